// Reading a survey log back: meta (schema version, stored config) and the raw lines in id order,
// one at a time, as the ReceivedLine values the core was fed live (for replay).
#pragma once

#include <memory>
#include <optional>
#include <string>

#include "common/received_line.hpp"
#include "log/log_store.hpp"

namespace sg::log {

class LogReader {
public:
    // Opens read-only; throws LogError if the file is missing or not a swathguard log.
    explicit LogReader(const std::string& path);

    int schemaVersion() { return m_store.schemaVersion(); }
    std::optional<std::string> meta(std::string_view key) { return m_store.meta(key); }
    std::optional<std::string> configText() { return m_store.configText(); }
    std::int64_t rawCount() { return m_store.rawCount(); }
    std::vector<EventRow> events() { return m_store.events(); }

    // Next raw line in id order; false at the end. `id` is raw_lines.id. The two forms keep a
    // cursor each (both start at the last seek): use one of them per pass.
    bool next(std::int64_t& id, RawRow& row);
    // Only what the core was fed live (for replay; cheaper than the full row).
    bool next(ReceivedLine& line);
    // Restarts so that the next line is the first with id > after_id.
    void seek(std::int64_t after_id);
    LogStore& store() { return m_store; }

private:
    LogStore m_store;
    Statement* m_cursor = nullptr;       // owned by m_store's statement cache
    Statement* m_line_cursor = nullptr;  // the same, for next(ReceivedLine&)
};

}  // namespace sg::log
