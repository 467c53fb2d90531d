// Cross-check against a decoder outside the project: gpsd's `gpsdecode` (Debian package
// gpsd-clients, installed by scripts/install-deps.sh). 300 RMC+GGA pairs at random positions on
// the whole globe, both hemispheres, with random speeds, courses and heights, are written to a
// file; gpsdecode turns each pair into one TPV report (JSON), which must agree with decodeNmea to
// the precision gpsdecode prints (9 decimals of degrees, 3 of m/s, 4 of degrees and metres).
#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <random>
#include <string>

#include <nlohmann/json.hpp>

#include "decode/nmea.hpp"
#include "reason_printer.hpp"

namespace {

using namespace sg::decode;

std::string sentence(const std::string& body) {
    unsigned x = 0;
    for (unsigned char c : body) x ^= c;
    char hex[3];
    std::snprintf(hex, sizeof hex, "%02X", x & 0xFFu);
    return "$" + body + "*" + hex;
}

std::string angle(double deg, int deg_digits) {
    const double a = std::abs(deg);
    const int d = static_cast<int>(a);
    char buf[40];
    std::snprintf(buf, sizeof buf, "%0*d%08.5f", deg_digits, d, (a - d) * 60.0);
    return buf;
}

struct Expected {
    double lat_deg, lon_deg, sog_mps, cog_deg, alt_m;
};

TEST(GpsdecodeCrossCheck, RmcAndGgaAgreeWithGpsd) {
    if (std::system("command -v gpsdecode >/dev/null 2>&1") != 0) {
        FAIL() << "gpsdecode not found: install gpsd-clients (scripts/install-deps.sh)";
    }
    const auto dir = std::filesystem::temp_directory_path() /
                     ("sg_gpsdecode_" + std::to_string(::testing::UnitTest::GetInstance()->random_seed()) +
                      "_" + std::to_string(std::random_device{}()));
    std::filesystem::create_directories(dir);
    const auto in_path = dir / "in.nmea";
    const auto out_path = dir / "out.json";

    std::mt19937_64 rng(20261202);
    std::uniform_real_distribution<double> lat_d(-89.9, 89.9), lon_d(-179.9, 179.9),
        kn_d(0.0, 30.0), cog_d(0.0, 359.99), alt_d(-50.0, 500.0);
    std::map<std::string, Expected> expected;  // by gpsd's ISO time
    {
        std::ofstream out(in_path, std::ios::binary);
        for (int i = 0; i < 300; ++i) {
            const int tod = 3600 + i;
            char t[16];
            std::snprintf(t, sizeof t, "%02d%02d%02d.00", tod / 3600, (tod / 60) % 60, tod % 60);
            const double lat = lat_d(rng), lon = lon_d(rng);
            const std::string la = angle(lat, 2), lo = angle(lon, 3);
            const char ns = lat >= 0 ? 'N' : 'S', ew = lon >= 0 ? 'E' : 'W';
            char rmc[160], gga[160];
            std::snprintf(rmc, sizeof rmc, "GPRMC,%s,A,%s,%c,%s,%c,%.2f,%.2f,021226,,,A", t,
                          la.c_str(), ns, lo.c_str(), ew, kn_d(rng), cog_d(rng));
            std::snprintf(gga, sizeof gga, "GPGGA,%s,%s,%c,%s,%c,1,08,0.9,%.2f,M,40.0,M,,", t,
                          la.c_str(), ns, lo.c_str(), ew, alt_d(rng));
            const std::string rmc_line = sentence(rmc), gga_line = sentence(gga);
            out << rmc_line << "\r\n" << gga_line << "\r\n";

            const auto r = decodeNmea(rmc_line);
            const auto g = decodeNmea(gga_line);
            ASSERT_EQ(r.reason, Reason::Ok) << rmc_line << ": " << r.detail;
            ASSERT_EQ(g.reason, Reason::Ok) << gga_line << ": " << g.detail;
            const auto& rd = std::get<Rmc>(r.data);
            const auto& gd = std::get<Gga>(g.data);
            char iso[40];
            std::snprintf(iso, sizeof iso, "%04d-%02d-%02dT%02d:%02d:%02d.000Z", rd.date->year,
                          rd.date->month, rd.date->day, tod / 3600, (tod / 60) % 60, tod % 60);
            expected[iso] = {*gd.lat_deg, *gd.lon_deg, *rd.sog_mps, *rd.cog_deg, *gd.alt_m};
            EXPECT_DOUBLE_EQ(*rd.lat_deg, *gd.lat_deg);
        }
    }
    const std::string cmd = "gpsdecode < '" + in_path.string() + "' > '" + out_path.string() +
                            "' 2>/dev/null";
    ASSERT_EQ(std::system(cmd.c_str()), 0) << cmd;

    std::ifstream in(out_path);
    std::string line;
    int compared = 0;
    while (std::getline(in, line)) {
        const auto j = nlohmann::json::parse(line, nullptr, false);
        if (j.is_discarded() || j.value("class", "") != "TPV" || !j.contains("time")) continue;
        const auto it = expected.find(j["time"].get<std::string>());
        ASSERT_NE(it, expected.end()) << line;
        const Expected& e = it->second;
        EXPECT_NEAR(e.lat_deg, j["lat"].get<double>(), 1e-9) << line;
        EXPECT_NEAR(e.lon_deg, j["lon"].get<double>(), 1e-9) << line;
        EXPECT_NEAR(e.sog_mps, j["speed"].get<double>(), 6e-4) << line;
        EXPECT_NEAR(e.cog_deg, j["track"].get<double>(), 6e-5) << line;
        EXPECT_NEAR(e.alt_m, j["altMSL"].get<double>(), 6e-5) << line;
        ++compared;
    }
    // gpsd reports once per cycle and needs one cycle to learn its end: all but the first.
    EXPECT_GE(compared, 298);
    std::filesystem::remove_all(dir);
}

}  // namespace
