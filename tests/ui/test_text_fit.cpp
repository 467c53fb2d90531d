// ui/text_fit: eliding, wrapping and choosing strip fields. Properties checked against ImGui's own
// text measurement (ImFont::CalcTextSizeA) with its built-in font; no display needed.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include <imgui.h>

#include "ui/text_fit.hpp"

namespace {

class TextFit : public ::testing::Test {
protected:
    void SetUp() override {
        ImGui::CreateContext();
        ImGuiIO& io = ImGui::GetIO();
        io.Fonts->AddFontDefault();
        unsigned char* px = nullptr;
        int w = 0, h = 0;
        io.Fonts->GetTexDataAsRGBA32(&px, &w, &h);
        m_font = io.Fonts->Fonts[0];
        m_size = m_font->FontSize;
    }
    void TearDown() override { ImGui::DestroyContext(); }
    float width(const std::string& t) const { return m_font->CalcTextSizeA(m_size, 1e9f, 0.0f, t.c_str()).x; }
    ImFont* m_font = nullptr;
    float m_size = 0;
};

TEST_F(TextFit, ElideKeepsWhatFitsAndShortensTheRest) {
    const std::string t = "Coverage is a model's estimate";
    EXPECT_EQ(sg::ui::elideToWidth(t, width(t), m_font, m_size), t);  // fits exactly: unchanged
    for (float room : {width(t) - 1.0f, width(t) * 0.5f, width("ab...")}) {
        const std::string e = sg::ui::elideToWidth(t, room, m_font, m_size);
        ASSERT_GE(e.size(), 3u);
        EXPECT_EQ(e.substr(e.size() - 3), "...");
        EXPECT_LE(width(e), room);
        const std::string kept = e.substr(0, e.size() - 3);
        EXPECT_EQ(t.rfind(kept, 0), 0u) << "a prefix of the text: " << e;
        EXPECT_NE(kept.back(), ' ');  // no "word ..." with a space before the dots
    }
    EXPECT_EQ(sg::ui::elideToWidth(t, width("...") - 1.0f, m_font, m_size), "");
}

TEST_F(TextFit, ElideNeverSplitsAUtf8Character) {
    const std::string t = "G24 190 m\xC2\xB2 \xC2\xB2\xC2\xB2\xC2\xB2";  // superscript two, 2 bytes each
    for (float room = width("..."); room < width(t); room += 1.0f) {
        const std::string e = sg::ui::elideToWidth(t, room, m_font, m_size);
        if (e.empty()) continue;
        const std::string kept = e.substr(0, e.size() - 3);
        ASSERT_FALSE(!kept.empty() && static_cast<unsigned char>(kept.back()) == 0xC2) << "cut inside a character";
    }
}

TEST_F(TextFit, WrapKeepsEveryWordInOrderWithinTheWidth) {
    const std::string t = "ALARM Gap forming beside the last line: 7.0 m (+7 more)";
    const float room = width("forming beside");
    const auto lines = sg::ui::wrapToWidth(t, room, m_font, m_size);
    ASSERT_GT(lines.size(), 1u);
    std::string joined;
    for (const auto& l : lines) {
        EXPECT_LE(width(l), room) << l;
        joined += (joined.empty() ? "" : " ") + l;
    }
    EXPECT_EQ(joined, t);
}

TEST(FitStrip, DropsLowestPriorityFirstRightmostAmongEqualsAndKeepsTheKept) {
    using sg::ui::StripField;
    const std::vector<StripField> f = {{100, 10}, {100, 100}, {100, 10}, {100, 50}};
    // Everything fits: all shown (3 spacings of 5).
    EXPECT_EQ(sg::ui::fitStrip(f, 415, 5, 90), (std::vector<bool>{true, true, true, true}));
    // One must go: the rightmost of the two lowest.
    EXPECT_EQ(sg::ui::fitStrip(f, 414, 5, 90), (std::vector<bool>{true, true, false, true}));
    // Two must go: both lowest.
    EXPECT_EQ(sg::ui::fitStrip(f, 300, 5, 90), (std::vector<bool>{false, true, false, true}));
    // No room at all: only what is at or above `keep` stays (the caller shortens it).
    EXPECT_EQ(sg::ui::fitStrip(f, 10, 5, 90), (std::vector<bool>{false, true, false, false}));
}

}  // namespace
