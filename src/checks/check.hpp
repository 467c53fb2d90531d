// One live check: a measured value compared with a warn and an alarm limit, with hysteresis and a
// hold time, producing alarm episodes (start, end, peak level and value, acknowledgement).
//
// Rules (documented in docs/checks.md):
// - A value is "bad at level L" when it is beyond L's limit (above it for kAbove checks, below it
//   for kBelow checks). While a level is active it stays bad until the value comes back inside the
//   limit by more than the hysteresis (so a value wobbling around a limit does not flap).
// - A level is raised only after the value has been bad at that level for hold_s, and lowered only
//   after it has been good for hold_s. hold_s = 0 acts at once.
// - A missing value (std::nullopt) leaves the state unchanged: silence has its own checks.
// - An episode starts when the level leaves kOk and ends when it returns to kOk; its peak is the
//   worst level and the most extreme value seen during it.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "common/received_line.hpp"

namespace sg::checks {

enum class Level : std::uint8_t { kOk = 0, kWarn = 1, kAlarm = 2 };
const char* levelName(Level level);

enum class Direction : std::uint8_t {
    kAbove,  // bad when the value exceeds the limit (altitude, deviation, noise, silence)
    kBelow,  // bad when the value falls under the limit (signal quality, low speed)
};

struct Limits {
    bool enabled = true;
    Direction direction = Direction::kAbove;
    double warn = 0.0;        // in the check's unit
    double alarm = 0.0;       // in the check's unit; beyond warn
    double hysteresis = 0.0;  // in the check's unit, >= 0
    double hold_s = 0.0;      // seconds, >= 0
};

struct Episode {
    std::string check;
    TimeNs start_ns = 0;
    std::optional<TimeNs> end_ns;  // empty while active
    Level peak_level = Level::kWarn;
    double peak_value = 0.0;
    std::optional<TimeNs> ack_ns;  // when the operator acknowledged it
    std::uint64_t id = 0;          // unique within a CheckSet, in order of start
    std::string detail;            // what exactly is wrong, for checks that say more than a value
};

class Check {
public:
    Check(std::string name, std::string unit, Limits limits);

    const std::string& name() const { return m_name; }
    const std::string& unit() const { return m_unit; }
    const Limits& limits() const { return m_limits; }
    Level level() const { return m_level; }
    std::optional<double> lastValue() const { return m_last; }

    // Feeds a value measured at t_ns (times must not go backwards). Returns the new level.
    Level update(TimeNs t_ns, std::optional<double> value);

private:
    bool beyond(double value, double limit, bool active) const;

    std::string m_name;
    std::string m_unit;
    Limits m_limits;
    Level m_level = Level::kOk;
    // Index 0 = warn, 1 = alarm: since when the condition has been continuously true / false.
    std::optional<TimeNs> m_bad_since[2];
    std::optional<TimeNs> m_good_since[2];
    bool m_bad_now[2] = {false, false};
    std::optional<double> m_last;
};

}  // namespace sg::checks
