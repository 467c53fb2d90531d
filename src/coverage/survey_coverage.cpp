// The coverage module's per-survey state and the swath-edge probe; see survey_coverage.hpp.
#include "coverage/survey_coverage.hpp"

#include <array>
#include <cmath>

namespace sg::coverage {

namespace {

Point originFor(const MultiPolygon& area) {
    if (area.empty()) return {};
    const Box b = bounds(area);
    return {std::floor(b.min_e / 100.0) * 100.0, std::floor(b.min_n / 100.0) * 100.0};
}

LineTrackerOptions trackerOptions(const SurveyPlan& plan) {
    LineTrackerOptions o;
    o.line_spacing_m = plan.line_spacing_m > 0.0 ? plan.line_spacing_m : 10.0;
    return o;
}

}  // namespace

EdgeProbe probeEdge(const CoverageRaster& raster, const SwathSample& s, bool starboard, double search_m) {
    EdgeProbe out;
    if (!s.valid) return out;
    const Point edge = starboard ? SwathPainter::starboardEdge(s) : SwathPainter::portEdge(s);
    const double ne = starboard ? s.dir_n : -s.dir_n;
    const double nn = starboard ? -s.dir_e : s.dir_e;
    const double step = 0.5 * raster.cellSize();
    for (double d = step; d <= search_m + step; d += step) {
        const auto c = raster.cellAt({edge.e_m + ne * d, edge.n_m + nn * d});
        if (c.covered() && c.run != s.run) {
            out.found = true;
            out.gap_m = std::max(0.0, d - step);
            out.run = c.run;
            return out;
        }
    }
    return out;
}

SurveyCoverage::SurveyCoverage(SurveyPlan plan, const CoverageOptions& coverage, const GapOptions& gaps)
    : m_plan(std::move(plan)), m_gap_options(gaps), m_raster(coverage.cell_size_m, originFor(m_plan.area)),
      m_painter(m_raster, coverage.max_sample_step_m), m_tracker(m_plan.lines, trackerOptions(m_plan)) {}

SurveyCoverage SurveyCoverage::fromConfig(const config::Section& root, const LonLatToGrid& to_grid) {
    SurveyPlan plan = loadPlan(root.table("plan"), to_grid);
    const auto cov_sec = root.optionalTable("coverage");
    const CoverageOptions cov = cov_sec ? loadCoverageOptions(*cov_sec) : CoverageOptions{};
    const double heading = plan.surveyHeadingDeg();
    const auto gaps_sec = root.optionalTable("gaps");
    GapOptions gaps;
    gaps.survey_heading_deg = heading;
    if (gaps_sec) gaps = loadGapOptions(*gaps_sec, heading);
    return SurveyCoverage(std::move(plan), cov, gaps);
}

int SurveyCoverage::updatePosition(std::int64_t t_ns, Point pos, double dir_e, double dir_n,
                                   std::optional<double> altitude_m) {
    syncSite();
    return m_tracker.update(t_ns, pos, dir_e, dir_n, altitude_m);
}

CoverageRaster& SurveyCoverage::beginSite() {
    if (!m_site) {
        m_site = std::make_unique<CoverageRaster>(m_raster.cellSize(), m_raster.origin());
        m_raster.setTrackDirty(true);
        m_raster.takeDirtyTiles();
        m_site->mergeFrom(m_raster);  // anything painted before (normally nothing)
    }
    return *m_site;
}

void SurveyCoverage::syncSite() {
    if (!m_site) return;
    const auto keys = m_raster.takeDirtyTiles();
    if (keys.empty()) return;
    std::array<std::uint8_t, kCellsPerTile> codes{};
    std::array<std::int32_t, kCellsPerTile> runs{};
    for (TileKey key : keys) {
        const CoverageTile* t = m_raster.tile(tileX(key), tileY(key));
        if (t == nullptr) continue;
        std::uint16_t mask = 0;
        for (int b = 0; b < kBlocksPerTile; ++b)
            if (m_raster.block(*t, b) != nullptr) mask = static_cast<std::uint16_t>(mask | (1U << b));
        m_raster.tileCodes(*t, codes);
        for (int c = 0; c < kCellsPerTile; ++c)
            runs[static_cast<std::size_t>(c)] = codes[static_cast<std::size_t>(c)] == 0 ? kRunNone : m_raster.runAt(*t, c);
        m_site->mergeTile(key, mask, codes, runs);
    }
}

GapReport SurveyCoverage::gaps(bool final) {
    flush();
    m_tracker.refreshCoverage(raster());
    m_last_final = final;
    return gapsWith(raster(), m_tracker, final);
}

GapReport SurveyCoverage::gapsWith(const CoverageRaster& raster, const LineTracker& tracker, bool final) const {
    if (m_plan.area.empty() || tracker.lines().empty()) return findGaps(raster, m_plan.area, m_gap_options);
    const auto pending = pendingGround(tracker, final);
    GapReport rep = findGaps(raster, m_plan.area, m_gap_options, &pending.quads);
    rep.lines_total = pending.lines_total;
    for (int li : pending.lines_pending) rep.lines_not_run.push_back(tracker.lines()[static_cast<std::size_t>(li)].name);
    return rep;
}

SurveyCoverage::Infill SurveyCoverage::infill(const GapReport& report, const InfillOptions& options) const {
    Infill out;
    out.plan = planInfill(report, options);
    if (m_plan.area.empty() || m_tracker.lines().empty()) {
        out.after = flyInfill(raster(), m_plan.area, out.plan, m_gap_options).after;
    } else {
        const auto pending = pendingGround(m_tracker, m_last_final);
        out.after = flyInfill(raster(), m_plan.area, out.plan, m_gap_options, 2.0, 1.0, &pending.quads).after;
        out.after.lines_total = report.lines_total;
        out.after.lines_not_run = report.lines_not_run;
    }
    return out;
}

std::uint64_t SurveyCoverage::contentHash() {
    flush();
    return raster().contentHash();
}

}  // namespace sg::coverage
