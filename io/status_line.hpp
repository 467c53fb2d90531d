// The one-line acquisition status printed every second by `record`:
//   gnss 10.0 l/s 0 err | mag 20.0 l/s 3 err 120 DROPPED OUTAGE | fix 52.123456 4.123456 | field 48123.4 nT | log 12345
// (DROPPED: datagrams the kernel dropped; after "log": rows waiting and LOST lines while the disk
// fails)
#pragma once

#include <map>
#include <string>

#include "engine/line_decoder.hpp"
#include "io/log_writer.hpp"

namespace sg::io {

class StatusLine {
public:
    // Text for the period since the previous call, `dt_s` seconds long (> 0).
    std::string update(const std::map<std::string, engine::SourceCounters>& counters,
                       const LogWriterStats& log, double dt_s);

private:
    std::map<std::string, std::uint64_t> m_prev_lines;
};

}  // namespace sg::io
