// Helpers shared by the io tests: temporary folders, running an io_context until a condition
// holds, NMEA/field-map line makers, and running the sqlite3 shell (the outside reference).
#pragma once

#include <chrono>
#include <cstdio>
#include <filesystem>
#include <functional>
#include <random>
#include <string>

#include <boost/asio/io_context.hpp>

#include "decode/field_map.hpp"
#include "decode/nmea.hpp"

namespace sg::test {

// A fresh folder under /tmp, removed at the end of the test.
class TempDir {
public:
    TempDir() {
        std::random_device rd;
        m_path = std::filesystem::temp_directory_path() /
                 ("sgio-" + std::to_string(rd()) + "-" + std::to_string(rd()));
        std::filesystem::create_directories(m_path);
    }
    ~TempDir() {
        std::error_code ec;
        std::filesystem::remove_all(m_path, ec);
    }
    std::string file(const std::string& name) const { return (m_path / name).string(); }
    const std::filesystem::path& path() const { return m_path; }

private:
    std::filesystem::path m_path;
};

// Runs `io` in small slices until `done()` or `timeout`; returns done().
inline bool runUntil(boost::asio::io_context& io, const std::function<bool()>& done,
                     std::chrono::milliseconds timeout = std::chrono::seconds(10)) {
    const auto end = std::chrono::steady_clock::now() + timeout;
    while (!done() && std::chrono::steady_clock::now() < end) {
        io.restart();
        io.run_for(std::chrono::milliseconds(5));
    }
    return done();
}

// Standard output of a shell command (the sqlite3 shell, socat...).
inline std::string shell(const std::string& cmd) {
    std::string out;
    FILE* p = ::popen(cmd.c_str(), "r");
    if (p == nullptr) return out;
    char buf[4096];
    std::size_t n = 0;
    while ((n = std::fread(buf, 1, sizeof buf, p)) > 0) out.append(buf, n);
    ::pclose(p);
    while (!out.empty() && (out.back() == '\n' || out.back() == '\r')) out.pop_back();
    return out;
}

// "hhmmss.ss" for a time of day in seconds.
inline std::string hhmmss(double tod_s, int decimals = 2) {
    const int h = static_cast<int>(tod_s / 3600);
    const int m = static_cast<int>((tod_s - h * 3600) / 60);
    const double s = tod_s - h * 3600 - m * 60;
    char buf[32];
    std::snprintf(buf, sizeof buf, "%02d%02d%0*.*f", h, m, decimals + 3, decimals, s);
    return buf;
}

// Invented sentences for tests (position off the Dutch coast, any values will do).
inline std::string gga(double tod_s, double lat_min = 0.0) {
    char body[160];
    std::snprintf(body, sizeof body, "GPGGA,%s,52%07.4f,N,00430.0000,E,1,08,0.9,10.0,M,47.0,M,,",
                  hhmmss(tod_s).c_str(), lat_min);
    return decode::nmeaWithChecksum(body);
}
inline std::string rmc(double tod_s, const std::string& ddmmyy) {
    return decode::nmeaWithChecksum("GPRMC," + hhmmss(tod_s) +
                                    ",A,5200.0000,N,00430.0000,E,4.0,90.0," + ddmmyy + ",,,A");
}
inline std::string sgm(double tod_s, double field_nT, int sensor = 0) {
    char body[120];
    std::snprintf(body, sizeof body, "SGM,%d,%s,%.3f,97,12.40,4.10", sensor,
                  hhmmss(tod_s, 3).c_str(), field_nT);
    return decode::withXorChecksum(body);
}

// The config used by several tests: one NMEA input and one field-map input, given transports.
inline std::string fieldMapToml() {
    return "[fieldmap.sgm]\nstart = \"SGM\"\nchecksum = \"xor\"\nsensor = 1\ntime = 2\n"
           "field_nT = 3\nquality = 4\ndepth_m = 5\naltitude_m = 6\n";
}

}  // namespace sg::test
