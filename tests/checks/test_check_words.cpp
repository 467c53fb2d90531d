// The words a surveyor reads for each check (one table for the screen and the report) and the
// GNSS fix type by its NMEA 0183 name (issue #12: no internal identifiers on screen).
#include <gtest/gtest.h>

#include <set>
#include <string>

#include "checks/check_set.hpp"

namespace {

using namespace sg::checks;

TEST(CheckWords, EveryCheckOfTheCatalogueHasItsOwnWords) {
    std::set<std::string> seen;
    for (const auto& spec : catalogue()) {
        const std::string words(checkWords(spec.name));
        EXPECT_NE(words, std::string(spec.name)) << spec.name << " has no words";
        EXPECT_EQ(words.find('_'), std::string::npos) << words;  // no identifier
        EXPECT_TRUE(seen.insert(words).second) << "two checks read the same: " << words;
    }
    EXPECT_EQ(checkWords("no_such_check"), "no_such_check");
}

// GGA field 6, the GPS quality indicator. NMEA 0183 v4.10, GGA sentence (from memory of the
// standard): 0 fix not available or invalid, 1 GPS SPS mode fix valid, 2 differential GPS,
// 3 GPS PPS mode, 4 real time kinematic (fixed integers), 5 float RTK, 6 estimated (dead
// reckoning), 7 manual input mode, 8 simulator mode.
TEST(CheckWords, FixQualityByItsNmea0183Name) {
    EXPECT_EQ(fixQualityName(0), "no fix (invalid)");
    EXPECT_EQ(fixQualityName(1), "GPS fix");
    EXPECT_EQ(fixQualityName(2), "DGPS fix");
    EXPECT_EQ(fixQualityName(3), "PPS fix");
    EXPECT_EQ(fixQualityName(4), "RTK fixed");
    EXPECT_EQ(fixQualityName(5), "RTK float");
    EXPECT_EQ(fixQualityName(6), "estimated (dead reckoning)");
    EXPECT_EQ(fixQualityName(7), "manual input");
    EXPECT_EQ(fixQualityName(8), "simulator");
    EXPECT_EQ(fixQualityName(9), "unknown");
    // The fix_quality check's value is a rank; its text names the fix, never "3.00 rank".
    for (int q : {0, 1, 2, 4, 5, 6}) {
        const std::string text = checkValueText("fix_quality", fixQualityRank(q));
        EXPECT_EQ(text.find("rank"), std::string::npos) << text;
        if (q != 2) {
            EXPECT_EQ(text, q == 0 ? std::string("no fix") : std::string(fixQualityName(q))) << q;
        }
    }
}

TEST(CheckWords, ValuesRoundedToWhatTheyMean) {
    EXPECT_EQ(checkValueText("altitude", 7.04321), "7.0 m");
    EXPECT_EQ(checkValueText("noise", 1.38999), "1.39 nT");
    EXPECT_EQ(checkValueText("gnss_silence", 25.1), "25 s");
    EXPECT_EQ(checkValueText("signal_quality", 30.0), "30 %");
    // 1 kn = 1852 m / 3600 s: 2.0 m/s = 3.888 kn.
    EXPECT_EQ(checkValueText("speed_high", 2.0), "2.0 m/s (3.9 kn)");
}

}  // namespace
