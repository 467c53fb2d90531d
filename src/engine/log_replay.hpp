// Reading a survey log back into the core: the survey config stored in the log (or one given),
// and the raw lines in their original order through a fresh Pipeline. Pacing (1x, a factor, as
// fast as possible), pause and seek belong to the caller; this only steps.
#pragma once

#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "engine/pipeline.hpp"
#include "engine/survey_config.hpp"
#include "engine/survey_summary.hpp"
#include "log/log_reader.hpp"

namespace sg::engine {

// The config to replay with: `override_path` when given, else the text stored by `record` (its
// relative plan paths resolve against the folder of the file it was recorded with).
SurveyConfig configForLog(log::LogReader& reader, const std::optional<std::string>& override_path);

// "Next alarm" of a replay: visits the episodes the log recorded (alarms and warnings), by
// survey start time, each once and in order, and stops at the last (never past it).
class EpisodeCursor {
public:
    EpisodeCursor() = default;
    explicit EpisodeCursor(std::vector<TimeNs> starts_ns);  // sorted here
    // The episode to visit from survey time now_ns: the one after the last visited while the
    // replay still stands where that visit left it, else the first starting after now_ns;
    // nullopt after the last.
    std::optional<std::size_t> next(TimeNs now_ns) const;
    // Records the visit of episode i; the replay stands at now_ns after seeking to it.
    void visited(std::size_t i, TimeNs now_ns);
    const std::vector<TimeNs>& starts() const { return m_starts; }
    int lastVisited() const { return m_visited; }

private:
    std::vector<TimeNs> m_starts;
    int m_visited = -1;
    TimeNs m_after_visit_ns = 0;
};

class LogReplay {
public:
    LogReplay(const std::string& log_path, const std::optional<std::string>& config_override);
    // With a config built by the caller (a site's effective config for this log).
    LogReplay(const std::string& log_path, SurveyConfig config);
    // A site: the earlier sessions to join before the first line (kept for restart()).
    void setSiteSeed(std::function<SiteSeed()> make_seed);
    // Replays without anomaly picks and the verification strip (switchOffPicks); starts again.
    void switchOffPicks();

    // Feeds the next line; false at the end of the log.
    bool step();
    // Feeds lines until the next one would be later than utc_ns (or the end). Returns lines fed.
    std::uint64_t runUntil(TimeNs utc_ns);
    // Survey clock: feeds lines until the survey clock reaches s_ns. While the next line is later
    // (all inputs silent) the receive clock is ticked on, but never to the next line's receive
    // time nor past the end of the log (no silence the log did not have). Returns lines fed.
    std::uint64_t runUntilSurvey(TimeNs s_ns);
    // Survey clock: goes to s_ns (backwards = rebuild from the start, then forwards).
    void seekSurvey(TimeNs s_ns);
    // The survey clock now (0 before the first aligned line).
    TimeNs surveyNow() const { return m_pipeline->engine().surveyClock_ns(); }
    // The log's survey span: instrument times of its decoded fixes and samples (the receive
    // span when none carries one).
    TimeNs surveyFirst() const { return m_survey_first_ns; }
    TimeNs surveyLast() const { return m_survey_last_ns; }
    // Start (survey clock) of every episode the log recorded within its survey span, in order
    // ("next alarm"; episodes after the last line, e.g. silences when acquisition stopped, have
    // nothing to show and are left out).
    std::vector<TimeNs> episodeStarts();
    // "Next alarm": goes forward to the next episode of `cursor` (see EpisodeCursor) and returns
    // its index, or nullopt (and stays) after the last.
    std::optional<std::size_t> nextEpisode(EpisodeCursor& cursor);
    // Feeds every remaining line.
    std::uint64_t runToEnd();
    // Starts again from the first line with a fresh Pipeline (seek backwards = rebuild).
    void restart();

    // UTC receive time of the next line (nullopt at the end) and of the first and last lines.
    std::optional<TimeNs> nextTime() const { return m_has_next ? std::optional<TimeNs>(m_next.utc_ns) : std::nullopt; }
    TimeNs firstTime() const { return m_first_ns; }
    TimeNs lastTime() const { return m_last_ns; }
    std::int64_t totalLines() const { return m_total; }
    std::uint64_t linesFed() const { return m_fed; }

    // The log's own contribution to a summary: path, events (link outages), first/last times.
    LogContext context();

    Pipeline& pipeline() { return *m_pipeline; }
    const SurveyConfig& config() const { return m_config; }
    log::LogReader& reader() { return m_reader; }

private:
    void prime();
    void init();
    void feedDropsUntil(TimeNs utc_ns);

    std::string m_path;
    log::LogReader m_reader;
    SurveyConfig m_config;
    std::unique_ptr<Pipeline> m_pipeline;
    std::function<SiteSeed()> m_make_seed;
    std::int64_t m_next_event_id = 1;
    ReceivedLine m_next;
    bool m_has_next = false;
    TimeNs m_first_ns = 0;
    TimeNs m_last_ns = 0;
    TimeNs m_survey_first_ns = 0;
    TimeNs m_survey_last_ns = 0;
    std::int64_t m_total = 0;
    std::uint64_t m_fed = 0;
    std::vector<SourceEvent> m_drops;  // input_drops events of the log, by receive time
    std::size_t m_drop_next = 0;
};

}  // namespace sg::engine
