// The survey's inputs, log and import settings: [[input]] tables, [log] and [import].
// Parsed with config::Section, so every error names the file, the key and the line.
// Documented in docs/config.md.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "common/config_section.hpp"

namespace sg::config {

enum class InputKind { Nmea, FieldMap };
enum class Transport { Serial, Udp, Tcp, File };
enum class ClockSource { Receive, Instrument };
enum class Parity { None, Even, Odd };

struct SerialSettings {
    std::string device;            // e.g. "/dev/ttyUSB0"
    std::uint32_t baud = 4800;     // bits per second, 50 .. 4 000 000
    Parity parity = Parity::None;
    std::uint8_t data_bits = 8;    // 5 .. 8
    std::uint8_t stop_bits = 1;    // 1 or 2
};

struct InputConfig {
    std::string name;           // unique; the `source` of every logged line
    InputKind kind = InputKind::Nmea;
    std::string fieldmap;       // name of the [fieldmap.NAME] table (kind fieldmap only)
    std::string role;           // "gnss", "heading", "depth", "mag", "altimeter", "cable"
    Transport transport = Transport::File;
    SerialSettings serial;      // transport serial
    std::string listen_host;    // transport udp: address to bind ("0.0.0.0" for all)
    std::uint16_t listen_port = 0;
    std::int64_t receive_buffer_bytes = 4 << 20;  // udp: SO_RCVBUF asked for (the kernel caps it)
    std::string connect_host;   // transport tcp
    std::uint16_t connect_port = 0;
    double reconnect_min_s = 0.25;  // first retry delay after a loss, seconds (<= 1)
    double reconnect_max_s = 0.5;   // the backoff doubles up to this, seconds (<= 1)
    std::string path;           // transport file
    bool follow = false;        // file: keep reading as the file grows
    // NMEA only: talker ids (sg::isTalkerId) whose sentences are exempt on this input from the
    // missing-checksum rule (decode::NmeaStreamDecoder): decoded and marked no_checksum when they
    // come without '*hh', verified when they carry one. For a multiplexer that merges a talker
    // that never sends checksums with one that does. Empty: no exemption (the default).
    std::vector<std::string> checksum_optional_talkers;
    ClockSource clock = ClockSource::Receive;
    double latency_ms = 0.0;    // fixed delay between the instrument's measurement and the line
    // False only when parsed for offline use (InputUse::Offline) from a table without
    // `transport`: `import` then takes the capture file from `--input NAME=PATH`.
    bool transport_given = true;
    // import, for a capture without any instrument time (HDT, DPT, a field map without `time`):
    // the [[input]] whose time span its lines are spread over ("" = the reference capture), and
    // its nominal line rate in Hz (optional; when set, checked against the span).
    std::string import_align;
    std::optional<double> import_rate_hz;
};

// Who reads the [[input]] tables: acquisition (`record`, the demo) needs a transport for each
// input; offline use (`import`, which reads capture files and lets `--input NAME=PATH` stand for
// the transport, and reading a log back: replay, gaps, report) lets `transport` be left out.
enum class InputUse { Acquisition, Offline };

struct LogConfig {
    std::string path;                  // SQLite file; empty = given on the command line
    std::int64_t commit_interval_ms = 500;  // 10 .. 1000: a crash loses at most this much
    double queue_limit_mb = 64.0;  // 1 .. 4096 MiB: writer backlog bound while the disk stalls
    double stop_timeout_s = 5.0;   // 0 .. 600 s: how long stopping waits for a stalled disk
};

struct ImportConfig {
    double max_clock_disagreement_s = 2.0;  // captures whose clocks differ more are reported
};

// Reads every [[input]] table of `root`. Throws ConfigError (file, key, line) on a missing or
// bad key, an unknown key, a duplicate name or a fieldmap that has no [fieldmap.NAME] table.
// With InputUse::Offline, `transport` may be left out (then no transport key may be given).
std::vector<InputConfig> parseInputs(const Section& root, InputUse use = InputUse::Acquisition);
// Reads [log] (all keys optional).
LogConfig parseLog(const Section& root);
// Reads [import] (all keys optional).
ImportConfig parseImport(const Section& root);

const char* toString(InputKind k);
const char* toString(Transport t);

}  // namespace sg::config
