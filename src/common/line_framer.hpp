// Splits a byte stream into lines on CR, LF or CRLF. A line longer than the limit is cut: the
// first part is delivered flagged kLineTruncated and the rest (up to the next terminator) follows
// as further pieces flagged kLineContinued, so no byte is ever lost and the reader never stalls.
// A line holding NUL or other non-text bytes is delivered flagged kLineBinary.
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

private:
    void emit();

    Sink m_sink;
    std::size_t m_max;
    std::string m_line;
    std::uint8_t m_flags = 0;
    bool m_last_was_cr = false;
    bool m_in_continuation = false;
};

// True for bytes that never appear in instrument text: NUL, control characters other than
// TAB, and DEL. Bytes >= 0x80 are allowed (some devices send Latin-1 degree signs).
bool isBinaryByte(unsigned char c);

}  // namespace sg
