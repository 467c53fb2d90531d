// `swathguard inspect` end to end: a capture with good and bad lines of every kind (mixed line
// endings, NUL bytes, a 5000-byte line, empty lines) gives one JSON object per framed line with
// the right reason, then a summary whose counts add up; --config and --as change the layouts.
// Runs the built executable (build the `swathguard` target first; CI builds everything).
#include <gtest/gtest.h>

#include <algorithm>
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
    cap += "$GP" + std::string(5000, 'A') + "\r\n";                         // 8 (2 pieces)
    cap += "$GPGSV,1,1,00*79\r\n";                                          // 9 unknown
    cap += "hello world";                                                   // 10, no terminator

    std::vector<json> out;
    std::string err;
    ASSERT_EQ(run("inspect '" + write("cap.txt", cap).string() + "'", out, err), 0) << err;
    ASSERT_EQ(out.size(), 12u) << err;
    const char* reasons[] = {"ok",         "ok",          "ok",        "ok",
                             "bad_checksum", "empty_line", "binary_bytes", "too_long",
                             "too_long",   "unknown_sentence", "bad_start"};
    // The line cut at 4096 bytes is one line of the file: both pieces carry its number.
    const int lines[] = {1, 2, 3, 4, 5, 6, 7, 8, 8, 9, 10};
    for (std::size_t i = 0; i < 11; ++i) {
        EXPECT_EQ(out[i]["line"], lines[i]) << out[i].dump();
        EXPECT_EQ(out[i]["reason"], reasons[i]) << out[i].dump();
    }
    EXPECT_FALSE(out[7].contains("piece"));
    EXPECT_EQ(out[8]["piece"], 2);
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
    EXPECT_EQ(s["lines"], 10);
    EXPECT_EQ(s["records"], 11);
    EXPECT_FALSE(s.contains("bom_skipped"));
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

// A capture of a multiplexed port (common practice: GNSS with checksums, gyro HE without; the
// checksum is NMEA 0183's XOR, computed in this file): without the option each gyro line after
// the first GNSS checksum is missing_checksum, with --checksum-optional-talkers HE it decodes.
TEST_F(Inspect, ChecksumOptionalTalkersOptionExemptsTheListedTalkerOnly) {
    const std::string gga =
        "$" + xorSealed("GPGGA,120000.00,5412.3456,N,00739.2593,E,4,14,0.7,1.2,M,45.0,M,,");
    std::string gga_lost = gga;
    gga_lost.erase(gga_lost.size() - 3, 1);  // its '*' lost in transit
    std::string hdt_bad = "$" + xorSealed("HEHDT,93.2,T");
    hdt_bad.back() = hdt_bad.back() == '0' ? '1' : '0';
    const std::string cap = gga + "\r\n$HEHDT,93.1,T\r\n" + gga_lost + "\r\n" + hdt_bad + "\r\n";
    const auto file = write("mux.nmea", cap);

    std::vector<json> out;
    std::string err;
    ASSERT_EQ(run("inspect '" + file.string() + "'", out, err), 0) << err;
    ASSERT_EQ(out.size(), 5u);
    EXPECT_EQ(out[1]["reason"], "missing_checksum");
    EXPECT_EQ(out[2]["reason"], "missing_checksum");

    out.clear();
    const std::string inspect = "inspect '" + file.string() + "' --checksum-optional-talkers ";
    ASSERT_EQ(run(inspect + "HE", out, err), 0) << err;
    ASSERT_EQ(out.size(), 5u);
    EXPECT_EQ(out[0]["reason"], "ok");
    EXPECT_EQ(out[1]["reason"], "no_checksum");
    EXPECT_DOUBLE_EQ(out[1]["fields"]["heading_deg"].get<double>(), 93.1);
    EXPECT_EQ(out[2]["reason"], "missing_checksum");  // the GNSS keeps the rule
    EXPECT_EQ(out[3]["reason"], "bad_checksum");      // a checksum sent is still verified
    EXPECT_EQ(out[4]["summary"]["by_reason"]["no_checksum"], 1);

    // Several ids, comma-separated; a malformed one is refused, naming the option.
    out.clear();
    ASSERT_EQ(run(inspect + "HC,HE", out, err), 0) << err;
    EXPECT_EQ(out[1]["reason"], "no_checksum");
    out.clear();
    EXPECT_NE(run(inspect + "he", out, err), 0);
    EXPECT_NE(err.find("--checksum-optional-talkers he"), std::string::npos) << err;
    EXPECT_TRUE(out.empty());
}

// Line numbers counted independently of the program: 1 + the number of LF bytes before the
// line's first byte (what `grep -n` and `sed -n` number; this capture has no bare CR).
int fileLineOf(const std::string& cap, const std::string& marker) {
    const auto at = cap.find(marker);
    EXPECT_NE(at, std::string::npos) << marker;
    return 1 + static_cast<int>(std::count(cap.begin(), cap.begin() + static_cast<long>(at), '\n'));
}

TEST_F(Inspect, RealReceiverQuirksKeepSentencesAndTheFilesLineNumbers) {
    // A capture with a UTF-8 byte-order mark, a CR CR LF ending, an overlong line and a corrupted
    // '*' after checksummed sentences; RMC with variation "999.9,E" and with the mode letter in
    // the E/W place. Sentences built here, checksums computed in this file.
    const std::string rmc1 =
        "$" + xorSealed("GPRMC,120000.00,A,5412.3456,N,00739.2593,E,4.8,47.1,020626,999.9,E,A");
    const std::string gga1 =
        "$" + xorSealed("GPGGA,120000.00,5412.3456,N,00739.2593,E,1,08,0.9,12.0,M,46.9,M,,");
    const std::string rmc2 =
        "$" + xorSealed("GPRMC,120001.00,A,5412.3460,N,00739.2600,E,4.8,47.1,020626,003.1,A");
    std::string corrupt = "$" + xorSealed("GPHDT,47.5,T");
    corrupt[corrupt.size() - 3] = ',';  // '*' lost: "...,T,hh" would read as one more field
    const std::string hdt = "$" + xorSealed("GPHDT,48.0,T");

    std::string cap = "\xEF\xBB\xBF" + rmc1 + "\r\n";  // line 1 behind the BOM
    cap += gga1 + "\r\r\n";                             // 2, written through two CR LF conversions
    cap += rmc2 + "\r\n";                               // 3
    cap += "$GPXXX," + std::string(6000, '7') + "\r\n";  // 4, cut by the framer
    cap += corrupt + "\r\n";                            // 5
    cap += hdt + "\r\r\n";                              // 6
    cap += xorSealed("SGM,2,120001.100,48213.417,97,12.40,4.10") + "\n";  // 7

    std::vector<json> out;
    std::string err;
    ASSERT_EQ(run("inspect '" + write("quirks.nmea", cap).string() + "'", out, err), 0) << err;
    ASSERT_EQ(out.size(), 9u) << err;  // 7 lines + 1 extra piece + summary

    // BOM skipped: the first sentence is decoded, not lost.
    EXPECT_EQ(out[0]["line"], fileLineOf(cap, rmc1));
    EXPECT_EQ(out[0]["sentence"], "RMC");
    EXPECT_EQ(out[0]["reason"], "field_ignored");
    EXPECT_TRUE(out[0]["fields"]["mag_var_deg"].is_null());
    EXPECT_EQ(out[0]["fields"]["date"], "2026-06-02");
    EXPECT_NE(out[0]["detail"].get<std::string>().find("'999.9'"), std::string::npos);
    // CR CR LF is one line end: no empty line in between, numbers stay the file's.
    EXPECT_EQ(out[1]["line"], fileLineOf(cap, gga1));
    EXPECT_EQ(out[1]["reason"], "ok");
    EXPECT_EQ(out[2]["line"], fileLineOf(cap, rmc2));
    EXPECT_EQ(out[2]["reason"], "field_ignored");
    EXPECT_EQ(out[2]["fields"]["mode"], "A");
    EXPECT_TRUE(out[2]["fields"]["mag_var_deg"].is_null());
    // The overlong line: two pieces, one line number.
    EXPECT_EQ(out[3]["line"], fileLineOf(cap, "$GPXXX"));
    EXPECT_EQ(out[4]["line"], fileLineOf(cap, "$GPXXX"));
    EXPECT_EQ(out[3]["reason"], "too_long");
    EXPECT_EQ(out[4]["piece"], 2);
    // The corrupted '*' after checksummed sentences is rejected, not read as data.
    EXPECT_EQ(out[5]["line"], fileLineOf(cap, corrupt));
    EXPECT_EQ(out[5]["reason"], "missing_checksum");
    EXPECT_FALSE(out[5].contains("fields"));
    EXPECT_EQ(out[6]["line"], fileLineOf(cap, hdt));
    EXPECT_EQ(out[6]["reason"], "ok");
    EXPECT_EQ(out[7]["line"], 7);
    EXPECT_EQ(out[7]["layout"], "mag");
    // Full UTC from the RMC date behind the BOM (GNU date -u -d 2026-06-02T12:00:01.1Z +%s%N).
    EXPECT_EQ(out[7]["fields"]["utc_ns"].get<std::int64_t>(), 1780401601'100'000'000LL);

    const json& s = out[8]["summary"];
    EXPECT_EQ(s["lines"], 7);
    EXPECT_EQ(s["records"], 8);
    EXPECT_EQ(s["bom_skipped"], true);
    EXPECT_EQ(s["by_reason"]["field_ignored"], 2);
    EXPECT_EQ(s["by_reason"]["missing_checksum"], 1);
    EXPECT_FALSE(s["by_reason"].contains("empty_line"));
}

TEST_F(Inspect, BinaryByteDetailIsHex) {
    const auto cap = write("bin.txt", std::string("$GPHDT,4\x1b.0,T\n", 14));
    std::vector<json> out;
    std::string err;
    ASSERT_EQ(run("inspect '" + cap.string() + "'", out, err), 0) << err;
    ASSERT_EQ(out.size(), 2u);
    EXPECT_EQ(out[0]["reason"], "binary_bytes");
    EXPECT_EQ(out[0]["detail"], "byte 0x1B at offset 8");
}

TEST_F(Inspect, JsonTextIsEscapedAndNumbersKeepTheirForm) {
    // The JSON is written by hand (no JSON library per line): check the text against the
    // document model of an independent writer (nlohmann::json here, as the tests use it), for
    // numbers with and without decimals, nulls, letters and a detail with quotes and non-ASCII.
    std::string cap = "$" + xorSealed("GPZDA,201530,04,07,2002,-3,00") + "\n";
    cap += "$" + xorSealed("SDDPT,12,0.5,") + "\n";
    cap += "ab\"c\\d\xE9,1\n";  // Latin-1 byte: invalid UTF-8 in the echoed detail
    std::vector<json> out;
    std::string err;
    ASSERT_EQ(run("inspect '" + write("esc.txt", cap).string() + "'", out, err), 0) << err;
    ASSERT_EQ(out.size(), 4u);
    EXPECT_EQ(out[0]["fields"], json::parse(R"({"tod_s":72930.0,"date":"2002-07-04",
        "zone_hours":-3,"zone_minutes":0})"));
    EXPECT_TRUE(out[0]["fields"]["tod_s"].is_number_float());
    EXPECT_TRUE(out[0]["fields"]["zone_hours"].is_number_integer());
    EXPECT_EQ(out[1]["fields"], json::parse(R"({"depth_m":12.0,"offset_m":0.5,"max_range_m":null})"));
    EXPECT_EQ(out[2]["source"], "none");
    const std::string d = out[2]["detail"].get<std::string>();
    EXPECT_NE(d.find("ab\"c\\d\xEF\xBF\xBD"), std::string::npos) << d;  // U+FFFD for the bad byte

    // Text form of the numbers, as nlohmann::json dump() writes them: 72930.0, 12.0, -3.
    std::ifstream in(m_dir / "out.txt");
    std::string first, second;
    std::getline(in, first);
    std::getline(in, second);
    EXPECT_NE(first.find("\"tod_s\":72930.0,"), std::string::npos) << first;
    EXPECT_NE(first.find("\"zone_hours\":-3,"), std::string::npos) << first;
    EXPECT_NE(second.find("\"depth_m\":12.0,"), std::string::npos) << second;
}

}  // namespace
