// An optional table of the survey config as a Section either way: the table when present, else
// an empty one (so the module's parser applies its defaults and names the key path in messages).
#pragma once

#include <string>
#include <string_view>

#include "common/config_section.hpp"

namespace sg::engine {

inline config::Section sectionOrEmpty(const config::Section& root, std::string_view key) {
    if (auto s = root.optionalTable(key)) return *s;
    static const toml::table kEmpty;
    return config::Section(kEmpty, root.file(), std::string(key));
}

}  // namespace sg::engine
