// InstrumentClock: time of day + RMC/ZDA date -> full UTC, across midnight, month, year and leap
// day. Reference epoch seconds come from GNU date (`date -u -d 2026-12-31T23:59:59 +%s`).
#include <gtest/gtest.h>

#include <limits>

#include "decode/instrument_clock.hpp"
#include "decode/nmea.hpp"

namespace {

using namespace sg::decode;
using sg::kNsPerSecond;
using sg::TimeNs;

constexpr TimeNs ns(std::int64_t s) { return s * kNsPerSecond; }

TEST(InstrumentClock, NothingBeforeADate) {
    InstrumentClock c;
    EXPECT_FALSE(c.hasDate());
    EXPECT_FALSE(c.toUtc(3600.0));
}

TEST(InstrumentClock, DaysFromCivilMatchesGnuDate) {
    EXPECT_EQ(daysFromCivil(Date{1970, 1, 1}), 0);
    EXPECT_EQ(daysFromCivil(Date{2027, 1, 1}) * 86400, 1798761600);  // GNU date
    EXPECT_EQ(daysFromCivil(Date{2028, 3, 1}) * 86400, 1835481600);  // GNU date
    EXPECT_TRUE(isValidDate(Date{2028, 2, 29}));
    EXPECT_FALSE(isValidDate(Date{2027, 2, 29}));
    EXPECT_FALSE(isValidDate(Date{2100, 2, 29}));  // century rule (Gregorian calendar)
    EXPECT_TRUE(isValidDate(Date{2000, 2, 29}));   // 400-year rule
    EXPECT_FALSE(isValidDate(Date{2026, 4, 31}));
    EXPECT_FALSE(isValidDate(Date{2026, 13, 1}));
}

TEST(InstrumentClock, MidnightAtYearEnd) {
    InstrumentClock c;
    c.setDate(Date{2026, 12, 31}, 86399.0);  // RMC at 23:59:59 on 31 Dec 2026
    EXPECT_EQ(*c.toUtc(86399.5), ns(1798761599) + 500'000'000);  // GNU date: 2026-12-31T23:59:59
    // Time of day jumps back by ~24 h: next day, 2027-01-01T00:00:00.25.
    EXPECT_EQ(*c.toUtc(0.25), ns(1798761600) + 250'000'000);
    // A late string stamped before midnight (arriving after the GNSS already said 00:00:00)
    // belongs to the old day, and does not move the clock back.
    EXPECT_EQ(*c.toUtc(86399.9), ns(1798761599) + 900'000'000);
    EXPECT_EQ(*c.toUtc(1.0), ns(1798761601));
    // Ordinary progress through the day.
    EXPECT_EQ(*c.toUtc(43200.0), ns(1798761600 + 43200));
}

TEST(InstrumentClock, LeapDay) {
    InstrumentClock c;
    c.setDate(Date{2028, 2, 28}, 86000.0);
    EXPECT_EQ(*c.toUtc(86399.0), ns(1835395199));  // GNU date: 2028-02-28T23:59:59
    EXPECT_EQ(*c.toUtc(10.0), ns(1835395200 + 10));  // 2028-02-29T00:00:10
    EXPECT_EQ(*c.toUtc(43000.0), ns(1835395200 + 43000));
    EXPECT_EQ(*c.toUtc(86000.0), ns(1835395200 + 86000));
    EXPECT_EQ(*c.toUtc(5.0), ns(1835481600 + 5));  // 2028-03-01T00:00:05
}

TEST(InstrumentClock, NewDateReplacesTheRolledDay) {
    InstrumentClock c;
    c.setDate(Date{2026, 12, 31}, 86399.0);
    (void)c.toUtc(0.5);                        // rolled to 1 Jan by the time of day
    c.setDate(Date{2027, 1, 1}, 1.0);          // the GNSS confirms
    EXPECT_EQ(*c.toUtc(2.0), ns(1798761602));
}

TEST(InstrumentClock, ObservesRmcAndZda) {
    InstrumentClock c;
    // DePriest's RMC (from memory): 23 March 1994 12:35:19 = 764426119 (GNU date).
    c.observe(decodeNmea("$GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,W*6A"));
    ASSERT_TRUE(c.hasDate());
    EXPECT_EQ(*c.toUtc(45319.0), ns(764426119));
    // Trimble's ZDA (from memory): 4 July 2002 20:15:30 = 1025813730 (GNU date).
    InstrumentClock z;
    z.observe(decodeNmea("$GPZDA,201530.00,04,07,2002,00,00*60"));
    EXPECT_EQ(*z.toUtc(72930.0), ns(1025813730));
    // A sentence that failed does not set the date.
    InstrumentClock bad;
    bad.observe(decodeNmea("$GPZDA,201530.00,04,07,2002,00,00*61"));
    EXPECT_FALSE(bad.hasDate());
}

TEST(InstrumentClock, ForwardJumpOfMoreThanHalfADayIsThePreviousDay) {
    // The rule as stated in the API: only jumps within 12 h count as the same day, so a data
    // gap of more than 12 h without a new date is ambiguous and resolved as "late sample".
    InstrumentClock c;
    c.setDate(Date{2028, 2, 29}, 10.0);
    EXPECT_EQ(*c.toUtc(86000.0), ns(1835395200 - 86400 + 86000));  // 2028-02-28T23:53:20
}

TEST(InstrumentClock, RejectsTimesOutsideADay) {
    InstrumentClock c;
    c.setDate(Date{2026, 12, 2}, 0.0);
    EXPECT_FALSE(c.toUtc(-1.0));
    EXPECT_FALSE(c.toUtc(86401.0));
    EXPECT_FALSE(c.toUtc(std::numeric_limits<double>::quiet_NaN()));
}

}  // namespace
