// The site-wide part of a survey config (docs/site.md): the keys that decide where coverage lies
// and what "covered" means, which every log of a site must share: [survey] epsg and
// coverage_class, [geomagnetic], [detection], [[target]], [coverage], [gaps], [plan] (with the
// content of its files) and [infill]. Everything else ([vessel], [tow], [[sensor]], [[input]],
// [fieldmap.*], [checks], [log], [import], [survey] name) belongs to the vessel and session that
// recorded a log, and each log keeps its own.
#pragma once

#include <cstdint>
#include <optional>
#include <string>

#include "engine/survey_config.hpp"

namespace sg::site {

// Canonical text of the site-wide part (keys sorted; [plan] area/lines replaced by a hash of the
// files' content, or "missing:<path>"). Equal text means equal coverage rules.
std::string siteWideText(const engine::SurveyConfig& cfg);
// 64-bit hash of siteWideText (XXH3).
std::uint64_t siteWideHash(const engine::SurveyConfig& cfg);

// The first site-wide key whose value differs between two configs, as people write it
// ("[detection] k", "[survey] epsg", "[[target]] 2 moment_Am2", "[plan] area (file content)"),
// or nullopt when the site-wide parts are equal.
std::optional<std::string> firstSiteWideDifference(const engine::SurveyConfig& a, const engine::SurveyConfig& b);

// The config a log of the site is computed with: the log's own config with every site-wide key
// taken from `site` (its [plan] file paths made absolute). Throws config::ConfigError when the
// combination does not parse (naming both files).
engine::SurveyConfig effectiveConfig(const engine::SurveyConfig& log_cfg, const engine::SurveyConfig& site);

}  // namespace sg::site
