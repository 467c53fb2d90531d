// One line as an instrument delivered it: the unit that flows from the readers (or a log being
// replayed) into the core. Live acquisition and replay build exactly the same values.
#pragma once

#include <cstdint>
#include <string>

namespace sg {

// Nanoseconds. Monotonic times come from std::chrono::steady_clock, UTC times are nanoseconds
// since the Unix epoch (1970-01-01T00:00:00Z, leap seconds not counted, as POSIX time).
using TimeNs = std::int64_t;

constexpr TimeNs kNsPerSecond = 1'000'000'000;

inline double toSeconds(TimeNs t) { return static_cast<double>(t) * 1e-9; }

// Bit flags set by the line framer.
enum LineFlag : std::uint8_t {
    kLineTruncated = 1u << 0,  // longer than the framer's limit: the kept bytes are the first part
    kLineBinary = 1u << 1,     // held a NUL or another byte that no instrument text contains
    kLineContinued = 1u << 2,  // the remainder of a line that was cut at the limit
};

struct ReceivedLine {
    std::string source;   // input name from the config ("gnss", "mag", ...)
    TimeNs mono_ns = 0;   // monotonic receive time (steady clock)
    TimeNs utc_ns = 0;    // UTC receive time (system clock)
    std::string bytes;    // the line without its terminator, byte for byte
    std::uint8_t flags = 0;
};

}  // namespace sg
