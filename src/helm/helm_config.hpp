// [[output]] tables of the survey config: where the helm's steering sentences go (docs/config.md,
// "[[output]]"; docs/helm-output.md). Parsed and validated here; io/helm_output.* opens them.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "common/config_section.hpp"
#include "helm/steering_sentences.hpp"

namespace sg::helm {

struct OutputConfig {
    std::string name;                 // shown in messages and logged with every sentence
    std::string kind = "steering";    // only "steering" for now
    std::string transport = "udp";    // "udp" | "serial"
    std::string host;                 // udp: destination host (name or address)
    int port = 0;                     // udp: destination port 1..65535
    std::string device;               // serial: e.g. /dev/ttyUSB1
    int baud = 4800;                  // serial: 50..4000000 (NMEA 0183's usual rate is 4800)
    double rate_hz = 1.0;             // sentences per second of survey time, 0.1..10
    SentenceOptions sentence;         // talker, xte_decimals
    std::vector<std::string> sentences{"XTE", "APB", "RMB"};
    std::string reference = "array";  // "array" (mean of the sensors, the deviation the screen
                                      // shows) | "antenna" (the vessel's GNSS antenna)
    double arrival_radius_m = 50.0;   // arrival circle around the destination, 1..10000 m
    bool void_when_no_line = true;    // when_no_line = "void" (status V sentences) | "silent"
};

// Reads every [[output]] table (none: an empty vector). Throws config::ConfigError naming the
// file and key for a bad value or an unknown key.
std::vector<OutputConfig> parseOutputs(const config::Section& root);

}  // namespace sg::helm
