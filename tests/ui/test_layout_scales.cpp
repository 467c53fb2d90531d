// The layout holds at UI scales 1.0, 1.5, 2.0 and 2.5 on 1280x800 and 1920x1080 windows, drawing
// the real demo survey (the same snapshot as DemoSurveyShowsCoverageGapAndAlarmWherePlaced in
// test_screen.cpp: simulated to 1480 s through the whole core, alarm banner up).
//
// After each GPU-free frame the test walks what ImGui produced:
// - text: every glyph quad in the draw data (a quad whose texture coordinates are a glyph's of
//   the loaded font, or part of one when ImGui clipped it) is grouped into text runs (glyphs
//   following each other on one line); no two runs may overlap, no glyph may lie outside the
//   window, and no glyph may be cut by a clip rectangle;
// - widgets: every ImGui window's content extent this frame (imgui_internal.h,
//   ImGuiWindow::DC.CursorMaxPos, the furthest any item reached) must lie inside its window, so
//   no toggle or button falls off to the right or below (the lists under the tabs may scroll
//   vertically and are exempt from the bottom check).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <memory>
#include <sstream>
#include <string>
#include <vector>

#include <imgui.h>
#include <imgui_internal.h>

#include "engine/snapshot.hpp"
#include "ui/screen.hpp"
#include "ui/tile_textures.hpp"

std::shared_ptr<const sg::engine::Snapshot> demoSnapshotAt(double seconds);  // test_screen.cpp

namespace {

struct NullBackend final : sg::ui::TextureBackend {
    ImTextureID create(int) override { return reinterpret_cast<ImTextureID>(std::uintptr_t{1}); }
    void upload(ImTextureID, int, const std::vector<ImU32>&) override {}
    void destroy(ImTextureID) override {}
};

struct Box {
    float x0, y0, x1, y1;
};

struct TextRun {
    Box box;
    std::string window;  // the draw list's owner, for messages
    int glyphs = 0;
};

struct FrameText {
    std::vector<TextRun> runs;
    std::vector<std::string> problems;  // glyphs outside the viewport or cut by a clip rectangle
};

bool sameUv(float a, float b) { return std::fabs(a - b) < 1e-6f; }

// Finds the glyph quads of every draw list (ImDrawList::PrimRectUV writes a glyph as the indices
// i, i+1, i+2, i, i+2, i+3 over four axis-aligned corners) and groups them into runs.
FrameText collectText(const ImDrawData& dd, const ImFont& font, ImVec2 display) {
    FrameText out;
    const ImTextureID atlas = ImGui::GetIO().Fonts->TexID;
    for (int l = 0; l < dd.CmdListsCount; ++l) {
        const ImDrawList& dl = *dd.CmdLists[l];
        const std::string owner = dl._OwnerName ? dl._OwnerName : "?";
        for (const ImDrawCmd& cmd : dl.CmdBuffer) {
            if (cmd.UserCallback || cmd.TextureId != atlas) continue;
            TextRun run{};
            bool open = false;
            float prev_x1 = 0;
            auto close = [&] {
                if (open) out.runs.push_back(run);
                open = false;
            };
            for (unsigned p = 0; p + 6 <= cmd.ElemCount; p += 3) {
                const ImDrawIdx* ix = dl.IdxBuffer.Data + cmd.IdxOffset + p;
                const unsigned i = ix[0];
                if (!(ix[1] == i + 1 && ix[2] == i + 2 && ix[3] == i && ix[4] == i + 2 && ix[5] == i + 3)) {
                    continue;
                }
                const ImDrawVert* v = dl.VtxBuffer.Data + cmd.VtxOffset + i;
                const bool rect = v[0].pos.y == v[1].pos.y && v[1].pos.x == v[2].pos.x && v[2].pos.y == v[3].pos.y &&
                                  v[3].pos.x == v[0].pos.x && v[0].pos.x < v[2].pos.x && v[0].pos.y < v[2].pos.y;
                if (!rect) continue;
                const float u0 = v[0].uv.x, v0 = v[0].uv.y, u1 = v[2].uv.x, v1 = v[2].uv.y;
                if (sameUv(u0, u1) || sameUv(v0, v1)) continue;  // solid fills use the one white texel
                const ImFontGlyph* exact = nullptr;
                const ImFontGlyph* within = nullptr;
                for (const ImFontGlyph& g : font.Glyphs) {
                    if (sameUv(g.U0, u0) && sameUv(g.V0, v0) && sameUv(g.U1, u1) && sameUv(g.V1, v1)) {
                        exact = &g;
                        break;
                    }
                    if (!within && u0 >= g.U0 - 1e-6f && u1 <= g.U1 + 1e-6f && v0 >= g.V0 - 1e-6f && v1 <= g.V1 + 1e-6f)
                        within = &g;
                }
                if (!exact && !within) continue;  // not a glyph (e.g. anti-aliased line texels)
                const Box b{v[0].pos.x, v[0].pos.y, v[2].pos.x, v[2].pos.y};
                std::ostringstream where;
                where << owner << " glyph '" << static_cast<char>((exact ? exact : within)->Codepoint) << "' at ("
                      << b.x0 << ", " << b.y0 << ")";
                const ImVec4& clip = cmd.ClipRect;  // the scissor the renderer applies
                if (b.x1 <= clip.x || b.x0 >= clip.z || b.y1 <= clip.y || b.y0 >= clip.w) continue;  // not shown
                const bool scissored = b.x0 < clip.x - 0.5f || b.x1 > clip.z + 0.5f || b.y0 < clip.y - 0.5f ||
                                       b.y1 > clip.w + 0.5f;
                // A list that scrolls shows part of its last line: that is scrolling, not a cut.
                const ImGuiWindow* win = ImGui::FindWindowByName(owner.c_str());
                const bool scroll_edge = win && win->ScrollMax.y > 0.0f && b.x0 >= clip.x - 0.5f && b.x1 <= clip.z + 0.5f;
                if ((!exact || scissored) && !scroll_edge) out.problems.push_back("cut by a clip rectangle: " + where.str());
                if (b.x0 < 0 || b.y0 < 0 || b.x1 > display.x || b.y1 > display.y)
                    out.problems.push_back("outside the window: " + where.str());
                // Same run: on the same line, to the right and close to the previous glyph.
                const float h = b.y1 - b.y0;
                const bool same = open && b.x0 >= prev_x1 - 2.0f && b.x0 - prev_x1 < 1.2f * font.FontSize &&
                                  b.y0 < run.box.y1 && b.y1 > run.box.y0 && h > 0;
                if (!same) {
                    close();
                    run = TextRun{b, owner, 0};
                    open = true;
                }
                run.box.x0 = std::min(run.box.x0, b.x0);
                run.box.y0 = std::min(run.box.y0, b.y0);
                run.box.x1 = std::max(run.box.x1, b.x1);
                run.box.y1 = std::max(run.box.y1, b.y1);
                ++run.glyphs;
                prev_x1 = b.x1;
                p += 3;  // the quad's second triangle
            }
            close();
        }
    }
    return out;
}

std::string describe(const TextRun& r) {
    std::ostringstream s;
    s << r.window << " [" << r.box.x0 << "," << r.box.y0 << " - " << r.box.x1 << "," << r.box.y1 << "] ("
      << r.glyphs << " glyphs)";
    return s.str();
}

struct Case {
    float width, height, scale;
    bool night;
};

class LayoutAtScale : public ::testing::TestWithParam<Case> {
protected:
    static void SetUpTestSuite() { s_snap = demoSnapshotAt(1480.0); }
    static void TearDownTestSuite() { s_snap.reset(); }
    static std::shared_ptr<const sg::engine::Snapshot> s_snap;
};
std::shared_ptr<const sg::engine::Snapshot> LayoutAtScale::s_snap;

struct Finding {
    std::string window;  // the ImGui window (or draw list owner) it was found in
    std::string what;
};

// Draws the demo at the case's size, scale and palette, with `tab` the tab shown under the plots,
// and returns what does not hold.
std::vector<Finding> inspectLayout(const Case& c, const std::shared_ptr<const sg::engine::Snapshot>& snap,
                                   const std::string& tab = "Alarms") {
    std::vector<Finding> found;
    ImGui::CreateContext();
    ImGuiIO& io = ImGui::GetIO();
    io.IniFilename = nullptr;
    io.DisplaySize = {c.width, c.height};
    io.DeltaTime = 1.0f / 30.0f;
    io.BackendFlags |= ImGuiBackendFlags_RendererHasVtxOffset;
    sg::ui::CommandQueue commands;
    sg::ui::TileTextureCache textures{std::make_unique<NullBackend>()};
    sg::ui::ScreenSettings settings;
    settings.ui_scale = c.scale;
    settings.night = c.night;
    settings.follow_vessel = false;
    settings.tab = tab;
    {
        sg::ui::ScreenUi ui(settings, commands, textures);
        EXPECT_TRUE(ui.prepareFonts());
        EXPECT_TRUE(ui.fontProblem().empty()) << ui.fontProblem();
        unsigned char* px = nullptr;
        int tw = 0, th = 0;
        io.Fonts->GetTexDataAsRGBA32(&px, &tw, &th);
        io.Fonts->SetTexID(reinterpret_cast<ImTextureID>(std::uintptr_t{2}));
        // The font is rasterised at the scale's size, not scaled afterwards.
        EXPECT_FLOAT_EQ(io.Fonts->Fonts[0]->FontSize, std::round(sg::ui::kBaseFontPx * c.scale));
        io.MousePos = {-100, -100};
        for (int f = 0; f < 4; ++f) ui.frame(snap.get(), 0.0);  // ImGui settles sizes over frames

        const ImDrawData* dd = ImGui::GetDrawData();
        EXPECT_NE(dd, nullptr);
        if (!dd) return found;
        const FrameText text = collectText(*dd, *io.Fonts->Fonts[0], io.DisplaySize);
        // The tab asked for is the one drawn (the saved tab is restored over the first frames).
        std::string selected;
        ImGuiContext& gc = *ImGui::GetCurrentContext();
        for (int n = 0; n < gc.TabBars.GetBufSize(); ++n) {
            ImGuiTabBar* bar = gc.TabBars.GetByIndex(n);
            for (const ImGuiTabItem& t : bar->Tabs)
                if (t.ID == bar->VisibleTabId) {
                    // A short label ("Runs###Runs & infill") keeps the full name as its identity.
                    selected = bar->GetTabName(&t);
                    if (const auto id = selected.find("###"); id != std::string::npos) selected = selected.substr(id + 3);
                }
        }
        EXPECT_EQ(selected, tab);
        // The recorder sees the text at all: many runs, and the plan view's own (labels, legend).
        EXPECT_GE(text.runs.size(), 25u) << "the demo screen has far more text than that";
        EXPECT_GE(std::count_if(text.runs.begin(), text.runs.end(), [](const TextRun& r) { return r.window.rfind("Plan", 0) == 0; }),
                  5);
        for (const auto& p : text.problems) found.push_back({p.substr(p.find(": ") + 2), p});
        for (std::size_t i = 0; i < text.runs.size(); ++i)
            for (std::size_t j = i + 1; j < text.runs.size(); ++j) {
                const Box& a = text.runs[i].box;
                const Box& b = text.runs[j].box;
                const float w = std::min(a.x1, b.x1) - std::max(a.x0, b.x0);
                const float h = std::min(a.y1, b.y1) - std::max(a.y0, b.y0);
                if (w > 1.0f && h > 1.0f) {
                    found.push_back({text.runs[i].window, "text overlaps: " + describe(text.runs[i]) + " and " + describe(text.runs[j])});
                    if (text.runs[j].window != text.runs[i].window)
                        found.push_back({text.runs[j].window, found.back().what});
                }
            }

        // Widgets: every window's items inside the window, every window inside the display.
        ImGuiContext& g = *ImGui::GetCurrentContext();
        int windows = 0;
        for (ImGuiWindow* w : g.Windows) {
            if (!w->Active || w->Hidden) continue;
            ++windows;
            const ImVec2 reach = w->DC.CursorMaxPos;
            const std::string name = w->Name;
            // Lists under the tabs (and tables' own scrolling children) may scroll vertically.
            const bool scrolls = name.rfind("Panels", 0) == 0 || w->ScrollMax.y > 0.0f ||
                                 (w->Flags & ImGuiWindowFlags_ChildWindow) != 0;
            std::ostringstream m;
            if (reach.x > w->InnerRect.Max.x + 1.0f) m << "items reach x " << reach.x << " beyond " << w->InnerRect.Max.x << "; ";
            if (!scrolls && reach.y > w->InnerRect.Max.y + 1.0f)
                m << "items reach y " << reach.y << " beyond " << w->InnerRect.Max.y << "; ";
            if (w->Pos.x < -0.5f || w->Pos.y < -0.5f || w->Pos.x + w->Size.x > c.width + 0.5f ||
                w->Pos.y + w->Size.y > c.height + 0.5f)
                m << "window outside the display; ";
            if (!m.str().empty()) found.push_back({name, name + ": " + m.str()});
        }
        EXPECT_GE(windows, 5);
    }
    ImGui::DestroyContext();
    return found;
}

bool startsWith(const std::string& s, const char* prefix) { return s.rfind(prefix, 0) == 0; }

// Strict for what this change owns: the plan view (labels, legend, scale bar, controls) and the
// placement of every window in the display. The other panels are checked by the test below.
TEST_P(LayoutAtScale, PlanViewTextAndWindowPlacementHold) {
    ASSERT_TRUE(s_snap);
    ASSERT_TRUE(s_snap->hasUnacknowledgedAlarm());  // the banner is part of the layout checked
    int n = 0;
    for (const auto& f : inspectLayout(GetParam(), s_snap))
        if (startsWith(f.window, "Plan") || f.what.find("window outside the display") != std::string::npos) {
            ADD_FAILURE() << f.what;
            ++n;
        }
    EXPECT_EQ(n, 0);
}

// Every panel, every window: the helm panel, time plots, each tab under them (alarm list, runs
// and infill, profiles), toolbar, status bar and banner as well as the plan view.
TEST_P(LayoutAtScale, EveryPanelHolds) {
    ASSERT_TRUE(s_snap);
    // Each tab under the plots in turn (only the shown one is drawn).
    for (const char* tab : {"Alarms", "Runs & infill", "Profiles", "Anomalies"}) {
        SCOPED_TRACE(tab);
        const auto found = inspectLayout(GetParam(), s_snap, tab);
        for (std::size_t i = 0; i < found.size() && i < 40; ++i) ADD_FAILURE() << found[i].what;
        EXPECT_TRUE(found.empty()) << found.size() << " findings with tab " << tab;
    }
}

std::string caseName(const ::testing::TestParamInfo<Case>& i) {
    const Case& c = i.param;
    return std::to_string(static_cast<int>(c.width)) + "x" + std::to_string(static_cast<int>(c.height)) + "_scale" +
           std::to_string(static_cast<int>(std::lround(c.scale * 10))) + (c.night ? "_night" : "_day");
}

INSTANTIATE_TEST_SUITE_P(DemoScreen, LayoutAtScale,
                         ::testing::Values(Case{1280, 800, 1.0f, false}, Case{1280, 800, 1.5f, false},
                                           Case{1280, 800, 2.0f, false}, Case{1280, 800, 2.5f, false},
                                           Case{1920, 1080, 1.0f, false}, Case{1920, 1080, 1.5f, true},
                                           Case{1920, 1080, 2.0f, false}, Case{1920, 1080, 2.5f, true}),
                         caseName);

}  // namespace
