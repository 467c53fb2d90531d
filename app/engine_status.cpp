// Status summaries; see engine_status.hpp.
#include "app/engine_status.hpp"

#include <ctime>

#include <fmt/format.h>

#include "engine/alarm_text.hpp"

namespace sg::app {

std::string utcText(TimeNs utc_ns) {
    const std::time_t secs = static_cast<std::time_t>(utc_ns / kNsPerSecond);
    std::tm tm{};
    gmtime_r(&secs, &tm);
    const int tenths = static_cast<int>((utc_ns % kNsPerSecond) / (kNsPerSecond / 10));
    return fmt::format("{:04}-{:02}-{:02}T{:02}:{:02}:{:02}.{}Z", tm.tm_year + 1900, tm.tm_mon + 1,
                       tm.tm_mday, tm.tm_hour, tm.tm_min, tm.tm_sec, tenths);
}

std::string engineStatus(const engine::SurveyEngine& e) {
    const auto& r = e.raster();
    const double cell2 = r.cellSize() * r.cellSize();
    std::string out = fmt::format("covered {:.0f} m2", static_cast<double>(r.coveredCells()) * cell2);
    if (const auto* lines = e.lines(); lines && lines->activeLine() >= 0) {
        out += fmt::format(" | line {}", lines->lines()[static_cast<std::size_t>(lines->activeLine())].name);
        if (e.deviation_m()) out += fmt::format(" dev {:+.1f} m", *e.deviation_m());
    } else {
        out += " | off line";
    }
    if (!e.sensors().empty() && e.sensors()[0].pose.altitude_source != nav::AltitudeSource::None)
        out += fmt::format(" | alt {:.1f} m", e.sensors()[0].pose.altitude_m);
    const auto active = e.checks().active();
    if (active.empty()) {
        out += " | no alarms";
    } else {
        out += " |";
        // Each open episode as the screen's banner and alarm list state it: its worst level and the
        // one sentence of engine::alarmStatement (a forming gap with its place and width). Never
        // the check's last value: a held alarm outlives the condition that raised it.
        const auto& spot = e.formingGapSpot();
        for (const auto* ep : active)
            out += fmt::format(" {}{} {}", ep->ack_ns ? "" : "*",
                               ep->peak_level == checks::Level::kAlarm ? "ALARM" : "warn",
                               engine::alarmStatement(*ep, spot ? &*spot : nullptr));
    }
    return out;
}

}  // namespace sg::app
