// Subcommands of the `swathguard` executable. Each lives in its own cmd_<name>.cpp and registers
// itself here; main.cpp calls every registration function below.
#pragma once

#include <CLI/CLI.hpp>

namespace sg::app {

// Each function adds one subcommand (with its options and callback) to `app`.
// Add a line here and a call in main.cpp when adding a command.
void addRecordCommand(CLI::App& app);  // cmd_record.cpp
void addImportCommand(CLI::App& app);  // cmd_import.cpp
void addSwathCommand(CLI::App& app);  // cmd_swath.cpp

void addInspectCommand(CLI::App& app);  // cmd_inspect.cpp: decode a capture file to JSON lines
void addReplayCommands(CLI::App& app);  // cmd_replay.cpp: replay and gaps
void addDemoCommand(CLI::App& app);     // cmd_demo.cpp: simulator -> core in one process
void addReportCommand(CLI::App& app);   // cmd_report.cpp: the end-of-site report
void addCheckCommand(CLI::App& app);    // cmd_check.cpp: setup validation before a run
void addRouteCommand(CLI::App& app);    // cmd_route.cpp: the infill plan as an NMEA route

}  // namespace sg::app
