// Turns an instrument's UTC time of day into full UTC nanoseconds, using the latest date that an
// RMC or ZDA sentence reported, and handling midnight: a time of day that jumps back by more than
// 12 h belongs to the next day; one that jumps forward by more than 12 h is a late sample from the
// previous day (e.g. a magnetometer string stamped 23:59:59.9 that arrives after the GNSS has
// already reported 00:00:00 of the new date).
#pragma once

#include <cstdint>
#include <optional>

#include "common/received_line.hpp"
#include "decode/nmea.hpp"

namespace sg::decode {

class InstrumentClock {
public:
    // A date and the time of day (0 <= tod_s < 86401 s) it was reported with (RMC or ZDA).
    void setDate(const Date& date, double tod_s);
    bool hasDate() const { return m_has_date; }

    // Full UTC of a time of day, or nullopt before any date (or for a tod outside 0..86401 s).
    // Advances the clock's day at midnight (see the file comment).
    std::optional<TimeNs> toUtc(double tod_s);

    // Convenience: feed a decoded sentence; RMC (with date and time) and ZDA set the date.
    void observe(const NmeaSentence& s);

private:
    bool m_has_date = false;
    std::int64_t m_day = 0;  // days since 1970-01-01 of m_last_tod_s
    double m_last_tod_s = 0;
};

}  // namespace sg::decode
