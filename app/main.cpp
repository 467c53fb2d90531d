// swathguard: entry point. Parses the command line and runs one subcommand.
#include <cstdio>
#include <exception>
#include <memory>

#include <CLI/CLI.hpp>
#include <spdlog/sinks/stdout_color_sinks.h>
#include <spdlog/spdlog.h>

#include "app/commands.hpp"

int main(int argc, char** argv) {
    // Warnings and errors on stderr: standard output carries status lines and results only.
    spdlog::set_default_logger(spdlog::stderr_color_mt("swathguard"));
    CLI::App app{"swathguard: live magnetometer survey coverage, checks, gaps and infill"};
    app.set_version_flag("--version", "swathguard 0.1.0");
    app.require_subcommand(1);
    sg::app::addRecordCommand(app);
    sg::app::addImportCommand(app);
    sg::app::addSwathCommand(app);

    sg::app::addInspectCommand(app);
    sg::app::addReplayCommands(app);
    sg::app::addDemoCommand(app);
    sg::app::addReportCommand(app);
    sg::app::addCheckCommand(app);
    sg::app::addRouteCommand(app);

    try {
        app.parse(argc, argv);
    } catch (const CLI::ParseError& e) {
        return app.exit(e);
    } catch (const std::exception& e) {
        std::fprintf(stderr, "swathguard: %s\n", e.what());
        return 1;
    }
    return 0;
}
