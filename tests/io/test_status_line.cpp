// The one-line status of `record`: rate per source over the period, errors, outage, last fix,
// last field value, committed lines.
#include <gtest/gtest.h>

#include "io/status_line.hpp"

namespace {

using namespace sg::io;
using sg::engine::SourceCounters;

TEST(StatusLine, RatesErrorsFixFieldAndLog) {
    std::map<std::string, SourceCounters> c;
    c["gnss"].lines = 20;
    c["gnss"].rejected = 1;
    c["gnss"].last_lat_deg = 52.5;
    c["gnss"].last_lon_deg = 4.25;
    c["mag"].lines = 40;
    c["mag"].in_outage = true;
    c["mag"].last_field_nT = 48213.4;
    LogWriterStats log;
    log.raw_committed = 55;
    StatusLine s;
    EXPECT_EQ(s.update(c, log, 2.0),
              "gnss 10.0 l/s 1 err | mag 20.0 l/s 0 err OUTAGE | fix 52.500000 4.250000 | "
              "field 48213.4 nT | log 55");
    c["gnss"].lines = 30;  // 10 more lines in the next second
    c["mag"].lines = 40;
    const auto next = s.update(c, log, 1.0);
    EXPECT_NE(next.find("gnss 10.0 l/s"), std::string::npos) << next;
    EXPECT_NE(next.find("mag 0.0 l/s"), std::string::npos) << next;
    log.last_error = "disk full";
    EXPECT_NE(s.update(c, log, 1.0).find("LOG ERROR: disk full"), std::string::npos);
}

}  // namespace
