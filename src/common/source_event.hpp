// Something that happened to an input rather than a line: an outage starting or ending, or a
// finite source (a file read once) reaching its end. Produced by the readers (io/), logged by the
// line decoder (src/engine/line_decoder.hpp).
#pragma once

#include <string>

#include "common/received_line.hpp"

namespace sg {

struct SourceEvent {
    enum class Kind { OutageStart, OutageEnd, Finished };
    Kind kind = Kind::OutageStart;
    std::string source;
    TimeNs utc_ns = 0;   // when it happened (system clock)
    TimeNs mono_ns = 0;
    std::string detail;  // e.g. "connect 127.0.0.1:4001: Connection refused"
};

}  // namespace sg
