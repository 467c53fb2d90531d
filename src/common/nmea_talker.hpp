// NMEA 0183 talker ids as a configuration names them (`[[input]] checksum_optional_talkers`,
// `inspect --checksum-optional-talkers`). In common, not decode: the [[input]] parser (common)
// and the decoder's users must apply one and the same rule.
#pragma once

#include <string_view>

namespace sg {

// True for a talker id that may be listed: exactly two characters, an upper-case letter other
// than 'P' followed by an upper-case letter or a digit, e.g. "HE", "GP", "U1". NMEA 0183: the
// address of an approved sentence starts with a two-character talker; '$P' starts a proprietary
// sentence, which has no such talker, so "P?" could never match one.
constexpr bool isTalkerId(std::string_view id) {
    if (id.size() != 2) return false;
    const bool first = id[0] >= 'A' && id[0] <= 'Z' && id[0] != 'P';
    const bool second = (id[1] >= 'A' && id[1] <= 'Z') || (id[1] >= '0' && id[1] <= '9');
    return first && second;
}

// What isTalkerId accepts, for error messages.
inline constexpr std::string_view kTalkerIdWords =
    "two characters: an upper-case letter other than P, then an upper-case letter or a digit "
    "(e.g. \"HE\")";

}  // namespace sg
