// Draws one snapshot in a real window (the test's Xvfb) at 1600 x 1000 with given screen
// settings, saves the screenshot and reads it back.
#pragma once

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <memory>
#include <string>

#include "png_image.hpp"
#include "ui/screen.hpp"

namespace sg::testui {

// With the settings file `settings_path` as it is.
inline Image renderSnapshotWith(std::shared_ptr<const sg::engine::Snapshot> snap, const std::string& settings_path,
                                const std::string& png_path) {
    sg::ui::SnapshotBox box;
    sg::ui::CommandQueue commands;
    box.publish(std::move(snap));
    sg::ui::ScreenOptions o;
    o.width = 1600;
    o.height = 1000;
    o.settings_path = settings_path;
    o.screenshot_path = png_path;
    o.after_frames = 4;  // the first frames settle ImGui's layout
    o.max_fps = 200;
    EXPECT_EQ(sg::ui::runScreen(box, commands, o), 0);
    return loadPng(o.screenshot_path);
}

inline Image renderSnapshot(std::shared_ptr<const sg::engine::Snapshot> snap, const std::filesystem::path& dir,
                            const std::string& name, const std::string& ini_text) {
    std::filesystem::create_directories(dir);
    const std::string ini = (dir / (name + ".ini")).string();
    std::ofstream(ini, std::ios::trunc) << ini_text;
    return renderSnapshotWith(std::move(snap), ini, (dir / (name + ".png")).string());
}

}  // namespace sg::testui
