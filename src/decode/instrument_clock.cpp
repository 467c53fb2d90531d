// InstrumentClock: time of day + latest RMC/ZDA date -> full UTC, across midnight.
#include "decode/instrument_clock.hpp"

#include <cmath>

namespace sg::decode {

namespace {
constexpr double kDay_s = 86'400.0;
constexpr double kHalfDay_s = 43'200.0;
// A time of day may reach 86400.999 s during a leap second (23:59:60.x).
bool isTimeOfDay(double tod_s) { return std::isfinite(tod_s) && tod_s >= 0.0 && tod_s < 86'401.0; }
}  // namespace

void InstrumentClock::setDate(const Date& date, double tod_s) {
    if (!isValidDate(date) || !isTimeOfDay(tod_s)) return;
    m_has_date = true;
    m_day = daysFromCivil(date);
    m_last_tod_s = tod_s;
}

std::optional<TimeNs> InstrumentClock::toUtc(double tod_s) {
    if (!m_has_date || !isTimeOfDay(tod_s)) return std::nullopt;
    std::int64_t day = m_day;
    const double jump = tod_s - m_last_tod_s;
    if (jump < -kHalfDay_s) {
        // Back by more than half a day: midnight has passed.
        ++m_day;
        day = m_day;
        m_last_tod_s = tod_s;
    } else if (jump > kHalfDay_s) {
        // Forward by more than half a day: a late sample from before midnight. Do not move the
        // clock back for it.
        day = m_day - 1;
    } else if (jump > 0) {
        m_last_tod_s = tod_s;
    }
    const auto whole_s = static_cast<std::int64_t>(std::floor(tod_s));
    const auto frac_ns = std::llround((tod_s - static_cast<double>(whole_s)) * 1e9);
    return (day * static_cast<std::int64_t>(kDay_s) + whole_s) * kNsPerSecond + frac_ns;
}

void InstrumentClock::observe(const NmeaSentence& s) {
    if (!isUsable(s.reason)) return;
    if (const auto* r = std::get_if<Rmc>(&s.data)) {
        if (r->date && r->tod_s) setDate(*r->date, *r->tod_s);
    } else if (const auto* z = std::get_if<Zda>(&s.data)) {
        setDate(z->date, z->tod_s);
    }
}

}  // namespace sg::decode
