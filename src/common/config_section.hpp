// Typed, validated access to one table of a survey's TOML configuration (toml++).
// Every error names the file, the full key path, the line, what was expected and what was found:
//   survey.toml:12: key 'input[1].baud': expected an integer from 50 to 4000000, found "fast"
// Each module parses its own section with a Section (see DEVELOPERS.md, "Adding a config key").
#pragma once

#include <cstdint>
#include <functional>
#include <initializer_list>
#include <memory>
#include <optional>
#include <set>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include <toml++/toml.h>

namespace sg::config {

class ConfigError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// Parses a whole file; a TOML syntax error becomes a ConfigError naming the file and line.
toml::table parseFile(const std::string& path);
// Parses text (the copy of a config stored in a log); `name` stands in for the file name.
toml::table parseText(std::string_view text, const std::string& name);

class Section {
public:
    // `table` must outlive the Section. `path` is the key path of this table ("" for the root).
    Section(const toml::table& table, std::string file, std::string path = "");

    const std::string& file() const { return *m_file; }
    const std::string& path() const { return m_path; }
    bool has(std::string_view key) const;

    // Required values: throw ConfigError when missing or of the wrong type or out of range.
    double number(std::string_view key) const;
    double number(std::string_view key, double lo, double hi) const;
    std::int64_t integer(std::string_view key, std::int64_t lo, std::int64_t hi) const;
    std::string string(std::string_view key) const;
    bool boolean(std::string_view key) const;

    // Optional values with a default (the default is not range checked).
    double number(std::string_view key, double lo, double hi, double fallback) const;
    std::int64_t integer(std::string_view key, std::int64_t lo, std::int64_t hi,
                         std::int64_t fallback) const;
    std::string string(std::string_view key, std::string fallback) const;
    bool boolean(std::string_view key, bool fallback) const;
    std::optional<double> optionalNumber(std::string_view key, double lo, double hi) const;
    std::optional<std::int64_t> optionalInteger(std::string_view key, std::int64_t lo,
                                                std::int64_t hi) const;
    std::optional<std::string> optionalString(std::string_view key) const;

    // A string that must be one of `choices`.
    std::string choice(std::string_view key, std::initializer_list<std::string_view> choices) const;
    std::string choice(std::string_view key, std::initializer_list<std::string_view> choices,
                       std::string fallback) const;

    // A fixed-length array of numbers, e.g. offsets [forward, starboard, up].
    std::vector<double> numbers(std::string_view key, std::size_t count) const;
    std::optional<std::vector<double>> optionalNumbers(std::string_view key,
                                                       std::size_t count) const;

    // An array of distinct strings, each one of `choices` (e.g. sentences = ["XTE", "APB"]);
    // `fallback` when the key is absent.
    std::vector<std::string> strings(std::string_view key, std::initializer_list<std::string_view> choices,
                                     std::vector<std::string> fallback) const;

    // An array of distinct strings, each accepted by `valid` (e.g. talker ids); `expected` says
    // what the array must hold, and the error names the first element that is wrong (or the
    // value itself when it is no array). Absent key or empty array: an empty vector.
    std::vector<std::string> stringList(std::string_view key,
                                        const std::function<bool(std::string_view)>& valid,
                                        std::string_view expected) const;

    // Sub-tables.
    Section table(std::string_view key) const;
    std::optional<Section> optionalTable(std::string_view key) const;
    // [[key]] arrays of tables (an absent key gives an empty vector).
    std::vector<Section> tables(std::string_view key) const;
    // Keys of this table (for maps such as [fieldmap.NAME]), in toml++ order: sorted by name,
    // not file order.
    std::vector<std::string> keys() const;

    // Rejects any key not in `allowed` (catches typos such as "baudrate" for "baud").
    void allowOnly(std::initializer_list<std::string_view> allowed) const;

    // Builds the standard message for a problem with `key` (for checks a module makes itself).
    [[noreturn]] void fail(std::string_view key, std::string_view expected) const;

private:
    const toml::node* node(std::string_view key) const;
    std::string keyPath(std::string_view key) const;
    [[noreturn]] void failAt(const toml::node* n, std::string_view key,
                             std::string_view expected) const;

    const toml::table* m_table;
    std::shared_ptr<const std::string> m_file;
    std::string m_path;
};

}  // namespace sg::config
