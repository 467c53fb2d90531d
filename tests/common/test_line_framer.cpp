// Line framing: CR, LF and CRLF terminators, the 4 KiB cut, binary flags, no byte lost.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "common/line_framer.hpp"
#include "common/received_line.hpp"

namespace {

struct Piece {
    std::string bytes;
    std::uint8_t flags;
};

std::vector<Piece> frame(const std::string& input, std::size_t max = 4096, std::size_t chunk = 7) {
    std::vector<Piece> out;
    sg::LineFramer framer([&](std::string_view b, std::uint8_t f) { out.push_back({std::string(b), f}); },
                          max);
    for (std::size_t i = 0; i < input.size(); i += chunk) framer.feed(input.substr(i, chunk));
    framer.flush();
    return out;
}

TEST(LineFramer, SplitsOnCrLfAndCrlf) {
    auto out = frame("a\r\nb\nc\rd");
    ASSERT_EQ(out.size(), 4u);
    EXPECT_EQ(out[0].bytes, "a");
    EXPECT_EQ(out[1].bytes, "b");
    EXPECT_EQ(out[2].bytes, "c");
    EXPECT_EQ(out[3].bytes, "d");  // delivered by flush()
    for (const auto& p : out) EXPECT_EQ(p.flags, 0);
}

TEST(LineFramer, CrlfSplitAcrossFeedsGivesOneLine) {
    std::vector<std::string> lines;
    sg::LineFramer framer([&](std::string_view b, std::uint8_t) { lines.emplace_back(b); });
    framer.feed("abc\r");
    framer.feed("\ndef\r\n");
    EXPECT_EQ(lines, (std::vector<std::string>{"abc", "def"}));
}

TEST(LineFramer, EmptyLinesAreDelivered) {
    auto out = frame("\n\nx\n", 4096, 1);
    ASSERT_EQ(out.size(), 3u);
    EXPECT_EQ(out[0].bytes, "");
    EXPECT_EQ(out[2].bytes, "x");
}

TEST(LineFramer, LongLineIsCutAndNothingLost) {
    const std::string big(10 * 1024, 'Z');
    auto out = frame(big + "\nok\n", 4096, 1000);
    ASSERT_EQ(out.size(), 4u);  // 4096 + 4096 + 2048, then "ok"
    EXPECT_EQ(out[0].bytes.size(), 4096u);
    EXPECT_TRUE(out[0].flags & sg::kLineTruncated);
    EXPECT_FALSE(out[0].flags & sg::kLineContinued);
    EXPECT_TRUE(out[1].flags & sg::kLineContinued);
    EXPECT_TRUE(out[1].flags & sg::kLineTruncated);
    EXPECT_TRUE(out[2].flags & sg::kLineContinued);
    EXPECT_FALSE(out[2].flags & sg::kLineTruncated);
    EXPECT_EQ(out[0].bytes.size() + out[1].bytes.size() + out[2].bytes.size(), big.size());
    EXPECT_EQ(out[3].bytes, "ok");
    EXPECT_EQ(out[3].flags, 0);
}

TEST(LineFramer, NulAndControlBytesAreFlaggedBinary) {
    auto out = frame(std::string("ab\0cd\n", 6) + "e\x01\n" + "tab\tok\n");
    ASSERT_EQ(out.size(), 3u);
    EXPECT_EQ(out[0].bytes.size(), 5u);
    EXPECT_TRUE(out[0].flags & sg::kLineBinary);
    EXPECT_TRUE(out[1].flags & sg::kLineBinary);
    EXPECT_EQ(out[2].flags, 0);
}

}  // namespace
