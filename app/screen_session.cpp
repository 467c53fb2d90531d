// Screen beside the work; see screen_session.hpp.
#include "app/screen_session.hpp"

#include <cstdio>
#include <thread>

#include "engine/survey_summary.hpp"

#ifdef SG_HAVE_UI
#include "ui/screen.hpp"
#include "ui/snapshot_box.hpp"
#endif

namespace sg::app {

namespace {

class HeadlessLink final : public ScreenLink {
public:
    bool hasScreen() const override { return false; }
    void publish(std::shared_ptr<const engine::Snapshot>) override {}
    std::vector<engine::UiCommand> commands() override { return {}; }
    bool stopRequested() const override { return false; }
};

#ifdef SG_HAVE_UI
class WindowLink final : public ScreenLink {
public:
    bool hasScreen() const override { return true; }
    void publish(std::shared_ptr<const engine::Snapshot> snapshot) override { box.publish(std::move(snapshot)); }
    std::vector<engine::UiCommand> commands() override { return queue.drain(); }
    bool stopRequested() const override { return stop.load(); }

    ui::SnapshotBox box;
    ui::CommandQueue queue;
    std::atomic<bool> stop{false};
};
#endif

}  // namespace

void addScreenOptions(CLI::App& cmd, ScreenArgs& args) {
    cmd.add_flag("--headless", args.headless, "No screen: status lines on the terminal only");
    cmd.add_option("--screenshot", args.screenshot, "Write the screen to this PNG, then exit");
    cmd.add_option("--after-seconds", args.after_seconds, "Seconds before the screenshot")
        ->check(CLI::PositiveNumber);
}

int runWithScreen(const ScreenArgs& args, const std::string& title,
                  const std::function<int(ScreenLink&)>& work) {
#ifdef SG_HAVE_UI
    if (!args.headless) {
        const auto why = ui::screenUnavailableReason();
        if (why.empty()) {
            WindowLink link;
            int rc = 0;
            std::atomic<bool> work_done{false};
            std::thread worker([&] {
                rc = work(link);
                work_done = true;
            });
            ui::ScreenOptions opt;
            opt.title = title;
            if (!args.screenshot.empty()) {
                opt.screenshot_path = args.screenshot;
                opt.after_seconds = args.after_seconds;
                opt.settings_path = "none";  // a screenshot must not depend on saved settings
            }
            try {
                ui::runScreen(link.box, link.queue, opt);
            } catch (const std::exception& e) {
                std::fprintf(stderr, "screen: %s\n", e.what());
                link.stop = true;
                worker.join();
                throw;
            }
            link.stop = true;  // the window was closed (or the screenshot written)
            worker.join();
            if (!args.screenshot.empty()) std::printf("screenshot: %s\n", args.screenshot.c_str());
            return rc;
        }
        std::fprintf(stderr, "screen: not shown (%s); running headless\n", why.c_str());
    }
#else
    if (!args.headless) std::printf("screen: this build has no screen; running headless\n");
#endif
    if (!args.screenshot.empty())
        throw std::runtime_error("--screenshot needs a screen (a display, or run under xvfb-run)");
    HeadlessLink link;
    return work(link);
}

std::vector<engine::UiCommand> applyCommonCommands(std::vector<engine::UiCommand> commands,
                                                   engine::SurveyEngine& engine,
                                                   engine::SnapshotBuilder& builder,
                                                   const std::string& export_dir,
                                                   const std::function<void(const std::string&)>& crew) {
    using Kind = engine::UiCommand::Kind;
    std::vector<engine::UiCommand> rest;
    // Acknowledgements are dated on the survey clock, like the episodes they close (before the
    // first aligned line there is none: the receive clock stands in).
    const auto now = [&] { return engine.surveyClock_ns() != 0 ? engine.surveyClock_ns() : engine.clock_ns(); };
    for (auto& c : commands) {
        switch (c.kind) {
        case Kind::kAcknowledgeAlarm: engine.acknowledge(c.id, now()); break;
        case Kind::kAcknowledgeAll: engine.acknowledgeAll(now()); break;
        case Kind::kAcknowledgeAlarms: engine.acknowledgeAll(now(), checks::Level::kAlarm); break;
        case Kind::kAcknowledgeWarnings: engine.acknowledgeAll(now(), checks::Level::kWarn); break;
        case Kind::kSetActiveLine: engine.chooseLine(static_cast<int>(c.id)); break;
        case Kind::kSteerInfill:
        case Kind::kSteerPlanned:
            if (!crew) {
                rest.push_back(std::move(c));
                break;
            }
            crew(c.kind == Kind::kSteerInfill ? "steer " + c.text : std::string("steer planned"));
            break;
        case Kind::kChooseProfileRun: builder.chooseProfileRun(static_cast<int>(c.value)); break;
        case Kind::kExportInfill: {
            auto summary = engine::summarise(engine, 0);
            for (const auto& p : engine::writeExports(summary, engine, export_dir))
                std::printf("export: wrote %s\n", p.c_str());
            break;
        }
        default: rest.push_back(std::move(c)); break;
        }
    }
    return rest;
}

}  // namespace sg::app
