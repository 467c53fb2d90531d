// The anomaly picks and verification passes of one session in its summary (docs/site.md,
// "Session summaries"; docs/picks.md "A site"): every field of a pick and of each of its passes
// (with the dipole fit), so that a site shows every session's picks without replaying its log.
#pragma once

#include <vector>

#include <nlohmann/json.hpp>

#include "detect/anomaly_picker.hpp"
#include "detect/verification_strip.hpp"

namespace sg::site {

nlohmann::json picksToJson(const std::vector<detect::AnomalyPick>& picks);
std::vector<detect::AnomalyPick> picksFromJson(const nlohmann::json& j);
nlohmann::json passesToJson(const std::vector<detect::VerificationPass>& passes);
std::vector<detect::VerificationPass> passesFromJson(const nlohmann::json& j);

}  // namespace sg::site
