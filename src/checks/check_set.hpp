// The survey's live checks, their default limits, and the alarm episodes they produce.
// Check names are the keys of the [checks.NAME] config tables; docs/checks.md lists them.
#pragma once

#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "checks/check.hpp"
#include "common/config_section.hpp"

namespace sg::checks {

struct CheckSpec {
    std::string_view name;
    std::string_view unit;
    std::string_view what;  // one line for the operator
    Limits defaults;
};

// Every check swathguard knows, with the defaults used when the config does not set them.
const std::vector<CheckSpec>& catalogue();

// The words a surveyor reads for a check, e.g. "forming_gap" -> "Gap forming beside the last
// line". One table for the screen and the report; every catalogue entry has one (tested). An
// unknown name comes back as it is.
std::string_view checkWords(std::string_view check);

// A check's value in words, rounded to what it means (e.g. altitude 7.0 m, noise 1.39 nT,
// silence 25 s, speed 3.1 m/s (6.0 kn), fix_quality "GPS fix").
std::string checkValueText(std::string_view check, double value);

// The name of a GGA quality indicator (NMEA 0183, GGA field 6, from memory of the standard:
// 0 invalid, 1 GPS fix, 2 DGPS fix, 3 PPS fix, 4 RTK fixed, 5 RTK float, 6 estimated (dead
// reckoning), 7 manual input, 8 simulator). Anything else: "unknown".
std::string_view fixQualityName(int gga_quality);
// The fix type a fix_quality rank stands for (the inverse of fixQualityRank, e.g. 3 -> "GPS fix";
// rank 2 reads "DGPS or PPS fix", rank 5 "no fix").
std::string_view fixRankName(double rank);

// Fix-quality rank used by the fix_quality check: 0 best ... 5 no fix. From the GGA quality
// indicator (NMEA 0183: 0 invalid, 1 GPS, 2 DGPS, 4 RTK fixed, 5 RTK float, 6 estimated).
double fixQualityRank(int gga_quality);

// What happened to an episode at one update: the engine logs these to the events table.
struct EpisodeChange {
    enum class Kind : std::uint8_t { kStarted, kEscalated, kEnded, kAcknowledged } kind;
    Episode episode;  // a copy as it stands after the change
};

class CheckSet {
public:
    // Uses catalogue defaults, overridden by `overrides` (by check name).
    explicit CheckSet(const std::map<std::string, Limits>& overrides = {});

    // Reads [checks.NAME] tables (keys: enabled, warn, alarm, hysteresis, hold_s) under `root`.
    // `derived` carries defaults computed from the survey (e.g. the altitude limit from the
    // detection model); explicit config values win over them.
    static CheckSet fromConfig(const config::Section& root,
                               const std::map<std::string, Limits>& derived = {});

    // Feeds a value to the named check (an unknown name is a programming error: throws).
    // `detail` (optional) says what exactly is wrong; it is kept on the episode it starts or
    // escalates (e.g. "magnetometer sensor 1 has no configured [[sensor]]").
    void update(std::string_view name, TimeNs t_ns, std::optional<double> value,
                std::string_view detail = {});

    bool acknowledge(std::uint64_t episode_id, TimeNs t_ns);
    // Acknowledges every unacknowledged episode, or only those whose peak level is `only`
    // (the screen acknowledges alarms and warnings as two separate actions).
    int acknowledgeAll(TimeNs t_ns, std::optional<Level> only = std::nullopt);

    const Check& check(std::string_view name) const;
    const std::vector<Check>& checks() const { return m_checks; }
    const std::vector<Episode>& episodes() const { return m_episodes; }
    std::vector<const Episode*> active() const;
    // Changes since the last call, in order.
    std::vector<EpisodeChange> drainChanges();

private:
    Check& find(std::string_view name);

    std::vector<Check> m_checks;
    std::vector<std::optional<std::size_t>> m_open;  // per check: index of its open episode
    std::vector<Episode> m_episodes;
    std::vector<EpisodeChange> m_changes;
};

}  // namespace sg::checks
