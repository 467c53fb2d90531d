// Line framing; see line_framer.hpp.
#include "common/line_framer.hpp"

#include "common/received_line.hpp"

#include <utility>

namespace sg {

bool isBinaryByte(unsigned char c) { return (c < 0x20 && c != '\t') || c == 0x7f; }

LineFramer::LineFramer(Sink sink, std::size_t max_line_bytes)
    : m_sink(std::move(sink)), m_max(max_line_bytes == 0 ? 1 : max_line_bytes) {
    m_line.reserve(256);
}

void LineFramer::emit() {
    std::uint8_t flags = m_flags;
    if (m_in_continuation) flags |= kLineContinued;
    m_sink(m_line, flags);
    m_line.clear();
    m_flags = 0;
}

void LineFramer::feed(std::string_view bytes) {
    for (char ch : bytes) {
        const auto c = static_cast<unsigned char>(ch);
        if (c == '\n') {
            // LF straight after CR closes a CRLF pair that was already emitted at the CR.
            if (!m_last_was_cr) {
                emit();
                m_in_continuation = false;
            }
            m_last_was_cr = false;
            continue;
        }
        if (c == '\r') {
            emit();
            m_in_continuation = false;
            m_last_was_cr = true;
            continue;
        }
        m_last_was_cr = false;
        if (m_line.size() >= m_max) {
            m_flags |= kLineTruncated;
            emit();
            m_in_continuation = true;
        }
        if (isBinaryByte(c)) m_flags |= kLineBinary;
        m_line.push_back(ch);
    }
}

void LineFramer::flush() {
    if (!m_line.empty() || m_flags != 0) emit();
    m_in_continuation = false;
    m_last_was_cr = false;
}

}  // namespace sg
