// The survey's inputs, log and import settings: [[input]] tables, [log] and [import].
// Parsed with config::Section, so every error names the file, the key and the line.
// Documented in docs/config.md.
#pragma once

#include <cstdint>
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
    std::string connect_host;   // transport tcp
    std::uint16_t connect_port = 0;
    double reconnect_min_s = 0.5;   // first retry delay after a loss, seconds
    double reconnect_max_s = 10.0;  // the backoff doubles up to this, seconds
    std::string path;           // transport file
    bool transport_given = true;  // false: no transport key (an input that is only imported)
    bool follow = false;        // file: keep reading as the file grows
    ClockSource clock = ClockSource::Receive;
    double latency_ms = 0.0;    // fixed delay between the instrument's measurement and the line
};

struct LogConfig {
    std::string path;                  // SQLite file; empty = given on the command line
    std::int64_t commit_interval_ms = 500;  // 10 .. 1000: a crash loses at most this much
};

struct ImportConfig {
    double max_clock_disagreement_s = 2.0;  // captures whose clocks differ more are reported
};

// Reads every [[input]] table of `root`. Throws ConfigError (file, key, line) on a missing or
// bad key, an unknown key, a duplicate name or a fieldmap that has no [fieldmap.NAME] table.
std::vector<InputConfig> parseInputs(const Section& root);
// Reads [log] (all keys optional).
LogConfig parseLog(const Section& root);
// Reads [import] (all keys optional).
ImportConfig parseImport(const Section& root);

const char* toString(InputKind k);
const char* toString(Transport t);

}  // namespace sg::config
