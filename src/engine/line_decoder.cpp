// Line -> decoder -> rows and counters; see line_decoder.hpp.
#include "engine/line_decoder.hpp"

#include <string_view>
#include <variant>

#include <fmt/format.h>

namespace sg::engine {

log::DecodeStatus statusOf(decode::Reason r) {
    if (decode::isUsable(r)) return log::DecodeStatus::Ok;
    if (r == decode::Reason::UnknownSentence) return log::DecodeStatus::Unsupported;
    return log::DecodeStatus::Rejected;
}

LineDecoder::LineDecoder(std::vector<config::InputConfig> inputs, std::vector<decode::FieldMap> maps,
                       std::function<std::int64_t()> next_event_id)
    : m_inputs(std::move(inputs)), m_maps(std::move(maps)), m_next_event_id(std::move(next_event_id)) {
    for (const auto& in : m_inputs) {
        Input x;
        x.cfg = &in;
        if (in.kind == config::InputKind::FieldMap) {
            for (const auto& m : m_maps)
                if (m.name == in.fieldmap) x.map = &m;
            if (x.map == nullptr)
                throw config::ConfigError(
                    fmt::format("input '{}': no [fieldmap.{}] table", in.name, in.fieldmap));
        } else {
            x.nmea = decode::NmeaStreamDecoder(in.checksum_optional_talkers);
        }
        x.counters = &m_counters[in.name];
        m_by_name.emplace(in.name, x);
    }
}

void LineDecoder::onLine(const ReceivedLine& line) {
    log::RawRow raw;
    if (m_log_rows) {
        raw.source = line.source;
        raw.mono_ns = line.mono_ns;
        raw.utc_ns = line.utc_ns;
        raw.bytes = line.bytes;
        raw.flags = line.flags;
    }
    const auto it = m_by_name.find(line.source);
    auto& c = it != m_by_name.end() ? *it->second.counters : m_counters[line.source];
    ++c.lines;
    c.last_utc_ns = line.utc_ns;
    if (line.flags & kLineContinued) {
        // The tail of a line cut at the framer's limit: no decoder can use half a line.
        raw.status = log::DecodeStatus::NotDecoded;
        raw.reason = "continued";
    } else if (it == m_by_name.end()) {
        raw.status = log::DecodeStatus::NotDecoded;
        raw.reason = "unknown_source";
    } else if (it->second.map != nullptr) {
        decodeFields(line, it->second, raw, c);
    } else {
        decodeNmea(line, it->second, raw, c);
    }
    switch (raw.status) {
    case log::DecodeStatus::Ok: ++c.ok; break;
    case log::DecodeStatus::Rejected: ++c.rejected; break;
    case log::DecodeStatus::Unsupported: ++c.unsupported; break;
    case log::DecodeStatus::NotDecoded: ++c.not_decoded; break;
    }
    // Count by the reason code alone (the stored reason text may add a detail after ": ").
    const std::string_view reason = raw.reason.empty()
                                        ? std::string_view("ok")
                                        : std::string_view(raw.reason).substr(0, raw.reason.find(':'));
    auto r = c.by_reason.find(reason);
    if (r == c.by_reason.end()) r = c.by_reason.emplace(std::string(reason), 0).first;
    ++r->second;
    if (m_log_rows) m_batch.raw.push_back(std::move(raw));
}

void LineDecoder::logOnly(const ReceivedLine& line, log::DecodeStatus status, std::string reason) {
    if (!m_log_rows) return;
    log::RawRow raw;
    raw.source = line.source;
    raw.mono_ns = line.mono_ns;
    raw.utc_ns = line.utc_ns;
    raw.bytes = line.bytes;
    raw.flags = line.flags;
    raw.status = status;
    raw.reason = std::move(reason);
    m_batch.raw.push_back(std::move(raw));
}

void LineDecoder::decodeNmea(const ReceivedLine& line, Input& in, log::RawRow& raw,
                             SourceCounters& c) {
    const auto s = in.nmea.decode(line.bytes);
    raw.status = statusOf(s.reason);
    if (s.reason != decode::Reason::Ok) {
        raw.reason = std::string(decode::reasonName(s.reason));
        if (!s.detail.empty()) raw.reason += ": " + s.detail;
    }
    if (raw.status != log::DecodeStatus::Ok) return;
    m_clock.observe(s);
    const std::size_t idx = m_batch.raw.size();  // this line's index once pushed
    if (m_sink != nullptr) {
        std::optional<double> tod;
        std::visit(
            [&](const auto& d) {
                if constexpr (requires { d.tod_s; }) tod = d.tod_s;
            },
            s.data);
        std::optional<TimeNs> utc;
        if (tod) utc = m_clock.toUtc(*tod);
        m_sink->onNmea(*in.cfg, line, s, utc);
    }
    auto utcOf = [this](const std::optional<double>& tod) -> std::optional<TimeNs> {
        return tod ? m_clock.toUtc(*tod) : std::nullopt;
    };
    auto addFix = [&](const std::optional<double>& tod, const std::optional<double>& lat,
                      const std::optional<double>& lon) -> log::FixRow* {
        if (!lat || !lon) return nullptr;  // no position (e.g. quality 0): nothing to tabulate
        c.last_lat_deg = lat;
        c.last_lon_deg = lon;
        if (!m_log_rows) return nullptr;
        log::FixRow f;
        f.raw_index = idx;
        f.source = line.source;
        f.sentence = s.type;
        f.time_of_day_s = tod;
        f.time_utc_ns = utcOf(tod);
        f.lat_deg = *lat;
        f.lon_deg = *lon;
        m_batch.fixes.push_back(std::move(f));
        return &m_batch.fixes.back();
    };
    if (const auto* g = std::get_if<decode::Gga>(&s.data)) {
        if (auto* f = addFix(g->tod_s, g->lat_deg, g->lon_deg)) {
            f->altitude_m = g->alt_m;
            f->quality = g->quality;
            f->satellites = g->satellites;
            f->hdop = g->hdop;
            f->valid = g->quality != 0;
        }
    } else if (const auto* r = std::get_if<decode::Rmc>(&s.data)) {
        if (auto* f = addFix(r->tod_s, r->lat_deg, r->lon_deg)) {
            f->speed_mps = r->sog_mps;
            f->course_deg = r->cog_deg;
            f->valid = r->valid;
        }
    } else if (const auto* n = std::get_if<decode::Gns>(&s.data)) {
        if (auto* f = addFix(n->tod_s, n->lat_deg, n->lon_deg)) {
            f->altitude_m = n->alt_m;
            f->satellites = n->satellites;
            f->hdop = n->hdop;
            // Valid when any constellation reports a fix (mode letter other than N).
            f->valid = n->mode.find_first_not_of('N') != std::string::npos;
        }
    } else if (const auto* l = std::get_if<decode::Gll>(&s.data)) {
        if (auto* f = addFix(l->tod_s, l->lat_deg, l->lon_deg)) f->valid = l->valid;
    } else if (const auto* h = std::get_if<decode::Hdt>(&s.data)) {
        if (m_log_rows) m_batch.headings.push_back({idx, line.source, s.type, h->heading_deg, {}, {}});
        c.last_value = {"heading_deg", h->heading_deg};
    } else if (const auto* v = std::get_if<decode::Vtg>(&s.data)) {
        if (m_log_rows) m_batch.headings.push_back({idx, line.source, s.type, {}, v->cog_true_deg, v->sog_mps});
    } else if (const auto* d = std::get_if<decode::Dpt>(&s.data)) {
        if (m_log_rows) m_batch.depths.push_back({idx, line.source, s.type, d->depth_m, d->offset_m});
        c.last_value = {"depth_m", d->depth_m};
    } else if (const auto* b = std::get_if<decode::Dbt>(&s.data)) {
        if (m_log_rows) m_batch.depths.push_back({idx, line.source, s.type, b->depth_m, {}});
        c.last_value = {"depth_m", b->depth_m};
    }
    // ZDA and GST decode ok and set the clock / stay in the raw table; no decoded table yet.
}

void LineDecoder::decodeFields(const ReceivedLine& line, const Input& in, log::RawRow& raw,
                               SourceCounters& c) {
    const auto r = decode::decodeFieldMap(*in.map, line.bytes);
    raw.status = statusOf(r.reason);
    if (r.reason != decode::Reason::Ok) {
        raw.reason = std::string(decode::reasonName(r.reason));
        if (!r.detail.empty()) raw.reason += ": " + r.detail;
    }
    if (raw.status != log::DecodeStatus::Ok) return;
    const std::size_t idx = m_batch.raw.size();
    std::optional<TimeNs> utc = r.utc_ns;
    if (!utc && r.tod_s) utc = m_clock.toUtc(*r.tod_s);
    if (m_sink != nullptr) m_sink->onFields(*in.cfg, line, r, utc);
    if (r.field_nT) {
        c.last_field_nT = r.field_nT;
        if (!m_log_rows) return;
        log::MagRow m;
        m.raw_index = idx;
        m.source = line.source;
        m.time_utc_ns = utc;
        m.time_of_day_s = r.tod_s;
        m.sensor = r.sensor;
        m.field_nT = r.field_nT;
        m.signal_quality = r.quality;
        m.depth_m = r.depth_m;
        m.altitude_m = r.altitude_m;
        m_batch.mags.push_back(std::move(m));
        return;
    }
    auto aux = [&](const char* kind, const std::optional<double>& v) {
        if (!v) return;
        if (m_log_rows) m_batch.aux.push_back({idx, line.source, kind, utc, r.tod_s, *v});
        c.last_value = {kind, *v};
    };
    aux("altitude_m", r.altitude_m);
    aux("cable_out_m", r.cable_out_m);
    aux("depth_m", r.depth_m);
}

void LineDecoder::onEvent(const SourceEvent& e) {
    auto& c = m_counters[e.source];
    if (e.kind == SourceEvent::Kind::OutageStart) {
        c.in_outage = true;
        ++c.outages;
        log::EventRow row;
        row.id = m_next_event_id();
        row.kind = "outage";
        row.source = e.source;
        row.start_utc_ns = e.utc_ns;
        row.detail = e.detail;
        m_open_outages[e.source] = {row.id, e.utc_ns};
        m_batch.events.push_back(std::move(row));
    } else if (e.kind == SourceEvent::Kind::OutageEnd) {
        c.in_outage = false;
        auto it = m_open_outages.find(e.source);
        if (it == m_open_outages.end()) return;
        m_batch.event_ends.push_back(
            {it->second.first, e.utc_ns, toSeconds(e.utc_ns - it->second.second)});
        m_open_outages.erase(it);
    } else if (e.kind == SourceEvent::Kind::Drops) {
        // Kept in the events table (receive time, count): a replay feeds them back in.
        c.dropped += e.count;
        log::EventRow row;
        row.id = m_next_event_id();
        row.kind = "input_drops";
        row.source = e.source;
        row.start_utc_ns = e.utc_ns;
        row.end_utc_ns = e.utc_ns;
        row.value = static_cast<double>(e.count);
        row.detail = e.detail;
        m_batch.events.push_back(std::move(row));
    }
}

void LineDecoder::addEvent(log::EventRow row) {
    if (row.id == 0) row.id = m_next_event_id();
    m_batch.events.push_back(std::move(row));
}

log::Batch LineDecoder::takeBatch() {
    log::Batch b = std::move(m_batch);
    m_batch = log::Batch{};
    return b;
}

}  // namespace sg::engine
