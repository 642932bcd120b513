// The part-family and package tables: readable names, family defaults, package outlines.

#include "parts/diode.hpp"
#include "parts/inductor.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <set>
#include <string>

namespace cp = coilsieve::parts;

namespace {

constexpr cp::InductorFamily all_families[] = {
    cp::InductorFamily::shielded_drum_ferrite, cp::InductorFamily::semi_shielded_drum,
    cp::InductorFamily::unshielded_drum,       cp::InductorFamily::metal_composite,
    cp::InductorFamily::powder_toroid,         cp::InductorFamily::ferrite_toroid,
    cp::InductorFamily::gapped_ferrite_core,
};

constexpr cp::DiodeTechnology all_technologies[] = {
    cp::DiodeTechnology::schottky,  cp::DiodeTechnology::sic_schottky,
    cp::DiodeTechnology::ultrafast, cp::DiodeTechnology::fast,
    cp::DiodeTechnology::standard,
};

} // namespace

TEST(InductorNames, FamilyNamesAreTheCanonicalOnes) {
    // The names of /work/notes/columns.md, in enum order.
    EXPECT_EQ(cp::to_string(cp::InductorFamily::shielded_drum_ferrite), "shielded-drum-ferrite");
    EXPECT_EQ(cp::to_string(cp::InductorFamily::semi_shielded_drum), "semi-shielded-drum");
    EXPECT_EQ(cp::to_string(cp::InductorFamily::unshielded_drum), "unshielded-drum");
    EXPECT_EQ(cp::to_string(cp::InductorFamily::metal_composite), "metal-composite");
    EXPECT_EQ(cp::to_string(cp::InductorFamily::powder_toroid), "powder-toroid");
    EXPECT_EQ(cp::to_string(cp::InductorFamily::ferrite_toroid), "ferrite-toroid");
    EXPECT_EQ(cp::to_string(cp::InductorFamily::gapped_ferrite_core), "gapped-ferrite-core");
    const auto names = cp::family_names();
    ASSERT_EQ(names.size(), std::size(all_families));
    for (std::size_t i = 0; i < names.size(); ++i) {
        EXPECT_EQ(names[i], cp::to_string(all_families[i]));
    }
}

TEST(InductorNames, RoundTrips) {
    for (auto f : all_families) {
        const auto back = cp::family_from_string(cp::to_string(f));
        ASSERT_TRUE(back.has_value()) << cp::to_string(f);
        EXPECT_EQ(*back, f);
    }
    for (auto s : {cp::SaturationShape::hard, cp::SaturationShape::soft}) {
        EXPECT_EQ(cp::shape_from_string(cp::to_string(s)), s);
    }
    for (auto m : {cp::Mounting::smd, cp::Mounting::tht}) {
        EXPECT_EQ(cp::mounting_from_string(cp::to_string(m)), m);
    }
    EXPECT_EQ(cp::to_string(cp::SaturationShape::soft), "soft");
    EXPECT_EQ(cp::to_string(cp::Mounting::tht), "tht");
}

TEST(InductorNames, LenientSpellingAndUnknowns) {
    EXPECT_EQ(cp::family_from_string("Metal_Composite"), cp::InductorFamily::metal_composite);
    EXPECT_EQ(cp::family_from_string("POWDER-TOROID"), cp::InductorFamily::powder_toroid);
    EXPECT_EQ(cp::mounting_from_string("SMD"), cp::Mounting::smd);
    EXPECT_FALSE(cp::family_from_string("").has_value());
    EXPECT_FALSE(cp::family_from_string("drum").has_value());
    EXPECT_FALSE(cp::family_from_string("metal-composite-x").has_value());
    EXPECT_FALSE(cp::shape_from_string("medium").has_value());
    EXPECT_FALSE(cp::mounting_from_string("through-hole").has_value());
}

TEST(FamilyDefaults, EveryFamilyIsPhysicallySane) {
    for (auto f : all_families) {
        const auto& d = cp::family_defaults(f);
        SCOPED_TRACE(std::string(cp::to_string(f)));
        EXPECT_GT(d.core.k, 0.0);
        // Steinmetz exponents of power magnetics: alpha 1..2, beta 2..3 (domain notes, from
        // memory).
        EXPECT_GE(d.core.alpha, 1.0);
        EXPECT_LE(d.core.alpha, 2.0);
        EXPECT_GE(d.core.beta, 2.0);
        EXPECT_LE(d.core.beta, 3.0);
        // Flux at isat below the saturation of any core material used (iron alloys < 1.6 T).
        EXPECT_GT(d.b_sat, 0.1);
        EXPECT_LT(d.b_sat, 1.6);
        EXPECT_GT(d.core_volume_fraction, 0.0);
        EXPECT_LT(d.core_volume_fraction, 1.0);
        EXPECT_GE(d.ac_factor, 1.0); // R_ac can only exceed DCR
        EXPECT_GT(d.energy_density_min, 0.0);
        EXPECT_LT(d.energy_density_min, d.energy_density_max);
    }
}

TEST(FamilyDefaults, FerriteLossAtTheReferencePointIsInTheDomainNotesRange) {
    // MnZn power ferrite: roughly 100-300 mW/cm^3 at 100 kHz, 100 mT (domain notes, from memory).
    for (auto f :
         {cp::InductorFamily::shielded_drum_ferrite, cp::InductorFamily::semi_shielded_drum,
          cp::InductorFamily::ferrite_toroid, cp::InductorFamily::gapped_ferrite_core}) {
        const auto& s = cp::family_defaults(f).core;
        const double pv = s.k * std::pow(1e5, s.alpha) * std::pow(0.1, s.beta); // W/m^3
        EXPECT_GE(pv, 100e3) << cp::to_string(f);
        EXPECT_LE(pv, 300e3) << cp::to_string(f);
    }
}

TEST(FamilyDefaults, ShapesAndEnergyOrdering) {
    // Powder and metal composite saturate softly, ferrite hard (domain notes: roll-off with bias).
    EXPECT_EQ(cp::family_defaults(cp::InductorFamily::metal_composite).shape,
              cp::SaturationShape::soft);
    EXPECT_EQ(cp::family_defaults(cp::InductorFamily::powder_toroid).shape,
              cp::SaturationShape::soft);
    EXPECT_EQ(cp::family_defaults(cp::InductorFamily::shielded_drum_ferrite).shape,
              cp::SaturationShape::hard);
    EXPECT_EQ(cp::family_defaults(cp::InductorFamily::gapped_ferrite_core).shape,
              cp::SaturationShape::hard);
    // A metal-composite body stores more energy per volume than any ferrite one; an ungapped
    // ferrite toroid the least (high permeability; common practice).
    const auto& mc = cp::family_defaults(cp::InductorFamily::metal_composite);
    const auto& ft = cp::family_defaults(cp::InductorFamily::ferrite_toroid);
    for (auto f : all_families) {
        if (f == cp::InductorFamily::metal_composite || f == cp::InductorFamily::ferrite_toroid) {
            continue;
        }
        EXPECT_GT(mc.energy_density_max, cp::family_defaults(f).energy_density_max);
        EXPECT_LT(ft.energy_density_max, cp::family_defaults(f).energy_density_min);
    }
}

TEST(InductorRecord, IsAssumedLooksUpTheList) {
    cp::Inductor part;
    EXPECT_FALSE(part.is_assumed("tolerance"));
    part.assumed = {"tolerance", "core_k"};
    EXPECT_TRUE(part.is_assumed("tolerance"));
    EXPECT_TRUE(part.is_assumed("core_k"));
    EXPECT_FALSE(part.is_assumed("core"));
    EXPECT_FALSE(part.is_assumed(""));
}

TEST(DiodeNames, RoundTripsAndCanonicalNames) {
    EXPECT_EQ(cp::to_string(cp::DiodeTechnology::schottky), "schottky");
    EXPECT_EQ(cp::to_string(cp::DiodeTechnology::sic_schottky), "sic-schottky");
    EXPECT_EQ(cp::to_string(cp::DiodeTechnology::ultrafast), "ultrafast");
    EXPECT_EQ(cp::to_string(cp::DiodeTechnology::fast), "fast");
    EXPECT_EQ(cp::to_string(cp::DiodeTechnology::standard), "standard");
    const auto names = cp::technology_names();
    ASSERT_EQ(names.size(), std::size(all_technologies));
    for (std::size_t i = 0; i < names.size(); ++i) {
        EXPECT_EQ(names[i], cp::to_string(all_technologies[i]));
        EXPECT_EQ(cp::technology_from_string(names[i]), all_technologies[i]);
    }
    EXPECT_EQ(cp::technology_from_string("SiC_Schottky"), cp::DiodeTechnology::sic_schottky);
    EXPECT_FALSE(cp::technology_from_string("").has_value());
    EXPECT_FALSE(cp::technology_from_string("zener").has_value());
    EXPECT_FALSE(cp::technology_from_string("schottky ").has_value());
}

TEST(DiodeRecord, IsAssumedLooksUpTheList) {
    cp::Diode part;
    part.assumed = {"rth_ja"};
    EXPECT_TRUE(part.is_assumed("rth_ja"));
    EXPECT_FALSE(part.is_assumed("tj_max"));
}

TEST(PackageOutline, JedecDo214OutlinesMatchTheDomainNotes) {
    // JEDEC DO-214AC (SMA), DO-214AA (SMB), DO-214AB (SMC): body length x width x height, mm,
    // nominal, as listed in the domain notes ("Standards for data").
    struct Case {
        const char* name;
        const char* jedec;
        double l, w, h;
    };
    const Case cases[] = {{"SMA", "DO-214AC", 4.3, 2.6, 2.4},
                          {"SMB", "DO-214AA", 4.3, 3.6, 2.3},
                          {"SMC", "DO-214AB", 6.85, 5.9, 2.3}};
    for (const auto& c : cases) {
        for (const char* n : {c.name, c.jedec}) {
            const auto o = cp::package_outline(n);
            ASSERT_TRUE(o.has_value()) << n;
            EXPECT_EQ(o->name, c.name) << n;
            EXPECT_NEAR(o->length, c.l * 1e-3, 1e-9) << n;
            EXPECT_NEAR(o->width, c.w * 1e-3, 1e-9) << n;
            EXPECT_NEAR(o->height, c.h * 1e-3, 1e-9) << n;
            EXPECT_TRUE(o->smd) << n;
        }
    }
}

TEST(PackageOutline, OtherDomainNotesOutlines) {
    // TO-252 (DPAK) about 6.1 x 6.5 x 2.4 mm; SOD-123 about 2.65 x 1.55 x 1.35 mm (domain notes,
    // industry-typical).
    const auto dpak = cp::package_outline("dpak");
    ASSERT_TRUE(dpak.has_value());
    EXPECT_EQ(dpak->name, "TO-252");
    EXPECT_NEAR(dpak->length, 6.1e-3, 1e-9);
    EXPECT_NEAR(dpak->width, 6.5e-3, 1e-9);
    EXPECT_NEAR(dpak->height, 2.4e-3, 1e-9);
    const auto sod = cp::package_outline("SOD-123");
    ASSERT_TRUE(sod.has_value());
    EXPECT_NEAR(sod->length, 2.65e-3, 1e-9);
    EXPECT_NEAR(sod->width, 1.55e-3, 1e-9);
    EXPECT_NEAR(sod->height, 1.35e-3, 1e-9);
}

TEST(PackageOutline, NamesAreCaseAndPunctuationInsensitive) {
    for (const char* n : {"sma", "Sma", "do-214ac", "DO214AC", "do 214ac"}) {
        const auto o = cp::package_outline(n);
        ASSERT_TRUE(o.has_value()) << n;
        EXPECT_EQ(o->name, "SMA") << n;
    }
    EXPECT_EQ(cp::package_outline("sod123f")->name, "SOD-123F");
    EXPECT_EQ(cp::package_outline("SOD-123")->name, "SOD-123"); // not confused with SOD-123F
    EXPECT_EQ(cp::package_outline("DO-201AD")->name, "DO-201");
    EXPECT_EQ(cp::package_outline("DO-204AL")->name, "DO-41");
    EXPECT_EQ(cp::package_outline("D2PAK")->name, "TO-263");
}

TEST(PackageOutline, UnknownNamesGiveNullopt) {
    for (const char* n : {"", "-", "SMX", "TO-999", "DO-214", "SMA2", "0805"}) {
        EXPECT_FALSE(cp::package_outline(n).has_value()) << '"' << n << '"';
    }
}

TEST(PackageOutline, TableIsConsistent) {
    const char* names[] = {"SOD-323", "SOD-123", "SOD-123F", "SMA",    "SMB",   "SMC",   "TO-277",
                           "TO-252",  "TO-263",  "TO-220",   "TO-247", "DO-41", "DO-15", "DO-201"};
    std::set<std::string> seen;
    for (const char* n : names) {
        const auto o = cp::package_outline(n);
        ASSERT_TRUE(o.has_value()) << n;
        EXPECT_EQ(o->name, n); // canonical names round-trip
        EXPECT_TRUE(seen.insert(std::string(o->name)).second) << n;
        EXPECT_GT(o->length, 0.5e-3) << n;
        EXPECT_LT(o->length, 30e-3) << n;
        EXPECT_GT(o->width, 0.5e-3) << n;
        EXPECT_GT(o->height, 0.5e-3) << n;
        // Junction-to-ambient without a heat sink: tens to hundreds of K/W (common practice).
        EXPECT_GE(o->rth_ja, 20.0) << n;
        EXPECT_LE(o->rth_ja, 600.0) << n;
    }
    // Bigger SMD bodies dissipate better (common practice): SOD-123 > SMA > SMB > SMC.
    EXPECT_GT(cp::package_outline("SOD-123")->rth_ja, cp::package_outline("SMA")->rth_ja);
    EXPECT_GT(cp::package_outline("SMA")->rth_ja, cp::package_outline("SMB")->rth_ja);
    EXPECT_GT(cp::package_outline("SMB")->rth_ja, cp::package_outline("SMC")->rth_ja);
    EXPECT_FALSE(cp::package_outline("TO-220")->smd);
    EXPECT_FALSE(cp::package_outline("DO-41")->smd);
    EXPECT_TRUE(cp::package_outline("TO-252")->smd);
}
