// `parts list`, `parts show`, `parts sources`, `parts delete`.
#include "catalog/fields.hpp"
#include "cli/parts_commands.hpp"
#include "report/table.hpp"

#include <cmath>
#include <iomanip>
#include <nlohmann/json.hpp>
#include <sstream>

namespace coilsieve::cli {

using catalog::PartKind;
using units::Dimension;

catalog::Range parse_range(std::string_view text, Dimension d, std::string_view option) {
    const std::size_t dots = text.find("..");
    if (dots == std::string_view::npos) {
        throw UsageError(
            std::string(option) + ": \"" + std::string(text) +
            "\" is not a range; write MIN..MAX, e.g. 8u..15u (MIN.. or ..MAX also work)");
    }
    catalog::Range r;
    const std::string_view lo = text.substr(0, dots), hi = text.substr(dots + 2);
    if (!lo.empty()) r.min = parse_quantity(lo, d, option);
    if (!hi.empty()) r.max = parse_quantity(hi, d, option);
    if (r.min && r.max && *r.min > *r.max) {
        throw UsageError(std::string(option) + ": the range \"" + std::string(text) +
                         "\" is empty (MIN > MAX)");
    }
    return r;
}

double parse_quantity(std::string_view text, Dimension d, std::string_view option) {
    try {
        return units::parse(text, d);
    } catch (const std::exception& e) {
        throw UsageError(std::string(option) + ": " + e.what());
    }
}

namespace {

std::string plain_number(double v, int digits = 4) {
    std::ostringstream os;
    os << std::setprecision(digits) << v;
    return os.str();
}

// A stored value for people: engineering notation with the SI unit.
std::string format_value(const catalog::Field& f, const catalog::Value& v) {
    if (std::holds_alternative<std::monostate>(v)) return "";
    if (auto s = std::get_if<std::string>(&v)) return *s;
    const double x = std::get<double>(v);
    if (f.name == "b_sat") return plain_number(x * 1e3, 3).append(" mT");
    if (f.name == "spice_eg") return plain_number(x, 3).append(" eV");
    if (f.dimension == Dimension::dimensionless) return plain_number(x);
    return units::format(x, f.dimension);
}

// A stored value as a number in the field's display unit (for --csv).
std::string number_in_unit(const catalog::Field& f, const catalog::Value& v) {
    auto d = std::get_if<double>(&v);
    if (!d) {
        if (auto s = std::get_if<std::string>(&v)) return *s;
        return "";
    }
    if (f.type == catalog::FieldType::number && f.dimension == Dimension::temperature) {
        return plain_number(units::to_celsius(*d), 6);
    }
    double scale = 1.0;
    if (!f.display_unit.empty())
        scale = std::get<double>(catalog::parse_cell(f, "1", f.display_unit));
    return plain_number(*d / scale, 6);
}

std::string csv_header(const catalog::Field& f) {
    std::string h(f.name);
    if (f.type == catalog::FieldType::number && !f.display_unit.empty()) {
        h.append(" (").append(f.display_unit).append(")");
    }
    return h;
}

struct ListColumn {
    std::string header;
    std::string field;
    report::Align align;
};

const std::vector<ListColumn>& list_columns(PartKind kind) {
    static const std::vector<ListColumn> inductor{
        {"id", "id", report::Align::left},         {"source", "", report::Align::left},
        {"family", "family", report::Align::left}, {"L", "inductance", report::Align::right},
        {"DCR", "dcr_typ", report::Align::right},  {"Isat", "isat", report::Align::right},
        {"Irms", "irms", report::Align::right},    {"length", "length", report::Align::right},
        {"width", "width", report::Align::right},  {"height", "height", report::Align::right},
        {"price", "price", report::Align::right},
    };
    static const std::vector<ListColumn> diode{
        {"id", "id", report::Align::left},
        {"source", "", report::Align::left},
        {"technology", "technology", report::Align::left},
        {"VRRM", "vrrm", report::Align::right},
        {"IF(AV)", "if_avg", report::Align::right},
        {"Vf", "vf1", report::Align::right},
        {"at IF", "if1", report::Align::right},
        {"package", "package", report::Align::left},
        {"Rth(j-a)", "rth_ja", report::Align::right},
        {"height", "height", report::Align::right},
        {"price", "price", report::Align::right},
    };
    return kind == PartKind::inductor ? inductor : diode;
}

template <class Part>
int print_parts(const std::vector<Part>& ps, PartKind kind, const PartsListOptions& o,
                Context& ctx) {
    const auto table_fields = catalog::fields(kind);
    if (o.json) {
        nlohmann::ordered_json arr = nlohmann::ordered_json::array();
        for (const Part& p : ps) {
            const catalog::Record r = catalog::to_record(p);
            nlohmann::ordered_json obj;
            obj["source"] = p.source;
            for (std::size_t i = 0; i < table_fields.size(); ++i) {
                const auto& f = table_fields[i];
                if (auto d = std::get_if<double>(&r[i])) {
                    obj[std::string(f.name)] = f.type == catalog::FieldType::number &&
                                                       f.dimension == Dimension::temperature
                                                   ? units::to_celsius(*d)
                                                   : *d;
                } else if (auto s = std::get_if<std::string>(&r[i])) {
                    obj[std::string(f.name)] = *s;
                }
            }
            obj["assumed"] = p.assumed;
            arr.push_back(std::move(obj));
        }
        ctx.out() << arr.dump(2) << "\n";
        return exit_ok;
    }
    const auto& cols = list_columns(kind);
    std::vector<std::size_t> index;
    for (const auto& c : cols)
        index.push_back(c.field.empty() ? 0 : *catalog::field_index(kind, c.field));
    if (o.csv) {
        std::vector<std::string> header;
        for (std::size_t c = 0; c < cols.size(); ++c) {
            header.push_back(cols[c].field.empty() ? "source" : csv_header(table_fields[index[c]]));
        }
        ctx.out() << report::csv_line(header);
        for (const Part& p : ps) {
            const catalog::Record r = catalog::to_record(p);
            std::vector<std::string> cells;
            for (std::size_t c = 0; c < cols.size(); ++c) {
                cells.push_back(cols[c].field.empty()
                                    ? p.source
                                    : number_in_unit(table_fields[index[c]], r[index[c]]));
            }
            ctx.out() << report::csv_line(cells);
        }
        return exit_ok;
    }
    std::vector<report::Column> columns;
    for (const auto& c : cols) columns.push_back({c.header, c.align});
    report::Table table(std::move(columns));
    for (const Part& p : ps) {
        const catalog::Record r = catalog::to_record(p);
        std::vector<std::string> cells;
        for (std::size_t c = 0; c < cols.size(); ++c) {
            if (cols[c].field.empty()) {
                cells.push_back(p.source);
                continue;
            }
            std::string cell = format_value(table_fields[index[c]], r[index[c]]);
            if (cols[c].field == "price" && !cell.empty() && !p.currency.empty())
                cell += " " + p.currency;
            if (p.is_assumed(cols[c].field) && !cell.empty()) cell += "*";
            cells.push_back(std::move(cell));
        }
        table.add_row(std::move(cells));
    }
    ctx.out() << table.render();
    ctx.out() << ps.size() << (ps.size() == 1 ? " part" : " parts")
              << " (* = assumed value, see `coilsieve parts show ID`)\n";
    return exit_ok;
}

template <class Part> void show_part(const Part& p, PartKind kind, Context& ctx) {
    const auto table_fields = catalog::fields(kind);
    const catalog::Record r = catalog::to_record(p);
    ctx.out() << catalog::to_string(kind) << " " << p.source << ":" << p.id << "\n";
    ctx.out() << "  " << std::left << std::setw(16) << "source" << p.source << "\n";
    for (std::size_t i = 0; i < table_fields.size(); ++i) {
        const auto& f = table_fields[i];
        std::string value = format_value(f, r[i]);
        if (value.empty()) value.push_back('-');
        ctx.out() << "  " << std::left << std::setw(16) << std::string(f.name) << value
                  << (p.is_assumed(f.name) ? "  (assumed)" : "") << "\n";
    }
}

} // namespace

int run_parts_list(const PartsListOptions& o, Context& ctx) {
    const PartKind kind = parse_kind(o.kind, "KIND");
    auto reject = [&](const std::string& value, const char* option) {
        if (!value.empty()) {
            throw UsageError(std::string(option) + " applies to " +
                             (kind == PartKind::inductor ? "diodes" : "inductors") + ", not " +
                             std::string(catalog::to_string(kind)) + "s");
        }
    };
    if (kind == PartKind::inductor) {
        reject(o.vrrm_min, "--vrrm-min");
        reject(o.if_min, "--if-min");
        reject(o.technology, "--technology");
        reject(o.package, "--package");
        catalog::InductorQuery q;
        if (!o.inductance.empty())
            q.inductance = parse_range(o.inductance, Dimension::inductance, "--inductance");
        if (!o.isat_min.empty())
            q.isat_min = parse_quantity(o.isat_min, Dimension::current, "--isat-min");
        if (!o.height_max.empty())
            q.height_max = parse_quantity(o.height_max, Dimension::length, "--height-max");
        if (!o.family.empty()) q.family = o.family;
        if (!o.source.empty()) q.source = o.source;
        if (!o.sort.empty()) q.sort = o.sort;
        q.descending = o.desc;
        q.limit = o.limit;
        return print_parts(ctx.store().query(q), kind, o, ctx);
    }
    reject(o.inductance, "--inductance");
    reject(o.isat_min, "--isat-min");
    reject(o.family, "--family");
    catalog::DiodeQuery q;
    if (!o.vrrm_min.empty())
        q.vrrm_min = parse_quantity(o.vrrm_min, Dimension::voltage, "--vrrm-min");
    if (!o.if_min.empty()) q.if_avg_min = parse_quantity(o.if_min, Dimension::current, "--if-min");
    if (!o.height_max.empty())
        q.height_max = parse_quantity(o.height_max, Dimension::length, "--height-max");
    if (!o.technology.empty()) q.technology = o.technology;
    if (!o.package.empty()) q.package = o.package;
    if (!o.source.empty()) q.source = o.source;
    if (!o.sort.empty()) q.sort = o.sort;
    q.descending = o.desc;
    q.limit = o.limit;
    return print_parts(ctx.store().query(q), kind, o, ctx);
}

int run_parts_show(const PartsShowOptions& o, Context& ctx) {
    auto& store = ctx.store();
    const auto inductors = store.find_inductors(o.id);
    const auto diodes = store.find_diodes(o.id);
    if (inductors.empty() && diodes.empty()) {
        throw catalog::CatalogError("no part \"" + o.id +
                                    "\" in the catalog; see `coilsieve parts list inductors` or "
                                    "`... list diodes`");
    }
    bool first = true;
    for (const auto& p : inductors) {
        if (!first) ctx.out() << "\n";
        show_part(p, PartKind::inductor, ctx);
        first = false;
    }
    for (const auto& p : diodes) {
        if (!first) ctx.out() << "\n";
        show_part(p, PartKind::diode, ctx);
        first = false;
    }
    return exit_ok;
}

int run_parts_sources(Context& ctx) {
    report::Table table({{"source", report::Align::left},
                         {"kind", report::Align::left},
                         {"parts", report::Align::left},
                         {"count", report::Align::right},
                         {"created (UTC)", report::Align::left},
                         {"file", report::Align::left},
                         {"sha256", report::Align::left}});
    const auto sources = ctx.store().sources();
    for (const auto& s : sources) {
        table.add_row({s.name, s.kind, std::string(catalog::to_string(s.part_kind)) + "s",
                       std::to_string(s.parts), s.created, s.file_name, s.sha256.substr(0, 12)});
    }
    ctx.out() << table.render();
    ctx.out() << sources.size() << (sources.size() == 1 ? " source" : " sources") << " in "
              << ctx.store().path().string() << "\n";
    return exit_ok;
}

int run_parts_delete(const PartsDeleteOptions& o, Context& ctx) {
    std::optional<PartKind> kind;
    if (!o.kind.empty()) kind = parse_kind(o.kind, "--kind");
    const int n = ctx.store().delete_source(o.source, kind);
    ctx.out() << "deleted source \"" << o.source << "\" (" << n << (n == 1 ? " part" : " parts")
              << ")\n";
    return exit_ok;
}

} // namespace coilsieve::cli
