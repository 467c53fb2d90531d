// Typed, validated access to TOML tables; see config_section.hpp.
#include "common/config_section.hpp"

#include <algorithm>

#include <cmath>
#include <sstream>

#include <fmt/format.h>

namespace sg::config {

namespace {

std::string describe(const toml::node* n) {
    if (n == nullptr) return "nothing (key missing)";
    std::ostringstream out;
    switch (n->type()) {
    case toml::node_type::string: out << '"' << n->as_string()->get() << '"'; break;
    case toml::node_type::integer: out << "integer " << n->as_integer()->get(); break;
    case toml::node_type::floating_point: out << "number " << n->as_floating_point()->get(); break;
    case toml::node_type::boolean: out << (n->as_boolean()->get() ? "true" : "false"); break;
    case toml::node_type::table: out << "a table"; break;
    case toml::node_type::array: out << "an array"; break;
    default: out << "a date/time"; break;
    }
    return out.str();
}

std::optional<double> asDouble(const toml::node* n) {
    if (n == nullptr) return std::nullopt;
    if (auto f = n->as_floating_point()) return f->get();
    if (auto i = n->as_integer()) return static_cast<double>(i->get());
    return std::nullopt;
}

}  // namespace

toml::table parseFile(const std::string& path) {
    try {
        return toml::parse_file(path);
    } catch (const toml::parse_error& e) {
        throw ConfigError(fmt::format("{}:{}: TOML syntax error: {}", path,
                                      e.source().begin.line, e.description()));
    }
}

toml::table parseText(std::string_view text, const std::string& name) {
    try {
        return toml::parse(text, name);
    } catch (const toml::parse_error& e) {
        throw ConfigError(fmt::format("{}:{}: TOML syntax error: {}", name,
                                      e.source().begin.line, e.description()));
    }
}

Section::Section(const toml::table& table, std::string file, std::string path)
    : m_table(&table), m_file(std::make_shared<const std::string>(std::move(file))),
      m_path(std::move(path)) {}

const toml::node* Section::node(std::string_view key) const { return m_table->get(key); }

bool Section::has(std::string_view key) const { return node(key) != nullptr; }

std::string Section::keyPath(std::string_view key) const {
    if (m_path.empty()) return std::string(key);
    if (key.empty()) return m_path;
    return m_path + "." + std::string(key);
}

void Section::failAt(const toml::node* n, std::string_view key, std::string_view expected) const {
    const toml::node* where = n != nullptr ? n : static_cast<const toml::node*>(m_table);
    const auto line = where->source().begin.line;
    std::string loc = *m_file;
    if (line > 0) loc += fmt::format(":{}", line);
    throw ConfigError(fmt::format("{}: key '{}': expected {}, found {}", loc, keyPath(key),
                                  expected, describe(n)));
}

void Section::fail(std::string_view key, std::string_view expected) const {
    failAt(node(key), key, expected);
}

double Section::number(std::string_view key) const {
    const auto* n = node(key);
    auto v = asDouble(n);
    if (!v || !std::isfinite(*v)) failAt(n, key, "a number");
    return *v;
}

double Section::number(std::string_view key, double lo, double hi) const {
    const auto* n = node(key);
    auto v = asDouble(n);
    if (!v || !(*v >= lo && *v <= hi)) failAt(n, key, fmt::format("a number from {} to {}", lo, hi));
    return *v;
}

double Section::number(std::string_view key, double lo, double hi, double fallback) const {
    if (!has(key)) return fallback;
    return number(key, lo, hi);
}

std::optional<double> Section::optionalNumber(std::string_view key, double lo, double hi) const {
    if (!has(key)) return std::nullopt;
    return number(key, lo, hi);
}

std::int64_t Section::integer(std::string_view key, std::int64_t lo, std::int64_t hi) const {
    const auto* n = node(key);
    const auto* i = n != nullptr ? n->as_integer() : nullptr;
    if (i == nullptr || i->get() < lo || i->get() > hi)
        failAt(n, key, fmt::format("an integer from {} to {}", lo, hi));
    return i->get();
}

std::int64_t Section::integer(std::string_view key, std::int64_t lo, std::int64_t hi,
                              std::int64_t fallback) const {
    if (!has(key)) return fallback;
    return integer(key, lo, hi);
}

std::optional<std::int64_t> Section::optionalInteger(std::string_view key, std::int64_t lo,
                                                     std::int64_t hi) const {
    if (!has(key)) return std::nullopt;
    return integer(key, lo, hi);
}

std::string Section::string(std::string_view key) const {
    const auto* n = node(key);
    const auto* s = n != nullptr ? n->as_string() : nullptr;
    if (s == nullptr) failAt(n, key, "a string");
    return s->get();
}

std::string Section::string(std::string_view key, std::string fallback) const {
    if (!has(key)) return fallback;
    return string(key);
}

std::optional<std::string> Section::optionalString(std::string_view key) const {
    if (!has(key)) return std::nullopt;
    return string(key);
}

bool Section::boolean(std::string_view key) const {
    const auto* n = node(key);
    const auto* b = n != nullptr ? n->as_boolean() : nullptr;
    if (b == nullptr) failAt(n, key, "true or false");
    return b->get();
}

bool Section::boolean(std::string_view key, bool fallback) const {
    if (!has(key)) return fallback;
    return boolean(key);
}

std::string Section::choice(std::string_view key,
                            std::initializer_list<std::string_view> choices) const {
    const auto* n = node(key);
    const auto* s = n != nullptr ? n->as_string() : nullptr;
    if (s != nullptr) {
        for (auto c : choices)
            if (s->get() == c) return s->get();
    }
    std::string list;
    for (auto c : choices) list += (list.empty() ? "" : ", ") + fmt::format("\"{}\"", c);
    failAt(n, key, "one of " + list);
}

std::string Section::choice(std::string_view key, std::initializer_list<std::string_view> choices,
                            std::string fallback) const {
    if (!has(key)) return fallback;
    return choice(key, choices);
}

std::vector<double> Section::numbers(std::string_view key, std::size_t count) const {
    const auto* n = node(key);
    const auto* a = n != nullptr ? n->as_array() : nullptr;
    const auto expected = fmt::format("an array of {} numbers", count);
    if (a == nullptr || a->size() != count) failAt(n, key, expected);
    std::vector<double> out;
    for (const auto& el : *a) {
        auto v = asDouble(&el);
        if (!v || !std::isfinite(*v)) failAt(n, key, expected);
        out.push_back(*v);
    }
    return out;
}

std::optional<std::vector<double>> Section::optionalNumbers(std::string_view key,
                                                            std::size_t count) const {
    if (!has(key)) return std::nullopt;
    return numbers(key, count);
}

std::vector<std::string> Section::strings(std::string_view key,
                                          std::initializer_list<std::string_view> choices,
                                          std::vector<std::string> fallback) const {
    const auto* n = node(key);
    if (n == nullptr) return fallback;
    const auto* a = n->as_array();
    std::string expected = "a non-empty array of distinct strings from";
    for (const auto c : choices) expected += fmt::format(" \"{}\"", c);
    if (a == nullptr || a->empty()) failAt(n, key, expected);
    std::vector<std::string> out;
    for (const auto& el : *a) {
        const auto* s = el.as_string();
        if (s == nullptr) failAt(n, key, expected);
        const std::string v = s->get();
        if (std::find(choices.begin(), choices.end(), v) == choices.end() ||
            std::find(out.begin(), out.end(), v) != out.end())
            failAt(n, key, expected);
        out.push_back(v);
    }
    return out;
}

std::vector<std::string> Section::stringList(std::string_view key,
                                             const std::function<bool(std::string_view)>& valid,
                                             std::string_view expected) const {
    const auto* n = node(key);
    if (n == nullptr) return {};
    const auto* a = n->as_array();
    if (a == nullptr) failAt(n, key, expected);
    std::vector<std::string> out;
    for (const auto& el : *a) {
        const auto* s = el.as_string();
        if (s == nullptr) failAt(&el, key, expected);
        const std::string v = s->get();
        if (!valid(v) || std::find(out.begin(), out.end(), v) != out.end())
            failAt(&el, key, expected);
        out.push_back(v);
    }
    return out;
}

Section Section::table(std::string_view key) const {
    const auto* n = node(key);
    const auto* t = n != nullptr ? n->as_table() : nullptr;
    if (t == nullptr) failAt(n, key, "a table");
    Section s(*t, *m_file, keyPath(key));
    s.m_file = m_file;
    return s;
}

std::optional<Section> Section::optionalTable(std::string_view key) const {
    if (!has(key)) return std::nullopt;
    return table(key);
}

std::vector<Section> Section::tables(std::string_view key) const {
    std::vector<Section> out;
    const auto* n = node(key);
    if (n == nullptr) return out;
    const auto* a = n->as_array();
    if (a == nullptr || !a->is_array_of_tables()) failAt(n, key, "an array of tables [[...]]");
    for (std::size_t i = 0; i < a->size(); ++i) {
        Section s(*a->get(i)->as_table(), *m_file, fmt::format("{}[{}]", keyPath(key), i));
        s.m_file = m_file;
        out.push_back(std::move(s));
    }
    return out;
}

std::vector<std::string> Section::keys() const {
    std::vector<std::string> out;
    for (const auto& [k, v] : *m_table) out.emplace_back(k.str());
    return out;
}

void Section::allowOnly(std::initializer_list<std::string_view> allowed) const {
    for (const auto& [k, v] : *m_table) {
        bool ok = false;
        for (auto a : allowed) ok = ok || k.str() == a;
        if (!ok) {
            std::string list;
            for (auto a : allowed) list += (list.empty() ? "" : ", ") + std::string(a);
            const auto line = v.source().begin.line;
            throw ConfigError(fmt::format("{}:{}: key '{}': unknown key (allowed here: {})",
                                          *m_file, line, keyPath(k.str()), list));
        }
    }
}

}  // namespace sg::config
