// Lets GoogleTest print a Reason by its stable name instead of a byte dump.
#pragma once

#include <ostream>

#include "decode/reason.hpp"

namespace sg::decode {
inline void PrintTo(Reason r, std::ostream* os) { *os << reasonName(r); }
}  // namespace sg::decode
