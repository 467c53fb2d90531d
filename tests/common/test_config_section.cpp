// Config access: every error names the file, the key path and the line.
#include <gtest/gtest.h>

#include "common/config_section.hpp"

namespace {

using sg::config::ConfigError;
using sg::config::Section;

std::string errorOf(const std::function<void()>& f) {
    try {
        f();
    } catch (const ConfigError& e) {
        return e.what();
    }
    return "(no error)";
}

TEST(ConfigSection, ReadsTypedValues) {
    auto t = sg::config::parseText("a = 1.5\nb = 3\ns = \"x\"\n[sub]\nv = [1, 2.0, 3]\n", "t.toml");
    Section root(t, "t.toml");
    EXPECT_DOUBLE_EQ(root.number("a"), 1.5);
    EXPECT_DOUBLE_EQ(root.number("b"), 3.0);  // integers are accepted where numbers are wanted
    EXPECT_EQ(root.integer("b", 0, 10), 3);
    EXPECT_EQ(root.string("s"), "x");
    EXPECT_EQ(root.table("sub").numbers("v", 3), (std::vector<double>{1, 2, 3}));
    EXPECT_EQ(root.number("missing", 0, 1, 0.25), 0.25);
}

TEST(ConfigSection, ErrorsNameFileKeyAndLine) {
    auto t = sg::config::parseText("[[input]]\nname = \"a\"\n[[input]]\nbaud = \"fast\"\n", "s.toml");
    Section root(t, "s.toml");
    auto inputs = root.tables("input");
    ASSERT_EQ(inputs.size(), 2u);
    auto msg = errorOf([&] { inputs[1].integer("baud", 50, 4000000); });
    EXPECT_NE(msg.find("s.toml:4"), std::string::npos) << msg;
    EXPECT_NE(msg.find("input[1].baud"), std::string::npos) << msg;
    EXPECT_NE(msg.find("\"fast\""), std::string::npos) << msg;
    msg = errorOf([&] { inputs[0].string("kind"); });
    EXPECT_NE(msg.find("input[0].kind"), std::string::npos) << msg;
    EXPECT_NE(msg.find("missing"), std::string::npos) << msg;
}

TEST(ConfigSection, RangeChoiceAndUnknownKeys) {
    auto t = sg::config::parseText("k = 12.0\nmode = \"sideways\"\nbaudrate = 9600\n", "r.toml");
    Section root(t, "r.toml");
    EXPECT_NE(errorOf([&] { root.number("k", 0, 10); }).find("from 0 to 10"), std::string::npos);
    EXPECT_NE(errorOf([&] { root.choice("mode", {"left", "right"}); }).find("\"left\", \"right\""),
              std::string::npos);
    auto msg = errorOf([&] { root.allowOnly({"k", "mode", "baud"}); });
    EXPECT_NE(msg.find("'baudrate': unknown key"), std::string::npos) << msg;
}

TEST(ConfigSection, SyntaxErrorNamesFileAndLine) {
    auto msg = errorOf([] { sg::config::parseText("a = 1\nb = = 2\n", "bad.toml"); });
    EXPECT_NE(msg.find("bad.toml:2"), std::string::npos) << msg;
}

}  // namespace
