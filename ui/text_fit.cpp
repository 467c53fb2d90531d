// Text that fits its room (see text_fit.hpp).
#include "ui/text_fit.hpp"

#include <algorithm>
#include <numeric>

namespace sg::ui {

namespace {

float widthOf(const ImFont* font, float size, const char* b, const char* e) {
    return font->CalcTextSizeA(size, 1e9f, 0.0f, b, e).x;
}

// Start of the UTF-8 character before `p` (p > begin).
const char* prevChar(const char* begin, const char* p) {
    do {
        --p;
    } while (p > begin && (static_cast<unsigned char>(*p) & 0xC0) == 0x80);
    return p;
}

}  // namespace

std::string elideToWidth(const std::string& text, float width, const ImFont* font, float size) {
    const char* b = text.data();
    const char* e = b + text.size();
    if (widthOf(font, size, b, e) <= width) return text;
    const float dots = widthOf(font, size, "...", nullptr);
    if (dots > width) return {};
    const char* p = e;
    while (p > b && widthOf(font, size, b, p) + dots > width) p = prevChar(b, p);
    while (p > b && p[-1] == ' ') --p;  // no "word ..." with a space before the dots
    return std::string(b, p) + "...";
}

std::string elideToWidth(const std::string& text, float width) {
    return elideToWidth(text, width, ImGui::GetFont(), ImGui::GetFontSize());
}

bool textFittedColoured(const std::string& text, ImU32 colour, float width) {
    const float room = width > 0.0f ? width : ImGui::GetContentRegionAvail().x;
    const std::string shown = elideToWidth(text, std::max(0.0f, room));
    const bool shortened = shown.size() != text.size();
    if (shown.empty()) {
        ImGui::Dummy({std::max(0.0f, room), ImGui::GetTextLineHeight()});
    } else {
        ImGui::PushStyleColor(ImGuiCol_Text, ImGui::ColorConvertU32ToFloat4(colour));
        ImGui::TextUnformatted(shown.c_str());
        ImGui::PopStyleColor();
    }
    if (shortened && ImGui::IsItemHovered()) ImGui::SetTooltip("%s", text.c_str());
    return shortened;
}

bool textFitted(const std::string& text, float width) {
    return textFittedColoured(text, ImGui::GetColorU32(ImGuiCol_Text), width);
}

std::vector<std::string> wrapToWidth(const std::string& text, float width, const ImFont* font, float size) {
    std::vector<std::string> lines;
    std::string line;
    std::size_t i = 0;
    while (i < text.size()) {
        while (i < text.size() && text[i] == ' ') ++i;
        if (i >= text.size()) break;
        std::size_t j = text.find(' ', i);
        if (j == std::string::npos) j = text.size();
        const std::string word = text.substr(i, j - i);
        const std::string joined = line.empty() ? word : line + " " + word;
        if (line.empty() || widthOf(font, size, joined.data(), joined.data() + joined.size()) <= width) {
            line = joined;
        } else {
            lines.push_back(elideToWidth(line, width, font, size));
            line = word;
        }
        i = j;
    }
    if (!line.empty()) lines.push_back(elideToWidth(line, width, font, size));
    return lines;
}

std::vector<bool> fitStrip(const std::vector<StripField>& fields, float room, float spacing, int keep) {
    std::vector<bool> shown(fields.size(), true);
    auto total = [&] {
        float w = 0.0f;
        int n = 0;
        for (std::size_t i = 0; i < fields.size(); ++i)
            if (shown[i]) {
                w += fields[i].width;
                ++n;
            }
        return w + spacing * static_cast<float>(std::max(0, n - 1));
    };
    // Drop order: lowest priority first, the rightmost first among equals.
    std::vector<std::size_t> order(fields.size());
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
        if (fields[a].priority != fields[b].priority) return fields[a].priority < fields[b].priority;
        return a > b;
    });
    for (std::size_t i : order) {
        if (total() <= room) break;
        if (fields[i].priority >= keep) break;
        shown[i] = false;
    }
    return shown;
}

}  // namespace sg::ui
