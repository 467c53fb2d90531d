// ScreenUi: builds one ImGui frame from a snapshot by placing the registered panels in the
// layout's slots. No OpenGL here, so the benchmark and tests can run it without a GPU.
#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <string_view>
#include <utility>

#include "ui/screen.hpp"

namespace sg::ui {

namespace {

// GLFW key codes (include/GLFW/glfw3.h): printable keys are their upper-case ASCII code.
constexpr int kKeySpace = 32, kKeySlash = 47, kKeyEscape = 256, kKeyF1 = 290;

}  // namespace

const std::vector<KeyBinding>& keyBindings() {
    static const std::vector<KeyBinding> keys = {
        {'A', "A", "Acknowledge every alarm (warnings stay)"},
        {'W', "W", "Acknowledge every warning"},
        {'N', "N", "Replay: go to the next alarm of the log (stops at the last)"},
        {kKeySpace, "Space", "Replay: pause / play"},
        {'F', "F", "Fit the whole survey in the plan view"},
        {'V', "V", "Follow the vessel on / off"},
        {'G', "G", "Jump to the forming gap"},
        {'I', "I", "Steer to the next proposed infill line (I1, I2, ... in rank order; logged)"},
        {'P', "P", "Steer the planned lines again (ends the infill steering; logged)"},
        {kKeyF1, "F1 or ?", "This list of keys (Esc closes it)"},
    };
    return keys;
}

void ScreenUi::handleKeys(const engine::Snapshot* s, FrameContext& ctx) {
    const ImGuiIO& io = ImGui::GetIO();
    if (io.WantTextInput || io.KeyCtrl || io.KeyAlt || io.KeySuper) return;
    const auto pressed = [](int key) { return ImGui::IsKeyPressed(key, false); };
    if (pressed(kKeyF1) || (io.KeyShift && pressed(kKeySlash))) m_help = !m_help;
    if (m_help && pressed(kKeyEscape)) m_help = false;
    if (pressed('A')) ctx.send({engine::UiCommand::Kind::kAcknowledgeAlarms, 0, 0.0, {}});
    if (pressed('W')) ctx.send({engine::UiCommand::Kind::kAcknowledgeWarnings, 0, 0.0, {}});
    if (pressed('F')) ctx.fit_request = true;
    if (pressed('V')) {
        m_settings.follow_vessel = !m_settings.follow_vessel;
        m_settings_changed = true;
    }
    if (s && !s->replay.is_replay) {
        // The crew's steering choice goes to the core as a logged command (a replay shows the
        // log's own choices and takes none).
        if (pressed('I') && !s->infill.empty()) {
            std::size_t next = 0;
            for (std::size_t k = 0; k < s->infill.size(); ++k)
                if (s->helm.infill && s->infill[k].name == s->helm.line) next = (k + 1) % s->infill.size();
            ctx.send({engine::UiCommand::Kind::kSteerInfill, 0, 0.0, s->infill[next].name});
        }
        if (pressed('P')) ctx.send({engine::UiCommand::Kind::kSteerPlanned, 0, 0.0, {}});
    }
    if (s && s->replay.is_replay) {
        if (pressed('N')) ctx.send({engine::UiCommand::Kind::kReplayNextAlarm, 0, 0.0, {}});
        if (pressed(kKeySpace))
            ctx.send({s->replay.paused ? engine::UiCommand::Kind::kReplayPlay : engine::UiCommand::Kind::kReplayPause, 0,
                      0.0, {}});
    }
    if (s && pressed('G') && s->forming_gap.active) {
        // The forming gap the engine locates now (its marker on the plan).
        ctx.focus_request = s->forming_gap.at;
    } else if (s && pressed('G')) {
        // Otherwise the newest forming-gap episode that has a place.
        const engine::AlarmView* best = nullptr;
        for (const auto& a : s->alarms) {
            if (a.episode.check != "forming_gap" || !a.where) continue;
            const bool better = !best || (!a.episode.end_ns && best->episode.end_ns) ||
                                (!a.episode.end_ns == !best->episode.end_ns && a.episode.start_ns > best->episode.start_ns);
            if (better) best = &a;
        }
        if (best) ctx.focus_request = *best->where;
    }
}

void ScreenUi::drawHelp(const Palette& pal, float scale) {
    const ImVec2 display = ImGui::GetIO().DisplaySize;
    ImGui::SetNextWindowPos({display.x * 0.5f, display.y * 0.5f}, ImGuiCond_Always, {0.5f, 0.5f});
    ImGui::SetNextWindowBgAlpha(0.96f);
    ImGui::PushStyleColor(ImGuiCol_Border, ImGui::ColorConvertU32ToFloat4(pal.text));
    ImGui::Begin("Keys", &m_help,
                 ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoCollapse | ImGuiWindowFlags_NoSavedSettings |
                     ImGuiWindowFlags_NoMove);
    ImGui::SetWindowFontScale(1.2f);
    if (ImGui::BeginTable("keys", 2, ImGuiTableFlags_RowBg | ImGuiTableFlags_SizingFixedFit)) {
        for (const auto& k : keyBindings()) {
            ImGui::TableNextRow();
            ImGui::TableNextColumn();
            ImGui::TextUnformatted(k.key_name);
            ImGui::TableNextColumn();
            ImGui::TextUnformatted(k.action);
        }
        ImGui::EndTable();
    }
    ImGui::Dummy({0, 4 * scale});
    ImGui::TextDisabled("Keys act when no text field has the keyboard.");
    ImGui::SetWindowFontScale(1.0f);
    ImGui::End();
    ImGui::PopStyleColor();
}

ScreenUi::ScreenUi(ScreenSettings settings, CommandSink& commands, TileTextureSource& textures)
    : m_settings(std::move(settings)), m_commands(commands), m_textures(textures), m_panels(makePanels()) {}

ScreenUi::~ScreenUi() = default;

bool ScreenUi::takeSettingsChanged() { return std::exchange(m_settings_changed, false); }

namespace {

// Why `path` cannot be used as a TrueType/OpenType font, or empty when it looks like one. Checked
// before ImGui sees the file: ImGui 1.86 asserts on a file it cannot open.
std::string fontFileProblem(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) return "cannot open font file " + path + " (install fonts-dejavu-core, or set font_file)";
    std::array<unsigned char, 4> tag{};
    in.read(reinterpret_cast<char*>(tag.data()), 4);
    // sfnt version tags: 0x00010000 (TrueType outlines), 'true', 'OTTO' (CFF outlines).
    const bool sfnt = (tag[0] == 0 && tag[1] == 1 && tag[2] == 0 && tag[3] == 0) ||
                      (tag == std::array<unsigned char, 4>{'t', 'r', 'u', 'e'}) ||
                      (tag == std::array<unsigned char, 4>{'O', 'T', 'T', 'O'});
    if (!in || !sfnt) return "not a TrueType/OpenType font file: " + path;
    return {};
}

}  // namespace

bool ScreenUi::prepareFonts() {
    const float scale = std::clamp(m_settings.ui_scale, 0.75f, 3.0f);
    if (scale == m_font_scale && m_settings.font_file == m_font_file) return false;
    m_font_scale = scale;
    m_font_file = m_settings.font_file;
    ImGuiIO& io = ImGui::GetIO();
    io.Fonts->Clear();
    // Rasterised at the scale's pixel size (never a bitmap font stretched): sharp at every scale.
    const float px = std::round(kBaseFontPx * scale);
    m_font_problem = fontFileProblem(m_font_file);
    ImFont* font = nullptr;
    if (m_font_problem.empty()) {
        ImFontConfig cfg;
        cfg.OversampleH = 2;
        cfg.OversampleV = 1;
        // Latin-1 plus the few symbols the panels print (degree, micro, superscript 2, dashes).
        static const ImWchar ranges[] = {0x0020, 0x00FF, 0x2013, 0x2014, 0x2190, 0x2193, 0x2264, 0x2265, 0};
        font = io.Fonts->AddFontFromFileTTF(m_font_file.c_str(), px, &cfg, ranges);
        if (!font) m_font_problem = "ImGui could not load the font file " + m_font_file;
    }
    if (!font) {
        // Never silent: the message goes to stderr and stays on screen (drawn by frame()).
        std::fprintf(stderr, "swathguard screen: %s; using ImGui's built-in bitmap font\n", m_font_problem.c_str());
        ImFontConfig cfg;
        cfg.SizePixels = px;
        io.Fonts->AddFontDefault(&cfg);
    }
    io.Fonts->Build();
    return true;
}

void ScreenUi::frame(const engine::Snapshot* s, double wall_s) {
    const float scale = std::clamp(m_settings.ui_scale, 0.75f, 3.0f);
    if (scale != m_style_scale || m_settings.night != m_style_night) {
        ImGuiStyle style;
        applyPaletteToStyle(paletteFor(m_settings.night), style);
        style.ScaleAllSizes(scale);
        ImGui::GetStyle() = style;
        m_style_scale = scale;
        m_style_night = m_settings.night;
    }
    ImGui::NewFrame();
    const ImVec2 display = ImGui::GetIO().DisplaySize;
    // The alert strip's space is always reserved: an alarm coming or going never moves a panel.
    m_layout = computeLayout(display, scale, s && s->replay.is_replay, /*banner=*/true);
    // The helm panel takes the top of the right column.
    // Its height follows its rows as they wrap at this width, up to 60 % of the column's upper
    // part (what does not fit then is left out by the panel, last rows first).
    const float helm_h = std::min(std::round(helmPanelHeight(s, m_layout.plots.width(), scale)),
                                  std::round(m_layout.plots.height() * 0.6f));
    const Rect helm{m_layout.plots.min, {m_layout.plots.max.x, m_layout.plots.min.y + helm_h}};
    m_layout.plots.min.y += helm_h;

    FrameContext ctx;
    ctx.snapshot = s;
    ctx.palette = &paletteFor(m_settings.night);
    ctx.settings = &m_settings;
    ctx.commands = &m_commands;
    ctx.textures = &m_textures;
    ctx.wall_s = wall_s;
    ctx.scale = scale;
    ctx.focus_request = std::exchange(m_focus, std::nullopt);
    handleKeys(s, ctx);

    const ImGuiWindowFlags fixed = ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoMove |
                                   ImGuiWindowFlags_NoSavedSettings | ImGuiWindowFlags_NoBringToFrontOnFocus;
    auto slotRect = [&](Slot slot) -> const Rect* {
        switch (slot) {
            case Slot::kToolbar: return &m_layout.toolbar;
            case Slot::kPlan: return &m_layout.plan;
            case Slot::kHelm: return &helm;
            case Slot::kPlots: return &m_layout.plots;
            case Slot::kReplay: return m_layout.replay.height() > 0 ? &m_layout.replay : nullptr;
            case Slot::kStatus: return &m_layout.status;
            case Slot::kTab:
            case Slot::kOverlay: return nullptr;
        }
        return nullptr;
    };
    // Fixed slots first, then the tabbed panels, then overlays.
    for (auto& p : m_panels) {
        const Rect* r = slotRect(p->slot());
        if (!r) continue;
        const bool plan = p->slot() == Slot::kPlan;
        ImGui::SetNextWindowPos(r->min);
        ImGui::SetNextWindowSize({r->width(), r->height()});
        if (plan) ImGui::PushStyleVar(ImGuiStyleVar_WindowPadding, {0, 0});
        ImGui::Begin(p->name(), nullptr, fixed | (plan ? ImGuiWindowFlags_NoScrollWithMouse : 0));
        if (plan) {
            p->draw(ctx, r->min, r->max);
        } else {
            const ImVec2 a = ImGui::GetCursorScreenPos();
            const ImVec2 avail = ImGui::GetContentRegionAvail();
            p->draw(ctx, a, {a.x + avail.x, a.y + avail.y});
        }
        ImGui::End();
        if (plan) ImGui::PopStyleVar();
    }
    int unacked = 0;
    if (s)
        for (const auto& a : s->alarms) unacked += a.episode.ack_ns ? 0 : 1;
    ImGui::SetNextWindowPos(m_layout.tabs.min);
    ImGui::SetNextWindowSize({m_layout.tabs.width(), m_layout.tabs.height()});
    ImGui::Begin("Panels", nullptr, fixed);
    // Full tab names when they fit in one row, else the short ones (the tab's identity, saved
    // setting and selection stay with the full name).
    float tabs_w = 0.0f;
    for (auto& p : m_panels)
        if (p->slot() == Slot::kTab)
            tabs_w += ImGui::CalcTextSize(p->name()).x + 2 * ImGui::GetStyle().FramePadding.x +
                      ImGui::GetStyle().ItemInnerSpacing.x;
    const bool short_tabs = tabs_w > ImGui::GetContentRegionAvail().x;
    if (ImGui::BeginTabBar("panel_tabs")) {
        for (auto& p : m_panels) {
            if (p->slot() != Slot::kTab) continue;
            // The ID is the full name's in both cases ("###"), so the chosen tab survives a resize.
            const std::string label = std::string(short_tabs ? p->shortName() : p->name()) + "###" + p->name();
            // A new unacknowledged alarm brings the alarm list to the front.
            const bool is_alarms = std::string_view(p->name()) == "Alarms";
            const bool restore = m_tab_frames < 2 && m_settings.tab == p->name();
            const ImGuiTabItemFlags f =
                ((is_alarms && unacked > m_last_unacked) || restore) ? ImGuiTabItemFlags_SetSelected : 0;
            if (ImGui::BeginTabItem(label.c_str(), nullptr, f)) {
                if (m_tab_frames >= 3 && m_settings.tab != p->name()) {
                    m_settings.tab = p->name();  // the operator (or a new alarm) chose this tab
                    m_settings_changed = true;
                }
                const ImVec2 a = ImGui::GetCursorScreenPos();
                const ImVec2 avail = ImGui::GetContentRegionAvail();
                p->draw(ctx, a, {a.x + avail.x, a.y + avail.y});
                ImGui::EndTabItem();
            }
        }
        ImGui::EndTabBar();
        ++m_tab_frames;  // the saved tab is applied over the first frames, then choices are recorded
    }
    ImGui::End();
    m_last_unacked = unacked;
    for (auto& p : m_panels)
        if (p->slot() == Slot::kOverlay) p->draw(ctx, m_layout.banner.min, m_layout.banner.max);
    m_banner_shown = s && s->hasUnacknowledgedActiveAlarm();
    if (m_help) drawHelp(*ctx.palette, scale);

    if (!m_font_problem.empty()) {
        const std::string msg = "Font: " + m_font_problem + " - built-in font in use";
        ImDrawList* fg = ImGui::GetForegroundDrawList();
        const ImVec2 size = ImGui::CalcTextSize(msg.c_str());
        const ImVec2 at{m_layout.plan.min.x + 8.0f * scale, m_layout.plan.max.y - size.y - 8.0f * scale};
        fg->AddRectFilled({at.x - 4, at.y - 2}, {at.x + size.x + 4, at.y + size.y + 2}, palette().background);
        fg->AddText(at, palette().gap, msg.c_str());
    }
    ImGui::Render();
    m_textures.endFrame();
    if (ctx.settings_changed) m_settings_changed = true;
    if (ctx.focus_request) m_focus = ctx.focus_request;  // asked for by a panel drawn after the plan
}

}  // namespace sg::ui
