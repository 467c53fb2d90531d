// A block of consecutive loopback ports held by one test process for its lifetime.
//
// ctest runs test processes in parallel, and several of them start the real `record` and the
// simulator over UDP or TCP. Ports chosen from the process id alone collided (two processes whose
// ids differ by a multiple of the modulus got the same block). Here a block is taken only when
// its lock file can be locked (flock, released by the kernel when the process ends, so a killed
// test never leaves a block taken) and every port of it binds for UDP and TCP on 127.0.0.1, so a
// port held by anything else on the machine is skipped too.
#pragma once

#include <fcntl.h>
#include <netinet/in.h>
#include <sys/file.h>
#include <sys/socket.h>
#include <unistd.h>

#include <cstdint>
#include <filesystem>
#include <stdexcept>
#include <string>

namespace sg::testdata {

class PortBlock {
public:
    // Blocks are slots of kStride ports from kFirst; all below Linux's ephemeral range
    // (32768..60999 by default), where a client's own port could be handed out.
    static constexpr int kStride = 32;
    static constexpr int kFirst = 20000;
    static constexpr int kSlots = (32000 - kFirst) / kStride;

    explicit PortBlock(int count) {
        if (count < 1 || count > kStride) throw std::invalid_argument("PortBlock: 1..32 ports");
        const std::filesystem::path dir = std::filesystem::temp_directory_path() / "swathguard-test-ports";
        std::error_code ec;
        std::filesystem::create_directories(dir, ec);
        const int start = static_cast<int>(::getpid() % kSlots);
        for (int k = 0; k < kSlots; ++k) {
            const int slot = (start + k) % kSlots;
            const std::string lock = (dir / (std::to_string(slot) + ".lock")).string();
            const int fd = ::open(lock.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0666);
            if (fd < 0) continue;
            if (::flock(fd, LOCK_EX | LOCK_NB) != 0) {
                ::close(fd);
                continue;
            }
            const int base = kFirst + slot * kStride;
            if (allFree(base, count)) {
                m_fd = fd;
                m_base = base;
                return;
            }
            ::close(fd);
        }
        throw std::runtime_error("PortBlock: no free block of " + std::to_string(count) + " loopback ports");
    }
    PortBlock(const PortBlock&) = delete;
    PortBlock& operator=(const PortBlock&) = delete;
    ~PortBlock() {
        if (m_fd >= 0) ::close(m_fd);
    }

    int base() const { return m_base; }

private:
    static bool binds(int type, int port) {
        const int s = ::socket(AF_INET, type | SOCK_CLOEXEC, 0);
        if (s < 0) return false;
        if (type == SOCK_STREAM) {
            const int one = 1;  // as a listening acceptor sets it: TIME_WAIT does not hold a port
            ::setsockopt(s, SOL_SOCKET, SO_REUSEADDR, &one, sizeof one);
        }
        sockaddr_in a{};
        a.sin_family = AF_INET;
        a.sin_port = htons(static_cast<std::uint16_t>(port));
        a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
        const bool ok = ::bind(s, reinterpret_cast<const sockaddr*>(&a), sizeof a) == 0;
        ::close(s);
        return ok;
    }
    static bool allFree(int base, int count) {
        for (int p = base; p < base + count; ++p)
            if (!binds(SOCK_DGRAM, p) || !binds(SOCK_STREAM, p)) return false;
        return true;
    }

    int m_fd = -1;
    int m_base = 0;
};

}  // namespace sg::testdata
