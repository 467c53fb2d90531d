// Something that happened to an input rather than a line: an outage starting or ending, a
// finite source (a file read once) reaching its end, or datagrams the kernel dropped before the
// reader got them (Drops, `count` new ones since the last report). Produced by the readers (io/), logged by the
// line decoder (src/engine/line_decoder.hpp).
#pragma once

#include <cstdint>
#include <string>

#include "common/received_line.hpp"

namespace sg {

struct SourceEvent {
    enum class Kind { OutageStart, OutageEnd, Finished, Drops };
    Kind kind = Kind::OutageStart;
    std::string source;
    TimeNs utc_ns = 0;   // when it happened (system clock)
    TimeNs mono_ns = 0;
    std::string detail;  // e.g. "connect 127.0.0.1:4001: Connection refused"
    std::uint64_t count = 0;  // Drops: datagrams lost since the previous report
};

}  // namespace sg
