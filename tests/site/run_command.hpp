// Running the real binaries from the site tests: a shell command's exit code, stdout and stderr
// apart (stderr through a temporary file).
#pragma once

#include <sys/wait.h>
#include <unistd.h>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <memory>
#include <sstream>
#include <string>

namespace sg::test {

struct Result {
    int rc = -1;
    std::string out, err;
};

inline Result run(const std::string& cmd) {
    Result r;
    namespace fs = std::filesystem;
    static int n = 0;
    const std::string err_file =
        (fs::temp_directory_path() / ("sg_site_err_" + std::to_string(::getpid()) + "_" + std::to_string(n++))).string();
    std::unique_ptr<FILE, int (*)(FILE*)> p(popen((cmd + " 2>" + err_file).c_str(), "r"), pclose);
    if (!p) return r;
    std::array<char, 4096> buf{};
    while (fgets(buf.data(), static_cast<int>(buf.size()), p.get()) != nullptr) r.out += buf.data();
    const int st = pclose(p.release());
    r.rc = WIFEXITED(st) ? WEXITSTATUS(st) : -1;
    std::ifstream f(err_file);
    std::stringstream ss;
    ss << f.rdbuf();
    r.err = ss.str();
    fs::remove(err_file);
    return r;
}

}  // namespace sg::test
