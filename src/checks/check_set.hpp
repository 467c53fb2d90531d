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
    int acknowledgeAll(TimeNs t_ns);

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
