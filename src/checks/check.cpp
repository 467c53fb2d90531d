// Live check with hysteresis and hold time; see check.hpp for the rules.
#include "checks/check.hpp"

#include <utility>

namespace sg::checks {

const char* levelName(Level level) {
    switch (level) {
    case Level::kOk: return "ok";
    case Level::kWarn: return "warn";
    case Level::kAlarm: return "alarm";
    }
    return "?";
}

Check::Check(std::string name, std::string unit, Limits limits)
    : m_name(std::move(name)), m_unit(std::move(unit)), m_limits(limits) {}

bool Check::beyond(double value, double limit, bool active) const {
    // Once active, the value must come back inside by the hysteresis to count as good again.
    const double h = active ? m_limits.hysteresis : 0.0;
    if (m_limits.direction == Direction::kAbove) return active ? value > limit - h : value > limit;
    return active ? value < limit + h : value < limit;
}

Level Check::update(TimeNs t_ns, std::optional<double> value) {
    if (!m_limits.enabled || !value) return m_level;
    m_last = value;
    const double limit[2] = {m_limits.warn, m_limits.alarm};
    for (int i = 0; i < 2; ++i) {
        const bool active = static_cast<int>(m_level) >= i + 1;
        m_bad_now[i] = beyond(*value, limit[i], active);
        if (m_bad_now[i]) {
            if (!m_bad_since[i]) m_bad_since[i] = t_ns;
            m_good_since[i].reset();
        } else {
            if (!m_good_since[i]) m_good_since[i] = t_ns;
            m_bad_since[i].reset();
        }
    }
    const auto held = [&](const std::optional<TimeNs>& since) {
        return since && toSeconds(t_ns - *since) >= m_limits.hold_s;
    };
    // Raise to the highest level whose condition has held long enough.
    for (int i = 1; i >= 0; --i) {
        const auto level = static_cast<Level>(i + 1);
        if (level > m_level && held(m_bad_since[i])) {
            m_level = level;
            return m_level;
        }
    }
    // Lower once the current level's condition has been clear long enough.
    if (m_level != Level::kOk) {
        const int cur = static_cast<int>(m_level) - 1;
        if (held(m_good_since[cur])) {
            Level next = Level::kOk;
            for (int i = cur - 1; i >= 0; --i)
                if (m_bad_now[i]) {
                    next = static_cast<Level>(i + 1);
                    break;
                }
            m_level = next;
        }
    }
    return m_level;
}

}  // namespace sg::checks
