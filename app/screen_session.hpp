// Running a command's work beside the screen: the work (acquisition, replay, simulation) runs on
// a worker thread and publishes snapshots; the screen runs on the main thread (GLFW needs it)
// and sends commands back. Without a display, or with --headless, the work runs alone.
#pragma once

#include <atomic>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>

#include "engine/snapshot.hpp"
#include "engine/snapshot_builder.hpp"
#include "engine/survey_engine.hpp"

namespace sg::app {

struct ScreenArgs {
    bool headless = false;
    std::string screenshot;      // write the window to this PNG and exit
    double after_seconds = 5.0;  // ... after this many seconds
};

// Adds --headless, --screenshot and --after-seconds to a command.
void addScreenOptions(CLI::App& cmd, ScreenArgs& args);

// What the worker gets: publish a snapshot, take the screen's commands, and whether to stop.
class ScreenLink {
public:
    virtual ~ScreenLink() = default;
    virtual bool hasScreen() const = 0;
    virtual void publish(std::shared_ptr<const engine::Snapshot> snapshot) = 0;
    virtual std::vector<engine::UiCommand> commands() = 0;
    virtual bool stopRequested() const = 0;
};

// Runs `work` with a screen when one can be opened (and not --headless), else on this thread.
// Returns work's result. Prints why the screen is not shown when a display was expected.
int runWithScreen(const ScreenArgs& args, const std::string& title,
                  const std::function<int(ScreenLink&)>& work);

// Applies the commands every screen shares (acknowledge, active line, profile run, export) to
// the engine; returns the replay commands it did not handle. `export_dir` for infill exports.
// `crew` feeds a crew command line ("steer I7", "steer planned") into the Pipeline as a line of
// source Pipeline::kCrewSource (logged, so a replay repeats it); without it (replay) the steering
// commands are returned unhandled.
std::vector<engine::UiCommand> applyCommonCommands(std::vector<engine::UiCommand> commands,
                                                   engine::SurveyEngine& engine,
                                                   engine::SnapshotBuilder& builder,
                                                   const std::string& export_dir,
                                                   const std::function<void(const std::string&)>& crew = {});

}  // namespace sg::app
