// Why a line decoded the way it did. One code per outcome; the snake_case names are stored in the
// raw log and the event log, so they must never change (add new codes at the end only).
#pragma once

#include <cstdint>
#include <string_view>

namespace sg::decode {

enum class Reason : std::uint8_t {
    Ok,               // decoded, checksum present and correct (or the format has none)
    NoChecksum,       // NMEA sentence without '*hh': decoded and accepted, but marked
    BadChecksum,      // checksum present but wrong, or malformed ('*' not followed by 2 hex digits)
    NotNmea,          // does not start with '$' or '!'
    Truncated,        // fewer fields than the sentence or field map needs
    BadField,         // a field failed validation; `detail` names it
    UnknownSentence,  // well-formed NMEA of a type we do not decode (proprietary $P..., GSV, ...)
    BinaryBytes,      // NUL or other control bytes no instrument text contains
    TooLong,          // longer than the format allows
    EmptyLine,        // nothing (or only spaces) between two line terminators
    BadStart,         // NMEA address field malformed, or field-map start token not matched
    FieldIgnored,     // decoded and usable, checksum correct; a field the core does not use was
                      // malformed and is null (`detail` names it): e.g. RMC variation "999.9,E"
    MissingChecksum,  // NMEA without '*hh' from a source that has sent checksums before (a
                      // corrupted '*' would otherwise turn its checksum digits into data);
                      // never for a talker the input lists in checksum_optional_talkers
};

inline constexpr int kReasonCount = 13;

// Stable snake_case name ("ok", "no_checksum", "bad_checksum", ...).
std::string_view reasonName(Reason r);

// True when the line's data can be used (Ok, NoChecksum or FieldIgnored).
inline bool isUsable(Reason r) {
    return r == Reason::Ok || r == Reason::NoChecksum || r == Reason::FieldIgnored;
}

}  // namespace sg::decode
