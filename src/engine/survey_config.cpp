// Survey configuration: gathers the sections each module parses; see survey_config.hpp.
#include "engine/survey_config.hpp"

#include <filesystem>
#include <fstream>
#include <sstream>

#include "detect/anomaly_picker.hpp"
#include "detect/verification_strip.hpp"

namespace sg::engine {

namespace {

void parseSurveyInfo(const config::Section& root, SurveyConfig& cfg) {
    if (auto s = root.optionalTable("survey")) {
        s->allowOnly({"name", "epsg", "coverage_class"});
        cfg.survey.name = s->string("name", "");
        if (auto epsg = s->optionalInteger("epsg", 1024, 999999))
            cfg.survey.epsg = static_cast<int>(*epsg);
        cfg.survey.coverage_class = s->string("coverage_class", "");
    }
    if (!cfg.survey.coverage_class.empty()) {
        bool found = false;
        for (const auto& t : cfg.detection.targets) found = found || t.name == cfg.survey.coverage_class;
        if (!found) root.table("survey").fail("coverage_class", "the name of a [[target]]");
    }
}

}  // namespace

void switchOffPicks(SurveyConfig& cfg) {
    auto copy = cfg.table ? std::make_shared<toml::table>(*cfg.table) : std::make_shared<toml::table>();
    if (auto* picks = (*copy)["picks"].as_table())
        picks->insert_or_assign("enabled", false);
    else
        copy->insert_or_assign("picks", toml::table{{"enabled", false}});
    cfg.table = std::move(copy);
}

SurveyConfig parseSurveyConfig(const std::string& text, const std::string& name,
                               const std::string& dir, config::InputUse use) {
    SurveyConfig cfg;
    cfg.file = name;
    cfg.text = text;
    cfg.dir = dir;
    cfg.table = std::make_shared<const toml::table>(config::parseText(text, name));
    const config::Section root = cfg.root();
    root.allowOnly({"survey", "log", "import", "input", "fieldmap", "vessel", "tow", "sensor",
                    "geomagnetic", "detection", "target", "plan", "coverage", "gaps", "infill",
                    "checks", "output", "picks", "known_item"});
    cfg.fieldmaps = decode::parseFieldMaps(root);
    cfg.inputs = config::parseInputs(root, use);
    cfg.log = config::parseLog(root);
    cfg.import = config::parseImport(root);
    cfg.nav = nav::parseVesselConfig(root);
    cfg.detection = detect::parseDetectionConfig(root);
    parseSurveyInfo(root, cfg);
    cfg.outputs = helm::parseOutputs(root);
    (void)detect::parsePickSettings(root);                          // [picks]
    (void)detect::parseKnownItems(root, *cfg.table, cfg.detection.targets);     // [[known_item]]
    (void)checks::CheckSet::fromConfig(root);  // validates [checks] now, not mid-survey
    return cfg;
}

SurveyConfig loadSurveyConfig(const std::string& path, config::InputUse use) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw config::ConfigError(path + ": cannot open the survey config file");
    std::ostringstream text;
    text << in.rdbuf();
    const auto dir = std::filesystem::absolute(path).parent_path().string();
    return parseSurveyConfig(text.str(), path, dir, use);
}

}  // namespace sg::engine
