// [[output]] parsing; see helm_config.hpp.
#include "helm/helm_config.hpp"

#include <algorithm>

#include <fmt/format.h>

namespace sg::helm {

std::vector<OutputConfig> parseOutputs(const config::Section& root) {
    std::vector<OutputConfig> out;
    const auto tables = root.tables("output");
    for (std::size_t k = 0; k < tables.size(); ++k) {
        const auto& t = tables[k];
        t.allowOnly({"name", "kind", "transport", "host", "port", "device", "baud", "rate_hz", "talker",
                     "sentences", "xte_decimals", "reference", "arrival_radius_m", "when_no_line"});
        OutputConfig o;
        o.name = t.string("name", fmt::format("output{}", k + 1));
        for (const auto& earlier : out)
            if (earlier.name == o.name) t.fail("name", "a name no other [[output]] has");
        o.kind = t.choice("kind", {"steering"});
        o.transport = t.choice("transport", {"udp", "serial"});
        if (o.transport == "udp") {
            if (t.has("device")) t.fail("device", "no device with transport = \"udp\" (host and port)");
            o.host = t.string("host");
            if (o.host.empty()) t.fail("host", "a host name or address");
            o.port = static_cast<int>(t.integer("port", 1, 65535));
        } else {
            if (t.has("host") || t.has("port")) t.fail(t.has("host") ? "host" : "port",
                                                      "no host/port with transport = \"serial\" (device and baud)");
            o.device = t.string("device");
            if (o.device.empty()) t.fail("device", "a serial device path");
            o.baud = static_cast<int>(t.integer("baud", 50, 4'000'000, 4800));
        }
        o.rate_hz = t.number("rate_hz", 0.1, 10.0, 1.0);
        o.sentence.talker = t.string("talker", "IN");
        const auto& tk = o.sentence.talker;
        if (tk.size() != 2 || !std::all_of(tk.begin(), tk.end(), [](char c) {
                return (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9');
            }) || tk[0] == 'P')
            t.fail("talker", "two upper-case letters or digits, not starting with P (proprietary), e.g. \"IN\"");
        o.sentence.xte_decimals = static_cast<int>(t.integer("xte_decimals", 2, 4, 3));
        o.sentences = t.strings("sentences", {"XTE", "APB", "RMB"}, {"XTE", "APB", "RMB"});
        o.reference = t.choice("reference", {"array", "antenna"}, "array");
        o.arrival_radius_m = t.number("arrival_radius_m", 1.0, 10000.0, 50.0);
        o.void_when_no_line = t.choice("when_no_line", {"void", "silent"}, "void") == "void";
        out.push_back(std::move(o));
    }
    return out;
}

}  // namespace sg::helm
