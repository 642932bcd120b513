// Design files: the examples load, malformed fields are named, impossible designs are refused,
// and the effective design round-trips through JSON exactly.

#include "design/design_json.hpp"

#include <filesystem>
#include <fstream>
#include <functional>
#include <gtest/gtest.h>
#include <string>

using namespace coilsieve::design;
using nlohmann::json;

namespace {

const std::filesystem::path examples =
    std::filesystem::path(COILSIEVE_SOURCE_DIR) / "data/examples";

json lamp_json() {
    return json::parse(R"({
      "name": "reading lamp",
      "supply": {"min": "20V", "nom": "24V", "max": "28V"},
      "load": {"type": "led", "count": 4, "vf": "3.05V", "rd": "0.45ohm", "current": "700mA"},
      "switch": {"on_resistance": "85mohm", "rise_time": "12ns", "fall_time": "9ns",
                 "gate_charge": "6nC", "drive_voltage": "10V", "output_capacitance": "60pF"},
      "sense_resistor": "0.2ohm",
      "control": {"mode": "hysteretic", "band": "25%", "delay": "120ns",
                  "band_range": ["5%", "60%"]},
      "ambient": {"max": "55C"},
      "limits": {"load_ripple": "30%", "f_sw_min": "20kHz", "f_sw_max": "1MHz",
                 "isat_derating": 0.8, "vrrm_derating": 0.8, "tj_max": "125C",
                 "t_inductor_max": "110C", "height_max": "5mm"},
      "weights": {"loss": 1, "size": 1, "ripple": 0.5, "margin": 0.5, "cost": 0}
    })");
}

json charger_json() {
    return json::parse(R"({
      "supply": {"min": "11V", "nom": "12V", "max": "14V"},
      "load": {"type": "battery", "chemistry": "li-ion", "cells": 2, "capacity": "2.5Ah",
               "charge_current": "2A", "internal_resistance": "120mohm"},
      "control": {"mode": "pwm", "frequency": "250kHz", "frequency_range": ["50kHz", "1MHz"]},
      "ambient": {"max": "45C", "min": "0C"}
    })");
}

// The message of the DesignError that reading `j` throws, or "" when it reads fine.
std::string error_of(const json& j) {
    try {
        (void)read_design(j, "test.json");
    } catch (const DesignError& e) {
        return e.what();
    }
    return "";
}

void expect_error(const json& j, const std::string& field, const std::string& also = "") {
    const std::string msg = error_of(j);
    ASSERT_FALSE(msg.empty()) << "expected an error naming " << field;
    EXPECT_NE(msg.find("test.json"), std::string::npos) << msg;
    EXPECT_NE(msg.find(field), std::string::npos) << msg;
    if (!also.empty()) {
        EXPECT_NE(msg.find(also), std::string::npos) << msg;
    }
}

void expect_same(const Design& a, const Design& b) {
    EXPECT_EQ(a.name, b.name);
    EXPECT_EQ(a.supply.min, b.supply.min);
    EXPECT_EQ(a.supply.nom, b.supply.nom);
    EXPECT_EQ(a.supply.max, b.supply.max);
    ASSERT_EQ(a.load.index(), b.load.index());
    if (auto* la = std::get_if<coilsieve::loads::LedString>(&a.load)) {
        const auto& lb = std::get<coilsieve::loads::LedString>(b.load);
        EXPECT_EQ(la->count, lb.count);
        EXPECT_EQ(la->vf, lb.vf);
        EXPECT_EQ(la->rd, lb.rd);
        EXPECT_EQ(la->current, lb.current);
        EXPECT_EQ(la->vf_tempco, lb.vf_tempco);
    } else if (auto* ba = std::get_if<coilsieve::loads::Battery>(&a.load)) {
        const auto& bb = std::get<coilsieve::loads::Battery>(b.load);
        EXPECT_EQ(ba->chemistry, bb.chemistry);
        EXPECT_EQ(ba->cells, bb.cells);
        EXPECT_EQ(ba->capacity, bb.capacity);
        EXPECT_EQ(ba->charge_current, bb.charge_current);
        EXPECT_EQ(ba->termination_current, bb.termination_current);
        EXPECT_EQ(ba->internal_resistance, bb.internal_resistance);
        EXPECT_EQ(ba->precharge_current, bb.precharge_current);
    } else {
        const auto& sa = std::get<coilsieve::loads::Sink>(a.load);
        const auto& sb = std::get<coilsieve::loads::Sink>(b.load);
        EXPECT_EQ(sa.voltage, sb.voltage);
        EXPECT_EQ(sa.resistance, sb.resistance);
        EXPECT_EQ(sa.current, sb.current);
    }
    EXPECT_EQ(a.sw.on_resistance, b.sw.on_resistance);
    EXPECT_EQ(a.sw.on_resistance_tempco, b.sw.on_resistance_tempco);
    EXPECT_EQ(a.sw.rise_time, b.sw.rise_time);
    EXPECT_EQ(a.sw.fall_time, b.sw.fall_time);
    EXPECT_EQ(a.sw.gate_charge, b.sw.gate_charge);
    EXPECT_EQ(a.sw.drive_voltage, b.sw.drive_voltage);
    EXPECT_EQ(a.sw.output_capacitance, b.sw.output_capacitance);
    EXPECT_EQ(a.sw.defaulted, b.sw.defaulted);
    EXPECT_EQ(a.sense_resistor, b.sense_resistor);
    EXPECT_EQ(a.pareto, b.pareto);
    ASSERT_EQ(a.output_capacitor.has_value(), b.output_capacitor.has_value());
    if (a.output_capacitor) {
        EXPECT_EQ(a.output_capacitor->capacitance, b.output_capacitor->capacitance);
        EXPECT_EQ(a.output_capacitor->esr, b.output_capacitor->esr);
    }
    EXPECT_EQ(a.control.mode, b.control.mode);
    EXPECT_EQ(a.control.band, b.control.band);
    EXPECT_EQ(a.control.band_is_fraction, b.control.band_is_fraction);
    EXPECT_EQ(a.control.delay, b.control.delay);
    EXPECT_EQ(a.control.band_min, b.control.band_min);
    EXPECT_EQ(a.control.band_max, b.control.band_max);
    EXPECT_EQ(a.control.frequency, b.control.frequency);
    EXPECT_EQ(a.control.frequency_min, b.control.frequency_min);
    EXPECT_EQ(a.control.frequency_max, b.control.frequency_max);
    EXPECT_EQ(a.ambient.max, b.ambient.max);
    EXPECT_EQ(a.ambient.min, b.ambient.min);
    EXPECT_EQ(a.limits.load_ripple, b.limits.load_ripple);
    EXPECT_EQ(a.limits.f_sw_min, b.limits.f_sw_min);
    EXPECT_EQ(a.limits.f_sw_max, b.limits.f_sw_max);
    EXPECT_EQ(a.limits.isat_derating, b.limits.isat_derating);
    EXPECT_EQ(a.limits.vrrm_derating, b.limits.vrrm_derating);
    EXPECT_EQ(a.limits.diode_current_derating, b.limits.diode_current_derating);
    EXPECT_EQ(a.limits.tj_max, b.limits.tj_max);
    EXPECT_EQ(a.limits.t_inductor_max, b.limits.t_inductor_max);
    EXPECT_EQ(a.limits.t_on_min, b.limits.t_on_min);
    EXPECT_EQ(a.limits.current_error, b.limits.current_error);
    EXPECT_EQ(a.limits.t_off_min, b.limits.t_off_min);
    EXPECT_EQ(a.limits.height_max, b.limits.height_max);
    EXPECT_EQ(a.limits.footprint_max, b.limits.footprint_max);
    EXPECT_EQ(a.limits.efficiency_min, b.limits.efficiency_min);
    EXPECT_EQ(a.weights.loss, b.weights.loss);
    EXPECT_EQ(a.weights.size, b.weights.size);
    EXPECT_EQ(a.weights.ripple, b.weights.ripple);
    EXPECT_EQ(a.weights.margin, b.weights.margin);
    EXPECT_EQ(a.weights.cost, b.weights.cost);
}

} // namespace

TEST(DesignFile, ReadingLampExampleLoads) {
    const Design d = load_design_file(examples / "reading-lamp.json");
    EXPECT_EQ(d.name, "reading lamp");
    EXPECT_DOUBLE_EQ(d.supply.min, 20.0);
    EXPECT_DOUBLE_EQ(d.supply.max, 28.0);
    const auto& led = std::get<coilsieve::loads::LedString>(d.load);
    EXPECT_EQ(led.count, 4);
    EXPECT_DOUBLE_EQ(led.current, 0.7);
    EXPECT_DOUBLE_EQ(led.vf_tempco, -2e-3); // default, common practice
    EXPECT_EQ(d.control.mode, ControlMode::hysteretic);
    EXPECT_TRUE(d.control.band_is_fraction);
    EXPECT_DOUBLE_EQ(d.control.band, 0.25);
    EXPECT_NEAR(band_amps(d.control, 0.7), 0.175, 1e-15);
    EXPECT_DOUBLE_EQ(d.control.delay, 120e-9);
    EXPECT_NEAR(d.ambient.max, 328.15, 1e-9);
    EXPECT_NEAR(*d.limits.tj_max, 398.15, 1e-9);
    EXPECT_DOUBLE_EQ(*d.limits.height_max, 5e-3);
    // The issue's example gives every switch field except the on-resistance tempco.
    EXPECT_EQ(d.sw.defaulted, std::vector<std::string>{"on_resistance_tempco"});
    EXPECT_DOUBLE_EQ(d.sw.on_resistance, 0.085);
    EXPECT_DOUBLE_EQ(d.sense_resistor, 0.2);
}

TEST(DesignFile, TwoCellChargerExampleLoads) {
    const Design d = load_design_file(examples / "two-cell-charger.json");
    const auto& b = std::get<coilsieve::loads::Battery>(d.load);
    EXPECT_EQ(b.cells, 2);
    EXPECT_DOUBLE_EQ(b.capacity, 2.5 * 3600.0);
    EXPECT_DOUBLE_EQ(b.charge_current, 2.0);
    EXPECT_EQ(d.control.mode, ControlMode::pwm);
    EXPECT_DOUBLE_EQ(d.control.frequency, 250e3);
    EXPECT_DOUBLE_EQ(d.control.frequency_min, 50e3);
    EXPECT_DOUBLE_EQ(d.control.frequency_max, 1e6);
    ASSERT_TRUE(d.ambient.min.has_value());
    EXPECT_NEAR(*d.ambient.min, 273.15, 1e-9);
}

TEST(DesignFile, FloodlightExampleLoadsWithItsCapacitor) {
    const Design d = load_design_file(examples / "workshop-floodlight.json");
    const auto& led = std::get<coilsieve::loads::LedString>(d.load);
    EXPECT_EQ(led.count, 6);
    EXPECT_DOUBLE_EQ(led.current, 1.2);
    EXPECT_EQ(d.control.mode, ControlMode::hysteretic);
    EXPECT_NEAR(band_amps(d.control, 1.2), 0.48, 1e-12);
    ASSERT_TRUE(d.output_capacitor.has_value());
    EXPECT_DOUBLE_EQ(d.output_capacitor->capacitance, 2.2e-6);
    EXPECT_DOUBLE_EQ(d.output_capacitor->esr, 0.03);
    EXPECT_DOUBLE_EQ(*d.limits.f_sw_max, 600e3);
}

TEST(DesignFile, DefaultsAreRecorded) {
    const Design d = read_design(charger_json(), "charger.json");
    EXPECT_EQ(d.name, "charger"); // from the file name
    EXPECT_EQ(d.sw.defaulted.size(), 7u);
    EXPECT_EQ(switch_default_notes(d.sw).size(), 7u);
    const auto& b = std::get<coilsieve::loads::Battery>(d.load);
    // Termination C/20 (IEC 62133-2 / IEC 61960, from memory), pre-charge 10 % of CC.
    EXPECT_NEAR(b.termination_current, 0.125, 1e-12);
    EXPECT_NEAR(b.precharge_current, 0.2, 1e-12);
    EXPECT_DOUBLE_EQ(d.limits.f_sw_min, 20e3);
    // ±5 % on the current: common practice for an LED driver's accuracy. Written out, so a saved
    // study reruns with the limit it ran with even if the default changes.
    EXPECT_DOUBLE_EQ(d.limits.current_error, 0.05);
    EXPECT_DOUBLE_EQ(to_json(d)["limits"]["current_error"].get<double>(), 0.05);

    json j = lamp_json();
    j["switch"].erase("rise_time");
    const Design partial = read_design(j, "x.json");
    EXPECT_EQ(partial.sw.defaulted,
              (std::vector<std::string>{"on_resistance_tempco", "rise_time"}));
    EXPECT_DOUBLE_EQ(partial.sw.rise_time, Switch{}.rise_time);
}

TEST(DesignFile, DefaultBandRangeHoldsTheBand) {
    json j = lamp_json();
    j["control"] = {{"mode", "hysteretic"}, {"band", "0.5A"}};
    const Design d = read_design(j, "x.json");
    EXPECT_FALSE(d.control.band_is_fraction);
    EXPECT_DOUBLE_EQ(d.control.band, 0.5);
    EXPECT_NEAR(d.control.band_min, 0.05 * 0.7, 1e-15);
    EXPECT_DOUBLE_EQ(d.control.band_max, 0.5); // widened from 60 % of 0.7 A = 0.42 A
    EXPECT_DOUBLE_EQ(band_amps(d.control, 0.7), 0.5);
}

TEST(DesignFile, RoundTripIsExact) {
    json amps = lamp_json();
    amps["control"]["band"] = "0.17A";
    amps["control"]["band_range"] = {"0.05A", "0.4A"};
    amps["ambient"] = {{"max", "55.3C"}, {"min", "-20C"}};
    amps["switch"].erase("gate_charge");
    amps["output_capacitor"] = {{"capacitance", "4.7uF"}, {"esr", "15mohm"}};
    amps["limits"]["footprint_max"] = "60mm2";
    amps["limits"]["efficiency_min"] = "87.5%";
    amps["limits"]["t_on_min"] = "150ns";
    amps["limits"]["current_error"] = "3%";
    amps["limits"]["t_off_min"] = "0.2us";
    EXPECT_EQ(read_design(amps, "rt.json").limits.t_off_min, 200e-9);
    amps["pareto"] = {"loss", "ripple", "margin"};
    EXPECT_EQ(read_design(amps, "rt.json").pareto,
              (std::vector<Objective>{Objective::loss, Objective::ripple, Objective::margin}));
    for (const json& j : {lamp_json(), charger_json(), amps}) {
        const Design d = read_design(j, "rt.json");
        const Design again = read_design(to_json(d), "rt.json");
        expect_same(d, again);
        // Through text as well (what a study stores on disk).
        const Design from_text = read_design(json::parse(to_json(d).dump()), "rt.json");
        expect_same(d, from_text);
        // ADL hooks.
        const json via_adl = d;
        expect_same(d, via_adl.get<Design>());
    }
}

TEST(DesignFile, MalformedFieldsAreNamed) {
    using Edit = std::function<void(json&)>;
    struct Case {
        Edit edit;
        std::string field;
        std::string also;
    };
    const std::vector<Case> cases{
        {[](json& j) { j["supply"].erase("min"); }, "supply.min", "missing"},
        {[](json& j) { j["supply"]["min"] = "20A"; }, "supply.min", "is a current"},
        {[](json& j) {
             j["pareto"] = {"loss", "colour"};
         },
         "pareto[1]", "known: loss, size"},
        {[](json& j) {
             j["pareto"] = {"loss", "loss"};
         },
         "pareto[1]", "listed twice"},
        {[](json& j) { j["pareto"] = {"loss"}; }, "pareto", "at least two"},
        {[](json& j) { j["pareto"] = "loss"; }, "pareto", "list of objectives"},
        {[](json& j) { j["supply"]["min"] = "20A"; }, "supply.min", "expected a voltage"},
        {[](json& j) { j["supply"]["min"] = "twenty"; }, "supply.min", ""},
        {[](json& j) { j["supply"]["min"] = true; }, "supply.min", "expected a voltage"},
        {[](json& j) { j["supply"]["mni"] = "20V"; }, "supply.mni", "did you mean \"min\""},
        {[](json& j) { j["limit"] = json::object(); }, "limit", "limits"},
        {[](json& j) { j["supply"]["nom"] = "30V"; }, "supply", "min <= nom <= max"},
        {[](json& j) { j["load"]["current"] = "-1A"; }, "load.current", "positive"},
        {[](json& j) { j["load"]["count"] = 0; }, "load.count", "whole number"},
        {[](json& j) { j["load"]["count"] = 2.5; }, "load.count", "whole number"},
        {[](json& j) { j["load"]["type"] = "lamp"; }, "load.type", "led, battery, sink"},
        {[](json& j) { j["load"]["vf_tempco"] = "2mV"; }, "load.vf_tempco", ""},
        {[](json& j) { j["load"].erase("vf"); }, "load.vf", "missing"},
        {[](json& j) { j.erase("load"); }, "load", "missing"},
        {[](json& j) { j["switch"]["rise_time"] = "12nF"; }, "switch.rise_time", "capacitance"},
        {[](json& j) { j["switch"]["on_resistance"] = "-1ohm"; }, "switch.on_resistance",
         "negative"},
        {[](json& j) { j["sense_resistor"] = "0.2V"; }, "sense_resistor", "voltage"},
        {[](json& j) {
             j["output_capacitor"] = {{"esr", "1mohm"}};
         },
         "output_capacitor.capacitance", "missing"},
        {[](json& j) { j["control"]["mode"] = "pfm"; }, "control.mode", "hysteretic, pwm"},
        {[](json& j) { j["control"]["band"] = "3V"; }, "control.band", "25%"},
        {[](json& j) {
             j["control"]["band_range"] = {"60%", "5%"};
         },
         "control.band_range", ""},
        {[](json& j) {
             j["control"]["band_range"] = {"5%", "0.4A"};
         },
         "control.band_range", ""},
        {[](json& j) { j["control"]["band"] = "70%"; }, "control.band", "band_range"},
        {[](json& j) { j["control"]["frequency"] = "250kHz"; }, "control.frequency", "known keys"},
        {[](json& j) { j["control"]["delay"] = "120nV"; }, "control.delay", "expected a time"},
        {[](json& j) { j["ambient"]["max"] = "hot"; }, "ambient.max", ""},
        {[](json& j) { j["ambient"]["min"] = "80C"; }, "ambient", "min must not be above max"},
        // Beyond the widest common temperature grade (and, at -250 °C, below where copper's
        // linear tempco would make the winding's resistance negative: IEC 60028, -234.5 °C).
        {[](json& j) { j["ambient"]["max"] = "-250C"; }, "ambient.max", "-55 °C to 150 °C"},
        {[](json& j) { j["ambient"]["max"] = "-274C"; }, "ambient.max", "below absolute zero"},
        {[](json& j) { j["ambient"]["max"] = "175C"; }, "ambient.max", "-55 °C to 150 °C"},
        {[](json& j) { j["ambient"]["min"] = "-60C"; }, "ambient.min", "-55 °C to 150 °C"},
        {[](json& j) { j["limits"]["f_sw_min"] = "2MHz"; }, "limits.f_sw_min", "f_sw_max"},
        {[](json& j) { j["limits"]["t_on_min"] = "100nA"; }, "limits.t_on_min", "time"},
        {[](json& j) { j["limits"]["current_error"] = "5mA"; }, "limits.current_error", ""},
        {[](json& j) { j["limits"]["t_off_min"] = "-5ns"; }, "limits.t_off_min", ""},
        // 30 µs + 25 µs of pulses do not fit in the longest period 1/20 kHz = 50 µs.
        {[](json& j) {
             j["limits"]["t_on_min"] = "30us";
             j["limits"]["t_off_min"] = "25us";
         },
         "limits.t_on_min", "f_sw_min"},
        {[](json& j) { j["limits"]["isat_derating"] = 1.5; }, "limits.isat_derating", ""},
        {[](json& j) { j["limits"]["efficiency_min"] = "120%"; }, "limits.efficiency_min", ""},
        {[](json& j) { j["limits"]["tj_max"] = "50C"; }, "limits.tj_max", "ambient.max"},
        {[](json& j) { j["limits"]["height_max"] = "5mH"; }, "limits.height_max", "length"},
        {[](json& j) {
             j["weights"] = {{"loss", 0}, {"size", 0}};
         },
         "weights", "all weights"},
        {[](json& j) { j["weights"]["loss"] = -1; }, "weights.loss", "non-negative"},
        {[](json& j) { j["weights"]["loss"] = "1"; }, "weights.loss", "non-negative"},
        {[](json& j) { j["name"] = 5; }, "name", "string"},
    };
    for (const auto& c : cases) {
        json j = lamp_json();
        c.edit(j);
        SCOPED_TRACE(j.dump());
        expect_error(j, c.field, c.also);
    }
}

TEST(DesignFile, MalformedBatteryAndPwmFields) {
    struct Case {
        std::function<void(json&)> edit;
        std::string field;
        std::string also;
    };
    const std::vector<Case> cases{
        {[](json& j) { j["load"]["chemistry"] = "nimh"; }, "load.chemistry", "lifepo4"},
        {[](json& j) { j["load"]["termination_current"] = "3A"; }, "load.termination_current",
         "below charge_current"},
        {[](json& j) { j["load"]["capacity"] = "2.5A"; }, "load.capacity", "current"},
        {[](json& j) { j["load"]["cells"] = -2; }, "load.cells", ""},
        {[](json& j) { j["control"].erase("frequency"); }, "control.frequency", "missing"},
        {[](json& j) {
             j["control"]["frequency_range"] = {"1MHz", "50kHz"};
         },
         "control.frequency_range", "low < high"},
        {[](json& j) { j["control"]["frequency"] = "20kHz"; }, "control.frequency",
         "frequency_range"},
        {[](json& j) { j["control"]["band"] = "20%"; }, "control.band", "known keys"},
        {[](json& j) {
             j["limits"] = {{"f_sw_min", "1.5MHz"}, {"f_sw_max", "3MHz"}};
         },
         "control.frequency_range", "f_sw_min"},
    };
    for (const auto& c : cases) {
        json j = charger_json();
        c.edit(j);
        SCOPED_TRACE(j.dump());
        expect_error(j, c.field, c.also);
    }
}

TEST(DesignFile, ImpossibleDesignIsReported) {
    json j = lamp_json();
    j["supply"] = {{"min", "10V"}, {"nom", "12V"}, {"max", "14V"}};
    const std::string msg = error_of(j);
    // 4 × 3.05 V = 12.2 V at 700 mA (plus drops) cannot come from 10 V in a buck.
    EXPECT_NE(msg.find("LED string needs 12.2 V at 700 mA"), std::string::npos) << msg;
    EXPECT_NE(msg.find("supply.min is 10.0 V"), std::string::npos) << msg;
    EXPECT_NE(msg.find("a buck cannot step up"), std::string::npos) << msg;
}

TEST(DesignFile, ImpossibleOnlyAtTheColdCorner) {
    json j = lamp_json();
    // 4 LEDs of 3.0 V at 25 °C, −3 mV/K: 12.78 V at −40 °C, 11.28 V at 85 °C (Khanna ch. 14 law).
    j["load"] = {{"type", "led"},
                 {"count", 4},
                 {"vf", "3.0V"},
                 {"current", "350mA"},
                 {"vf_tempco", "-3mV/K"}};
    j["switch"]["on_resistance"] = 0.0;
    j["sense_resistor"] = 0.0;
    j["supply"] = {{"min", "12.5V"}, {"nom", "13V"}, {"max", "14V"}};
    j["ambient"] = {{"max", "85C"}, {"min", "-40C"}};
    j["limits"].erase("tj_max");
    j["limits"].erase("t_inductor_max");
    const std::string msg = error_of(j);
    EXPECT_NE(msg.find("12.8 V"), std::string::npos) << msg;
    EXPECT_NE(msg.find("-40"), std::string::npos) << msg;
    // The same design is fine when it never gets that cold.
    j["ambient"] = {{"max", "85C"}, {"min", "20C"}};
    EXPECT_EQ(error_of(j), "");
}

TEST(DesignFile, ChargerNeedsHeadroomAboveChargeVoltage) {
    json j = charger_json();
    j["supply"] = {{"min", "8.4V"}, {"nom", "9V"}, {"max", "12V"}};
    const std::string msg = error_of(j);
    EXPECT_NE(msg.find("battery needs 8.40 V"), std::string::npos) << msg;
    EXPECT_NE(msg.find("cc-end"), std::string::npos) << msg;
}

TEST(DesignFile, FileErrorsNameTheFile) {
    const auto dir = std::filesystem::path(::testing::TempDir());
    try {
        (void)load_design_file(dir / "no-such-design.json");
        FAIL();
    } catch (const DesignError& e) {
        EXPECT_NE(std::string(e.what()).find("no-such-design.json"), std::string::npos);
    }
    const auto bad = dir / "broken-design.json";
    {
        std::ofstream out(bad);
        out << "{\n  \"name\": \"x\",\n  \"supply\": {\"min\": 20,}\n}\n";
    }
    try {
        (void)load_design_file(bad);
        FAIL();
    } catch (const DesignError& e) {
        EXPECT_NE(std::string(e.what()).find("broken-design.json:3:"), std::string::npos)
            << e.what();
    }
}

TEST(DesignFile, AnEmptyWeightsObjectMeansTheDefaults) {
    json j = lamp_json();
    j["weights"] = json::object();
    const Design d = read_design(j, "lamp.json");
    const Weights defaults; // design.hpp
    EXPECT_EQ(d.weights.loss, defaults.loss);
    EXPECT_EQ(d.weights.size, defaults.size);
    EXPECT_EQ(d.weights.ripple, defaults.ripple);
    EXPECT_EQ(d.weights.margin, defaults.margin);
    EXPECT_EQ(d.weights.cost, defaults.cost);
    // A named weight still makes the others zero.
    j["weights"] = {{"size", 2}};
    const Design s = read_design(j, "lamp.json");
    EXPECT_EQ(s.weights.size, 2.0);
    EXPECT_EQ(s.weights.loss, 0.0);
}
