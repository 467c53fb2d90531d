// Snapshot building; see snapshot_builder.hpp.
#include "engine/snapshot_builder.hpp"

#include <algorithm>
#include <cmath>
#include <span>

#include <fmt/format.h>

#include "coverage/gaps.hpp"
#include "engine/alarm_text.hpp"
#include "engine/picks_summary.hpp"
#include "engine/snapshot_picks.hpp"

namespace sg::engine {

namespace {

constexpr double kTrackStep_m = 0.5;       // tracks keep a point every half metre
constexpr double kSlowSeriesPeriod_s = 0.5;  // altitude, noise, deviation, speed: 2 Hz
constexpr std::size_t kChunk = 4096;
constexpr int kProfileWindow = 201;        // samples of the running mean removed from profiles

double seconds(TimeNs t) { return toSeconds(t); }

// Sensors whose latest sample lies further than this from the epoch being summed are not part
// of it (their pose is stale, or they have no sample yet).
constexpr TimeNs kSameEpochNs = 500'000'000;

}  // namespace

SnapshotBuilder::SnapshotBuilder(SurveyEngine& engine, double gap_interval_s)
    : m_engine(engine), m_gap_interval_s(gap_interval_s) {
    m_engine.setSampleObserver([this](const SensorState& s) { onSample(s); });
}

SnapshotBuilder::~SnapshotBuilder() { m_engine.setSampleObserver({}); }

void SnapshotBuilder::onSample(const SensorState& s) {
    const double t = seconds(s.t_ns);
    const auto add = [&](const std::string& key, double value) {
        auto& ser = m_series[key];
        if (!ser) {
            ser = std::make_shared<Series>();
            ser->name = key.substr(key.find(':') + 1);
        }
        ser->points.append({t, static_cast<float>(value)}, kChunk);
    };
    const std::string name = fmt::format("mag{}", s.index);
    auto& h = m_sensor_hist[s.index];
    if (s.pose.ok()) {
        const PointEN p{s.pose.easting_m, s.pose.northing_m};
        if (!h.last_kept || std::hypot(p.e_m - h.last_kept->e_m, p.n_m - h.last_kept->n_m) >= kTrackStep_m) {
            h.track.append(p, kChunk);
            h.last_kept = p;
        }
        if (s.pose.altitude_source != nav::AltitudeSource::None && t - h.last_alt_t >= kSlowSeriesPeriod_s) {
            add("alt:" + name, s.pose.altitude_m);
            h.last_alt_t = t;
        }
    }
    if (s.field_nT) {
        add("field:" + name, *s.field_nT);
        // Profiles of the run this sample belongs to.
        const auto* lines = m_engine.lines();
        const int run = lines ? lines->activeRun() : -1;
        if (run >= 0 && s.pose.ok()) {
            auto& ph = m_profiles[run];
            const PointEN p{s.pose.easting_m, s.pose.northing_m};
            auto& last = ph.last_pos[s.index];
            if (last) ph.dist[s.index] += std::hypot(p.e_m - last->e_m, p.n_m - last->n_m);
            last = p;
            ph.along[s.index].push_back(static_cast<float>(ph.dist[s.index]));
            ph.field[s.index].push_back(static_cast<float>(*s.field_nT));
        }
    }
    if (t - h.last_noise_t >= kSlowSeriesPeriod_s && s.noise_nT > 0) {
        add("noise:" + name, s.noise_nT);
        h.last_noise_t = t;
    }
    // Per epoch (sensor slot 0): array reference track, deviation, speed, gradients.
    const auto& sensors = m_engine.sensors();
    if (sensors.empty() || s.index != sensors.front().index) return;
    // Only sensors placed at this epoch: a sensor with no sample yet holds a default pose at
    // E 0, N 0 (that point once drew a straight line from the start of the track far off the
    // survey, issue #12).
    double e = 0, n = 0;
    int k = 0;
    for (const auto& o : sensors)
        if (o.samples > 0 && o.pose.ok() && std::llabs(o.t_ns - s.t_ns) <= kSameEpochNs) {
            e += o.pose.easting_m;
            n += o.pose.northing_m;
            ++k;
        }
    if (k > 0) {
        const PointEN ref{e / k, n / k};
        if (!m_ref_last || std::hypot(ref.e_m - m_ref_last->e_m, ref.n_m - m_ref_last->n_m) >= kTrackStep_m) {
            m_ref_track.append(ref, kChunk);
            m_ref_last = ref;
        }
    }
    if (t - m_last_dev_t >= kSlowSeriesPeriod_s) {
        if (auto d = m_engine.deviation_m()) add("dev:deviation", *d);
        if (auto v = m_engine.speed_mps()) add("speed:speed", *v);
        m_last_dev_t = t;
    }
    // Transverse gradient of neighbouring sensors (nT per metre of cross-track separation).
    const auto& cfg = m_engine.config().nav.sensors;
    for (std::size_t i = 0; i + 1 < sensors.size() && i + 1 < cfg.size(); ++i) {
        const auto& a = sensors[i];
        const auto& b = sensors[i + 1];
        const double sep = cfg[i + 1].cross_m - cfg[i].cross_m;
        if (!a.field_nT || !b.field_nT || std::abs(sep) < 1e-3) continue;
        if (std::abs(toSeconds(a.t_ns - b.t_ns)) > 0.2) continue;
        add(fmt::format("grad:mag{}-mag{}", b.index, a.index), (*b.field_nT - *a.field_nT) / sep);
    }
}

std::shared_ptr<const Series> SnapshotBuilder::series(const std::string& key) const {
    auto it = m_series.find(key);
    if (it == m_series.end()) return nullptr;
    return std::make_shared<const Series>(*it->second);
}

void SnapshotBuilder::updateTiles() {
    convertTiles(m_engine.raster(), 0, m_tiles_gen, m_tiles);
    const auto* cov = m_engine.coverage();
    if (cov != nullptr && cov->isSite() && !m_engine.priorSessions().empty())
        convertTiles(cov->sessionRaster(), 1, m_session_tiles_gen, m_session_tiles);
}

void SnapshotBuilder::convertTiles(const coverage::CoverageRaster& raster, int layer, std::uint64_t& gen,
                                   std::map<std::uint64_t, CoverageTileView>& views) {
    if (raster.generation() == gen) return;
    const double cell = raster.cellSize();
    for (const auto key : raster.tilesChangedSince(gen)) {
        const auto* tile = raster.tile(coverage::tileX(key), coverage::tileY(key));
        if (tile == nullptr) continue;
        CoverageTileView v;
        v.tx = coverage::tileX(key);
        v.ty = coverage::tileY(key);
        v.layer = layer;
        v.size_cells = coverage::kTileCells;
        v.cell_m = cell;
        const std::int64_t ix0 = static_cast<std::int64_t>(v.tx) * coverage::kTileCells;
        const std::int64_t iy0 = static_cast<std::int64_t>(v.ty) * coverage::kTileCells;
        const auto c0 = raster.cellCentre(ix0, iy0);
        v.origin_e = c0.e_m - cell / 2;
        v.origin_n = c0.n_m - cell / 2;
        v.generation = tile->generation;
        auto q = std::make_shared<std::vector<std::uint8_t>>(coverage::kCellsPerTile, 0);
        raster.tileCodes(*tile, std::span<std::uint8_t, coverage::kCellsPerTile>(q->data(), q->size()));
        for (auto& code : *q) {
            // Raster code = floor(16 * margin); covered from 16. Snapshot q = code - 15, so
            // margin = 1 + (q - 1) / 16 (MarginScale lo 1, hi 1 + 254/16).
            code = code >= coverage::kCoveredCode ? static_cast<std::uint8_t>(code - 15) : 0;
        }
        v.margin_q = std::move(q);
        views[key] = std::move(v);
    }
    gen = raster.generation();
}

void SnapshotBuilder::updateGaps(bool force) {
    const double now = seconds(m_engine.surveyClock_ns());
    if (!force && now - m_last_gap_s < m_gap_interval_s) return;
    if (m_engine.coverage() == nullptr) return;
    m_last_gap_s = now;
    m_summary = summarise(m_engine, 0);
    m_gap_views.clear();
    const auto outlines = coverage::gapOutlines(m_summary->gaps);
    for (std::size_t i = 0; i < m_summary->gaps.gaps.size() && i < outlines.size(); ++i) {
        const auto& g = m_summary->gaps.gaps[i];
        if (g.small) continue;
        GapView v;
        v.id = static_cast<std::uint64_t>(g.id);
        v.name = fmt::format("G{}", g.id);
        v.area_m2 = g.area_m2;
        v.centroid = {g.centroid.e_m, g.centroid.n_m};
        for (const auto& poly : outlines[i]) {
            std::vector<PointEN> ring;
            for (const auto& p : poly.exterior) ring.push_back({p.e_m, p.n_m});
            v.rings.push_back(std::move(ring));
        }
        m_gap_views.push_back(std::move(v));
    }
    m_not_run.clear();
    if (auto* cov = m_engine.coverage(); cov && !cov->plan().area.empty()) {
        const auto pending = cov->pendingGround(cov->lines(), false);
        for (const auto& q : pending.quads) {
            std::vector<PointEN> ring;
            for (const auto& p : q) ring.push_back({p.e_m, p.n_m});
            m_not_run.push_back(std::move(ring));
        }
    }
    m_not_run_message = m_summary->gaps.notRunMessage();
    m_infill_views.clear();
    for (const auto& l : m_summary->infill.plan.lines) {
        InfillView v;
        v.id = static_cast<std::uint64_t>(l.rank);
        v.name = l.name;
        v.points = {{l.start.e_m, l.start.n_m}, {l.end.e_m, l.end.n_m}};
        v.length_m = l.length_m;
        for (int id : l.gap_ids) v.gap_ids.push_back(static_cast<std::uint64_t>(id));
        m_infill_views.push_back(std::move(v));
    }
}

void SnapshotBuilder::buildHelm(Snapshot& s) const {
    HelmView& h = s.helm;
    const auto* lines = m_engine.lines();
    // The crew's infill line while it is the target (docs/helm-output.md), else the active line.
    const int target = m_engine.steerTarget();
    const int li = target >= 0 ? target : (lines ? lines->activeLine() : -1);
    if (lines && li >= 0 && static_cast<std::size_t>(li) < lines->lines().size()) {
        const auto& pl = lines->lines()[static_cast<std::size_t>(li)];
        h.line = pl.name;
        h.infill = li >= lines->planCount();
        // Along the line from the position of the array (the engine's reference, the one the
        // helm's sentences use; else the vessel) to the end the vessel is heading for: a planned
        // line is run either way, so the end is the one ahead; an infill line is run start -> end.
        std::optional<PointEN> pos;
        if (const auto r = m_engine.arrayReference()) pos = PointEN{r->e_m, r->n_m};
        else if (m_ref_last) pos = m_ref_last;
        else if (m_engine.vesselPosition()) pos = s.vessel;
        const double le = pl.end.e_m - pl.start.e_m, ln = pl.end.n_m - pl.start.n_m;
        const double len = std::hypot(le, ln);
        if (target >= 0 && lines->activeLine() != target) {
            // Not on it yet: off-line from the target itself, starboard of its direction positive.
            if (pos && len > 0) h.off_line_m = ((pos->e_m - pl.start.e_m) * ln - (pos->n_m - pl.start.n_m) * le) / len;
        } else {
            h.off_line_m = m_engine.deviation_m();
        }
        if (pos && len > 0) {
            const double along = ((pos->e_m - pl.start.e_m) * le + (pos->n_m - pl.start.n_m) * ln) / len;
            const double de = std::sin(s.heading_rad), dn = std::cos(s.heading_rad);
            const bool forward = h.infill || de * le + dn * ln >= 0;
            h.to_end_m = std::max(0.0, forward ? len - along : along);
            if (auto v = m_engine.speed_mps(); v && *v > 0.1) h.to_end_s = *h.to_end_m / *v;
        }
    }
    h.speed_mps = m_engine.speed_mps();
    const auto& sensors = m_engine.sensors();
    if (!sensors.empty() && sensors.front().samples > 0 && sensors.front().pose.positionOk())
        h.layback_m = sensors.front().pose.layback_m;
    h.cable_out_m = m_engine.cableOut_m();
    if (const auto& g = m_engine.gnssStatus()) {
        h.fix_quality = g->quality;
        h.fix_name = std::string(checks::fixQualityName(g->quality));
        h.satellites = g->satellites;
        h.hdop = g->hdop;
    }
    if (m_summary) h.coverage_pct = m_summary->coverage_pct;
}

void SnapshotBuilder::buildInputs(Snapshot& s) {
    if (!m_decoder) return;
    const TimeNs now = m_engine.clock_ns();
    for (const auto& [name, c] : m_decoder->counters()) {
        InputHealthView v;
        v.name = name;
        v.lines = c.lines;
        v.errors = c.rejected;
        v.in_outage = c.in_outage;
        if (c.last_utc_ns != 0 && now >= c.last_utc_ns) v.age_s = seconds(now - c.last_utc_ns);
        // Rate over at least 2 s of the receive clock (the last value is kept in between).
        auto& mark = m_rates[name];
        if (mark.t_ns == 0) {
            mark = {now, c.lines, -1.0};
        } else if (now - mark.t_ns >= 2'000'000'000) {
            mark.rate_hz = static_cast<double>(c.lines - mark.lines) / seconds(now - mark.t_ns);
            mark.t_ns = now;
            mark.lines = c.lines;
        }
        v.rate_hz = mark.rate_hz;
        s.inputs.push_back(std::move(v));
    }
}

std::shared_ptr<const Snapshot> SnapshotBuilder::build(bool force_gaps) {
    m_engine.flushCoverage();
    updateTiles();
    updateGaps(force_gaps);
    auto snap = std::make_shared<Snapshot>();
    Snapshot& s = *snap;
    s.seq = ++m_seq;
    // The survey clock (instrument time) for everything the survey did; the receive clock apart.
    s.now_s = seconds(m_engine.surveyClock_ns() != 0 ? m_engine.surveyClock_ns() : m_engine.clock_ns());
    s.receive_s = seconds(m_engine.clock_ns());
    const auto& sensors = m_engine.sensors();
    if (auto v = m_engine.vesselPosition()) s.vessel = {v->e_m, v->n_m};
    if (!sensors.empty()) s.heading_rad = sensors.front().pose.heading_grid_rad;
    s.speed_mps = m_engine.speed_mps().value_or(0.0);
    s.tow_point = m_ref_last.value_or(s.vessel);
    s.tow_track = m_ref_track;
    for (const auto& st : sensors) {
        // A sensor never placed yet has no position to draw (its pose is a default at E 0, N 0).
        if (st.samples == 0 || !st.pose.positionOk()) continue;
        SensorView v;
        v.name = fmt::format("mag{}", st.index);
        v.position = {st.pose.easting_m, st.pose.northing_m};
        if (st.pose.altitude_source != nav::AltitudeSource::None) v.altitude_m = st.pose.altitude_m;
        const double de = std::sin(st.pose.heading_grid_rad), dn = std::cos(st.pose.heading_grid_rad);
        // Starboard of (de, dn) is (dn, -de).
        v.swath_left = {v.position.e_m - dn * st.half_widths.port_m, v.position.n_m + de * st.half_widths.port_m};
        v.swath_right = {v.position.e_m + dn * st.half_widths.starboard_m,
                         v.position.n_m - de * st.half_widths.starboard_m};
        if (auto it = m_sensor_hist.find(st.index); it != m_sensor_hist.end()) v.track = it->second.track;
        s.sensors.push_back(std::move(v));
    }
    if (const auto* plan = m_engine.plan()) {
        for (const auto& poly : plan->area) {
            std::vector<PointEN> ring;
            for (const auto& p : poly.exterior) ring.push_back({p.e_m, p.n_m});
            s.area.push_back(std::move(ring));
        }
        for (const auto& l : plan->lines)
            s.lines.push_back({l.name, {{l.start.e_m, l.start.n_m}, {l.end.e_m, l.end.n_m}}});
    }
    const auto* lines = m_engine.lines();
    s.active_line = lines ? lines->activeLine() : -1;
    for (const auto& [key, v] : m_tiles) s.tiles.push_back(v);
    for (const auto& [key, v] : m_session_tiles) s.session_tiles.push_back(v);
    s.earlier_sessions = static_cast<int>(m_engine.priorSessions().size());
    s.margin.lo = 1.0;
    s.margin.hi = 1.0 + 254.0 / 16.0;
    s.margin.unit = "x threshold";
    s.gaps = m_gap_views;
    s.infill = m_infill_views;
    s.not_run_yet = m_not_run;
    s.not_run_message = m_not_run_message;
    const auto& spot = m_engine.formingGapSpot();
    if (spot && m_engine.checks().check("forming_gap").level() != checks::Level::kOk) {
        auto& f = s.forming_gap;
        f.active = true;
        f.line = spot->line_name;
        f.starboard = spot->starboard;
        f.width_m = spot->width_m;
        f.along_m = spot->along_m;
        f.at = {spot->at.e_m, spot->at.n_m};
        f.lon_deg = spot->lon_deg;
        f.lat_deg = spot->lat_deg;
    }

    // Plots, in the order the screen expects.
    const auto& chk = m_engine.checks();
    const auto limitsOf = [&](const char* name, const char* label) {
        std::vector<PlotLimit> out;
        const auto& l = chk.check(name).limits();
        if (!l.enabled) return out;
        out.push_back({l.warn, checks::Level::kWarn, std::string(label) + " warn"});
        out.push_back({l.alarm, checks::Level::kAlarm, std::string(label) + " alarm"});
        return out;
    };
    const auto group = [&](const std::string& title, const std::string& unit, const std::string& prefix,
                           std::vector<PlotLimit> limits) {
        PlotGroup g;
        g.title = title;
        g.unit = unit;
        for (const auto& [key, ser] : m_series)
            if (key.rfind(prefix, 0) == 0) g.series.push_back(series(key));
        g.limits = std::move(limits);
        s.plots.push_back(std::move(g));
    };
    group("Altitude", "m", "alt:", limitsOf("altitude", "altitude"));
    auto dev_limits = limitsOf("deviation", "tolerance");
    for (std::size_t i = 0, n = dev_limits.size(); i < n; ++i)
        dev_limits.push_back({-dev_limits[i].value, dev_limits[i].level, dev_limits[i].label});
    group("Deviation", "m", "dev:", dev_limits);
    group("Total field", "nT", "field:", {});
    group("Gradient", "nT/m", "grad:", {});
    group("Noise", "nT", "noise:", limitsOf("noise", "noise"));
    auto speed_limits = limitsOf("speed_high", "max speed");
    for (auto& l : limitsOf("speed_low", "min speed")) speed_limits.push_back(l);
    group("Speed", "m/s", "speed:", speed_limits);

    // Runs.
    if (lines) {
        for (const auto& r : lines->runs()) {
            RunView v;
            const std::string line_name = r.line >= 0 ? lines->lines()[static_cast<std::size_t>(r.line)].name : "?";
            v.name = fmt::format("{} run {}", line_name, r.id + 1);
            v.line_index = r.line;
            v.start_s = seconds(r.start_t_ns);
            v.end_s = r.open ? v.start_s : seconds(r.end_t_ns);
            v.percent_covered = r.corridor_covered_pct;
            v.mean_altitude_m = r.meanAltitude_m();
            v.worst_altitude_m = r.worst_altitude_m;
            v.worst_deviation_m = r.worst_deviation_m;
            v.alarm_count = r.alarms;
            v.active = r.open && r.id == lines->activeRun();
            v.session = r.session;
            const auto& prior = m_engine.priorSessions();
            v.log = r.session < static_cast<int>(prior.size()) ? prior[static_cast<std::size_t>(r.session)].log : "this session";
            v.earlier_session = r.session < lines->session();
            s.runs.push_back(std::move(v));
        }
    }
    // Anomaly picks and the verification strip (docs/picks.md): recomputed every
    // kPicksInterval_s of survey time (picksNow() copies the picker), shared in between.
    if (m_engine.picksEnabled() && (force_gaps || !m_picks_view || s.now_s - m_last_picks_s >= kPicksInterval_s ||
                                    s.now_s < m_last_picks_s)) {
        m_picks_view = std::make_shared<const PicksView>(makePicksView(m_engine.picksNow(), true, s.runs));
        m_last_picks_s = s.now_s;
    } else if (!m_engine.picksEnabled() && !m_picks_view) {
        m_picks_view = std::make_shared<const PicksView>(PicksView{false, kPicksCaution, {}, {}, {}, {}});
    }
    s.picks = m_picks_view;
    // Profiles: the chosen run, else the current one, else the last.
    int run = m_profile_run;
    if (run < 0 && lines) run = lines->activeRun() >= 0 ? lines->activeRun() : static_cast<int>(lines->runs().size()) - 1;
    if (auto it = m_profiles.find(run); it != m_profiles.end()) {
        s.profiles.run_index = run;
        s.profiles.run_name = run < static_cast<int>(s.runs.size()) ? s.runs[static_cast<std::size_t>(run)].name : "";
        for (const auto& st : sensors) {
            auto fa = it->second.along.find(st.index);
            if (fa == it->second.along.end()) continue;
            const auto& f = it->second.field.at(st.index);
            ProfileTrace tr;
            tr.sensor = fmt::format("mag{}", st.index);
            tr.along_m = fa->second;
            // Remove the ambient trend: a centred running mean over kProfileWindow samples.
            const std::size_t n = f.size();
            std::vector<double> prefix(n + 1, 0.0);
            for (std::size_t i = 0; i < n; ++i) prefix[i + 1] = prefix[i] + f[i];
            tr.residual_nT.resize(n);
            for (std::size_t i = 0; i < n; ++i) {
                const std::size_t half = kProfileWindow / 2;
                const std::size_t a = i > half ? i - half : 0;
                const std::size_t b = std::min(n, i + half + 1);
                const double mean = (prefix[b] - prefix[a]) / static_cast<double>(b - a);
                tr.residual_nT[i] = static_cast<float>(f[i] - mean);
            }
            s.profiles.traces.push_back(std::move(tr));
        }
    }
    // Alarms: active first, then past ones newest first.
    std::vector<AlarmView> active, past;
    const std::optional<PointEN> here =
        m_ref_last ? m_ref_last : (m_engine.vesselPosition() ? std::optional<PointEN>(s.vessel) : std::nullopt);
    for (const auto& ep : chk.episodes()) {
        AlarmView a;
        a.episode = ep;
        a.unit = chk.check(ep.check).unit();
        a.words = std::string(checks::checkWords(ep.check));
        a.value_text = checks::checkValueText(ep.check, ep.peak_value);
        // The same sentence as the headless status line (one function, alarm_text.hpp).
        a.text = alarmStatement(ep, spot ? &*spot : nullptr);
        if (auto it = m_episode_where.find(ep.id); it != m_episode_where.end()) a.where = it->second;
        else if (here && !ep.end_ns) a.where = m_episode_where[ep.id] = *here;
        (ep.end_ns ? past : active).push_back(std::move(a));
    }
    std::reverse(past.begin(), past.end());
    s.alarms = std::move(active);
    for (auto& a : past) s.alarms.push_back(std::move(a));
    s.replay = m_replay;
    if (const auto* crs = m_engine.crs()) {
        s.crs_name = fmt::format("EPSG:{}", crs->epsg());
        // The screen thread gets its own PROJ object (they are not thread-safe).
        auto own = std::make_shared<nav::SurveyCrs>(crs->epsg());
        s.to_lonlat = [own](double e, double n) {
            const auto ll = own->inverse(e, n);
            return std::make_pair(ll.lon_deg, ll.lat_deg);
        };
    }
    buildHelm(s);
    buildInputs(s);
    s.cautions = "Coverage is a model's estimate. UXO clearance follows the project's risk "
                 "assessment, local regulations and licensed specialists. The master decides on "
                 "navigation.";
    return snap;
}

}  // namespace sg::engine
