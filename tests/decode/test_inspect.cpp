// `swathguard inspect` end to end: a capture with good and bad lines of every kind (mixed line
// endings, NUL bytes, a 5000-byte line, empty lines) gives one JSON object per framed line with
// the right reason, then a summary whose counts add up; --config and --as change the layouts.
// Runs the built executable (build the `swathguard` target first; CI builds everything).
#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>
#include <iterator>
#include <filesystem>
#include <fstream>
#include <random>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace {

namespace fs = std::filesystem;
using nlohmann::json;

std::string xorSealed(const std::string& body) {
    unsigned x = 0;
    for (unsigned char c : body) x ^= c;
    char hex[3];
    std::snprintf(hex, sizeof hex, "%02X", x & 0xFFu);
    return body + "*" + hex;
}

class Inspect : public ::testing::Test {
protected:
    void SetUp() override {
        m_exe = fs::path(SG_BINARY_DIR) / "app" / "swathguard";
        ASSERT_TRUE(fs::exists(m_exe)) << m_exe << " not built";
        m_dir = fs::temp_directory_path() / ("sg_inspect_" + std::to_string(std::random_device{}()));
        fs::create_directories(m_dir);
    }
    void TearDown() override { fs::remove_all(m_dir); }

    fs::path write(const std::string& name, const std::string& bytes) {
        const fs::path p = m_dir / name;
        std::ofstream(p, std::ios::binary) << bytes;
        return p;
    }

    // Runs swathguard with `args`; returns exit status, fills stdout lines and stderr text.
    int run(const std::string& args, std::vector<json>& out, std::string& err) {
        const fs::path o = m_dir / "out.txt", e = m_dir / "err.txt";
        const std::string cmd = "'" + m_exe.string() + "' " + args + " > '" + o.string() +
                                "' 2> '" + e.string() + "'";
        const int status = std::system(cmd.c_str());
        std::ifstream in(o);
        for (std::string line; std::getline(in, line);) out.push_back(json::parse(line));
        std::ifstream ein(e);
        err.assign(std::istreambuf_iterator<char>(ein), {});
        return status;
    }

    fs::path m_exe;
    fs::path m_dir;
};

TEST_F(Inspect, EveryLineGetsAnObjectAndTheSummaryAddsUp) {
    std::string cap =
        "$" + xorSealed("GPRMC,235959.50,A,5412.3456,N,00739.2593,E,4.8,47.1,311226,,,R") + "\r\n";
    cap += xorSealed("SGM,2,235959.900,48213.417,97,12.40,4.10") + "\n";  // line 2
    cap += xorSealed("SGM,1,000000.100,48213.500,97,12.40,") + "\r";        // line 3, bare CR
    cap += xorSealed("SGA,000000.10,4.12") + "\r\n";                        // 4
    cap += "$GPHDT,47.5,T*00\r\n";                                          // 5 bad checksum
    cap += "\r\n";                                                          // 6 empty
    cap += std::string("SGC,00\0\0,1", 10) + "\r\n";                        // 7 binary
    cap += "$GP" + std::string(5000, 'A') + "\r\n";                         // 8, 9: cut at 4096
    cap += "$GPGSV,1,1,00*79\r\n";                                          // 10 unknown
    cap += "hello world";                                                   // 11, no terminator

    std::vector<json> out;
    std::string err;
    ASSERT_EQ(run("inspect '" + write("cap.txt", cap).string() + "'", out, err), 0) << err;
    ASSERT_EQ(out.size(), 12u) << err;
    const char* reasons[] = {"ok",         "ok",          "ok",        "ok",
                             "bad_checksum", "empty_line", "binary_bytes", "too_long",
                             "too_long",   "unknown_sentence", "bad_start"};
    for (std::size_t i = 0; i < 11; ++i) {
        EXPECT_EQ(out[i]["line"], i + 1) << out[i].dump();
        EXPECT_EQ(out[i]["reason"], reasons[i]) << out[i].dump();
    }
    EXPECT_EQ(out[0]["source"], "nmea");
    EXPECT_EQ(out[0]["sentence"], "RMC");
    EXPECT_EQ(out[1]["layout"], "mag");
    EXPECT_DOUBLE_EQ(out[1]["fields"]["field_nT"].get<double>(), 48213.417);
    // Full UTC across midnight from the RMC date (GNU date: 2027-01-01T00:00:00Z = 1798761600).
    EXPECT_EQ(out[1]["fields"]["utc_ns"].get<std::int64_t>(), 1798761599'900'000'000LL);
    EXPECT_EQ(out[2]["fields"]["utc_ns"].get<std::int64_t>(), 1798761600'100'000'000LL);
    EXPECT_TRUE(out[2]["fields"]["altitude_m"].is_null());
    EXPECT_EQ(out[3]["layout"], "alt");

    const json& s = out[11]["summary"];
    EXPECT_EQ(s["lines"], 11);
    int by_reason = 0, by_type = 0;
    for (const auto& [k, v] : s["by_reason"].items()) by_reason += v.get<int>();
    for (const auto& [k, v] : s["by_type"].items()) by_type += v.get<int>();
    EXPECT_EQ(by_reason, 11);
    EXPECT_EQ(by_type, 11);
    EXPECT_EQ(s["by_reason"]["ok"], 4);
    EXPECT_EQ(s["by_reason"]["too_long"], 2);
    EXPECT_EQ(s["by_type"]["fieldmap:mag"], 2);
}

TEST_F(Inspect, ConfigLayoutsReplaceTheDefaults) {
    const auto cfg = write("survey.toml", R"(
[fieldmap.probe]
delimiter = ";"
time = 0
time_format = "seconds_of_day"
field_nT = 1
)");
    const auto cap = write("cap.txt", "3600.5;51234.5\n" + xorSealed("SGA,000000.10,4.12") + "\n");
    std::vector<json> out;
    std::string err;
    ASSERT_EQ(run("inspect '" + cap.string() + "' --config '" + cfg.string() + "'", out, err), 0)
        << err;
    ASSERT_EQ(out.size(), 3u);
    EXPECT_EQ(out[0]["layout"], "probe");
    EXPECT_DOUBLE_EQ(out[0]["fields"]["tod_s"].get<double>(), 3600.5);
    EXPECT_TRUE(out[0]["fields"]["utc_ns"].is_null());  // no date seen yet
    // The default SGA layout is gone, so the probe layout is tried and fails.
    EXPECT_NE(out[1]["reason"], "ok");

    // --as forces one layout for every line.
    out.clear();
    ASSERT_EQ(run("inspect '" + cap.string() + "' --as nmea", out, err), 0) << err;
    EXPECT_EQ(out[0]["reason"], "not_nmea");
}

TEST_F(Inspect, BadConfigNamesFileAndKey) {
    const auto cfg = write("bad.toml", "[fieldmap.m]\ntime = 0\nfeild_nT = 1\n");
    const auto cap = write("cap.txt", "x\n");
    std::vector<json> out;
    std::string err;
    EXPECT_NE(run("inspect '" + cap.string() + "' --config '" + cfg.string() + "'", out, err), 0);
    EXPECT_NE(err.find("bad.toml"), std::string::npos) << err;
    EXPECT_NE(err.find("feild_nT"), std::string::npos) << err;
    EXPECT_NE(run("inspect '" + cap.string() + "' --as nosuch", out, err), 0);
}

}  // namespace
