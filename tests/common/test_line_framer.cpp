// Line framing: CR, LF, CRLF and CR CR LF terminators, the 4 KiB cut, binary flags, a leading
// UTF-8 byte-order mark, no byte lost.
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

TEST(LineFramer, CrCrLfIsOneLineEnd) {
    // CR LF written through a second text-mode conversion becomes CR CR LF: one line end, so
    // that line numbers stay the file's. A bare CR CR (old Mac text) is still an empty line.
    for (std::size_t chunk : {1u, 2u, 3u, 7u, 4096u}) {
        auto out = frame("a\r\r\nb\r\r\nc\r\rd\r\n\r\ne", 4096, chunk);
        std::vector<std::string> got;
        for (const auto& p : out) got.push_back(p.bytes);
        EXPECT_EQ(got, (std::vector<std::string>{"a", "b", "c", "", "d", "", "e"})) << chunk;
    }
    auto tail = frame("a\r\r", 4096, 1);  // the stream ends after CR CR: the empty line is kept
    ASSERT_EQ(tail.size(), 2u);
    EXPECT_EQ(tail[1].bytes, "");
}

TEST(LineFramer, LeadingUtf8BomIsSkippedInAnySplit) {
    // U+FEFF encoded in UTF-8 is EF BB BF (Unicode Standard, 23.8).
    const std::string text = "\xEF\xBB\xBF$GPHDT,1.0,T\r\nx\n";
    for (std::size_t chunk : {1u, 2u, 3u, 5u, 4096u}) {
        std::vector<std::string> lines;
        sg::LineFramer framer([&](std::string_view b, std::uint8_t) { lines.emplace_back(b); });
        for (std::size_t i = 0; i < text.size(); i += chunk) framer.feed(text.substr(i, chunk));
        framer.flush();
        EXPECT_TRUE(framer.bomSkipped()) << chunk;
        EXPECT_EQ(lines, (std::vector<std::string>{"$GPHDT,1.0,T", "x"})) << chunk;
    }
}

TEST(LineFramer, BomBytesElsewhereOrIncompleteAreData) {
    // Only at the very start; a partial BOM or one later in the stream is kept byte for byte.
    std::vector<std::string> lines;
    sg::LineFramer framer([&](std::string_view b, std::uint8_t) { lines.emplace_back(b); });
    framer.feed("\xEF\xBB");
    framer.feed("Z\n\xEF\xBB\xBFq\n");
    framer.flush();
    EXPECT_FALSE(framer.bomSkipped());
    EXPECT_EQ(lines, (std::vector<std::string>{"\xEF\xBBZ", "\xEF\xBB\xBFq"}));
    std::vector<std::string> short_lines;
    sg::LineFramer cut([&](std::string_view b, std::uint8_t) { short_lines.emplace_back(b); });
    cut.feed("\xEF\xBB");
    cut.flush();  // the stream ended inside a would-be BOM: those bytes are a line
    EXPECT_EQ(short_lines, (std::vector<std::string>{"\xEF\xBB"}));
}

TEST(LineFramer, BinaryFlagFollowsThePieceThatHoldsTheByte) {
    std::string line(10, 'a');
    line[7] = '\0';
    auto out = frame(line + "\n", 5, 3);
    ASSERT_EQ(out.size(), 2u);
    EXPECT_FALSE(out[0].flags & sg::kLineBinary);
    EXPECT_TRUE(out[1].flags & sg::kLineBinary);
}

}  // namespace
