// [[input]], [log] and [import] parsing: good tables read right, and every error names the file,
// the key path and the line (the rule for all config errors in this project).
#include <gtest/gtest.h>

#include "common/input_config.hpp"

namespace {

using namespace sg::config;

std::string errorOf(const std::string& toml) {
    try {
        auto t = parseText(toml, "survey.toml");
        Section root(t, "survey.toml");
        parseInputs(root);
        parseLog(root);
        parseImport(root);
    } catch (const ConfigError& e) {
        return e.what();
    }
    return "(no error)";
}

TEST(InputConfig, ReadsEveryTransport) {
    const std::string toml = R"(
[[input]]
name = "gnss"
kind = "nmea"
role = "gnss"
transport = "serial"
device = "/dev/ttyUSB0"
baud = 38400
parity = "even"
data_bits = 7
stop_bits = 2
clock = "instrument"
latency_ms = 20

[[input]]
name = "mag"
kind = "fieldmap"
fieldmap = "sgm"
role = "mag"
transport = "udp"
listen = "0.0.0.0:5005"

[[input]]
name = "hdg"
kind = "nmea"
role = "heading"
transport = "tcp"
connect = "10.0.0.5:4001"
reconnect_min_s = 0.2
reconnect_max_s = 0.8

[[input]]
name = "alt"
kind = "nmea"
role = "altimeter"
transport = "file"
path = "alt.txt"
follow = true

[fieldmap.sgm]
start = "SGM"
field_nT = 3

[log]
path = "survey.sqlite"
commit_interval_ms = 250

[import]
max_clock_disagreement_s = 0.5
)";
    auto t = parseText(toml, "survey.toml");
    Section root(t, "survey.toml");
    const auto in = parseInputs(root);
    ASSERT_EQ(in.size(), 4u);
    EXPECT_EQ(in[0].transport, Transport::Serial);
    EXPECT_EQ(in[0].serial.device, "/dev/ttyUSB0");
    EXPECT_EQ(in[0].serial.baud, 38400u);
    EXPECT_EQ(in[0].serial.parity, Parity::Even);
    EXPECT_EQ(in[0].serial.data_bits, 7);
    EXPECT_EQ(in[0].serial.stop_bits, 2);
    EXPECT_EQ(in[0].clock, ClockSource::Instrument);
    EXPECT_DOUBLE_EQ(in[0].latency_ms, 20.0);
    EXPECT_EQ(in[1].kind, InputKind::FieldMap);
    EXPECT_EQ(in[1].fieldmap, "sgm");
    EXPECT_EQ(in[1].listen_host, "0.0.0.0");
    EXPECT_EQ(in[1].listen_port, 5005);
    EXPECT_EQ(in[2].connect_host, "10.0.0.5");
    EXPECT_EQ(in[2].connect_port, 4001);
    EXPECT_DOUBLE_EQ(in[2].reconnect_max_s, 0.8);
    EXPECT_EQ(in[3].path, "alt.txt");
    EXPECT_TRUE(in[3].follow);
    EXPECT_EQ(in[3].clock, ClockSource::Receive);  // the default
    EXPECT_EQ(parseLog(root).commit_interval_ms, 250);
    EXPECT_EQ(parseLog(root).path, "survey.sqlite");
    EXPECT_DOUBLE_EQ(parseImport(root).max_clock_disagreement_s, 0.5);
}

TEST(InputConfig, DefaultsWithoutLogAndImportTables) {
    auto t = parseText("", "x.toml");
    Section root(t, "x.toml");
    EXPECT_TRUE(parseInputs(root).empty());
    EXPECT_EQ(parseLog(root).commit_interval_ms, 500);
    EXPECT_DOUBLE_EQ(parseImport(root).max_clock_disagreement_s, 2.0);
}

TEST(InputConfig, UnknownKeyNamesFileKeyAndLine) {
    const auto msg = errorOf(
        "[[input]]\nname = \"a\"\nkind = \"nmea\"\nrole = \"gnss\"\ntransport = \"serial\"\n"
        "device = \"/dev/ttyS0\"\nbaudrate = 4800\n");
    EXPECT_NE(msg.find("survey.toml:7"), std::string::npos) << msg;
    EXPECT_NE(msg.find("input[0].baudrate"), std::string::npos) << msg;
}

TEST(InputConfig, BadValuesNameFileKeyAndLine) {
    struct Case {
        std::string toml;
        std::string where;
        std::string key;
    };
    const std::string head = "[[input]]\nname = \"a\"\nkind = \"nmea\"\nrole = \"gnss\"\n";
    const Case cases[] = {
        {head + "transport = \"serial\"\ndevice = \"/dev/x\"\nbaud = \"fast\"\n", "survey.toml:7",
         "input[0].baud"},
        {head + "transport = \"serial\"\ndevice = \"/dev/x\"\nparity = \"mark\"\n",
         "survey.toml:7", "input[0].parity"},
        {head + "transport = \"udp\"\nlisten = \"5005\"\n", "survey.toml:6", "input[0].listen"},
        {head + "transport = \"tcp\"\nconnect = \"host:99999\"\n", "survey.toml:6",
         "input[0].connect"},
        {head + "transport = \"pigeon\"\n", "survey.toml:5", "input[0].transport"},
        {head + "transport = \"file\"\npath = \"x\"\nbaud = 9600\n", "survey.toml:7",
         "input[0].baud"},
        {head + "transport = \"tcp\"\nconnect = \"h:1\"\nreconnect_min_s = 0.9\nreconnect_max_s = 0.5\n",
         "survey.toml:8", "input[0].reconnect_max_s"},
        {"[[input]]\nname = \"m\"\nkind = \"fieldmap\"\nfieldmap = \"nope\"\nrole = \"mag\"\n"
         "transport = \"file\"\npath = \"x\"\n",
         "survey.toml:4", "input[0].fieldmap"},
        {head + "transport = \"file\"\npath = \"x\"\n" + head + "transport = \"file\"\npath = \"y\"\n",
         "survey.toml:8", "input[1].name"},
        // '@' starts the reserved source names (the crew's commands, "@crew").
        {"[[input]]\nname = \"@crew\"\nkind = \"nmea\"\nrole = \"gnss\"\ntransport = \"file\"\npath = \"x\"\n",
         "survey.toml:2", "input[0].name"},
        {"[log]\ncommit_interval_ms = 5000\n", "survey.toml:2", "log.commit_interval_ms"},
        {"[import]\nmax_clock_disagreement_s = \"2\"\n", "survey.toml:2",
         "import.max_clock_disagreement_s"},
    };
    for (const auto& c : cases) {
        const auto msg = errorOf(c.toml);
        EXPECT_NE(msg.find(c.where), std::string::npos) << c.toml << "\n-> " << msg;
        EXPECT_NE(msg.find(c.key), std::string::npos) << c.toml << "\n-> " << msg;
    }
}

TEST(InputConfig, MissingRequiredKeyNamesIt) {
    const auto msg = errorOf("[[input]]\nname = \"a\"\nkind = \"nmea\"\nrole = \"gnss\"\n"
                             "transport = \"serial\"\n");
    EXPECT_NE(msg.find("survey.toml"), std::string::npos) << msg;
    EXPECT_NE(msg.find("input[0].device"), std::string::npos) << msg;
}

// checksum_optional_talkers: the talkers a multiplexer merges without checksums onto an input
// whose other talkers send them (common practice; the rule and its exemption: docs/formats.md).
TEST(InputConfig, ChecksumOptionalTalkersAreReadPerNmeaInput) {
    const std::string head =
        "[[input]]\nkind = \"nmea\"\nrole = \"gnss\"\ntransport = \"file\"\npath = \"x\"\n";
    auto t = parseText(head + "name = \"mux\"\nchecksum_optional_talkers = [\"HE\", \"U1\"]\n" +
                           head + "name = \"gnss\"\n" + head +
                           "name = \"none\"\nchecksum_optional_talkers = []\n",
                       "survey.toml");
    Section root(t, "survey.toml");
    const auto in = parseInputs(root);
    ASSERT_EQ(in.size(), 3u);
    EXPECT_EQ(in[0].checksum_optional_talkers, (std::vector<std::string>{"HE", "U1"}));
    EXPECT_TRUE(in[1].checksum_optional_talkers.empty());  // default: the rule for every talker
    EXPECT_TRUE(in[2].checksum_optional_talkers.empty());
}

TEST(InputConfig, BadChecksumOptionalTalkersNameFileKeyAndLine) {
    const std::string kWhere = "survey.toml:6: key 'input[0].checksum_optional_talkers'";
    struct Case {
        std::string value;  // the TOML value of the key (line 6 of the file)
        std::string found;  // what the message must say it found
    };
    const std::string head =
        "[[input]]\nname = \"mux\"\nkind = \"nmea\"\nrole = \"gnss\"\ntransport = \"udp\"\n";
    const Case cases[] = {
        {"[\"he\"]", "found \"he\""},          // talker ids are upper case (NMEA 0183 address)
        {"[\"HEX\"]", "found \"HEX\""},        // a talker id is two characters
        {"[\"H\"]", "found \"H\""},
        {"\"HE\"", "found \"HE\""},            // not a list
        {"{ id = \"HE\" }", "found a table"},  // not a list either
        {"[\"HE\", 7]", "found integer 7"},    // an element that is no string
        {"[\"HE\", \"HE\"]", "found \"HE\""},  // listed twice
        {"[\"PG\"]", "found \"PG\""},          // '$P' starts a proprietary sentence, no talker
    };
    for (const auto& c : cases) {
        const std::string toml =
            head + "checksum_optional_talkers = " + c.value + "\nlisten = \"0.0.0.0:5005\"\n";
        const auto msg = errorOf(toml);
        EXPECT_NE(msg.find(kWhere), std::string::npos) << toml << "\n-> " << msg;
        EXPECT_NE(msg.find(c.found), std::string::npos) << toml << "\n-> " << msg;
        EXPECT_NE(msg.find("talker ids"), std::string::npos) << msg;
    }
    // A field-map input has no NMEA talkers: the key is refused there.
    const auto msg = errorOf(
        "[[input]]\nname = \"m\"\nkind = \"fieldmap\"\nfieldmap = \"sgm\"\nrole = \"mag\"\n"
        "checksum_optional_talkers = [\"HE\"]\ntransport = \"file\"\npath = \"x\"\n"
        "[fieldmap.sgm]\nstart = \"SGM\"\nfield_nT = 3\n");
    EXPECT_NE(msg.find(kWhere), std::string::npos) << msg;
    EXPECT_NE(msg.find("kind \"fieldmap\""), std::string::npos) << msg;
}

}  // namespace
