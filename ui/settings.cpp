// Reading and writing the screen's ini file.
#include "ui/settings.hpp"

#include <algorithm>
#include <charconv>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>

namespace sg::ui {
namespace {

std::string trim(const std::string& s) {
    const auto b = s.find_first_not_of(" \t\r");
    if (b == std::string::npos) return {};
    const auto e = s.find_last_not_of(" \t\r");
    return s.substr(b, e - b + 1);
}

std::vector<std::string> splitList(const std::string& s) {
    std::vector<std::string> out;
    std::stringstream ss(s);
    std::string item;
    while (std::getline(ss, item, ','))
        if (auto t = trim(item); !t.empty()) out.push_back(t);
    return out;
}

}  // namespace

std::string defaultSettingsPath() {
    std::filesystem::path base;
    if (const char* xdg = std::getenv("XDG_CONFIG_HOME"); xdg && *xdg) {
        base = xdg;
    } else if (const char* home = std::getenv("HOME"); home && *home) {
        base = std::filesystem::path(home) / ".config";
    } else {
        return {};
    }
    return (base / "swathguard" / "screen.ini").string();
}

ScreenSettings loadSettings(const std::string& path, std::vector<std::string>& warnings) {
    ScreenSettings s;
    if (path.empty()) return s;
    std::ifstream in(path);
    if (!in) return s;
    std::string raw;
    int line_no = 0;
    std::string section;
    auto warn = [&](const std::string& key, const std::string& what) {
        warnings.push_back(path + ":" + std::to_string(line_no) + ": key '" + key + "': " + what +
                           " (default kept)");
    };
    while (std::getline(in, raw)) {
        ++line_no;
        std::string line = trim(raw);
        if (line.empty() || line[0] == '#' || line[0] == ';') continue;
        if (line.front() == '[' && line.back() == ']') {
            section = trim(line.substr(1, line.size() - 2));
            continue;
        }
        const auto eq = line.find('=');
        if (eq == std::string::npos) {
            warnings.push_back(path + ":" + std::to_string(line_no) + ": expected 'key = value', line skipped");
            continue;
        }
        const std::string key = trim(line.substr(0, eq));
        const std::string value = trim(line.substr(eq + 1));
        if (section != "screen") {
            warn(key, "outside the [screen] section, ignored");
            continue;
        }
        if (key == "palette") {
            if (value == "day" || value == "night") s.night = value == "night";
            else warn(key, "must be 'day' or 'night', got '" + value + "'");
        } else if (key == "ui_scale") {
            char* end = nullptr;
            const double v = std::strtod(value.c_str(), &end);
            if (end && *end == '\0' && v >= 0.75 && v <= 3.0) s.ui_scale = static_cast<float>(v);
            else warn(key, "must be a number in 0.75..3.0, got '" + value + "'");
        } else if (key == "font_file") {
            if (!value.empty()) s.font_file = value;
            else warn(key, "must name a TrueType font file");
        } else if (key == "plot_minutes") {
            int v = 0;
            const auto [p, ec] = std::from_chars(value.data(), value.data() + value.size(), v);
            if (ec == std::errc() && p == value.data() + value.size() && v >= 1 && v <= 720) s.plot_minutes = v;
            else warn(key, "must be a whole number in 1..720, got '" + value + "'");
        } else if (key == "follow_vessel") {
            if (value == "true" || value == "false") s.follow_vessel = value == "true";
            else warn(key, "must be 'true' or 'false', got '" + value + "'");
        } else if (key == "show_picks") {
            if (value == "true" || value == "false") s.show_picks = value == "true";
            else warn(key, "must be 'true' or 'false', got '" + value + "'");
        } else if (key == "tab") {
            s.tab = value;  // an unknown name simply selects no saved tab
        } else if (key == "hidden_plots") {
            s.hidden_plots = splitList(value);
        } else {
            warn(key, "unknown key, ignored");
        }
    }
    return s;
}

bool saveSettings(const std::string& path, const ScreenSettings& s, std::string& error) {
    if (path.empty()) {
        error = "no settings path";
        return false;
    }
    std::error_code ec;
    const auto parent = std::filesystem::path(path).parent_path();
    if (!parent.empty()) std::filesystem::create_directories(parent, ec);
    // Write to a temporary file and rename, so a crash never leaves half a file.
    const std::string tmp = path + ".tmp";
    {
        std::ofstream out(tmp, std::ios::trunc);
        if (!out) {
            error = "cannot write " + tmp;
            return false;
        }
        out << "# swathguard screen settings (written by the screen; edit while it is closed)\n"
            << "[screen]\n"
            << "palette = " << (s.night ? "night" : "day") << "\n"
            << "ui_scale = " << s.ui_scale << "\n"
            << "font_file = " << s.font_file << "\n"
            << "plot_minutes = " << s.plot_minutes << "\n"
            << "follow_vessel = " << (s.follow_vessel ? "true" : "false") << "\n"
            << "show_picks = " << (s.show_picks ? "true" : "false") << "\n"
            << "tab = " << s.tab << "\n"
            << "hidden_plots = ";
        for (std::size_t i = 0; i < s.hidden_plots.size(); ++i) out << (i ? ", " : "") << s.hidden_plots[i];
        out << "\n";
        if (!out) {
            error = "write failed: " + tmp;
            return false;
        }
    }
    std::filesystem::rename(tmp, path, ec);
    if (ec) {
        error = "cannot rename " + tmp + " to " + path + ": " + ec.message();
        return false;
    }
    return true;
}

}  // namespace sg::ui
