// Log replay stepping; see log_replay.hpp.
#include "engine/log_replay.hpp"

#include <algorithm>
#include <filesystem>
#include <limits>

namespace sg::engine {

SurveyConfig configForLog(log::LogReader& reader, const std::optional<std::string>& override_path) {
    // Offline: a log made by `import` may hold a config whose inputs have no transport.
    if (override_path) return loadSurveyConfig(*override_path, config::InputUse::Offline);
    const auto text = reader.configText();
    if (!text) throw config::ConfigError("the log holds no survey config: pass --config FILE");
    std::string file = reader.meta("config_file").value_or("log");
    const auto dir = std::filesystem::path(file).parent_path().string();
    return parseSurveyConfig(*text, file, dir, config::InputUse::Offline);
}

LogReplay::LogReplay(const std::string& log_path, const std::optional<std::string>& config_override)
    : m_path(log_path), m_reader(log_path), m_config(configForLog(m_reader, config_override)) {
    init();
}

LogReplay::LogReplay(const std::string& log_path, SurveyConfig config)
    : m_path(log_path), m_reader(log_path), m_config(std::move(config)) {
    init();
}

void LogReplay::setSiteSeed(std::function<SiteSeed()> make_seed) {
    m_make_seed = std::move(make_seed);
    restart();
}

void LogReplay::switchOffPicks() {
    engine::switchOffPicks(m_config);
    restart();
}

void LogReplay::init() {
    m_total = m_reader.rawCount();
    // First and last receive times, for the seek bar.
    {
        log::LogReader probe(m_path);
        ReceivedLine l;
        if (probe.next(l)) m_first_ns = l.utc_ns;
        m_last_ns = m_first_ns;
        if (auto last = probe.store().lastRawUtc()) m_last_ns = *last;
        const auto span = probe.store().instrumentTimeSpan();
        m_survey_first_ns = span ? span->first : m_first_ns;
        m_survey_last_ns = span ? span->second : m_last_ns;
    }
    restart();
}

LogContext LogReplay::context() {
    return {m_path, m_reader.events(), m_first_ns, m_last_ns};
}

void LogReplay::restart() {
    m_reader.seek(0);
    m_next_event_id = 1;
    m_pipeline = std::make_unique<Pipeline>(m_config, [this] { return m_next_event_id++; });
    // A replay writes no log: gathering its rows would only grow memory by every line.
    m_pipeline->decoder().setLogRows(false);
    if (m_make_seed) m_pipeline->engine().seedSite(m_make_seed());
    m_fed = 0;
    // Datagrams the kernel dropped live are not lines: they come back from the events table, in
    // receive-time order between the lines, as the readers reported them.
    m_drops.clear();
    m_drop_next = 0;
    for (const auto& e : m_reader.events())
        if (e.kind == "input_drops" && e.value && *e.value > 0)
            m_drops.push_back({SourceEvent::Kind::Drops, e.source, e.start_utc_ns, 0, e.detail,
                               static_cast<std::uint64_t>(*e.value)});
    std::stable_sort(m_drops.begin(), m_drops.end(),
                     [](const SourceEvent& a, const SourceEvent& b) { return a.utc_ns < b.utc_ns; });
    prime();
}

void LogReplay::feedDropsUntil(TimeNs utc_ns) {
    while (m_drop_next < m_drops.size() && m_drops[m_drop_next].utc_ns <= utc_ns)
        m_pipeline->onSourceEvent(m_drops[m_drop_next++]);
}

void LogReplay::prime() { m_has_next = m_reader.next(m_next); }

bool LogReplay::step() {
    if (!m_has_next) return false;
    feedDropsUntil(m_next.utc_ns);
    m_pipeline->feed(m_next);
    ++m_fed;
    prime();
    return true;
}

std::uint64_t LogReplay::runUntil(TimeNs utc_ns) {
    std::uint64_t n = 0;
    while (m_has_next && m_next.utc_ns <= utc_ns) {
        step();
        ++n;
    }
    feedDropsUntil(utc_ns);
    m_pipeline->tick(utc_ns);
    return n;
}

std::uint64_t LogReplay::runUntilSurvey(TimeNs s_ns) {
    std::uint64_t n = 0;
    auto& engine = m_pipeline->engine();
    while (m_has_next && engine.surveyClock_ns() < s_ns) {
        step();
        ++n;
    }
    const TimeNs s_now = engine.surveyClock_ns();
    if (s_now != 0 && s_now < s_ns) {
        // While no line moves it, the survey clock follows the receive clock (SurveyEngine::
        // advanceTo): tick that on, short of the next line and never past the log's last line.
        TimeNs recv = engine.clock_ns() + (s_ns - s_now);
        recv = std::min(recv, m_has_next ? m_next.utc_ns - 1 : m_last_ns);
        if (recv > engine.clock_ns()) {
            feedDropsUntil(recv);
            m_pipeline->tick(recv);
        }
    }
    return n;
}

void LogReplay::seekSurvey(TimeNs s_ns) {
    if (s_ns < surveyNow()) restart();
    runUntilSurvey(s_ns);
}

std::vector<TimeNs> LogReplay::episodeStarts() {
    std::vector<TimeNs> out;
    // Episodes that started after the log's last line (the inputs falling silent when acquisition
    // was stopped) have no data to show: a replay cannot stand there, so they are not visited.
    for (const auto& e : m_reader.events())
        if (e.kind.rfind("alarm.", 0) == 0 && e.start_utc_ns <= m_survey_last_ns) out.push_back(e.start_utc_ns);
    std::sort(out.begin(), out.end());
    return out;
}

std::optional<std::size_t> LogReplay::nextEpisode(EpisodeCursor& cursor) {
    const auto i = cursor.next(surveyNow());
    if (!i) return std::nullopt;  // at the last one: stay (never seek past the end of the log)
    const TimeNs t = cursor.starts()[*i];
    // Two episodes may start within one line of each other: then the replay already stands there.
    if (t > surveyNow()) runUntilSurvey(t);
    cursor.visited(*i, surveyNow());
    return i;
}

EpisodeCursor::EpisodeCursor(std::vector<TimeNs> starts_ns) : m_starts(std::move(starts_ns)) {
    std::sort(m_starts.begin(), m_starts.end());
}

std::optional<std::size_t> EpisodeCursor::next(TimeNs now_ns) const {
    std::size_t i = 0;
    if (m_visited >= 0 && now_ns == m_after_visit_ns) {
        i = static_cast<std::size_t>(m_visited) + 1;
    } else {
        i = static_cast<std::size_t>(std::upper_bound(m_starts.begin(), m_starts.end(), now_ns) - m_starts.begin());
    }
    if (i >= m_starts.size()) return std::nullopt;
    return i;
}

void EpisodeCursor::visited(std::size_t i, TimeNs now_ns) {
    m_visited = static_cast<int>(i);
    m_after_visit_ns = now_ns;
}

std::uint64_t LogReplay::runToEnd() {
    std::uint64_t n = 0;
    while (step()) ++n;
    feedDropsUntil(std::numeric_limits<TimeNs>::max());
    return n;
}

}  // namespace sg::engine
