#include "studies/study_store.hpp"

#include <chrono>
#include <cmath>
#include <ctime>
#include <map>
#include <set>
#include <sstream>

namespace coilsieve::studies {

namespace sql = coilsieve::catalog::sqlite;

namespace {

constexpr std::string_view select_sql =
    "SELECT s.id, s.name, s.parent_id, p.name, s.created, s.design_json, s.options_json, "
    "s.catalog_fingerprint, s.results_json FROM study s LEFT JOIN study p ON p.id = s.parent_id";

Study read_row(sql::Statement& st) {
    Study s;
    s.id = st.column_int(0);
    s.name = st.column_text(1);
    if (!st.is_null(2)) s.parent_id = st.column_int(2);
    if (!st.is_null(3)) s.parent_name = st.column_text(3);
    s.created = st.is_null(4) ? "" : st.column_text(4);
    auto parse = [&](int col) {
        if (st.is_null(col)) return nlohmann::json();
        try {
            return nlohmann::json::parse(st.column_text(col));
        } catch (const nlohmann::json::exception& e) {
            throw StudyError("study \"" + s.name + "\": stored JSON in column " +
                             std::to_string(col) + " is damaged (" + e.what() + ")");
        }
    };
    s.design = parse(5);
    s.options = parse(6);
    s.fingerprint = st.is_null(7) ? "" : st.column_text(7);
    s.results = parse(8);
    return s;
}

} // namespace

std::int64_t StudyStore::save(Study& s) {
    if (s.name.empty()) throw StudyError("a study needs a name");
    sql::Transaction tx(db_);
    {
        auto check = db_.prepare("SELECT count(*) FROM study WHERE name = ?");
        check.bind(1, s.name);
        check.step();
        if (check.column_int(0) > 0)
            throw StudyError("a study named \"" + s.name +
                             "\" exists already; choose another --study name or delete it with "
                             "`coilsieve study delete " +
                             s.name + "`");
    }
    auto st = db_.prepare("INSERT INTO study (name, parent_id, created, design_json, options_json, "
                          "catalog_fingerprint, results_json) VALUES (?, ?, ?, ?, ?, ?, ?)");
    st.bind(1, s.name);
    if (s.parent_id) st.bind(2, *s.parent_id);
    else st.bind_null(2);
    if (s.created.empty()) s.created = utc_now();
    st.bind(3, s.created);
    st.bind(4, s.design.dump());
    st.bind(5, s.options.dump());
    st.bind(6, s.fingerprint);
    st.bind(7, s.results.dump());
    st.run();
    s.id = db_.last_insert_rowid();
    tx.commit();
    return s.id;
}

std::vector<Study> StudyStore::list() {
    auto st = db_.prepare(std::string(select_sql) + " ORDER BY s.id");
    std::vector<Study> out;
    while (st.step()) out.push_back(read_row(st));
    return out;
}

std::optional<Study> StudyStore::find(std::string_view name) {
    auto st = db_.prepare(std::string(select_sql) + " WHERE s.name = ?");
    st.bind(1, name);
    if (!st.step()) return std::nullopt;
    return read_row(st);
}

Study StudyStore::get(std::string_view name) {
    if (auto s = find(name)) return *s;
    std::string known;
    auto st = db_.prepare("SELECT name FROM study ORDER BY id DESC LIMIT 10");
    while (st.step()) known += (known.empty() ? "" : ", ") + st.column_text(0);
    throw StudyError("no study named \"" + std::string(name) + "\"" +
                     (known.empty()
                          ? std::string("; none is saved yet (every `coilsieve rank` run "
                                        "saves one)")
                          : "; recent studies: " + known + " (`coilsieve study list` shows all)"));
}

void StudyStore::remove(std::string_view name) {
    sql::Transaction tx(db_);
    auto st = db_.prepare("DELETE FROM study WHERE name = ?");
    st.bind(1, name);
    st.run();
    if (db_.changes() == 0) {
        tx.commit();
        (void)get(name); // throws with the list of known names
    }
    tx.commit();
}

std::string StudyStore::generate_name(std::string_view design_name, std::string_view created) {
    std::string stamp;
    for (char c : created)
        if (std::isdigit(static_cast<unsigned char>(c))) stamp += c;
    if (stamp.size() >= 14) stamp = stamp.substr(0, 8) + "-" + stamp.substr(8, 6);
    std::string base;
    for (char c : design_name)
        base += (std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_') ? c : '-';
    if (base.empty()) base = "study";
    for (int n = 1;; ++n) {
        std::string name = base + "-" + stamp + "-" + std::to_string(n);
        if (!find(name)) return name;
    }
}

namespace {

void flatten(const nlohmann::json& j, const std::string& prefix,
             std::map<std::string, std::string>& out) {
    if (j.is_object()) {
        for (auto it = j.begin(); it != j.end(); ++it)
            flatten(it.value(), prefix.empty() ? it.key() : prefix + "." + it.key(), out);
    } else {
        out[prefix] = j.dump();
    }
}

std::vector<InputChange> compare(const nlohmann::json& a, const nlohmann::json& b,
                                 const std::string& prefix) {
    std::map<std::string, std::string> fa, fb;
    flatten(a, prefix, fa);
    flatten(b, prefix, fb);
    std::set<std::string> keys;
    for (auto& [k, v] : fa) keys.insert(k);
    for (auto& [k, v] : fb) keys.insert(k);
    std::vector<InputChange> out;
    for (const auto& k : keys) {
        auto ia = fa.find(k), ib = fb.find(k);
        std::string va = ia == fa.end() ? "absent" : ia->second;
        std::string vb = ib == fb.end() ? "absent" : ib->second;
        if (va != vb) out.push_back({k, va, vb});
    }
    return out;
}

struct Listed {
    std::map<std::string, nlohmann::json> by_key;
    std::vector<std::string> order;
};

Listed listed(const nlohmann::json& results, const char* field) {
    Listed l;
    if (!results.is_object() || !results.contains(field)) return l;
    for (const auto& p : results[field]) {
        const std::string key = p.value("key", "");
        l.by_key[key] = p;
        l.order.push_back(key);
    }
    return l;
}

} // namespace

StudyDiff diff_studies(const Study& a, const Study& b) {
    StudyDiff d;
    d.a = a.name;
    d.b = b.name;
    const Listed ta = listed(a.results, "results"), tb = listed(b.results, "results");
    const Listed pa = listed(a.results, "pareto"), pb = listed(b.results, "pareto");
    for (const auto& k : tb.order)
        if (!ta.by_key.count(k)) d.entered_top.push_back(k);
    for (const auto& k : ta.order)
        if (!tb.by_key.count(k)) d.left_top.push_back(k);
    for (const auto& k : pb.order)
        if (!pa.by_key.count(k)) d.entered_pareto.push_back(k);
    for (const auto& k : pa.order)
        if (!pb.by_key.count(k)) d.left_pareto.push_back(k);
    for (const auto& k : tb.order) {
        auto ia = ta.by_key.find(k);
        if (ia == ta.by_key.end()) continue;
        const auto& ja = ia->second;
        const auto& jb = tb.by_key.at(k);
        PairChange c;
        c.key = k;
        if (ja.contains("rank") && ja["rank"].is_number()) c.rank_before = ja["rank"].get<int>();
        if (jb.contains("rank") && jb["rank"].is_number()) c.rank_after = jb["rank"].get<int>();
        for (const char* o : {"loss", "efficiency", "ripple", "size", "margin", "cost"}) {
            const auto& oa = ja["objectives"][o];
            const auto& ob = jb["objectives"][o];
            if (oa.is_number() && ob.is_number() && oa.get<double>() != ob.get<double>())
                c.changes.push_back({o, oa.get<double>(), ob.get<double>()});
        }
        if (ja["score"].is_number() && jb["score"].is_number() &&
            ja["score"].get<double>() != jb["score"].get<double>())
            c.changes.push_back({"score", ja["score"].get<double>(), jb["score"].get<double>()});
        d.common.push_back(std::move(c));
    }
    d.design_changes = compare(a.design, b.design, "design");
    d.option_changes = compare(a.options, b.options, "options");
    d.fingerprint_a = a.fingerprint;
    d.fingerprint_b = b.fingerprint;
    d.catalog_changed = a.fingerprint != b.fingerprint;
    return d;
}

namespace {
std::string num(double v) {
    std::ostringstream os;
    os.precision(4);
    os << v;
    return os.str();
}
} // namespace

std::string diff_text(const StudyDiff& d) {
    std::ostringstream os;
    os << "Study " << d.a << " -> " << d.b << "\n";
    os << "Inputs:\n";
    if (d.design_changes.empty() && d.option_changes.empty() && !d.catalog_changed)
        os << "  identical design, options and catalog\n";
    for (const auto& c : d.design_changes)
        os << "  " << c.path << ": " << c.before << " -> " << c.after << "\n";
    for (const auto& c : d.option_changes)
        os << "  " << c.path << ": " << c.before << " -> " << c.after << "\n";
    if (d.catalog_changed)
        os << "  catalog changed: fingerprint " << d.fingerprint_a.substr(0, 12) << " -> "
           << d.fingerprint_b.substr(0, 12) << "\n";
    auto list = [&](const char* title, const std::vector<std::string>& v) {
        os << title << (v.empty() ? " none\n" : "\n");
        for (const auto& k : v) os << "  " << k << "\n";
    };
    list("Entered the top list:", d.entered_top);
    list("Left the top list:", d.left_top);
    list("Entered the Pareto set:", d.entered_pareto);
    list("Left the Pareto set:", d.left_pareto);
    os << "In both top lists:" << (d.common.empty() ? " none\n" : "\n");
    for (const auto& c : d.common) {
        os << "  " << c.key;
        if (c.rank_before && c.rank_after && *c.rank_before != *c.rank_after)
            os << "  rank " << *c.rank_before << " -> " << *c.rank_after;
        // The tuner's round-off moves a figure by parts per million when nothing that matters
        // changed; the text shows changes of 0.01 % or more (the JSON keeps them all).
        std::vector<ObjectiveChange> shown;
        for (const auto& ch : c.changes)
            if (ch.before == 0.0 || std::abs(ch.after - ch.before) >= 1e-4 * std::abs(ch.before))
                shown.push_back(ch);
        if (c.changes.empty()) os << "  unchanged";
        else if (shown.empty()) os << "  unchanged (within 0.01 %)";
        for (const auto& ch : shown) {
            os << "  " << ch.objective << " " << num(ch.before) << " -> " << num(ch.after);
            if (ch.before != 0.0)
                os << " (" << (ch.after >= ch.before ? "+" : "")
                   << num(100.0 * (ch.after - ch.before) / std::abs(ch.before)) << " %)";
        }
        os << "\n";
    }
    return os.str();
}

nlohmann::json diff_json(const StudyDiff& d) {
    auto changes = [](const std::vector<InputChange>& v) {
        nlohmann::json j = nlohmann::json::array();
        for (const auto& c : v)
            j.push_back({{"path", c.path}, {"before", c.before}, {"after", c.after}});
        return j;
    };
    nlohmann::json common = nlohmann::json::array();
    for (const auto& c : d.common) {
        nlohmann::json ch = nlohmann::json::object();
        for (const auto& o : c.changes)
            ch[o.objective] = {{"before", o.before}, {"after", o.after}};
        common.push_back({{"key", c.key},
                          {"rank_before", c.rank_before ? nlohmann::json(*c.rank_before) : nullptr},
                          {"rank_after", c.rank_after ? nlohmann::json(*c.rank_after) : nullptr},
                          {"changes", ch}});
    }
    return {{"a", d.a},
            {"b", d.b},
            {"entered_top", d.entered_top},
            {"left_top", d.left_top},
            {"entered_pareto", d.entered_pareto},
            {"left_pareto", d.left_pareto},
            {"common", common},
            {"design_changes", changes(d.design_changes)},
            {"option_changes", changes(d.option_changes)},
            {"catalog_changed", d.catalog_changed}};
}

} // namespace coilsieve::studies
