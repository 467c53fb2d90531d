// Draws one snapshot in a real window (the test's Xvfb) at 1600 x 1000 with the screen settings
// `ini_text`, saves `dir/name.png` (and `dir/name.ini`) and reads the screenshot back.
#pragma once

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <memory>
#include <string>

#include "png_image.hpp"
#include "ui/screen.hpp"

namespace sg::testui {

inline Image renderSnapshot(std::shared_ptr<const sg::engine::Snapshot> snap, const std::filesystem::path& dir,
                            const std::string& name, const std::string& ini_text) {
    std::filesystem::create_directories(dir);
    const std::string ini = (dir / (name + ".ini")).string();
    std::ofstream(ini, std::ios::trunc) << ini_text;
    sg::ui::SnapshotBox box;
    sg::ui::CommandQueue commands;
    box.publish(std::move(snap));
    sg::ui::ScreenOptions o;
    o.width = 1600;
    o.height = 1000;
    o.settings_path = ini;
    o.screenshot_path = (dir / (name + ".png")).string();
    o.after_frames = 4;
    o.max_fps = 200;
    EXPECT_EQ(sg::ui::runScreen(box, commands, o), 0);
    return loadPng(o.screenshot_path);
}

}  // namespace sg::testui
