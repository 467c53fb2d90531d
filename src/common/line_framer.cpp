// Line framing; see line_framer.hpp.
#include "common/line_framer.hpp"

#include "common/received_line.hpp"

#include <algorithm>
#include <utility>

namespace sg {

namespace {
// UTF-8 encoding of U+FEFF (Unicode Standard, section 23.8 "Specials", byte order mark).
constexpr char kBom[3] = {'\xEF', '\xBB', '\xBF'};
}  // namespace

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
    if (m_at_start) {
        std::size_t i = 0;
        while (i < bytes.size() && m_bom_matched < 3 && bytes[i] == kBom[m_bom_matched]) {
            ++m_bom_matched;
            ++i;
        }
        if (m_bom_matched == 3) {
            m_at_start = false;
            m_bom_skipped = true;
        } else if (i < bytes.size()) {
            // Not a BOM: the bytes held back so far are data.
            m_at_start = false;
            process(std::string_view(kBom, m_bom_matched));
        } else {
            return;  // a BOM prefix so far: wait for more bytes
        }
        bytes.remove_prefix(i);
    }
    process(bytes);
}

void LineFramer::append(const char* p, std::size_t n) {
    while (n > 0) {
        if (m_line.size() >= m_max) {
            m_flags |= kLineTruncated;
            emit();
            m_in_continuation = true;
        }
        const std::size_t take = std::min(n, m_max - m_line.size());
        for (std::size_t k = 0; k < take; ++k) {
            if (isBinaryByte(static_cast<unsigned char>(p[k]))) {
                m_flags |= kLineBinary;
                break;
            }
        }
        m_line.append(p, take);
        p += take;
        n -= take;
    }
}

void LineFramer::process(std::string_view bytes) {
    const char* p = bytes.data();
    const char* const end = p + bytes.size();
    while (p != end) {
        const char c = *p;
        if (c == '\n') {
            if (m_last_was_cr) {
                // LF straight after CR closes a CR LF (or CR CR LF) already ended at the first CR.
                m_pending_empty = false;
            } else {
                emit();
                m_in_continuation = false;
            }
            m_last_was_cr = false;
            ++p;
            continue;
        }
        if (c == '\r') {
            if (m_last_was_cr) {
                // CR CR: an empty line, unless an LF follows (CR CR LF is one line end).
                if (m_pending_empty) emit();
                m_pending_empty = true;
            } else {
                emit();
                m_in_continuation = false;
            }
            m_last_was_cr = true;
            ++p;
            continue;
        }
        if (m_pending_empty) {
            emit();
            m_pending_empty = false;
        }
        m_last_was_cr = false;
        const char* q = p;
        while (q != end && *q != '\n' && *q != '\r') ++q;
        append(p, static_cast<std::size_t>(q - p));
        p = q;
    }
}

void LineFramer::flush() {
    if (m_at_start && m_bom_matched > 0) {
        // The stream ended inside what looked like a BOM: those bytes are data.
        m_at_start = false;
        process(std::string_view(kBom, m_bom_matched));
    }
    if (m_pending_empty) {
        emit();
        m_pending_empty = false;
    }
    if (!m_line.empty() || m_flags != 0) emit();
    m_in_continuation = false;
    m_last_was_cr = false;
}

}  // namespace sg
