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

class LogReplay {
public:
    LogReplay(const std::string& log_path, const std::optional<std::string>& config_override);
    // With a config built by the caller (a site's effective config for this log).
    LogReplay(const std::string& log_path, SurveyConfig config);
    // A site: the earlier sessions to join before the first line (kept for restart()).
    void setSiteSeed(std::function<SiteSeed()> make_seed);

    // Feeds the next line; false at the end of the log.
    bool step();
    // Feeds lines until the next one would be later than utc_ns (or the end). Returns lines fed.
    std::uint64_t runUntil(TimeNs utc_ns);
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
    std::int64_t m_total = 0;
    std::uint64_t m_fed = 0;
    std::vector<SourceEvent> m_drops;  // input_drops events of the log, by receive time
    std::size_t m_drop_next = 0;
};

}  // namespace sg::engine
