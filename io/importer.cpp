// Capture files -> one log in instrument-time order; see importer.hpp.
#include "io/importer.hpp"

#include <algorithm>
#include <cmath>
#include <ctime>
#include <fstream>
#include <limits>
#include <optional>
#include <sstream>
#include <stdexcept>

#include <fmt/format.h>

#include "common/line_framer.hpp"
#include "decode/instrument_clock.hpp"
#include "decode/nmea.hpp"
#include "engine/line_decoder.hpp"
#include "io/source.hpp"
#include "log/log_store.hpp"

namespace sg::io {

namespace {

struct Capture {
    const config::InputConfig* cfg = nullptr;
    std::size_t order = 0;  // index of the input in the config (tie-break, independent of CLI order)
    std::string path;
    std::vector<std::pair<std::string, std::uint8_t>> lines;  // bytes, framer flags
    std::vector<std::optional<TimeNs>> time;                    // instrument time per line
    bool has_dates = false;
    bool placed = false;      // no line carries an instrument time: placed in receive order
    std::size_t usable = 0;   // lines that decode (ok / no_checksum)
    std::string first_reject;  // reason of the first line that does not decode, for messages
};

// "2026-12-01T10:00:00.000Z" (UTC, milliseconds) for messages and the log.
std::string isoText(TimeNs utc_ns) {
    const TimeNs ms_total = utc_ns >= 0 ? utc_ns / 1'000'000 : (utc_ns - 999'999) / 1'000'000;
    std::time_t secs = static_cast<std::time_t>(ms_total >= 0 ? ms_total / 1000 : (ms_total - 999) / 1000);
    const int ms = static_cast<int>(ms_total - static_cast<TimeNs>(secs) * 1000);
    std::tm tm{};
    gmtime_r(&secs, &tm);
    return fmt::format("{:04}-{:02}-{:02}T{:02}:{:02}:{:02}.{:03}Z", tm.tm_year + 1900, tm.tm_mon + 1,
                       tm.tm_mday, tm.tm_hour, tm.tm_min, tm.tm_sec, ms);
}

std::string readFile(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw std::runtime_error(fmt::format("{}: cannot read capture file", path));
    std::stringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

std::optional<double> todOf(const decode::NmeaSentence& s) {
    using namespace decode;
    if (const auto* g = std::get_if<Gga>(&s.data)) return g->tod_s;
    if (const auto* r = std::get_if<Rmc>(&s.data)) return r->tod_s;
    if (const auto* n = std::get_if<Gns>(&s.data)) return n->tod_s;
    if (const auto* l = std::get_if<Gll>(&s.data)) return l->tod_s;
    if (const auto* t = std::get_if<Gst>(&s.data)) return t->tod_s;
    if (const auto* z = std::get_if<Zda>(&s.data)) return z->tod_s;
    return std::nullopt;
}

}  // namespace

MergedCaptures mergeCaptures(const std::vector<config::InputConfig>& inputs,
                             const std::vector<decode::FieldMap>& maps,
                             const std::vector<CaptureFile>& files,
                             const config::ImportConfig& options) {
    std::vector<Capture> caps;
    for (const auto& f : files) {
        Capture c;
        for (std::size_t i = 0; i < inputs.size(); ++i)
            if (inputs[i].name == f.input) {
                c.cfg = &inputs[i];
                c.order = i;
            }
        if (c.cfg == nullptr)
            throw std::runtime_error(fmt::format("--input {}={}: no [[input]] named '{}'", f.input,
                                                 f.path, f.input));
        for (const auto& other : caps)
            if (other.cfg == c.cfg)
                throw std::runtime_error(fmt::format("input '{}' is given twice", f.input));
        c.path = f.path;
        // Frame exactly as a live reader does (same limit, same flags).
        LineFramer framer([&c](std::string_view b, std::uint8_t fl) { c.lines.emplace_back(b, fl); },
                          Source::kMaxLineBytes);
        framer.feed(readFile(f.path));
        framer.flush();
        caps.push_back(std::move(c));
    }
    // Sort by config order so the result does not depend on the order of --input options.
    std::sort(caps.begin(), caps.end(), [](const Capture& a, const Capture& b) { return a.order < b.order; });

    // The date: the first RMC/ZDA of the first NMEA capture that has one seeds every clock.
    std::optional<std::pair<decode::Date, double>> seed;
    for (auto& c : caps) {
        if (c.cfg->kind != config::InputKind::Nmea) continue;
        for (const auto& [bytes, fl] : c.lines) {
            const auto s = decode::decodeNmea(bytes);
            if (!decode::isUsable(s.reason)) continue;
            std::optional<std::pair<decode::Date, double>> d;
            if (const auto* r = std::get_if<decode::Rmc>(&s.data); r && r->date && r->tod_s)
                d = {{*r->date, *r->tod_s}};
            if (const auto* z = std::get_if<decode::Zda>(&s.data)) d = {{z->date, z->tod_s}};
            if (d) {
                c.has_dates = true;
                if (!seed) seed = d;
                break;
            }
        }
    }

    MergedCaptures out;
    for (auto& c : caps) {
        decode::InstrumentClock clock;
        if (seed) clock.setDate(seed->first, seed->second);
        const decode::FieldMap* map = nullptr;
        for (const auto& m : maps)
            if (m.name == c.cfg->fieldmap) map = &m;
        if (c.cfg->kind == config::InputKind::FieldMap && map == nullptr)
            throw std::runtime_error(
                fmt::format("input '{}': no [fieldmap.{}] table", c.cfg->name, c.cfg->fieldmap));
        const auto latency_ns = static_cast<TimeNs>(std::llround(c.cfg->latency_ms * 1e6));
        bool tod_without_date = false;
        c.time.reserve(c.lines.size());
        std::size_t line_no = 0;
        auto noteReject = [&](decode::Reason r, const std::string& detail) {
            if (!c.first_reject.empty()) return;
            c.first_reject = fmt::format("line {}: {}{}{}", line_no, decode::reasonName(r),
                                         detail.empty() ? "" : ": ", detail);
        };
        for (const auto& [bytes, fl] : c.lines) {
            std::optional<TimeNs> t;
            if (!(fl & kLineContinued)) {
                ++line_no;
                if (map == nullptr) {
                    const auto s = decode::decodeNmea(bytes);
                    if (decode::isUsable(s.reason)) {
                        ++c.usable;
                        clock.observe(s);
                        if (auto tod = todOf(s)) {
                            t = clock.toUtc(*tod);
                            if (!t) tod_without_date = true;
                        }
                    } else {
                        noteReject(s.reason, s.detail);
                    }
                } else {
                    const auto r = decode::decodeFieldMap(*map, bytes);
                    if (decode::isUsable(r.reason)) {
                        ++c.usable;
                        if (r.utc_ns) t = r.utc_ns;
                        else if (r.tod_s) {
                            t = clock.toUtc(*r.tod_s);
                            if (!t) tod_without_date = true;
                        }
                    } else {
                        noteReject(r.reason, r.detail);
                    }
                }
            }
            if (t) *t += latency_ns;
            c.time.push_back(t);
        }
        // Lines without instrument time take the time of the previous line of that file; lines
        // before the first timed line take the first time.
        std::optional<TimeNs> first;
        for (const auto& t : c.time)
            if (t) {
                first = t;
                break;
            }
        CaptureSummary sum;
        sum.input = c.cfg->name;
        sum.path = c.path;
        sum.lines = c.lines.size();
        if (!first) {
            if (tod_without_date)
                throw std::runtime_error(fmt::format(
                    "{}: times of day but no date: no capture holds an RMC or ZDA sentence",
                    c.path));
            if (c.usable == 0)
                throw std::runtime_error(fmt::format(
                    "{}: no line decodes as input '{}' ({}{}){}{}: is it the right file, and the "
                    "right [[input]] kind/fieldmap?",
                    c.path, c.cfg->name, config::toString(c.cfg->kind),
                    map != nullptr ? " " + map->name : std::string(),
                    c.first_reject.empty() ? "" : "; first: ", c.first_reject));
            // Lines decode but none carries a time (HDT, DPT, a field map without `time`):
            // placed in receive order below, once the timed captures are known.
            c.placed = true;
            sum.placed = true;
            out.captures.push_back(sum);
            continue;
        }
        sum.first_ns = *first;
        sum.last_ns = *first;
        TimeNs prev = *first;
        for (auto& t : c.time) {
            if (t) {
                ++sum.timed_lines;
                prev = *t;
                sum.first_ns = std::min(sum.first_ns, *t);
                sum.last_ns = std::max(sum.last_ns, *t);
            } else {
                t = prev;
            }
        }
        out.captures.push_back(sum);
    }

    // The reference capture: the first timed capture with dates (config order), else the first
    // timed capture.
    std::optional<std::size_t> ref_opt;
    for (std::size_t i = 0; i < caps.size() && !ref_opt; ++i)
        if (!caps[i].placed && caps[i].has_dates) ref_opt = i;
    for (std::size_t i = 0; i < caps.size() && !ref_opt; ++i)
        if (!caps[i].placed) ref_opt = i;
    if (!ref_opt) {
        std::string names;
        for (const auto& c : caps) names += (names.empty() ? "" : ", ") + c.cfg->name;
        throw std::runtime_error(fmt::format(
            "no capture carries an instrument time ({}): a capture without time can only be "
            "placed against a timed capture of the same session (GNSS with RMC/ZDA, or a field map "
            "with `time`)",
            names));
    }
    const std::size_t ref = *ref_opt;

    // Clock disagreement: captures of one session start and stop together within a few seconds,
    // so a capture whose start AND end are both shifted the same way against the reference
    // has a clock that disagrees. A capture that only starts later or stops earlier is not
    // shifted (one end agrees).
    for (std::size_t i = 0; i < out.captures.size(); ++i) {
        if (i == ref || caps[i].placed) continue;
        auto& s = out.captures[i];
        const double d0 = toSeconds(s.first_ns - out.captures[ref].first_ns);
        const double d1 = toSeconds(s.last_ns - out.captures[ref].last_ns);
        if ((d0 > 0) == (d1 > 0) && d0 != 0 && d1 != 0)
            s.shift_s = std::abs(d0) < std::abs(d1) ? d0 : d1;
        if (std::abs(s.shift_s) > options.max_clock_disagreement_s) {
            s.disagrees = true;
            out.problems.push_back(fmt::format(
                "{} ({}): clock shifted {:+.3f} s against {} (start {:+.3f} s, end {:+.3f} s; "
                "limit {} s)",
                s.input, s.path, s.shift_s, out.captures[ref].input, d0, d1,
                options.max_clock_disagreement_s));
        }
    }

    // Receive-order placement of captures without any instrument time. Rule: the k-th of the n
    // lines of the file gets t0 + k (t1 - t0) / (n - 1), where [t0, t1] is the span of receive
    // times of the timed capture it is aligned to ([[input]] import_align, else the reference).
    // This holds when both captures were logged over the same period and the untimed instrument
    // sent at a steady rate (instruments without time in their strings, gyros and echo sounders,
    // send at a fixed rate: common practice); import_rate_hz checks that against the span. The
    // capture's own latency_ms is then taken off by the engine, as for a live line.
    for (std::size_t i = 0; i < caps.size(); ++i) {
        auto& c = caps[i];
        if (!c.placed) continue;
        std::size_t target = ref;
        if (!c.cfg->import_align.empty()) {
            const auto it = std::find_if(caps.begin(), caps.end(), [&](const Capture& o) {
                return o.cfg->name == c.cfg->import_align;
            });
            if (it == caps.end())
                throw std::runtime_error(fmt::format(
                    "input '{}': import_align = \"{}\", but no capture of '{}' is imported (give "
                    "--input {}=PATH, or change import_align)",
                    c.cfg->name, c.cfg->import_align, c.cfg->import_align, c.cfg->import_align));
            if (it->placed)
                throw std::runtime_error(fmt::format(
                    "input '{}': import_align = \"{}\", but the capture of '{}' ({}) has no "
                    "instrument time itself",
                    c.cfg->name, c.cfg->import_align, c.cfg->import_align, it->path));
            target = static_cast<std::size_t>(it - caps.begin());
        }
        const CaptureSummary& ts = out.captures[target];
        auto& sum = out.captures[i];
        std::size_t heads = 0;
        for (const auto& l : c.lines)
            if (!(l.second & kLineContinued)) ++heads;
        const TimeNs span_ns = ts.last_ns - ts.first_ns;
        const double span_s = toSeconds(span_ns);
        std::size_t k = 0;
        TimeNs head_t = ts.first_ns;
        for (std::size_t j = 0; j < c.lines.size(); ++j) {
            if (!(c.lines[j].second & kLineContinued)) {
                head_t = ts.first_ns +
                         (heads > 1 ? static_cast<TimeNs>(std::llround(
                                          static_cast<long double>(span_ns) * static_cast<long double>(k) /
                                          static_cast<long double>(heads - 1)))
                                    : 0);
                ++k;
            }
            c.time[j] = head_t;  // a continued piece stays with its line
        }
        sum.first_ns = ts.first_ns;
        sum.last_ns = ts.last_ns;
        sum.aligned_to = ts.input;
        sum.implied_rate_hz = heads > 1 && span_ns > 0 ? static_cast<double>(heads - 1) / span_s : 0.0;
        sum.assumption = fmt::format(
            "{} lines without instrument time placed in file order, evenly over the time span of "
            "'{}' ({} .. {}, {:.3f} s; implied rate {:.3f} Hz); assumes both captures were logged "
            "over the same period and this instrument sent at a steady rate",
            heads, ts.input, isoText(ts.first_ns), isoText(ts.last_ns), span_s, sum.implied_rate_hz);
        if (c.cfg->import_rate_hz) {
            const double rate = *c.cfg->import_rate_hz;
            const double expected_s = heads > 1 ? static_cast<double>(heads - 1) / rate : 0.0;
            sum.shift_s = expected_s - span_s;
            sum.assumption += fmt::format(
                "; at import_rate_hz = {} Hz the lines last {:.3f} s ({:+.3f} s against the span)",
                rate, expected_s, sum.shift_s);
            if (std::abs(sum.shift_s) > options.max_clock_disagreement_s) {
                sum.disagrees = true;
                out.problems.push_back(fmt::format(
                    "{} ({}): {} lines at import_rate_hz = {} Hz last {:.3f} s, but '{}' spans "
                    "{:.3f} s ({:+.3f} s; limit {} s): the captures do not cover the same period, "
                    "or the rate is wrong",
                    sum.input, sum.path, heads, rate, expected_s, ts.input, span_s, sum.shift_s,
                    options.max_clock_disagreement_s));
            }
        }
    }

    // k-way merge: each file keeps its own order; the next line is the earliest head (ties go
    // to the input listed first in the config).
    std::vector<std::size_t> pos(caps.size(), 0);
    std::size_t total = 0;
    for (const auto& c : caps) total += c.lines.size();
    out.lines.reserve(total);
    const TimeNs t0 = [&] {
        TimeNs m = std::numeric_limits<TimeNs>::max();
        for (const auto& s : out.captures) m = std::min(m, s.first_ns);
        return m;
    }();
    TimeNs last_utc = std::numeric_limits<TimeNs>::min();
    for (std::size_t n = 0; n < total; ++n) {
        std::size_t best = caps.size();
        for (std::size_t i = 0; i < caps.size(); ++i) {
            if (pos[i] >= caps[i].lines.size()) continue;
            if (best == caps.size() || *caps[i].time[pos[i]] < *caps[best].time[pos[best]]) best = i;
        }
        auto& c = caps[best];
        const std::size_t k = pos[best]++;
        ReceivedLine l;
        l.source = c.cfg->name;
        // Receive times never run backwards, as on a live reader.
        last_utc = std::max(last_utc, *c.time[k]);
        l.utc_ns = last_utc;
        l.mono_ns = last_utc - t0;
        l.bytes = std::move(c.lines[k].first);
        l.flags = c.lines[k].second;
        out.lines.push_back(std::move(l));
    }
    return out;
}

ImportResult importCaptures(const std::vector<config::InputConfig>& inputs,
                            const std::vector<decode::FieldMap>& maps,
                            const std::vector<CaptureFile>& files,
                            const config::ImportConfig& options, const std::string& log_path,
                            const std::string& config_text, const std::string& config_file,
                            bool accept_disagreement) {
    return importMerged(mergeCaptures(inputs, maps, files, options), inputs, maps, log_path,
                        config_text, config_file, accept_disagreement);
}

ImportResult importMerged(MergedCaptures merged, const std::vector<config::InputConfig>& inputs,
                          const std::vector<decode::FieldMap>& maps, const std::string& log_path,
                          const std::string& config_text, const std::string& config_file,
                          bool accept_disagreement) {
    ImportResult res;
    res.merged = std::move(merged);
    if (!res.merged.problems.empty() && !accept_disagreement) return res;

    log::LogStore store(log_path, log::OpenMode::Create, log::StoreOptions{false});
    store.setMeta("config_text", config_text);
    store.setMeta("config_file", config_file);
    std::string from;
    for (const auto& c : res.merged.captures) from += fmt::format("{}={};", c.input, c.path);
    store.setMeta("imported_from", from);
    std::int64_t next_id = store.nextEventId();
    engine::LineDecoder d(inputs, maps, [&next_id] { return next_id++; });
    std::string placement;
    for (const auto& c : res.merged.captures) {
        if (!c.placed) continue;
        placement += fmt::format("{}={}: {}\n", c.input, c.path, c.assumption);
        log::EventRow e;
        e.kind = "untimed_placement";
        e.source = c.input;
        e.start_utc_ns = c.first_ns;
        e.end_utc_ns = c.last_ns;
        e.value = c.implied_rate_hz;
        e.detail = c.assumption;
        d.addEvent(std::move(e));
    }
    if (!placement.empty()) store.setMeta("import_placement", placement);
    for (const auto& c : res.merged.captures) {
        if (!c.disagrees) continue;
        log::EventRow e;
        e.kind = "clock_disagreement";
        e.source = c.input;
        e.start_utc_ns = c.first_ns;
        e.end_utc_ns = c.last_ns;
        e.value = c.shift_s;
        e.detail = fmt::format("imported anyway from {}", c.path);
        d.addEvent(std::move(e));
    }
    constexpr std::size_t kBatch = 20000;
    for (const auto& l : res.merged.lines) {
        d.onLine(l);
        if (d.pendingRaw() >= kBatch) {
            auto b = d.takeBatch();
            store.write(b);
        }
    }
    auto b = d.takeBatch();
    store.write(b);
    res.raw_lines = res.merged.lines.size();
    res.written = true;
    return res;
}

}  // namespace sg::io
