// Live check catalogue, config parsing and alarm episodes; see check_set.hpp.
#include "checks/check_set.hpp"

#include <cmath>
#include <cstdio>
#include <utility>

#include <algorithm>
#include <stdexcept>

namespace sg::checks {

namespace {

Limits above(double warn, double alarm, double hysteresis, double hold_s) {
    return Limits{true, Direction::kAbove, warn, alarm, hysteresis, hold_s};
}
Limits below(double warn, double alarm, double hysteresis, double hold_s) {
    return Limits{true, Direction::kBelow, warn, alarm, hysteresis, hold_s};
}

}  // namespace

// Defaults are the team's choices for a towed caesium-vapour array at 3-5 kn; every survey
// should set its own from its specification. Documented in docs/checks.md.
const std::vector<CheckSpec>& catalogue() {
    static const std::vector<CheckSpec> specs = {
        {"altitude", "m", "sensor altitude above the seabed",
         above(4.0, 5.0, 0.2, 1.0)},  // the engine derives these from the detection model
        {"deviation", "m", "cross-track distance from the active line", above(5.0, 10.0, 0.5, 2.0)},
        {"speed_high", "m/s", "speed over ground above its band", above(2.9, 3.4, 0.1, 5.0)},
        {"speed_low", "m/s", "speed over ground below its band", below(1.0, 0.5, 0.1, 5.0)},
        {"sample_spacing", "m", "along-track distance between magnetometer samples",
         above(0.5, 1.0, 0.05, 1.0)},
        {"mag_silence", "s", "time since the last magnetometer sample", above(1.0, 3.0, 0.0, 0.0)},
        {"gnss_silence", "s", "time since the last position fix", above(1.5, 3.0, 0.0, 0.0)},
        {"altitude_lost", "s", "time since the last known sensor altitude",
         above(1.0, 3.0, 0.0, 0.0)},
        {"fix_quality", "rank", "GNSS fix quality (0 RTK fixed ... 5 no fix)",
         above(2.5, 3.5, 0.0, 2.0)},
        {"position_error", "m", "GST horizontal position error (1 sigma)",
         above(1.0, 2.0, 0.1, 2.0)},
        {"noise", "nT", "fourth-difference noise estimate of the total field",
         above(0.3, 0.5, 0.02, 2.0)},
        {"signal_quality", "%", "magnetometer signal quality", below(60.0, 40.0, 2.0, 1.0)},
        {"forming_gap", "m", "width of the strip left unseen beside the neighbouring run",
         above(0.5, 2.0, 0.2, 2.0)},
        // Any datagram the kernel dropped is data lost before it reached the log.
        {"input_drops", "datagrams", "datagrams dropped by the kernel in the last 10 s (UDP inputs)",
         above(0.5, 0.5, 0.0, 0.0)},
        // Setup checks: a wrong configuration is an alarm within seconds, never a silent 0 %.
        {"unknown_sensor", "sensors",
         "magnetometer sensor indices in the strings with no [[sensor]] (seen in the last 5 s)",
         above(0.5, 0.5, 0.0, 1.0)},
        {"pose_inputs", "s",
         "time magnetometer samples have arrived without a value their position needs (first "
         "fix, HDT, cable out, sensor depth, altitude) that never arrived, or (HDT, cable out, "
         "sensor depth) that stopped arriving for longer than the pose may bridge",
         above(2.0, 3.0, 0.0, 0.0)},
        {"crs_area", "deg", "distance of the fixes outside the survey CRS's area of use",
         above(0.5, 3.0, 0.0, 0.0)},
    };
    return specs;
}

std::string_view checkWords(std::string_view check) {
    // Beside the catalogue: a new check needs its words here too (tests/checks test_check_words).
    static const std::pair<std::string_view, std::string_view> kWords[] = {
        {"altitude", "Sensor too high above the seabed"},
        {"deviation", "Off the active line"},
        {"speed_high", "Speed too high"},
        {"speed_low", "Speed too low"},
        {"sample_spacing", "Samples too far apart"},
        {"mag_silence", "No magnetometer data"},
        {"gnss_silence", "No position fixes"},
        {"altitude_lost", "Sensor altitude unknown"},
        {"fix_quality", "GNSS fix degraded"},
        {"position_error", "Position error large"},
        {"noise", "Magnetometer noise high"},
        {"signal_quality", "Magnetometer signal weak"},
        {"forming_gap", "Gap forming beside the last line"},
        {"input_drops", "Input data lost before logging"},
        {"unknown_sensor", "Sensor missing from the setup"},
        {"pose_inputs", "Sensor position cannot be computed"},
        {"crs_area", "Positions outside the survey's map projection"},
    };
    for (const auto& [name, words] : kWords)
        if (name == check) return words;
    return check;
}

std::string checkValueText(std::string_view check, double value) {
    char buf[64];
    if (check == "fix_quality") return std::string(fixRankName(value));
    if (check == "speed_high" || check == "speed_low") {
        // 1 knot = 1852 m / 3600 s (international nautical mile).
        std::snprintf(buf, sizeof buf, "%.1f m/s (%.1f kn)", value, value * 3600.0 / 1852.0);
        return buf;
    }
    const CheckSpec* spec = nullptr;
    for (const auto& c : catalogue())
        if (c.name == check) spec = &c;
    const std::string unit = spec ? std::string(spec->unit) : std::string();
    int decimals = 1;  // metres: a tenth is what a fish height or an offset can mean
    if (unit == "nT") decimals = 2;
    else if (unit == "s" || unit == "%" || unit == "datagrams" || unit == "sensors") decimals = 0;
    std::snprintf(buf, sizeof buf, "%.*f%s%s", decimals, value, unit.empty() ? "" : " ", unit.c_str());
    return buf;
}

std::string_view fixQualityName(int q) {
    switch (q) {
    case 0: return "no fix (invalid)";
    case 1: return "GPS fix";
    case 2: return "DGPS fix";
    case 3: return "PPS fix";
    case 4: return "RTK fixed";
    case 5: return "RTK float";
    case 6: return "estimated (dead reckoning)";
    case 7: return "manual input";
    case 8: return "simulator";
    default: return "unknown";
    }
}

std::string_view fixRankName(double rank) {
    const long r = std::lround(rank);
    switch (r) {
    case 0: return "RTK fixed";
    case 1: return "RTK float";
    case 2: return "DGPS or PPS fix";
    case 3: return "GPS fix";
    case 4: return "estimated (dead reckoning)";
    default: return "no fix";
    }
}

double fixQualityRank(int q) {
    switch (q) {
    case 4: return 0;  // RTK fixed
    case 5: return 1;  // RTK float
    case 2: return 2;  // differential
    case 3: return 2;  // PPS: treated like differential
    case 1: return 3;  // autonomous
    case 6: return 4;  // dead reckoning (estimated)
    default: return 5;  // 0 invalid, 7 manual, 8 simulation, anything else
    }
}

CheckSet::CheckSet(const std::map<std::string, Limits>& overrides) {
    for (const auto& spec : catalogue()) {
        Limits limits = spec.defaults;
        if (auto it = overrides.find(std::string(spec.name)); it != overrides.end())
            limits = it->second;
        m_checks.emplace_back(std::string(spec.name), std::string(spec.unit), limits);
    }
    m_open.resize(m_checks.size());
}

CheckSet CheckSet::fromConfig(const config::Section& root,
                              const std::map<std::string, Limits>& derived) {
    std::map<std::string, Limits> limits = derived;
    if (auto checks = root.optionalTable("checks")) {
        std::vector<std::string> names;
        for (const auto& spec : catalogue()) names.emplace_back(spec.name);
        for (const auto& key : checks->keys()) {
            if (std::find(names.begin(), names.end(), key) == names.end()) {
                std::string list;
                for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
                checks->fail(key, "a known check name (" + list + ")");
            }
            const auto t = checks->table(key);
            t.allowOnly({"enabled", "warn", "alarm", "hysteresis", "hold_s"});
            const auto& spec = *std::find_if(catalogue().begin(), catalogue().end(),
                                             [&](const CheckSpec& s) { return s.name == key; });
            Limits l = limits.count(key) ? limits[key] : spec.defaults;
            l.enabled = t.boolean("enabled", l.enabled);
            l.warn = t.number("warn", -1e12, 1e12, l.warn);
            l.alarm = t.number("alarm", -1e12, 1e12, l.alarm);
            l.hysteresis = t.number("hysteresis", 0.0, 1e12, l.hysteresis);
            l.hold_s = t.number("hold_s", 0.0, 86400.0, l.hold_s);
            const bool ordered = l.direction == Direction::kAbove ? l.alarm >= l.warn
                                                                  : l.alarm <= l.warn;
            if (!ordered)
                t.fail("alarm", l.direction == Direction::kAbove
                                    ? "an alarm limit at or above the warn limit"
                                    : "an alarm limit at or below the warn limit");
            limits[key] = l;
        }
    }
    return CheckSet(limits);
}

Check& CheckSet::find(std::string_view name) {
    for (auto& c : m_checks)
        if (c.name() == name) return c;
    throw std::logic_error("unknown check: " + std::string(name));
}

const Check& CheckSet::check(std::string_view name) const {
    return const_cast<CheckSet*>(this)->find(name);
}

void CheckSet::update(std::string_view name, TimeNs t_ns, std::optional<double> value,
                      std::string_view detail) {
    Check& c = find(name);
    const std::size_t idx = static_cast<std::size_t>(&c - m_checks.data());
    const Level before = c.level();
    const Level now = c.update(t_ns, value);
    auto& open = m_open[idx];
    if (open) {
        Episode& ep = m_episodes[*open];
        if (value) {
            const bool worse = c.limits().direction == Direction::kAbove
                                   ? *value > ep.peak_value
                                   : *value < ep.peak_value;
            if (worse) ep.peak_value = *value;
        }
        if (now > ep.peak_level) {
            ep.peak_level = now;
            if (!detail.empty()) ep.detail = std::string(detail);
            m_changes.push_back({EpisodeChange::Kind::kEscalated, ep});
        }
        if (now == Level::kOk) {
            ep.end_ns = t_ns;
            m_changes.push_back({EpisodeChange::Kind::kEnded, ep});
            open.reset();
        }
    } else if (before == Level::kOk && now != Level::kOk) {
        Episode ep;
        ep.check = c.name();
        ep.start_ns = t_ns;
        ep.peak_level = now;
        ep.peak_value = value.value_or(0.0);
        ep.id = m_episodes.size() + 1;
        ep.detail = std::string(detail);
        m_episodes.push_back(ep);
        open = m_episodes.size() - 1;
        m_changes.push_back({EpisodeChange::Kind::kStarted, ep});
    }
}

bool CheckSet::acknowledge(std::uint64_t episode_id, TimeNs t_ns) {
    if (episode_id == 0 || episode_id > m_episodes.size()) return false;
    Episode& ep = m_episodes[episode_id - 1];
    if (ep.ack_ns) return false;
    ep.ack_ns = t_ns;
    m_changes.push_back({EpisodeChange::Kind::kAcknowledged, ep});
    return true;
}

int CheckSet::acknowledgeAll(TimeNs t_ns, std::optional<Level> only) {
    int n = 0;
    for (auto& ep : m_episodes)
        if (!ep.ack_ns && (!only || ep.peak_level == *only) && acknowledge(ep.id, t_ns)) ++n;
    return n;
}

std::vector<const Episode*> CheckSet::active() const {
    std::vector<const Episode*> out;
    for (const auto& o : m_open)
        if (o) out.push_back(&m_episodes[*o]);
    return out;
}

std::vector<EpisodeChange> CheckSet::drainChanges() {
    std::vector<EpisodeChange> out;
    out.swap(m_changes);
    return out;
}

}  // namespace sg::checks
