// Reading a survey log back; see log_reader.hpp.
#include "log/log_reader.hpp"

namespace sg::log {

LogReader::LogReader(const std::string& path) : m_store(path, OpenMode::ReadOnly) { seek(0); }

void LogReader::seek(std::int64_t after_id) {
    m_cursor = &m_store.statement(
        "SELECT id, source, mono_ns, utc_ns, bytes, flags, status, reason FROM raw_lines "
        "WHERE id > ?1 ORDER BY id");
    m_cursor->reset();
    m_cursor->bind(1, after_id);
}

bool LogReader::next(std::int64_t& id, RawRow& r) {
    if (!m_cursor->step()) return false;
    id = m_cursor->columnInt(0);
    r.source = m_cursor->columnText(1);
    r.mono_ns = m_cursor->columnInt(2);
    r.utc_ns = m_cursor->columnInt(3);
    r.bytes = m_cursor->columnBlob(4);
    r.flags = static_cast<std::uint8_t>(m_cursor->columnInt(5));
    r.status = statusFromText(m_cursor->columnText(6));
    r.reason = m_cursor->columnText(7);
    return true;
}

bool LogReader::next(ReceivedLine& line) {
    std::int64_t id = 0;
    RawRow r;
    if (!next(id, r)) return false;
    line.source = std::move(r.source);
    line.mono_ns = r.mono_ns;
    line.utc_ns = r.utc_ns;
    line.bytes = std::move(r.bytes);
    line.flags = r.flags;
    return true;
}

}  // namespace sg::log
