// Splits a byte stream into lines. A line ends at LF, CR LF, a bare CR, or CR CR LF (one end: what
// a CR LF written through a second text-mode conversion becomes), so a line number counted from
// the pieces equals the file's. A line longer than the limit is cut: the first part is delivered
// flagged kLineTruncated and the rest (up to the next terminator) follows as further pieces
// flagged kLineContinued, so no byte is ever lost and the reader never stalls. A line holding NUL
// or other non-text bytes is delivered flagged kLineBinary. A UTF-8 byte-order mark (EF BB BF) at
// the very start of the stream is an encoding marker, not data: it is skipped (bomSkipped()).
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <string>
#include <string_view>

namespace sg {

class LineFramer {
public:
    // onLine(bytes, flags): called once per complete line (terminator removed).
    using Sink = std::function<void(std::string_view bytes, std::uint8_t flags)>;

    explicit LineFramer(Sink sink, std::size_t max_line_bytes = 4096);

    // Feed any number of bytes, split anywhere.
    void feed(std::string_view bytes);
    // Deliver a pending partial line (end of file, port closed).
    void flush();

    std::size_t pendingBytes() const { return m_line.size(); }
    // True when the stream began with a UTF-8 byte-order mark, which was skipped.
    bool bomSkipped() const { return m_bom_skipped; }

private:
    void emit();
    void process(std::string_view bytes);
    void append(const char* p, std::size_t n);

    Sink m_sink;
    std::size_t m_max;
    std::string m_line;
    std::uint8_t m_flags = 0;
    bool m_last_was_cr = false;
    bool m_pending_empty = false;  // an empty line ended by CR CR, unless an LF follows
    bool m_in_continuation = false;
    bool m_at_start = true;        // no byte decided yet (BOM detection)
    std::size_t m_bom_matched = 0;  // BOM bytes seen so far at the start
    bool m_bom_skipped = false;
};

// True for bytes that never appear in instrument text: NUL, control characters other than
// TAB, and DEL. Bytes >= 0x80 are allowed (some devices send Latin-1 degree signs).
bool isBinaryByte(unsigned char c);

}  // namespace sg
