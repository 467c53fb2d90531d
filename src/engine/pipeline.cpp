// Line -> decoder -> time alignment -> survey engine; see pipeline.hpp.
#include "engine/pipeline.hpp"

#include <cmath>
#include <variant>

#include "checks/check_set.hpp"

namespace sg::engine {

namespace {

// GGA-style quality from a GNS mode string (NMEA 0183 v4: N no fix, A autonomous, D differential,
// P precise, R RTK fixed, F RTK float, E estimated, M manual, S simulator): the best letter, by
// the same ranking the fix_quality check uses.
int qualityFromGnsMode(const std::string& mode) {
    int best = 0;
    for (char c : mode) {
        int q = 0;
        switch (c) {
        case 'A': q = 1; break;
        case 'D': case 'P': q = 2; break;
        case 'R': q = 4; break;
        case 'F': q = 5; break;
        case 'E': q = 6; break;
        default: q = 0; break;
        }
        if (checks::fixQualityRank(q) < checks::fixQualityRank(best)) best = q;
    }
    return best;
}

}  // namespace

Pipeline::Pipeline(const SurveyConfig& config, std::function<std::int64_t()> next_event_id)
    : m_next_event_id(std::move(next_event_id)),
      m_decoder(config.inputs, config.fieldmaps, m_next_event_id),
      m_engine(std::make_unique<SurveyEngine>(config, m_next_event_id)) {
    m_decoder.setSink(this);
}

void Pipeline::feed(const ReceivedLine& line) {
    ++m_lines;
    // The clocks first: silence at whole seconds before this line is judged without it (the
    // receive clock here, the line's own survey time once it is decoded and aligned).
    m_engine->advanceTo(line.utc_ns);
    if (line.source == kCrewSource) {
        // The crew's command: logged as a raw line (replay feeds it back here) and applied now.
        const auto outcome = m_engine->onCrewCommand(line.bytes);
        m_decoder.logOnly(line, outcome.accepted ? log::DecodeStatus::Ok : log::DecodeStatus::Rejected,
                          outcome.accepted ? std::string() : "crew_command: " + outcome.text);
        return;
    }
    m_decoder.onLine(line);
}

void Pipeline::onSourceEvent(const SourceEvent& event) {
    m_decoder.onEvent(event);
    if (event.kind == SourceEvent::Kind::Drops) {
        m_engine->advanceTo(event.utc_ns);
        m_engine->onInputDrops(event.source, event.count, event.utc_ns);
    }
}

void Pipeline::tick(TimeNs utc_ns) { m_engine->advanceTo(utc_ns); }

log::Batch Pipeline::takeBatch() {
    log::Batch b = m_decoder.takeBatch();
    m_engine->takeRows(b);
    return b;
}

std::optional<TimeNs> Pipeline::align(const config::InputConfig& input, const ReceivedLine& line,
                                      std::optional<TimeNs> instrument_utc_ns) {
    const TimeNs received = line.utc_ns - static_cast<TimeNs>(std::llround(input.latency_ms * 1e6));
    if (input.clock != config::ClockSource::Instrument) return received;
    if (instrument_utc_ns) {
        // Remember how the instruments' clock relates to the receive clock, for the lines of
        // instrument-clock inputs that carry no time of their own (HDT, DPT, ...).
        m_instrument_offset_ns = *instrument_utc_ns - received;
        return *instrument_utc_ns;
    }
    // Until the instruments' clock is known (no dated time seen yet) an instrument-clock line
    // cannot be placed in time: it is logged, not processed (mixing clocks would put later data
    // before earlier data).
    if (!m_instrument_offset_ns) return std::nullopt;
    return received + *m_instrument_offset_ns;
}

void Pipeline::onNmea(const config::InputConfig& input, const ReceivedLine& line,
                      const decode::NmeaSentence& s, std::optional<TimeNs> instrument_utc_ns) {
    const auto aligned = align(input, line, instrument_utc_ns);
    if (!aligned) return;
    const TimeNs t = *aligned;
    m_engine->advanceSurveyClock(t, line.utc_ns);
    auto& engine = *m_engine;
    if (const auto* g = std::get_if<decode::Gga>(&s.data)) {
        m_has_fix_sentence[input.name] = true;
        engine.onGnssStatus(t, g->quality, g->satellites, g->hdop);
        if (g->lat_deg && g->lon_deg) engine.onFix(t, *g->lon_deg, *g->lat_deg, g->quality);
        else engine.onFix(t, 0.0, 0.0, 0);
    } else if (const auto* n = std::get_if<decode::Gns>(&s.data)) {
        m_has_fix_sentence[input.name] = true;
        const int q = qualityFromGnsMode(n->mode);
        if (n->lat_deg && n->lon_deg && q > 0) engine.onFix(t, *n->lon_deg, *n->lat_deg, q);
        else engine.onFix(t, 0.0, 0.0, 0);
    } else if (const auto* r = std::get_if<decode::Rmc>(&s.data)) {
        if (r->valid && r->sog_mps) engine.onSpeed(t, *r->sog_mps);
        // RMC's position only when this input sends no GGA/GNS (they carry the fix quality).
        if (!m_has_fix_sentence[input.name] && r->valid && r->lat_deg && r->lon_deg)
            engine.onFix(t, *r->lon_deg, *r->lat_deg, 1);
    } else if (const auto* l = std::get_if<decode::Gll>(&s.data)) {
        if (!m_has_fix_sentence[input.name] && l->valid && l->lat_deg && l->lon_deg)
            engine.onFix(t, *l->lon_deg, *l->lat_deg, 1);
    } else if (const auto* v = std::get_if<decode::Vtg>(&s.data)) {
        if (v->sog_mps) engine.onSpeed(t, *v->sog_mps);
    } else if (const auto* h = std::get_if<decode::Hdt>(&s.data)) {
        engine.onHeading(t, h->heading_deg, input.name);
    } else if (const auto* d = std::get_if<decode::Dpt>(&s.data)) {
        engine.onWaterDepth(t, d->depth_m, d->offset_m);
    } else if (const auto* b = std::get_if<decode::Dbt>(&s.data)) {
        engine.onWaterDepth(t, b->depth_m, std::nullopt);
    } else if (const auto* st = std::get_if<decode::Gst>(&s.data)) {
        if (st->sigma_lat_m && st->sigma_lon_m)
            engine.onPositionError(t, std::hypot(*st->sigma_lat_m, *st->sigma_lon_m));
    }
}

void Pipeline::onFields(const config::InputConfig& input, const ReceivedLine& line,
                        const decode::FieldRecord& r, std::optional<TimeNs> instrument_utc_ns) {
    const auto aligned = align(input, line, instrument_utc_ns);
    if (!aligned) return;
    const TimeNs t = *aligned;
    m_engine->advanceSurveyClock(t, line.utc_ns);
    auto& engine = *m_engine;
    if (input.role == "mag") {
        engine.onMagSample(t, r.sensor, r.field_nT, r.quality, r.depth_m, r.altitude_m, input.name);
        return;
    }
    if (r.altitude_m) engine.onAltitude(t, *r.altitude_m);
    if (r.cable_out_m) engine.onCableOut(t, *r.cable_out_m, input.name);
    if (r.depth_m) engine.onSensorDepth(t, *r.depth_m, input.name);
}

}  // namespace sg::engine
