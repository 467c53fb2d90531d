// Steering to a proposed infill line (issue #12, docs/helm-output.md "Steering to an infill
// line"): the demo survey is run live through the Pipeline and logged; once the engine proposes
// an infill line the crew's command "steer I<n>" is fed as a line of source @crew. Checked:
// - the helm fix (XTE/APB/RMB) and the helm panel's numbers (distance off line with side,
//   distance to end) against an independent computation: the line's ends and the reference
//   position taken back to latitude/longitude with GeographicLib's UTMUPS (Karney 2011, not the
//   engine's PROJ), then cross-track and along-track from GeographicLib geodesics (Karney 2013)
//   in the local tangent plane at the line's start, scaled by the UTM point scale k that UTMUPS
//   returns (grid distance = k * ground distance);
// - the sentences name the infill line's waypoints (I<n>A -> I<n>B) and give its end's position;
// - replaying the log (the crew line included) gives the same helm sentences, byte for byte, as
//   live (replay = live).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

#include <GeographicLib/Geodesic.hpp>
#include <GeographicLib/UTMUPS.hpp>

#include "decode/nmea.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/helm_steering.hpp"
#include "engine/log_replay.hpp"
#include "engine/pipeline.hpp"
#include "engine/snapshot_builder.hpp"
#include "engine/survey_engine.hpp"
#include "io/helm_output.hpp"
#include "io/log_writer.hpp"

using namespace sg;

namespace {

constexpr double kPi = 3.14159265358979323846;

// Collects every sentence handed to it (CR LF stripped).
class Collect final : public io::LineSink {
public:
    explicit Collect(std::vector<std::string>& out) : m_out(out) {}
    bool send(std::string_view bytes, std::string&) override {
        std::string s(bytes);
        while (!s.empty() && (s.back() == '\n' || s.back() == '\r')) s.pop_back();
        m_out.push_back(std::move(s));
        return true;
    }

private:
    std::vector<std::string>& m_out;
};

helm::OutputConfig bridge() {
    helm::OutputConfig o;
    o.name = "bridge";
    o.host = "127.0.0.1";
    o.port = 10110;
    return o;  // XTE, APB, RMB at 1 Hz of survey time, from the array reference
}

io::HelmOutputs collectingHelm(std::vector<std::string>& out) {
    std::vector<std::unique_ptr<io::LineSink>> sinks;
    sinks.push_back(std::make_unique<Collect>(out));
    return io::HelmOutputs({bridge()}, std::move(sinks));
}

// Independent numbers for a point and a line given on the UTM grid of `epsg` (326zz / 327zz).
struct Independent {
    double xte_m = 0.0;     // starboard of start -> end positive, grid metres
    double to_end_m = 0.0;  // along the line from the point's foot to the end, grid metres
};
Independent independent(int epsg, coverage::Point a, coverage::Point b, coverage::Point p) {
    const bool north = epsg / 100 == 326;
    const int zone = epsg % 100;
    double lat_a = 0, lon_a = 0, lat_b = 0, lon_b = 0, lat_p = 0, lon_p = 0, gamma = 0, k = 0;
    GeographicLib::UTMUPS::Reverse(zone, north, a.e_m, a.n_m, lat_a, lon_a, gamma, k);
    double k_b = 0, k_p = 0;
    GeographicLib::UTMUPS::Reverse(zone, north, b.e_m, b.n_m, lat_b, lon_b, gamma, k_b);
    GeographicLib::UTMUPS::Reverse(zone, north, p.e_m, p.n_m, lat_p, lon_p, gamma, k_p);
    const auto& g = GeographicLib::Geodesic::WGS84();
    double s_ab = 0, az_ab = 0, s_ap = 0, az_ap = 0, az2 = 0;
    g.Inverse(lat_a, lon_a, lat_b, lon_b, s_ab, az_ab, az2);
    g.Inverse(lat_a, lon_a, lat_p, lon_p, s_ap, az_ap, az2);
    // Local tangent plane at A: a point at distance s, azimuth az from A; over a few km the
    // plane differs from the ellipsoid by (s/R)^2 ~ 1e-7 relative.
    const double d = (az_ap - az_ab) * kPi / 180.0;
    const double xte = s_ap * std::sin(d), along = s_ap * std::cos(d);
    const double scale = (k + k_b + k_p) / 3.0;  // the grid's scale over the few km involved
    return {scale * xte, scale * (s_ab - along)};
}

struct Live {
    std::string infill;                  // the line steered to
    std::vector<std::string> sentences;  // every helm sentence sent
    std::vector<std::uint64_t> update_after;  // lines fed before each helm update
    std::size_t first_after_steer = 0;   // index of the first sentence after the crew line
    int checked = 0;                     // instants compared with the independent numbers
    int final_target = -2;               // the engine's steerTarget() at the end
    double max_xte_m = 0.0;              // largest |cross-track| among the checked instants
    std::size_t end_of_steer = 0;        // sentences sent while the infill line was the target
};

}  // namespace

TEST(InfillSteering, HelmFollowsTheCrewsInfillLineAndReplayRepeatsIt) {
    const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
    const auto cfg = engine::loadSurveyConfig(dir + "survey.toml");
    const auto log_path = (std::filesystem::temp_directory_path() /
                           ("sg_infill_steer_" + std::to_string(::getpid()) + ".sglog")).string();
    std::filesystem::remove(log_path);

    sim::SimOptions so;
    so.duration_s = 1500.0;
    sim::Simulator simulator(sim::loadScenario(dir + "scenario.toml"), so);
    Live live;
    {
        io::LogWriter writer(log_path, {200, false},
                             {{"config_text", cfg.text}, {"config_file", dir + "survey.toml"}});
        engine::Pipeline pipeline(cfg, [&] { return writer.nextEventId(); });
        auto helm = collectingHelm(live.sentences);
        engine::SnapshotBuilder builder(pipeline.engine());
        auto& eng = pipeline.engine();
        std::uint64_t fed = 0;
        TimeNs last_look = 0, last_check = 0, last_recv = 0;
        while (!simulator.done()) {
            const auto& out = simulator.step();
            for (const auto& l : out.lines) {
                ReceivedLine r{sim::channelName(l.channel), l.utc_ns, l.utc_ns, l.bytes, 0};
                pipeline.feed(r);
                last_recv = l.utc_ns;
                ++fed;
            }
            const TimeNs now = eng.surveyClock_ns();
            if (live.infill.empty() && now - last_look >= 10'000'000'000LL && eng.arrayReference()) {
                // Every 10 s of survey time: the crew takes the first proposed line whose start
                // is more than 100 m away (the helm then steers to it from afar; the simulated
                // vessel keeps to its own route).
                last_look = now;
                const auto ref = *eng.arrayReference();
                for (const auto& l : eng.proposedInfill()) {
                    if (std::hypot(l.start.e_m - ref.e_m, l.start.n_m - ref.n_m) <= 100.0) continue;
                    live.infill = l.name;
                    pipeline.feed({std::string(engine::Pipeline::kCrewSource), last_recv, last_recv,
                                   "steer " + live.infill, 0});
                    ++fed;
                    live.first_after_steer = live.sentences.size();
                    ASSERT_GE(eng.steerTarget(), 0) << "steer " << live.infill << " was refused";
                    break;
                }
            }
            helm.update(eng, out.utc_ns);
            live.update_after.push_back(fed);
            if (!live.infill.empty() && eng.steerTarget() >= 0) live.end_of_steer = live.sentences.size();
            if (!out.lines.empty()) writer.post(pipeline.takeBatch());

            // While steering to it: every 5 s of survey time, the numbers against the independent
            // computation.
            const int t = eng.steerTarget();
            if (t < 0 || now - last_check < 5'000'000'000LL) continue;
            const auto ref = eng.arrayReference();
            if (!ref) continue;
            last_check = now;
            const auto& line = eng.lines()->lines()[static_cast<std::size_t>(t)];
            ASSERT_EQ(line.name, live.infill);
            const auto want = independent(eng.crs()->epsg(), line.start, line.end, *ref);
            const auto fix = engine::steeringFix(eng, bridge());
            ASSERT_TRUE(fix.valid);
            // Grid (PROJ, planar) against geodesic (GeographicLib) numbers: within 0.05 m plus
            // 1e-5 of the distance (the scale k varies ~1e-6 over the area, the tangent plane
            // ~1e-7).
            EXPECT_NEAR(fix.xte_m, want.xte_m, 0.05 + 1e-5 * std::abs(want.xte_m));
            EXPECT_EQ(fix.origin_id, live.infill + "A");
            EXPECT_EQ(fix.dest_id, live.infill + "B");
            const auto snap = builder.build();
            EXPECT_EQ(snap->helm.line, live.infill);
            EXPECT_TRUE(snap->helm.infill);
            ASSERT_TRUE(snap->helm.off_line_m.has_value());
            ASSERT_TRUE(snap->helm.to_end_m.has_value());
            // The panel's reference is the builder's own last array position: the same sample.
            EXPECT_NEAR(*snap->helm.off_line_m, want.xte_m, 0.05 + 1e-5 * std::abs(want.xte_m));
            EXPECT_NEAR(*snap->helm.to_end_m, std::max(0.0, want.to_end_m), 0.05 + 1e-5 * std::abs(want.to_end_m));
            ++live.checked;
            live.max_xte_m = std::max(live.max_xte_m, std::abs(want.xte_m));
        }
        writer.post(pipeline.takeBatch());
        writer.stop();
        live.final_target = eng.steerTarget();
    }
    ASSERT_FALSE(live.infill.empty()) << "the demo proposed no infill line in 1500 s";
    EXPECT_GE(live.checked, 3);
    // From afar (the choice is made > 100 m from the line's start), not only on the line.
    EXPECT_GT(live.max_xte_m, 20.0);
    std::printf("steered to %s: %d instants checked, |XTE| up to %.1f m, %zu sentences while steering\n",
                live.infill.c_str(), live.checked, live.max_xte_m, live.end_of_steer - live.first_after_steer);

    // The sentences after the choice name the infill line's waypoints.
    int rmb = 0;
    ASSERT_GT(live.end_of_steer, live.first_after_steer);
    for (std::size_t i = live.first_after_steer; i < live.end_of_steer; ++i) {
        const auto d = decode::decodeRouteNmea(live.sentences[i]);
        ASSERT_TRUE(d.checksum_ok) << live.sentences[i];
        if (const auto* r = std::get_if<decode::Rmb>(&d.data); r && r->valid) {
            EXPECT_EQ(r->origin_id, live.infill + "A") << live.sentences[i];
            EXPECT_EQ(r->dest_id, live.infill + "B") << live.sentences[i];
            ++rmb;
        }
        if (const auto* a = std::get_if<decode::Apb>(&d.data); a && a->valid) {
            EXPECT_EQ(a->dest_id, live.infill + "B") << live.sentences[i];
        }
    }
    EXPECT_GE(rmb, 10);

    // Replay: the same lines (the crew's included) between the same helm updates.
    engine::LogReplay replay(log_path, std::nullopt);
    std::vector<std::string> replayed;
    auto helm = collectingHelm(replayed);
    std::uint64_t fed = 0;
    for (const auto upto : live.update_after) {
        while (fed < upto && replay.step()) ++fed;
        helm.update(replay.pipeline().engine(), 0);
    }
    EXPECT_FALSE(replay.step());  // every logged line was fed
    ASSERT_EQ(replayed.size(), live.sentences.size());
    for (std::size_t i = 0; i < replayed.size(); ++i) ASSERT_EQ(replayed[i], live.sentences[i]) << "sentence " << i;
    EXPECT_EQ(replay.pipeline().engine().steerTarget(), live.final_target);

    std::filesystem::remove(log_path);
    std::filesystem::remove(log_path + "-wal");
    std::filesystem::remove(log_path + "-shm");
}

// Before any position (no survey grid, no lines), a crew line, or one that is no command,
// changes nothing and is logged as rejected with the reason (nothing lost, nothing quietly
// accepted).
TEST(InfillSteering, UnknownLineOrCommandIsRefusedAndLogged) {
    const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
    const auto cfg = engine::loadSurveyConfig(dir + "survey.toml");
    std::int64_t id = 0;
    engine::Pipeline pipeline(cfg, [&] { return ++id; });
    const std::string src(engine::Pipeline::kCrewSource);
    pipeline.feed({src, 1, 1, "steer I1", 0});  // no position yet: no lines at all
    pipeline.feed({src, 2, 2, "turn left", 0});
    pipeline.feed({src, 3, 3, "steer planned", 0});
    EXPECT_EQ(pipeline.engine().steerTarget(), -1);
    const auto batch = pipeline.takeBatch();
    ASSERT_EQ(batch.raw.size(), 3U);
    EXPECT_EQ(batch.raw[0].status, log::DecodeStatus::Rejected);
    EXPECT_NE(batch.raw[0].reason.find("no lines to steer to yet"), std::string::npos) << batch.raw[0].reason;
    EXPECT_EQ(batch.raw[1].status, log::DecodeStatus::Rejected);
    EXPECT_NE(batch.raw[1].reason.find("not a crew command"), std::string::npos) << batch.raw[1].reason;
    EXPECT_EQ(batch.raw[2].status, log::DecodeStatus::Rejected);  // nothing to go back to either
    EXPECT_EQ(batch.raw[2].source, src);
}
