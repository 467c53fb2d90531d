// The demo survey's config for a test that runs the real `record` over UDP: its six inputs moved
// to ports of the test's own (parallel test runs must not share them) and its plan files named by
// absolute path (the config is written into a scratch folder).
#pragma once

#include <fstream>
#include <regex>
#include <sstream>
#include <string>

namespace sg::testdata {

// The demo's survey.toml with its plan files named by absolute path.
inline std::string demoConfigWithAbsolutePlan() {
    const std::string src = SG_SOURCE_DIR;
    std::ifstream in(src + "/replay_logs/demo/survey.toml");
    std::stringstream ss;
    ss << in.rdbuf();
    return std::regex_replace(ss.str(), std::regex("\"plan_(area|lines)\\.geojson\""),
                              "\"" + src + "/replay_logs/demo/plan_$1.geojson\"");
}

// The demo's survey.toml with inputs on 127.0.0.1:base .. base+5.
inline std::string demoConfigOnPorts(int base) {
    std::string cfg = demoConfigWithAbsolutePlan();
    for (int i = 0; i < 6; ++i)
        cfg = std::regex_replace(cfg, std::regex("127\\.0\\.0\\.1:4700" + std::to_string(i)),
                                 "127.0.0.1:" + std::to_string(base + i));
    return cfg;
}

}  // namespace sg::testdata
