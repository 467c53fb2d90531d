// `swathguard route`: the infill plan of a log or a site as an NMEA 0183 route for the bridge
// (WPL per waypoint, then RTE; docs/helm-output.md), sent on request to a [[output]] of the
// config, to --to udp://HOST:PORT or serial:DEVICE[@BAUD], or printed with --print. Each infill
// line gives two waypoints (start, end: helm::lineEndId), in the planner's rank order.
// The route is advisory: the master decides on navigation.
#include <cstdio>

#include <fmt/format.h>

#include "app/commands.hpp"
#include "app/site_open.hpp"
#include "engine/helm_steering.hpp"
#include "engine/log_replay.hpp"
#include "engine/survey_summary.hpp"
#include "io/helm_output.hpp"
#include "io/source.hpp"

namespace sg::app {

namespace {

struct RouteOptions {
    std::vector<std::string> logs;
    std::string config;
    std::string to;       // udp://host:port | serial:/dev/x[@baud]
    std::string output;   // name of an [[output]] of the config
    std::string route_id = "INFILL";
    std::string talker = "IN";
    bool print = false;
};

helm::OutputConfig parseTo(const std::string& to) {
    helm::OutputConfig o;
    o.name = to;
    if (to.rfind("udp://", 0) == 0) {
        const auto rest = to.substr(6);
        const auto colon = rest.rfind(':');
        if (colon == std::string::npos) throw CLI::ValidationError("--to", "udp://HOST:PORT");
        o.transport = "udp";
        o.host = rest.substr(0, colon);
        o.port = std::stoi(rest.substr(colon + 1));
        if (o.port < 1 || o.port > 65535) throw CLI::ValidationError("--to", "port 1..65535");
    } else if (to.rfind("serial:", 0) == 0) {
        auto rest = to.substr(7);
        o.transport = "serial";
        if (const auto at = rest.rfind('@'); at != std::string::npos) {
            o.baud = std::stoi(rest.substr(at + 1));
            rest = rest.substr(0, at);
        }
        o.device = rest;
    } else {
        throw CLI::ValidationError("--to", "udp://HOST:PORT or serial:DEVICE[@BAUD]");
    }
    return o;
}

int runRoute(const RouteOptions& o) {
    std::unique_ptr<engine::LogReplay> replay;
    SiteView view;
    engine::SurveyEngine* eng = nullptr;
    engine::SurveySummary summary;
    const std::optional<std::string> cfg = o.config.empty() ? std::nullopt : std::optional<std::string>(o.config);
    if (namesSite(o.logs)) {
        view = summariseSite(openSite(o.logs, cfg));
        eng = view.engine.get();
        summary = std::move(view.summary);
    } else {
        replay = std::make_unique<engine::LogReplay>(o.logs.front(), cfg);
        replay->runToEnd();
        eng = &replay->pipeline().engine();
        summary = engine::summarise(*eng, replay->linesFed(), replay->context());
    }
    if (eng->crs() == nullptr) throw std::runtime_error("route: the log has no position, so no CRS: nothing to send");
    std::vector<engine::RouteLine> lines;
    for (const auto& l : summary.infill.plan.lines) lines.push_back({l.name, l.start, l.end});
    if (lines.empty()) {
        std::printf("route: no infill lines%s: nothing to send\n",
                    summary.infill_error.empty() ? "" : (" (" + summary.infill_error + ")").c_str());
        return 0;
    }
    helm::SentenceOptions sopt;
    sopt.talker = o.talker;
    const auto sentences = helm::buildRoute(o.route_id, engine::routeWaypoints(lines, *eng->crs()), sopt);
    if (o.print)
        for (const auto& s : sentences) std::printf("%s\n", s.c_str());

    std::vector<helm::OutputConfig> outs;
    if (!o.to.empty()) outs.push_back(parseTo(o.to));
    if (!o.output.empty()) {
        for (const auto& c : eng->config().outputs)
            if (c.name == o.output) outs.push_back(c);
        if (outs.empty() || outs.back().name != o.output)
            throw std::runtime_error(fmt::format("route: the config has no [[output]] named '{}'", o.output));
    }
    if (outs.empty()) {
        if (!o.print) std::printf("route: %zu sentences built; give --to, --output or --print\n", sentences.size());
        return 0;
    }
    io::HelmOutputs helm(outs);
    const auto failed = helm.sendNow(sentences, eng->surveyClock_ns(), io::utcNowNs());
    std::printf("route: %zu infill lines as route '%s' (%zu waypoints)\n", lines.size(), o.route_id.c_str(),
                lines.size() * 2);
    std::printf("%s", helm.summaryText("route").c_str());
    std::printf("The route is advisory: the master decides on navigation.\n");
    return failed > 0 ? 2 : 0;
}

}  // namespace

void addRouteCommand(CLI::App& app) {
    auto o = std::make_shared<RouteOptions>();
    auto* cmd = app.add_subcommand("route", "Send the infill plan to the bridge as an NMEA 0183 route (WPL, RTE)");
    cmd->add_option("logs", o->logs, "Survey log, a site folder, or several logs of one site")
        ->required()->check(CLI::ExistingPath);
    cmd->add_option("--config", o->config, "Survey config to use instead of the one in the log");
    cmd->add_option("--to", o->to, "udp://HOST:PORT or serial:DEVICE[@BAUD]");
    cmd->add_option("--output", o->output, "Send to this [[output]] of the config");
    cmd->add_option("--route-id", o->route_id, "Route identifier (RTE field 4)")->capture_default_str();
    cmd->add_option("--talker", o->talker, "Talker identifier")->capture_default_str();
    cmd->add_flag("--print", o->print, "Print the sentences");
    cmd->callback([o] {
        const int rc = runRoute(*o);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
