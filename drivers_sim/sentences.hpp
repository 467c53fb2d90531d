// Text of the simulated instrument lines (no terminator): NMEA 0183 GGA, RMC, VTG, ZDA, GST, HDT,
// DPT with their checksums, and the team's SGM/SGA/SGC strings (docs/formats.md). Pure functions.
#pragma once

#include <string>

#include "common/received_line.hpp"

namespace sg::sim {

struct GgaFields {
    TimeNs utc_ns = 0;
    double lat_deg = 0.0;
    double lon_deg = 0.0;
    int quality = 0;        // 0 = no fix: position fields left empty
    int satellites = 0;
    double hdop = 0.0;
    double altitude_m = 0.0;  // antenna above mean sea level
    double geoid_separation_m = 0.0;
    double diff_age_s = -1.0; // < 0: empty
    int station = -1;         // < 0: empty
};
std::string ggaSentence(const std::string& talker, const GgaFields& f);

struct RmcFields {
    TimeNs utc_ns = 0;
    bool valid = false;      // status A / V (position fields empty when V)
    double lat_deg = 0.0;
    double lon_deg = 0.0;
    double sog_kn = 0.0;
    double cog_true_deg = 0.0;
    double variation_deg = 0.0;  // east positive
    char mode = 'A';             // NMEA 0183 v2.3+ mode indicator (A, D, R, F, N)
};
std::string rmcSentence(const std::string& talker, const RmcFields& f);

// VTG: course true and magnetic (cog_true - variation), speed in knots and km/h; mode indicator.
std::string vtgSentence(const std::string& talker, bool valid, double cog_true_deg,
                        double variation_deg, double sog_kn, char mode);
std::string zdaSentence(const std::string& talker, TimeNs utc_ns);
// GST: rms of pseudorange residuals, error ellipse (semi-major, semi-minor, orientation) and the
// standard deviations of latitude, longitude and altitude errors (metres).
std::string gstSentence(const std::string& talker, TimeNs utc_ns, double rms, double smaj_m,
                        double smin_m, double orient_deg, double lat_m, double lon_m, double alt_m);
std::string hdtSentence(const std::string& talker, double heading_true_deg);
// DPT: depth below the transducer, offset of the transducer (positive: to the waterline), range.
std::string dptSentence(const std::string& talker, double depth_m, double offset_m, double range_m);

// SGM,<sensor>,<hhmmss.sss>,<field nT .3>,<quality>,<depth m .2>,<altitude m .2 or empty>*XX
// altitude_m < 0 leaves the field empty.
std::string sgmString(int sensor, TimeNs utc_ns, double field_nT, int quality, double depth_m,
                      double altitude_m);
std::string sgaString(TimeNs utc_ns, double altitude_m);
std::string sgcString(TimeNs utc_ns, double cable_out_m);

// "hhmmss.ss" (decimals 2) or "hhmmss.sss" (decimals 3), UTC time of day.
std::string timeOfDay(TimeNs utc_ns, int decimals);

// The line with its two checksum digits replaced by a different value (bad checksum fault).
// `flip` in 1..255 is XORed into the checksum.
std::string spoilChecksum(const std::string& line, unsigned flip);

}  // namespace sg::sim
