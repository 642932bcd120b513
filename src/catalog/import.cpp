#include "catalog/import.hpp"

#include "catalog/csv.hpp"
#include "catalog/fields.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <functional>
#include <future>
#include <nlohmann/json.hpp>
#include <sstream>
#include <unordered_map>

namespace coilsieve::catalog {

std::string ImportProblem::to_string() const {
    std::string s = file + ":" + std::to_string(line) + ": ";
    if (!column.empty()) s += "column \"" + column + "\": ";
    return s + reason;
}

namespace {

// One input cell: text (CSV, JSON string) or a JSON number (SI; temperatures in °C).
// Views into the parsed file, which outlives the row being read.
struct Cell {
    std::size_t field;
    std::string_view column; // header as written
    std::string_view unit;   // header unit
    std::string_view text;
    std::optional<double> number;
};

// A JSON number as text, the way a text field (and a message) shows it.
std::string json_number(double x) {
    std::ostringstream os;
    os << x;
    return os.str();
}

class Reader {
public:
    Reader(std::string_view file, PartKind kind, std::string_view source, ImportResult& result)
        : file_(file), kind_(kind), source_(source), result_(result), table_(fields(kind)) {}

    void problem(int line, std::string column, std::string reason) {
        keep({file_, line, std::move(column), std::move(reason)});
    }

    void fatal(int line, std::string column, std::string reason) {
        problem(line, std::move(column), std::move(reason));
        result_.fatal = true;
    }

    // Appends a later stretch of rows read by another Reader, as if this one had read them: the
    // problem cap applies to the whole file in line order.
    void absorb(ImportResult&& part, std::size_t part_left_out) {
        result_.rows += part.rows;
        for (ImportProblem& p : part.problems) keep(std::move(p));
        left_out_ += part_left_out;
        auto append = [](auto& to, auto& from) {
            to.insert(to.end(), std::make_move_iterator(from.begin()),
                      std::make_move_iterator(from.end()));
        };
        append(result_.inductors, part.inductors);
        append(result_.diodes, part.diodes);
        append(result_.part_lines, part.part_lines);
        append(result_.rejected_lines, part.rejected_lines);
    }
    std::size_t left_out() const { return left_out_; }
    // A reader of the same file for a stretch of its rows, writing into `part`.
    Reader for_part(ImportResult& part) const { return Reader(file_, kind_, source_, part); }

    void finish() {
        if (left_out_ > 0) {
            result_.problems.push_back(
                {file_, 0, "", std::to_string(left_out_) + " more problems not listed"});
        }
    }

    // Whether every required field has a column; reports the missing ones at `line`.
    bool check_required_columns(const std::vector<bool>& present, int line) {
        bool ok = true;
        for (std::size_t i = 0; i < table_.size(); ++i) {
            if (table_[i].required && !present[i]) {
                std::string names(table_[i].name);
                std::string_view a = table_[i].aliases;
                names += " (also accepted: " + std::string(a.substr(0, 40));
                std::replace(names.begin(), names.end(), '|', ',');
                names += a.size() > 40 ? "...)" : ")";
                fatal(line, std::string(table_[i].name),
                      "required column missing: " + names +
                          "; rename the header or give a --mapping file");
                ok = false;
            }
        }
        return ok;
    }

    // `first_line_of_id`: the earlier line with the same id, if any (see DuplicateIds).
    void row(int line, const std::vector<Cell>& cells, std::optional<int> first_line_of_id) {
        ++result_.rows;
        const std::size_t before = result_.problems.size() + left_out_;
        Record rec(table_.size());
        std::vector<bool> bad_cell(table_.size(), false); // reported already: not "missing"
        for (const Cell& c : cells) {
            const Field& f = table_[c.field];
            Value v;
            if (c.number) {
                double x = *c.number;
                if (f.dimension == units::Dimension::temperature && f.type == FieldType::number) {
                    x = units::celsius(x);
                }
                if (f.type == FieldType::text) {
                    v = json_number(*c.number);
                } else {
                    v = x;
                }
            } else {
                try {
                    v = parse_cell(f, c.text, c.unit);
                } catch (const std::exception& e) {
                    problem(line, std::string(c.column),
                            "value \"" + std::string(c.text) + "\": " + e.what());
                    bad_cell[c.field] = true;
                    continue;
                }
            }
            if (auto d = std::get_if<double>(&v)) {
                if (auto why = check_range(f, *d)) {
                    problem(line, std::string(c.column),
                            "value \"" + (c.number ? json_number(*c.number) : std::string(c.text)) +
                                "\": " + *why);
                    bad_cell[c.field] = true;
                    continue;
                }
            } else if (auto s = std::get_if<std::string>(&v)) {
                if (f.name == "family" || f.name == "technology" || f.name == "shape" ||
                    f.name == "mounting") {
                    auto canon = canonical_choice(f.name, *s);
                    if (!canon) {
                        std::string valid;
                        for (const auto& n : choice_names(f.name)) {
                            valid += (valid.empty() ? "" : ", ") + n;
                        }
                        problem(line, std::string(c.column),
                                "unknown " + std::string(f.name) + " \"" + *s +
                                    "\"; valid: " + valid);
                        bad_cell[c.field] = true;
                        continue;
                    }
                    *s = *canon;
                } else if (f.name == "package") {
                    if (auto canon = canonical_choice(f.name, *s)) *s = *canon;
                }
            }
            rec[c.field] = std::move(v);
        }
        for (std::size_t i = 0; i < table_.size(); ++i) {
            if (table_[i].required && !bad_cell[i] &&
                std::holds_alternative<std::monostate>(rec[i])) {
                problem(line, column_name(i, cells), "required value missing");
            }
        }
        if (first_line_of_id) {
            problem(line, column_name(0, cells),
                    "duplicate id \"" + std::get<std::string>(rec[0]) + "\" (also on line " +
                        std::to_string(*first_line_of_id) + ")");
        }
        if (result_.problems.size() + left_out_ == before) {
            std::vector<std::string> assumed;
            for (const RecordProblem& p : apply_defaults(kind_, rec, assumed)) {
                problem(line, column_name(*field_index(kind_, p.field), cells), p.reason);
            }
            if (result_.problems.size() + left_out_ == before) {
                if (kind_ == PartKind::inductor) {
                    result_.inductors.push_back(
                        inductor_from_record(rec, std::string(source_), std::move(assumed)));
                } else {
                    result_.diodes.push_back(
                        diode_from_record(rec, std::string(source_), std::move(assumed)));
                }
                result_.part_lines.push_back(line);
                return;
            }
        }
        result_.rejected_lines.push_back(line);
    }

    std::span<const Field> table() const { return table_; }

private:
    // Lists a problem, or counts it once the list holds max_problems.
    void keep(ImportProblem p) {
        if (result_.problems.size() < max_problems) result_.problems.push_back(std::move(p));
        else ++left_out_;
    }
    // The header as written for a field, or the canonical name if the file has no such column.
    std::string column_name(std::size_t field, const std::vector<Cell>& cells) const {
        for (const Cell& c : cells) {
            if (c.field == field) return std::string(c.column);
        }
        return std::string(table_[field].name);
    }

    std::string file_;
    PartKind kind_;
    std::string_view source_;
    ImportResult& result_;
    std::span<const Field> table_;
    std::size_t left_out_ = 0;
};

// Duplicate ids within one file, found in one pass over the rows in line order so that the rows
// themselves can then be read in any order. The key is the id as the row's record will hold it.
class DuplicateIds {
public:
    explicit DuplicateIds(std::size_t rows) { first_line_.reserve(rows); }
    // The earlier line with the row's id, or nullopt (and the id is remembered at `line`).
    std::optional<int> check(std::span<const Field> table, const std::vector<Cell>& cells,
                             int line) {
        const auto id =
            std::find_if(cells.begin(), cells.end(), [](const Cell& c) { return c.field == 0; });
        if (id == cells.end()) return std::nullopt;
        std::string key;
        if (id->number) {
            key = json_number(*id->number);
        } else {
            Value v = parse_cell(table[0], id->text, id->unit);               // text: never throws
            if (!std::holds_alternative<std::string>(v)) return std::nullopt; // empty: missing
            key = std::move(std::get<std::string>(v));
        }
        auto [it, inserted] = first_line_.emplace(std::move(key), line);
        if (inserted) return std::nullopt;
        return it->second;
    }

private:
    std::unordered_map<std::string, int> first_line_;
};

bool ends_with_ci(std::string_view s, std::string_view suffix) {
    if (s.size() < suffix.size()) return false;
    for (std::size_t i = 0; i < suffix.size(); ++i) {
        if (std::tolower(static_cast<unsigned char>(s[s.size() - suffix.size() + i])) !=
            std::tolower(static_cast<unsigned char>(suffix[i]))) {
            return false;
        }
    }
    return true;
}

// Below this many rows per thread, a thread costs more than it saves.
constexpr std::size_t rows_per_thread = 2000;

void read_csv(std::string_view text, Reader& reader, PartKind kind, const HeaderMapping& mapping,
              ImportResult& result, std::string_view file, unsigned threads) {
    CsvTable table;
    try {
        table = parse_csv(text, file, true);
    } catch (const CsvError& e) {
        // The message already starts with FILE:LINE; split it back for the problem record.
        std::string msg = e.what();
        const std::string prefix = std::string(file) + ":";
        int line = 1;
        if (msg.rfind(prefix, 0) == 0) {
            const std::size_t colon = msg.find(": ", prefix.size());
            line = std::atoi(msg.substr(prefix.size(), colon - prefix.size()).c_str());
            msg = msg.substr(colon + 2);
        }
        reader.fatal(line, "", msg);
        return;
    }
    const auto fields_table = reader.table();
    std::vector<std::optional<HeaderMatch>> matches;
    std::vector<bool> present(fields_table.size(), false);
    std::vector<int> first_column(fields_table.size(), -1);
    bool header_ok = true;
    for (std::size_t c = 0; c < table.header.size(); ++c) {
        const std::string& h = table.header[c];
        auto m = match_header(kind, h, mapping);
        if (m) {
            if (present[m->field]) {
                reader.fatal(table.header_line, h,
                             "two columns give " + std::string(fields_table[m->field].name) +
                                 " (the other is \"" + table.header[first_column[m->field]] +
                                 "\")");
                header_ok = false;
            } else if (auto why = check_header_unit(fields_table[m->field], m->unit)) {
                reader.fatal(table.header_line, h, *why);
                header_ok = false;
            }
            present[m->field] = true;
            first_column[m->field] = static_cast<int>(c);
        } else if (!h.empty()) {
            result.ignored_columns.push_back(h);
        }
        matches.push_back(std::move(m));
    }
    if (!reader.check_required_columns(present, table.header_line) || !header_ok) return;
    const std::size_t n = table.rows.size();
    auto cells_of = [&](const CsvRecord& rec, std::vector<Cell>& cells) {
        cells.clear();
        for (std::size_t c = 0; c < rec.fields.size(); ++c) {
            if (!matches[c]) continue;
            cells.push_back(
                {matches[c]->field, table.header[c], matches[c]->unit, rec.fields[c], {}});
        }
    };
    const auto well_formed = [&](const CsvRecord& rec) {
        return rec.fields.size() == table.header.size();
    };
    // Once duplicate ids are known, rows are independent: a long file is read in contiguous
    // stretches at once and joined in line order, which gives what one pass would.
    std::vector<std::optional<int>> duplicate_of(n);
    {
        DuplicateIds ids(n);
        std::vector<Cell> cells;
        for (std::size_t i = 0; i < n; ++i) {
            if (!well_formed(table.rows[i])) continue;
            cells_of(table.rows[i], cells);
            duplicate_of[i] = ids.check(fields_table, cells, table.rows[i].line);
        }
    }
    auto read_rows = [&](Reader& r, ImportResult& out, std::size_t begin, std::size_t end) {
        std::vector<Cell> cells;
        for (std::size_t i = begin; i < end; ++i) {
            const CsvRecord& rec = table.rows[i];
            if (!well_formed(rec)) {
                ++out.rows;
                r.problem(rec.line, "",
                          "row has " + std::to_string(rec.fields.size()) +
                              " fields but the header has " + std::to_string(table.header.size()) +
                              "; quote fields that contain commas");
                out.rejected_lines.push_back(rec.line);
                continue;
            }
            cells_of(rec, cells);
            r.row(rec.line, cells, duplicate_of[i]);
        }
    };
    const std::size_t stretches =
        std::clamp<std::size_t>(std::min<std::size_t>(threads, n / rows_per_thread), 1, 64);
    const std::size_t first_end = n / stretches;
    std::vector<ImportResult> later(stretches - 1);
    std::vector<Reader> later_readers;
    later_readers.reserve(later.size());
    for (ImportResult& part : later) later_readers.push_back(reader.for_part(part));
    // Deferred is allowed too: where no thread can be had, libstdc++ then reads the stretch in
    // get(), on this thread.
    std::vector<std::future<void>> pending;
    for (std::size_t k = 1; k < stretches; ++k) {
        pending.push_back(std::async(std::launch::async | std::launch::deferred, read_rows,
                                     std::ref(later_readers[k - 1]), std::ref(later[k - 1]),
                                     n * k / stretches, n * (k + 1) / stretches));
    }
    read_rows(reader, result, 0, first_end);
    for (std::size_t k = 1; k < stretches; ++k) {
        pending[k - 1].get();
        reader.absorb(std::move(later[k - 1]), later_readers[k - 1].left_out());
    }
}

int json_line(std::string_view text, std::size_t byte) {
    return 1 + static_cast<int>(std::count(
                   text.begin(),
                   text.begin() + static_cast<std::ptrdiff_t>(std::min(byte, text.size())), '\n'));
}

void read_json(std::string_view text, Reader& reader, PartKind kind, const HeaderMapping& mapping,
               ImportResult& result) {
    nlohmann::json doc;
    try {
        doc = nlohmann::json::parse(text.begin(), text.end());
    } catch (const nlohmann::json::parse_error& e) {
        reader.fatal(json_line(text, e.byte), "", std::string("invalid JSON: ") + e.what());
        return;
    }
    if (!doc.is_array()) {
        reader.fatal(1, "", "expected a JSON array of objects, one per part");
        return;
    }
    if (doc.empty()) {
        reader.fatal(1, "", "the array is empty; add at least one part");
        return;
    }
    const auto table = reader.table();
    std::unordered_map<std::string, std::optional<HeaderMatch>> cache;
    std::vector<bool> present(table.size(), false);
    for (const auto& element : doc) {
        if (!element.is_object()) continue;
        for (const auto& [key, value] : element.items()) {
            auto [it, inserted] = cache.try_emplace(key);
            if (inserted) {
                it->second = match_header(kind, key, mapping);
                if (!it->second) result.ignored_columns.push_back(key);
            }
            if (it->second) present[it->second->field] = true;
        }
    }
    if (!reader.check_required_columns(present, 1)) return;
    int index = 0;
    std::vector<Cell> cells;
    DuplicateIds ids(doc.size());
    for (const auto& element : doc) {
        const int line = ++index;
        if (!element.is_object()) {
            ++result.rows;
            reader.problem(line, "", "element is not an object");
            result.rejected_lines.push_back(line);
            continue;
        }
        cells.clear();
        std::vector<bool> seen(table.size(), false);
        bool bad = false;
        for (const auto& [key, value] : element.items()) {
            const auto& m = cache.at(key);
            if (!m) continue;
            if (seen[m->field]) {
                reader.problem(line, key, "two keys give " + std::string(table[m->field].name));
                bad = true;
                continue;
            }
            seen[m->field] = true;
            if (auto why = check_header_unit(table[m->field], m->unit)) {
                reader.problem(line, key, *why);
                bad = true;
                continue;
            }
            Cell c{m->field, key, m->unit, {}, {}};
            if (value.is_null()) continue;
            if (value.is_string()) {
                c.text = value.get_ref<const std::string&>();
            } else if (value.is_number()) {
                c.number = value.get<double>();
            } else {
                reader.problem(line, key,
                               "value " + value.dump() + " is neither a string nor a number");
                bad = true;
                continue;
            }
            cells.push_back(std::move(c));
        }
        if (bad) {
            ++result.rows;
            result.rejected_lines.push_back(line);
            continue;
        }
        reader.row(line, cells, ids.check(table, cells, line));
    }
}

} // namespace

ImportResult read_parts(std::string_view text, std::string_view file_name, PartKind kind,
                        std::string_view source, const HeaderMapping& mapping, unsigned threads) {
    ImportResult result;
    Reader reader(file_name, kind, source, result);
    for (const auto& [from, to] : mapping) {
        if (!field_index(kind, to)) {
            std::string valid;
            for (const Field& f : fields(kind))
                valid += (valid.empty() ? "" : ", ") + std::string(f.name);
            reader.fatal(0, from, "mapping names unknown field \"" + to + "\"; valid: " + valid);
        }
    }
    if (result.fatal) return result;
    if (ends_with_ci(file_name, ".json")) {
        read_json(text, reader, kind, mapping, result);
    } else {
        read_csv(text, reader, kind, mapping, result, file_name, std::max(threads, 1U));
    }
    reader.finish();
    return result;
}

} // namespace coilsieve::catalog
