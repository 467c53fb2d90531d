// Per-log session summaries: build by replay, write and read; see session_summary.hpp.
#include "site/session_summary.hpp"

#include <cstring>
#include <filesystem>
#include <fstream>

#include <fmt/format.h>
#include <nlohmann/json.hpp>
#include <xxhash.h>

#include "coverage/raster_io.hpp"
#include "engine/log_replay.hpp"
#include "engine/survey_summary.hpp"
#include "log/log_reader.hpp"
#include "site/session_picks.hpp"
#include "log/log_store.hpp"
#include "site/site_config.hpp"

namespace sg::site {

namespace {

using nlohmann::json;
namespace fs = std::filesystem;

constexpr char kMagic[4] = {'S', 'G', 'S', 'S'};

json optTime(const std::optional<TimeNs>& t) { return t ? json(*t) : json(nullptr); }
std::optional<TimeNs> getOptTime(const json& j) {
    return j.is_null() ? std::nullopt : std::optional<TimeNs>(j.get<TimeNs>());
}

json invalidJson(const engine::InvalidCounts& c) {
    return {c.no_field, c.pose, c.no_altitude, c.noise_warmup, c.noisy, c.low_quality};
}
engine::InvalidCounts invalidFrom(const json& j) {
    engine::InvalidCounts c;
    c.no_field = j.at(0);
    c.pose = j.at(1);
    c.no_altitude = j.at(2);
    c.noise_warmup = j.at(3);
    c.noisy = j.at(4);
    c.low_quality = j.at(5);
    return c;
}

json runJson(const coverage::LineRun& r) {
    json j = {{"id", r.id}, {"line", r.line}, {"reversed", r.reversed},
            {"t", {r.start_t_ns, r.end_t_ns}},
            {"pos", {r.start_pos.e_m, r.start_pos.n_m, r.end_pos.e_m, r.end_pos.n_m}},
            {"samples", r.samples},
            {"alt", {r.altitude_sum_m, r.altitude_samples, r.altitude_missing, r.worst_altitude_m}},
            {"worst_deviation_m", r.worst_deviation_m}, {"alarms", r.alarms},
            {"noise", {r.noise_sum_nT, r.noise_samples, r.worst_noise_nT}},
            {"corridor_covered_pct", r.corridor_covered_pct},
            {"along", {r.along_min_m, r.along_max_m}}};
    // A run of an infill line the crew steered to: the line's name and ends (its index is this
    // session's own).
    if (r.infill_line)
        j["infill_line"] = {r.infill_line->name, r.infill_line->start.e_m, r.infill_line->start.n_m,
                            r.infill_line->end.e_m, r.infill_line->end.n_m};
    return j;
}
coverage::LineRun runFrom(const json& j) {
    coverage::LineRun r;
    r.id = j.at("id");
    r.line = j.at("line");
    if (const auto it = j.find("infill_line"); it != j.end()) {
        coverage::PlanLine l;
        l.name = it->at(0).get<std::string>();
        l.start = {it->at(1).get<double>(), it->at(2).get<double>()};
        l.end = {it->at(3).get<double>(), it->at(4).get<double>()};
        r.infill_line = l;
    }
    r.reversed = j.at("reversed");
    r.open = false;
    r.start_t_ns = j.at("t").at(0);
    r.end_t_ns = j.at("t").at(1);
    const auto& p = j.at("pos");
    r.start_pos = {p.at(0), p.at(1)};
    r.end_pos = {p.at(2), p.at(3)};
    r.samples = j.at("samples");
    const auto& a = j.at("alt");
    r.altitude_sum_m = a.at(0);
    r.altitude_samples = a.at(1);
    r.altitude_missing = a.at(2);
    r.worst_altitude_m = a.at(3);
    r.worst_deviation_m = j.at("worst_deviation_m");
    r.alarms = j.at("alarms");
    const auto& n = j.at("noise");
    r.noise_sum_nT = n.at(0);
    r.noise_samples = n.at(1);
    r.worst_noise_nT = n.at(2);
    r.corridor_covered_pct = j.at("corridor_covered_pct");
    r.along_min_m = j.at("along").at(0);
    r.along_max_m = j.at("along").at(1);
    return r;
}

// Gap names as JSON: {"next": n, "runs": [[row, i0, i1, number], ...]}.
json namesJson(const coverage::GapNamer::Committed& c) {
    json runs = json::array();
    for (const auto& r : c.runs) runs.push_back({r.row, r.i0, r.i1, r.number});
    return {{"next", c.next}, {"runs", std::move(runs)}};
}

coverage::GapNamer::Committed namesFrom(const json& j) {
    coverage::GapNamer::Committed c;
    c.next = j.at("next");
    for (const auto& r : j.at("runs")) c.runs.push_back({r.at(0), r.at(1), r.at(2), r.at(3)});
    return c;
}

json toJson(const SessionSummary& s) {
    const auto& i = s.info;
    json j{{"version", s.version},
           {"log_name", s.log_name},
           {"log_stamp", {s.log_stamp.size, s.log_stamp.mtime_ns}},
           {"log_hash", fmt::format("{:016x}", s.log_hash)},
           {"config_hash", fmt::format("{:016x}", s.config_hash)},
           {"vessel", i.vessel},
           {"sensors", i.sensors},
           {"first_ns", i.first_ns},
           {"last_ns", i.last_ns},
           {"survey_first_ns", i.survey_first_ns},
           {"survey_last_ns", i.survey_last_ns},
           {"lines", i.lines},
           {"own_covered_m2", i.own_covered_m2},
           {"invalid", invalidJson(i.invalid)},
           {"epsg", s.epsg},
           {"raster_hash", fmt::format("{:016x}", s.raster_hash)},
           {"covered_cells", s.covered_cells},
           {"cell_size_m", s.cell_size_m}};
    json runs = json::array();
    for (const auto& r : s.runs) runs.push_back(runJson(r));
    j["runs"] = std::move(runs);
    json alarms = json::array();
    for (const auto& a : s.alarms)
        alarms.push_back({a.check, a.unit, a.start_ns, optTime(a.end_ns), a.peak_level, a.peak_value, optTime(a.ack_ns)});
    j["alarms"] = std::move(alarms);
    json outs = json::array();
    for (const auto& o : s.outages)
        outs.push_back({o.kind, o.source, o.start_ns, optTime(o.end_ns), o.duration_s, o.detail});
    j["outages"] = std::move(outs);
    j["picks"] = picksToJson(s.picks);
    j["verification_passes"] = passesToJson(s.verification_passes);
    j["gap_names"] = s.names ? namesJson(*s.names) : json(nullptr);
    j["gap_names_note"] = s.names_note;
    return j;
}

std::uint64_t hexValue(const json& j) { return std::stoull(j.get<std::string>(), nullptr, 16); }

SessionSummary fromJson(const json& j) {
    SessionSummary s;
    s.version = j.at("version");
    s.log_name = j.at("log_name");
    s.log_stamp = {j.at("log_stamp").at(0), j.at("log_stamp").at(1)};
    s.log_hash = hexValue(j.at("log_hash"));
    s.config_hash = hexValue(j.at("config_hash"));
    auto& i = s.info;
    i.log = s.log_name;
    i.vessel = j.at("vessel");
    i.sensors = j.at("sensors");
    i.first_ns = j.at("first_ns");
    i.last_ns = j.at("last_ns");
    i.survey_first_ns = j.at("survey_first_ns");
    i.survey_last_ns = j.at("survey_last_ns");
    i.lines = j.at("lines");
    i.own_covered_m2 = j.at("own_covered_m2");
    i.invalid = invalidFrom(j.at("invalid"));
    s.epsg = j.at("epsg");
    s.raster_hash = hexValue(j.at("raster_hash"));
    s.covered_cells = j.at("covered_cells");
    s.cell_size_m = j.at("cell_size_m");
    for (const auto& r : j.at("runs")) s.runs.push_back(runFrom(r));
    i.runs = static_cast<int>(s.runs.size());
    for (const auto& a : j.at("alarms"))
        s.alarms.push_back({a.at(0), a.at(1), a.at(2), getOptTime(a.at(3)), a.at(4), a.at(5), getOptTime(a.at(6)), 0});
    for (const auto& o : j.at("outages"))
        s.outages.push_back({o.at(0), o.at(1), o.at(2), getOptTime(o.at(3)), o.at(4), o.at(5), 0});
    if (j.contains("picks")) s.picks = picksFromJson(j.at("picks"));
    if (j.contains("verification_passes")) s.verification_passes = passesFromJson(j.at("verification_passes"));
    if (!j.at("gap_names").is_null()) s.names = namesFrom(j.at("gap_names"));
    s.names_note = j.at("gap_names_note");
    return s;
}

// Reads the whole file into `into` (resized to the file's size; its capacity is kept between
// calls, so that opening a site of many logs does not fault in fresh pages for every summary).
void readWhole(const std::string& path, std::string& into) {
    std::ifstream in(path, std::ios::binary | std::ios::ate);
    if (!in) throw std::runtime_error(fmt::format("{}: cannot read the session summary", path));
    const auto size = static_cast<std::size_t>(in.tellg());
    into.resize(size);
    in.seekg(0);
    in.read(into.data(), static_cast<std::streamsize>(size));
    into.resize(static_cast<std::size_t>(in.gcount()));
}

// Splits a summary file into its JSON text and raster bytes.
std::pair<std::string_view, std::string_view> splitFile(std::string_view bytes, const std::string& path) {
    if (bytes.size() < 16 || std::memcmp(bytes.data(), kMagic, 4) != 0)
        throw std::runtime_error(fmt::format("{}: not a swathguard session summary", path));
    std::uint32_t version = 0;
    std::uint64_t json_len = 0;
    std::memcpy(&version, bytes.data() + 4, 4);
    std::memcpy(&json_len, bytes.data() + 8, 8);
    if (version != kSessionSummaryVersion)
        throw std::runtime_error(fmt::format("{}: session summary version {} (this build writes {})", path, version,
                                             kSessionSummaryVersion));
    if (json_len > bytes.size() - 16) throw std::runtime_error(fmt::format("{}: session summary truncated", path));
    return {bytes.substr(16, json_len), bytes.substr(16 + json_len)};
}

}  // namespace

FileStamp stampOf(const std::string& path) {
    FileStamp st;
    st.size = static_cast<std::uint64_t>(fs::file_size(path));
    st.mtime_ns = static_cast<std::int64_t>(
        std::chrono::duration_cast<std::chrono::nanoseconds>(fs::last_write_time(path).time_since_epoch()).count());
    return st;
}

std::uint64_t fileContentHash(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw DamagedLog(fmt::format("{}: cannot read the log", path));
    XXH3_state_t* state = XXH3_createState();
    XXH3_64bits_reset(state);
    std::vector<char> buf(1 << 20);
    while (in) {
        in.read(buf.data(), static_cast<std::streamsize>(buf.size()));
        XXH3_64bits_update(state, buf.data(), static_cast<std::size_t>(in.gcount()));
    }
    const auto h = XXH3_64bits_digest(state);
    XXH3_freeState(state);
    return h;
}

namespace {
class MetaRow : public log::RowSet {
public:
    MetaRow(std::string key, std::string value) : m_key(std::move(key)), m_value(std::move(value)) {}
    void write(log::LogStore& store) override { store.setMeta(m_key, m_value); }

private:
    std::string m_key, m_value;
};
}  // namespace

log::Batch gapNamesBatch(const coverage::GapNamer::Committed& names, const engine::SurveyConfig& config) {
    const json j{{"config_hash", fmt::format("{:016x}", siteWideHash(config))}, {"names", namesJson(names)}};
    log::Batch b;
    b.extra.push_back(std::make_unique<MetaRow>(kGapNamesMeta, j.dump()));
    return b;
}

std::string summaryPathFor(const std::string& log_path) {
    return fs::path(log_path).replace_extension(".sgsum").string();
}

SessionSummary buildSessionSummary(const std::string& log_path, const engine::SurveyConfig& config) {
    SessionSummary s;
    s.log_name = fs::path(log_path).filename().string();
    try {
        log::LogReader check(log_path);
        auto& st = check.store().statement("PRAGMA quick_check");
        std::string verdict = st.step() ? st.columnText(0) : "no answer";
        st.reset();
        if (verdict != "ok") throw DamagedLog(fmt::format("{}: fails SQLite's quick_check: {}", log_path, verdict));
        // The names the live session recorded: the site's names only under the same config.
        if (const auto text = check.meta(kGapNamesMeta)) {
            const auto j = json::parse(*text, nullptr, false);
            if (j.is_discarded() || !j.contains("config_hash") || !j.contains("names"))
                s.names_note = "its recorded gap names cannot be read";
            else if (hexValue(j.at("config_hash")) != siteWideHash(config))
                s.names_note = "recorded its gap names under another config";
            else
                s.names = namesFrom(j.at("names"));
        } else {
            s.names_note = "recorded no gap names (an older log, or not recorded as a site session)";
        }
    } catch (const log::LogError& e) {
        throw DamagedLog(e.what());
    }
    s.log_stamp = stampOf(log_path);
    s.log_hash = fileContentHash(log_path);
    s.config_hash = siteWideHash(config);
    try {
        engine::LogReplay replay(log_path, config);
        replay.runToEnd();
        auto& eng = replay.pipeline().engine();
        eng.flushCoverage();
        const auto ctx = replay.context();
        auto& i = s.info;
        i.log = s.log_name;
        i.path = log_path;
        i.vessel = config.nav.vessel.name;
        i.sensors = eng.sensors().size();
        i.first_ns = ctx.first_ns;
        i.last_ns = ctx.last_ns;
        i.survey_first_ns = eng.firstSample_ns();
        i.survey_last_ns = eng.lastSample_ns();
        i.lines = replay.linesFed();
        i.invalid = eng.invalidCounts();
        s.epsg = eng.crs() != nullptr ? eng.crs()->epsg() : 0;
        if (const auto* lines = eng.lines()) {
            s.runs = lines->runs();
            for (auto& r : s.runs) r.open = false;
        }
        i.runs = static_cast<int>(s.runs.size());
        s.alarms = engine::sessionAlarms(eng, 0);
        s.outages = engine::sessionOutages(eng, ctx, 0);
        s.cell_size_m = eng.raster().cellSize();
        if (auto* cov = eng.coverage()) {
            const auto& r = cov->sessionRaster();
            s.raster_hash = r.contentHash();
            s.covered_cells = r.coveredCells();
            s.raster_bytes = coverage::rasterToBytes(r);
        }
        i.own_covered_m2 = static_cast<double>(s.covered_cells) * s.cell_size_m * s.cell_size_m;
        auto picks = eng.picksNow();
        s.picks = std::move(picks.picks);
        s.verification_passes = std::move(picks.verification.passes);
    } catch (const log::LogError& e) {
        throw DamagedLog(e.what());
    }
    return s;
}

void writeSessionSummary(const std::string& path, const SessionSummary& s) {
    const std::string text = toJson(s).dump();
    std::string out;
    out.append(kMagic, 4);
    const std::uint32_t version = kSessionSummaryVersion;
    const std::uint64_t len = text.size();
    out.append(reinterpret_cast<const char*>(&version), 4);
    out.append(reinterpret_cast<const char*>(&len), 8);
    out += text;
    out += s.raster_bytes;
    const std::string tmp = path + ".tmp";
    {
        std::ofstream f(tmp, std::ios::binary | std::ios::trunc);
        if (!f) throw std::runtime_error(fmt::format("{}: cannot write the session summary", tmp));
        f.write(out.data(), static_cast<std::streamsize>(out.size()));
        if (!f) throw std::runtime_error(fmt::format("{}: cannot write the session summary", tmp));
    }
    std::error_code ec;
    fs::rename(tmp, path, ec);
    if (ec) throw std::runtime_error(fmt::format("{}: cannot write the session summary: {}", path, ec.message()));
}

SessionSummary readSessionSummary(const std::string& path, bool with_raster) {
    std::string bytes;
    if (with_raster) {
        readWhole(path, bytes);
    } else {
        // The header and the JSON only: opening a site does not read the rasters twice.
        std::ifstream in(path, std::ios::binary);
        if (!in) throw std::runtime_error(fmt::format("{}: cannot read the session summary", path));
        bytes.resize(16);
        in.read(bytes.data(), 16);
        bytes.resize(static_cast<std::size_t>(in.gcount()));
        if (bytes.size() == 16) {
            std::uint64_t json_len = 0;
            std::memcpy(&json_len, bytes.data() + 8, 8);
            if (json_len < (std::uint64_t{1} << 32)) {
                bytes.resize(16 + json_len);
                in.read(bytes.data() + 16, static_cast<std::streamsize>(json_len));
                bytes.resize(16 + static_cast<std::size_t>(in.gcount()));
            }
        }
    }
    const auto [text, raster] = splitFile(bytes, path);
    SessionSummary s;
    try {
        s = fromJson(json::parse(text));
    } catch (const json::exception& e) {
        throw std::runtime_error(fmt::format("{}: damaged session summary: {}", path, e.what()));
    }
    if (with_raster) s.raster_bytes = std::string(raster);
    return s;
}

std::string_view readSessionRaster(const std::string& path, std::string& buffer) {
    readWhole(path, buffer);
    return splitFile(buffer, path).second;
}

}  // namespace sg::site
