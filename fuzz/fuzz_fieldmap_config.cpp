// libFuzzer target for reading [fieldmap.NAME] tables from TOML text: any text either gives maps
// or a config::ConfigError, never a crash or another exception; a map that loads can decode.
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "common/config_section.hpp"
#include "decode/field_map.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string_view text(reinterpret_cast<const char*>(data), size);
    try {
        const toml::table root = sg::config::parseText(text, "fuzz.toml");
        const sg::config::Section section(root, "fuzz.toml");
        const auto maps = sg::decode::parseFieldMaps(section);
        for (const auto& m : maps) {
            if (m.minFields() < 1 || m.minFields() > sg::decode::kMaxFieldIndex + 1) __builtin_trap();
            (void)sg::decode::decodeFieldMap(m, "SGM,1,000000.000,50000,1,2,3,4,5,6,7,8,9*00");
        }
    } catch (const sg::config::ConfigError&) {
    }
    return 0;
}
