// Text that fits its room: eliding to a width (the whole text on hover) and choosing which fields
// of a one-row strip fit, by priority. Shared by the alarm list, the toolbar, the status bar and
// the banner, so a larger UI scale drops or shortens text instead of letting it overlap or run
// under a clip rectangle.
#pragma once

#include <string>
#include <vector>

#include <imgui.h>

namespace sg::ui {

// `text` shortened to at most `width` pixels in `font` at `size` (whole UTF-8 characters, "..."
// appended), or unchanged when it fits. Returns "" when not even "..." fits.
std::string elideToWidth(const std::string& text, float width, const ImFont* font, float size);
// The same with the current ImGui font.
std::string elideToWidth(const std::string& text, float width);

// ImGui::TextUnformatted of `text` elided to the room left on the current line (or to `width`
// when > 0); the whole text shows as a tooltip when it was shortened and the mouse is on it.
// Returns true when it was shortened.
bool textFitted(const std::string& text, float width = 0.0f);
// The same in a colour.
bool textFittedColoured(const std::string& text, ImU32 colour, float width = 0.0f);

// Lines `text` breaks into at `width` pixels (at spaces; a word longer than the width is elided).
std::vector<std::string> wrapToWidth(const std::string& text, float width, const ImFont* font, float size);

// One field of a strip (toolbar, status bar): its width in pixels and its priority (higher stays
// longer; fields of equal priority go from the right).
struct StripField {
    float width = 0.0f;
    int priority = 0;
};

// Which fields to show in `room` pixels with `spacing` between shown fields: drops the lowest
// priorities first (the rightmost first among equals) until the rest fit. Every field with
// priority >= `keep` is always shown (the caller shortens it instead).
std::vector<bool> fitStrip(const std::vector<StripField>& fields, float room, float spacing, int keep);

}  // namespace sg::ui
