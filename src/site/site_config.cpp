// Site-wide config keys: canonical text, differences, effective config; see site_config.hpp.
#include "site/site_config.hpp"

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>

#include <fmt/format.h>
#include <xxhash.h>

namespace sg::site {

namespace {

// Whole top-level tables (or arrays of tables) that are site-wide.
constexpr const char* kSiteTables[] = {"geomagnetic", "detection", "target", "coverage", "gaps", "plan", "infill"};
// Keys of [survey] that are site-wide ([survey] name is free text of the session's config).
constexpr const char* kSiteSurveyKeys[] = {"epsg", "coverage_class"};
constexpr const char* kPlanFileKeys[] = {"area", "lines"};

std::string fileHash(const std::filesystem::path& p) {
    std::ifstream in(p, std::ios::binary);
    if (!in) return "missing:" + p.string();
    std::ostringstream s;
    s << in.rdbuf();
    const std::string bytes = s.str();
    return fmt::format("xxh3:{:016x}", XXH3_64bits(bytes.data(), bytes.size()));
}

std::filesystem::path resolve(const engine::SurveyConfig& cfg, const std::string& p) {
    const std::filesystem::path fp(p);
    if (fp.is_absolute()) return fp.lexically_normal();
    // As coverage::loadPlan does: relative to the folder of the config file.
    const auto base = cfg.dir.empty() ? std::filesystem::path(cfg.file).parent_path() : std::filesystem::path(cfg.dir);
    return (base / fp).lexically_normal();
}

// The site-wide keys of cfg as a table. `plan_files`: "hash" replaces plan file paths by their
// content hash; "absolute" makes them absolute paths.
toml::table siteWideTable(const engine::SurveyConfig& cfg, bool hash_plan_files) {
    toml::table out;
    const toml::table& root = *cfg.table;
    if (const auto* survey = root["survey"].as_table()) {
        toml::table s;
        for (const char* k : kSiteSurveyKeys)
            if (const auto* n = survey->get(k)) s.insert(k, *n);
        if (!s.empty()) out.insert("survey", std::move(s));
    }
    for (const char* k : kSiteTables) {
        const auto* n = root.get(k);
        if (n == nullptr) continue;
        if (std::string_view(k) == "plan" && n->is_table()) {
            toml::table plan = *n->as_table();
            for (const char* f : kPlanFileKeys) {
                const auto* v = plan.get(f);
                if (v == nullptr || !v->is_string()) continue;
                const auto path = resolve(cfg, v->as_string()->get());
                plan.insert_or_assign(f, hash_plan_files ? fileHash(path) : path.string());
            }
            out.insert("plan", std::move(plan));
        } else {
            out.insert(k, *n);
        }
    }
    return out;
}

std::string nodeText(const toml::node& n) {
    std::ostringstream s;
    n.visit([&s](const auto& v) { s << v; });
    return s.str();
}

std::optional<std::string> diffTables(const toml::table& a, const toml::table& b, const std::string& section) {
    std::set<std::string> keys;
    for (const auto& [k, v] : a) keys.insert(std::string(k.str()));
    for (const auto& [k, v] : b) keys.insert(std::string(k.str()));
    for (const auto& k : keys) {
        const auto* x = a.get(k);
        const auto* y = b.get(k);
        // A table present on one side only: its keys differ from nothing (name the first key).
        static const toml::table kEmpty;
        if (section.empty() && x == nullptr && y != nullptr && y->is_table()) x = &kEmpty;
        if (section.empty() && y == nullptr && x != nullptr && x->is_table()) y = &kEmpty;
        if (x == nullptr || y == nullptr) {
            if (section.empty()) return fmt::format("[{}] (present in one config only)", k);
            return fmt::format("[{}] {} (set in one config only)", section, k);
        }
        if (nodeText(*x) == nodeText(*y)) continue;
        if (section.empty() && x->is_table() && y->is_table())
            if (auto d = diffTables(*x->as_table(), *y->as_table(), k)) return d;
        if (section.empty() && x->is_array() && y->is_array()) {
            const auto& xa = *x->as_array();
            const auto& ya = *y->as_array();
            if (xa.size() != ya.size()) return fmt::format("[[{}]] ({} against {} tables)", k, xa.size(), ya.size());
            for (std::size_t i = 0; i < xa.size(); ++i) {
                if (!xa[i].is_table() || !ya[i].is_table()) continue;
                std::set<std::string> sub;
                for (const auto& [sk, sv] : *xa[i].as_table()) sub.insert(std::string(sk.str()));
                for (const auto& [sk, sv] : *ya[i].as_table()) sub.insert(std::string(sk.str()));
                for (const auto& sk : sub) {
                    const auto* p = xa[i].as_table()->get(sk);
                    const auto* q = ya[i].as_table()->get(sk);
                    if (p == nullptr || q == nullptr || nodeText(*p) != nodeText(*q))
                        return fmt::format("[[{}]] number {}: {}", k, i + 1, sk);
                }
            }
        }
        if (section.empty()) return fmt::format("[{}]", k);
        const bool file_key = section == "plan" && (k == "area" || k == "lines");
        return fmt::format("[{}] {}{}", section, k, file_key ? " (file content)" : "");
    }
    return std::nullopt;
}

}  // namespace

std::string siteWideText(const engine::SurveyConfig& cfg) {
    std::ostringstream s;
    s << siteWideTable(cfg, true);
    return s.str();
}

std::uint64_t siteWideHash(const engine::SurveyConfig& cfg) {
    const auto text = siteWideText(cfg);
    return XXH3_64bits(text.data(), text.size());
}

std::optional<std::string> firstSiteWideDifference(const engine::SurveyConfig& a, const engine::SurveyConfig& b) {
    return diffTables(siteWideTable(a, true), siteWideTable(b, true), "");
}

engine::SurveyConfig effectiveConfig(const engine::SurveyConfig& log_cfg, const engine::SurveyConfig& site) {
    toml::table t = *log_cfg.table;
    if (auto* survey = t["survey"].as_table())
        for (const char* k : kSiteSurveyKeys) survey->erase(k);
    for (const char* k : kSiteTables) t.erase(k);
    const toml::table sw = siteWideTable(site, false);
    for (const auto& [k, v] : sw) {
        if (k.str() == "survey") {
            if (!t.contains("survey")) t.insert("survey", toml::table{});
            auto* survey = t["survey"].as_table();
            for (const auto& [sk, sv] : *v.as_table()) survey->insert_or_assign(sk, sv);
        } else {
            t.insert_or_assign(k, v);
        }
    }
    std::ostringstream text;
    text << t;
    return engine::parseSurveyConfig(text.str(), fmt::format("{} (with the site-wide keys of {})", log_cfg.file, site.file),
                                     log_cfg.dir, config::InputUse::Offline);
}

}  // namespace sg::site
