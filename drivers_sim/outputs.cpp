// Output channels of the simulator; see outputs.hpp.
#include "drivers_sim/outputs.hpp"

#include <arpa/inet.h>
#include <cerrno>
#include <cstring>
#include <fcntl.h>
#include <netinet/in.h>
#include <stdexcept>
#include <sys/ioctl.h>
#include <sys/socket.h>
#include <termios.h>
#include <unistd.h>

#include <cstdio>
#include <fstream>
#include <vector>

#include <fmt/format.h>

namespace sg::sim {

void Output::write(const SimLine& line) {
    ChannelCounts& n = m_counts[static_cast<std::size_t>(line.channel)];
    ++n.produced;
    if (line.garbage) ++n.garbage;
    std::string bytes = line.bytes;
    bytes += "\r\n";
    if (send(line.channel, bytes)) {
        ++n.sent;
        n.bytes += bytes.size();
    } else {
        ++n.dropped;
    }
}

namespace {

std::runtime_error sysError(const std::string& what) {
    return std::runtime_error(what + ": " + std::strerror(errno));
}

sockaddr_in loopback(int port) {
    sockaddr_in a{};
    a.sin_family = AF_INET;
    a.sin_port = htons(static_cast<std::uint16_t>(port));
    a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
    return a;
}

class FileOutput final : public Output {
public:
    explicit FileOutput(const std::string& dir) {
        for (int c = 0; c < kChannelCount; ++c) {
            m_paths[static_cast<std::size_t>(c)] = dir + "/" + channelName(static_cast<Channel>(c)) + ".log";
            auto& f = m_files[static_cast<std::size_t>(c)];
            f.open(m_paths[static_cast<std::size_t>(c)], std::ios::binary | std::ios::trunc);
            if (!f) throw std::runtime_error("cannot write " + m_paths[static_cast<std::size_t>(c)]);
        }
    }
    void event(const PortEvent&) override {}  // a file has no port to close
    void close() override {
        for (auto& f : m_files) f.close();
    }
    std::string endpoint(Channel c) const override { return m_paths[static_cast<std::size_t>(c)]; }

protected:
    bool send(Channel c, const std::string& bytes) override {
        auto& f = m_files[static_cast<std::size_t>(c)];
        f.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
        return static_cast<bool>(f);
    }

private:
    std::array<std::ofstream, kChannelCount> m_files;
    std::array<std::string, kChannelCount> m_paths;
};

class UdpOutput final : public Output {
public:
    explicit UdpOutput(int base_port) : m_base(base_port) {
        m_fd = ::socket(AF_INET, SOCK_DGRAM, 0);
        if (m_fd < 0) throw sysError("udp socket");
        m_open.fill(true);
    }
    ~UdpOutput() override { close(); }
    void event(const PortEvent& e) override { m_open[static_cast<std::size_t>(e.channel)] = e.open; }
    void close() override {
        if (m_fd >= 0) ::close(m_fd);
        m_fd = -1;
    }
    std::string endpoint(Channel c) const override {
        return fmt::format("udp://127.0.0.1:{}", m_base + static_cast<int>(c));
    }

protected:
    bool send(Channel c, const std::string& bytes) override {
        if (!m_open[static_cast<std::size_t>(c)] || m_fd < 0) return false;
        const sockaddr_in to = loopback(m_base + static_cast<int>(c));
        const ssize_t n = ::sendto(m_fd, bytes.data(), bytes.size(), 0,
                                   reinterpret_cast<const sockaddr*>(&to), sizeof to);
        // UDP gives no delivery report: "sent" means the kernel took the datagram.
        return n == static_cast<ssize_t>(bytes.size());
    }

private:
    int m_base;
    int m_fd = -1;
    std::array<bool, kChannelCount> m_open{};
};

class TcpOutput final : public Output {
public:
    explicit TcpOutput(int base_port) : m_base(base_port) {
        m_listen.fill(-1);
        for (int c = 0; c < kChannelCount; ++c) listen(static_cast<Channel>(c));
    }
    ~TcpOutput() override { close(); }
    void event(const PortEvent& e) override {
        if (e.open) {
            listen(e.channel);
        } else {
            shut(e.channel);
        }
    }
    void poll() override {
        for (std::size_t c = 0; c < kChannelCount; ++c) {
            if (m_listen[c] < 0) continue;
            for (;;) {
                const int fd = ::accept4(m_listen[c], nullptr, nullptr, SOCK_NONBLOCK);
                if (fd < 0) break;
                m_clients[c].push_back(fd);
            }
        }
    }
    void close() override {
        for (int c = 0; c < kChannelCount; ++c) shut(static_cast<Channel>(c));
    }
    std::string endpoint(Channel c) const override {
        return fmt::format("tcp://127.0.0.1:{}", m_base + static_cast<int>(c));
    }

protected:
    bool send(Channel c, const std::string& bytes) override {
        auto& clients = m_clients[static_cast<std::size_t>(c)];
        bool any = false;
        for (std::size_t i = 0; i < clients.size();) {
            if (writeAll(clients[i], bytes)) {
                any = true;
                ++i;
            } else {
                ::close(clients[i]);  // gone or hopelessly slow: drop that client
                clients.erase(clients.begin() + static_cast<std::ptrdiff_t>(i));
            }
        }
        return any;
    }

private:
    static bool writeAll(int fd, const std::string& bytes) {
        std::size_t done = 0;
        int spins = 0;
        while (done < bytes.size()) {
            const ssize_t n = ::send(fd, bytes.data() + done, bytes.size() - done, MSG_NOSIGNAL);
            if (n > 0) {
                done += static_cast<std::size_t>(n);
            } else if (n < 0 && (errno == EAGAIN || errno == EWOULDBLOCK) && ++spins < 200) {
                ::usleep(1000);  // a slow reader: wait up to 0.2 s, then give it up
            } else {
                return false;
            }
        }
        return true;
    }
    void listen(Channel c) {
        const auto i = static_cast<std::size_t>(c);
        if (m_listen[i] >= 0) return;
        const int fd = ::socket(AF_INET, SOCK_STREAM | SOCK_NONBLOCK, 0);
        if (fd < 0) throw sysError("tcp socket");
        const int one = 1;
        ::setsockopt(fd, SOL_SOCKET, SO_REUSEADDR, &one, sizeof one);
        const sockaddr_in a = loopback(m_base + static_cast<int>(c));
        if (::bind(fd, reinterpret_cast<const sockaddr*>(&a), sizeof a) != 0 || ::listen(fd, 4) != 0) {
            const auto err = sysError(fmt::format("tcp listen on 127.0.0.1:{}", m_base + static_cast<int>(c)));
            ::close(fd);
            throw err;
        }
        m_listen[i] = fd;
    }
    void shut(Channel c) {
        const auto i = static_cast<std::size_t>(c);
        // The listening socket first: a client that sees its connection end and reconnects at
        // once must be refused, not parked in a backlog that is about to vanish.
        if (m_listen[i] >= 0) ::close(m_listen[i]);
        m_listen[i] = -1;
        for (int fd : m_clients[i]) ::close(fd);
        m_clients[i].clear();
    }

    int m_base;
    std::array<int, kChannelCount> m_listen{};
    std::array<std::vector<int>, kChannelCount> m_clients;
};

class PtyOutput final : public Output {
public:
    explicit PtyOutput(std::string dir) : m_dir(std::move(dir)) {
        m_fd.fill(-1);
        m_slave.fill(-1);
        for (int c = 0; c < kChannelCount; ++c) open(static_cast<Channel>(c));
    }
    ~PtyOutput() override { close(); }
    void event(const PortEvent& e) override {
        if (e.open) {
            open(e.channel);
            std::printf("swathguard-sim: %s reopened as %s\n", channelName(e.channel),
                        m_path[static_cast<std::size_t>(e.channel)].c_str());
            std::fflush(stdout);
        } else {
            shut(e.channel);
        }
    }
    void close() override {
        // Closing the master discards what the reader has not read yet (it sees a hangup), so
        // give readers up to a second to take the last lines first. The kernel moves written
        // bytes to the slave asynchronously, so look only after a short pause.
        ::usleep(30000);
        for (int i = 0; i < 100; ++i) {
            bool pending = false;
            for (int fd : m_slave) {
                int queued = 0;  // unread bytes, seen from the slave side
                if (fd >= 0 && ::ioctl(fd, FIONREAD, &queued) == 0 && queued > 0) pending = true;
            }
            if (!pending) break;
            ::usleep(10000);
        }
        for (int c = 0; c < kChannelCount; ++c) shut(static_cast<Channel>(c));
    }
    std::string endpoint(Channel c) const override { return m_path[static_cast<std::size_t>(c)]; }

protected:
    bool send(Channel c, const std::string& bytes) override {
        const int fd = m_fd[static_cast<std::size_t>(c)];
        if (fd < 0) return false;
        const ssize_t n = ::write(fd, bytes.data(), bytes.size());
        return n == static_cast<ssize_t>(bytes.size());  // buffer full (no reader): dropped
    }

private:
    void open(Channel c) {
        const auto i = static_cast<std::size_t>(c);
        if (m_fd[i] >= 0) return;
        const int fd = ::posix_openpt(O_RDWR | O_NOCTTY);
        if (fd < 0 || ::grantpt(fd) != 0 || ::unlockpt(fd) != 0) throw sysError("posix_openpt");
        termios t{};
        if (::tcgetattr(fd, &t) == 0) {
            ::cfmakeraw(&t);  // bytes pass unchanged (no CR/LF translation, no echo)
            ::tcsetattr(fd, TCSANOW, &t);
        }
        ::fcntl(fd, F_SETFL, ::fcntl(fd, F_GETFL) | O_NONBLOCK);
        char name[128] = {};
        if (::ptsname_r(fd, name, sizeof name) != 0) throw sysError("ptsname");
        m_fd[i] = fd;
        m_path[i] = name;
        // Hold the slave side open too: the master's writes then never fail for want of a
        // reader, and close() can see how much the reader has not taken yet.
        m_slave[i] = ::open(name, O_RDWR | O_NOCTTY | O_NONBLOCK);
        if (!m_dir.empty()) {
            const std::string link = m_dir + "/" + channelName(c) + ".pty";
            ::unlink(link.c_str());
            if (::symlink(name, link.c_str()) != 0) throw sysError("symlink " + link);
        }
    }
    void shut(Channel c) {
        const auto i = static_cast<std::size_t>(c);
        if (m_fd[i] >= 0) ::close(m_fd[i]);
        if (m_slave[i] >= 0) ::close(m_slave[i]);
        m_fd[i] = -1;
        m_slave[i] = -1;
    }

    std::string m_dir;
    std::array<int, kChannelCount> m_fd{};
    std::array<int, kChannelCount> m_slave{};
    std::array<std::string, kChannelCount> m_path;
};

}  // namespace

std::unique_ptr<Output> makeOutput(OutputKind kind, const std::string& dir, int base_port) {
    switch (kind) {
    case OutputKind::File: return std::make_unique<FileOutput>(dir);
    case OutputKind::Udp: return std::make_unique<UdpOutput>(base_port);
    case OutputKind::Tcp: return std::make_unique<TcpOutput>(base_port);
    case OutputKind::Pty: return std::make_unique<PtyOutput>(dir);
    }
    throw std::invalid_argument("unknown output kind");
}

}  // namespace sg::sim
