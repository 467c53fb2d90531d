// Parsing of [[input]], [log] and [import]; see input_config.hpp.
#include "common/input_config.hpp"

#include <charconv>
#include <set>

#include <fmt/format.h>

#include "common/nmea_talker.hpp"

namespace sg::config {
namespace {

// Splits "host:port" (the port after the last colon). Fails naming the key.
void hostPort(const Section& s, std::string_view key, std::string& host, std::uint16_t& port) {
    const std::string v = s.string(key);
    const auto colon = v.rfind(':');
    if (colon == std::string::npos || colon == 0 || colon + 1 >= v.size())
        s.fail(key, "\"host:port\"");
    int p = 0;
    const char* b = v.data() + colon + 1;
    const char* e = v.data() + v.size();
    auto [ptr, ec] = std::from_chars(b, e, p);
    if (ec != std::errc{} || ptr != e || p < 1 || p > 65535) s.fail(key, "\"host:port\" with port 1..65535");
    host = v.substr(0, colon);
    port = static_cast<std::uint16_t>(p);
}

}  // namespace

const char* toString(InputKind k) { return k == InputKind::Nmea ? "nmea" : "fieldmap"; }

const char* toString(Transport t) {
    switch (t) {
    case Transport::Serial: return "serial";
    case Transport::Udp: return "udp";
    case Transport::Tcp: return "tcp";
    case Transport::File: return "file";
    }
    return "?";
}

std::vector<InputConfig> parseInputs(const Section& root, InputUse use) {
    std::vector<InputConfig> out;
    std::set<std::string> names;
    const std::vector<Section> tables = root.tables("input");
    for (const Section& s : tables) {
        s.allowOnly({"name", "kind", "fieldmap", "role", "transport", "device", "baud", "parity",
                     "data_bits", "stop_bits", "listen", "receive_buffer_bytes", "connect",
                     "reconnect_min_s", "reconnect_max_s", "path", "follow", "clock",
                     "latency_ms", "import_align", "import_rate_hz",
                     "checksum_optional_talkers"});
        InputConfig c;
        c.name = s.string("name");
        if (c.name.empty()) s.fail("name", "a non-empty name");
        if (c.name.front() == '@') s.fail("name", "a name that does not start with '@' (reserved for the crew's commands)");
        if (!names.insert(c.name).second) s.fail("name", "a name no other [[input]] uses");
        c.kind = s.choice("kind", {"nmea", "fieldmap"}) == "nmea" ? InputKind::Nmea
                                                                 : InputKind::FieldMap;
        if (c.kind == InputKind::FieldMap) {
            c.fieldmap = s.string("fieldmap");
            auto fm = root.optionalTable("fieldmap");
            if (!fm || !fm->has(c.fieldmap))
                s.fail("fieldmap", "the name of a [fieldmap.NAME] table");
        } else if (s.has("fieldmap")) {
            s.fail("fieldmap", "no fieldmap for kind \"nmea\"");
        }
        if (c.kind == InputKind::Nmea) {
            c.checksum_optional_talkers = s.stringList(
                "checksum_optional_talkers", [](std::string_view id) { return isTalkerId(id); },
                fmt::format("an array of distinct NMEA talker ids, each {}", kTalkerIdWords));
        } else if (s.has("checksum_optional_talkers")) {
            s.fail("checksum_optional_talkers",
                   "no checksum_optional_talkers for kind \"fieldmap\"");
        }
        c.role = s.choice("role", {"gnss", "heading", "depth", "mag", "altimeter", "cable"});
        // Offline (import, reading a log back) the transport may be left out: import's --input
        // gives the file, a replay reads the log. Acquisition needs it (record; `check` reads
        // the config offline and says so for record, engine::checkConfig).
        c.transport_given = s.has("transport");
        const bool has_transport = use == InputUse::Acquisition || c.transport_given;
        const std::string tr =
            has_transport ? s.choice("transport", {"serial", "udp", "tcp", "file"}) : std::string();
        // Keys of another transport are rejected too: they are almost always a mistake.
        auto onlyFor = [&](std::initializer_list<std::string_view> keys, std::string_view t) {
            for (auto k : keys)
                if (s.has(k) && tr != t)
                    s.fail(k, has_transport ? fmt::format("no '{}' for transport \"{}\"", k, tr)
                                            : fmt::format("no '{}' without transport = \"{}\"", k, t));
        };
        onlyFor({"device", "baud", "parity", "data_bits", "stop_bits"}, "serial");
        onlyFor({"listen", "receive_buffer_bytes"}, "udp");
        onlyFor({"connect", "reconnect_min_s", "reconnect_max_s"}, "tcp");
        onlyFor({"path", "follow"}, "file");
        if (tr == "serial") {
            c.transport = Transport::Serial;
            c.serial.device = s.string("device");
            c.serial.baud = static_cast<std::uint32_t>(s.integer("baud", 50, 4000000, 4800));
            const auto p = s.choice("parity", {"none", "even", "odd"}, "none");
            c.serial.parity = p == "none" ? Parity::None : p == "even" ? Parity::Even : Parity::Odd;
            c.serial.data_bits = static_cast<std::uint8_t>(s.integer("data_bits", 5, 8, 8));
            c.serial.stop_bits = static_cast<std::uint8_t>(s.integer("stop_bits", 1, 2, 1));
        } else if (tr == "udp") {
            c.transport = Transport::Udp;
            hostPort(s, "listen", c.listen_host, c.listen_port);
            c.receive_buffer_bytes =
                static_cast<std::int64_t>(s.integer("receive_buffer_bytes", 1024, 1 << 30, 4 << 20));
        } else if (tr == "tcp") {
            c.transport = Transport::Tcp;
            hostPort(s, "connect", c.connect_host, c.connect_port);
            // At most 1 s between attempts: a source that comes back is read again within a
            // second (a longer backoff loses its first seconds of data for nothing).
            c.reconnect_min_s = s.number("reconnect_min_s", 0.01, 1.0, 0.25);
            c.reconnect_max_s = s.number("reconnect_max_s", 0.01, 1.0, 0.5);
            if (c.reconnect_max_s < c.reconnect_min_s)
                s.fail("reconnect_max_s", "a value >= reconnect_min_s");
        } else if (tr == "file") {
            c.transport = Transport::File;
            c.path = s.string("path");
            c.follow = s.boolean("follow", false);
        } else {
            c.transport_given = false;
            c.transport = Transport::File;  // no transport: path stays empty (import only)
        }
        c.clock = s.choice("clock", {"receive", "instrument"}, "receive") == "receive"
                      ? ClockSource::Receive
                      : ClockSource::Instrument;
        c.latency_ms = s.number("latency_ms", 0.0, 60000.0, 0.0);
        c.import_align = s.string("import_align", "");
        c.import_rate_hz = s.optionalNumber("import_rate_hz", 0.001, 10000.0);
        out.push_back(std::move(c));
    }
    for (std::size_t i = 0; i < out.size(); ++i) {
        const std::string& a = out[i].import_align;
        if (a.empty()) continue;
        if (a == out[i].name || names.count(a) == 0)
            tables[i].fail("import_align", "the name of another [[input]] (a capture with instrument time)");
    }
    return out;
}

LogConfig parseLog(const Section& root) {
    LogConfig c;
    auto s = root.optionalTable("log");
    if (!s) return c;
    s->allowOnly({"path", "commit_interval_ms", "queue_limit_mb", "stop_timeout_s"});
    c.path = s->string("path", "");
    c.commit_interval_ms = s->integer("commit_interval_ms", 10, 1000, 500);
    c.queue_limit_mb = s->number("queue_limit_mb", 1.0, 4096.0, 64.0);
    c.stop_timeout_s = s->number("stop_timeout_s", 0.0, 600.0, 5.0);
    return c;
}

ImportConfig parseImport(const Section& root) {
    ImportConfig c;
    auto s = root.optionalTable("import");
    if (!s) return c;
    s->allowOnly({"max_clock_disagreement_s"});
    c.max_clock_disagreement_s = s->number("max_clock_disagreement_s", 0.0, 86400.0, 2.0);
    return c;
}

}  // namespace sg::config
