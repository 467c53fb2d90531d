// Alarm statements; see alarm_text.hpp.
#include "engine/alarm_text.hpp"

#include "checks/check_set.hpp"

namespace sg::engine {

namespace {

// Narrower than this prints as "0.0 m wide" (one decimal): not a width to alarm with.
constexpr double kShownWidth_m = 0.05;

constexpr const char* kNoneNow = "; no gap measured now, clearing";

}  // namespace

std::string alarmStatement(const checks::Episode& ep, const FormingGapSpot* live) {
    const std::string plain = std::string(checks::checkWords(ep.check)) + ": " +
                              checks::checkValueText(ep.check, ep.peak_value);
    if (ep.check != "forming_gap") return plain;
    const bool open = !ep.end_ns;
    if (open && live && live->width_m >= kShownWidth_m) return "Gap forming: " + live->text();
    // The detail is the place and width recorded when the episode was raised or escalated.
    if (ep.detail.empty()) return open ? plain + " at worst" + kNoneNow : plain;
    std::string out = "Gap forming: " + ep.detail;
    if (open) out += std::string(" (when raised)") + kNoneNow;
    return out;
}

}  // namespace sg::engine
