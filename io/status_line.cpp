// The one-line acquisition status; see status_line.hpp.
#include "io/status_line.hpp"

#include <fmt/format.h>

namespace sg::io {

std::string StatusLine::update(const std::map<std::string, engine::SourceCounters>& counters,
                               const LogWriterStats& log, double dt_s) {
    std::string out;
    std::optional<std::pair<double, double>> fix;
    std::optional<double> field;
    std::string values;
    for (const auto& [name, c] : counters) {
        auto& prev = m_prev_lines[name];
        const double rate = dt_s > 0 ? static_cast<double>(c.lines - prev) / dt_s : 0.0;
        prev = c.lines;
        if (!out.empty()) out += " | ";
        out += fmt::format("{} {:.1f} l/s {} err", name, rate, c.rejected);
        if (c.dropped > 0) out += fmt::format(" {} DROPPED", c.dropped);
        if (c.in_outage) out += " OUTAGE";
        if (c.last_lat_deg && c.last_lon_deg) fix = {{*c.last_lat_deg, *c.last_lon_deg}};
        if (c.last_field_nT) field = c.last_field_nT;
        if (c.last_value)
            values += fmt::format(" | {} {} {:.2f}", name, c.last_value->first, c.last_value->second);
    }
    out += fix ? fmt::format(" | fix {:.6f} {:.6f}", fix->first, fix->second) : " | fix -";
    out += field ? fmt::format(" | field {:.1f} nT", *field) : " | field -";
    out += values;
    out += fmt::format(" | log {}", log.raw_committed);
    if (log.queued_rows > 0 && !log.last_error.empty())
        out += fmt::format(" ({} rows waiting, {:.1f} MB)", log.queued_rows,
                           static_cast<double>(log.queued_bytes) / (1 << 20));
    if (log.rawLost() > 0) out += fmt::format(" LOST {}", log.rawLost());
    if (!log.last_error.empty()) out += " LOG ERROR: " + log.last_error;
    return out;
}

}  // namespace sg::io
