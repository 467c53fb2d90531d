// The four transports behind the Source interface: serial port, UDP listener, TCP client and
// file reader (read once, or follow a growing file). See source.hpp for the common behaviour.
#pragma once

#include <array>
#include <chrono>
#include <stdexcept>
#include <string>
#include <vector>

#include <boost/asio/ip/tcp.hpp>
#include <boost/asio/ip/udp.hpp>
#include <boost/asio/serial_port.hpp>

#include "io/source.hpp"

namespace sg::io {

// Serial port: device, baud, parity, data and stop bits, no flow control. Input already waiting
// in the driver when the port opens is discarded (tcflush): its receive times would be wrong.
// The device is opened exclusively: TIOCEXCL (tty_ioctl(4): no further open() of the tty,
// except by root) and flock(LOCK_EX | LOCK_NB) on the descriptor (which holds for root too, among
// programs that take it). A device another process holds is refused: start() throws DeviceBusy
// naming the device; on a reopen after an outage it is a failed reopen, retried.
class SerialSource final : public Source {
public:
    struct DeviceBusy : std::runtime_error {
        using std::runtime_error::runtime_error;
    };
    SerialSource(asio::io_context& io, const config::InputConfig& cfg, SourceCallbacks cb);
    void start() override {
        m_starting = true;
        reopen();
        m_starting = false;
    }
    void stop() override;

private:
    void reopen() override;
    void read();
    config::SerialSettings m_settings;
    asio::serial_port m_port;
    std::array<char, 4096> m_buf{};
    bool m_stopped = false;
    bool m_starting = false;
};

// UDP listener bound to host:port. Each datagram is framed on its own: a datagram without a
// final terminator still ends its last line (a datagram is a message boundary).
// The port is bound exclusively (no SO_REUSEADDR/SO_REUSEPORT): start() throws PortInUse when
// another socket holds it, so a second recorder cannot silently share or take the stream.
// Datagrams the kernel drops (receive buffer full) are counted from the socket's drop counter
// (SO_RXQ_OVFL on each datagram, SO_MEMINFO for the tail) and reported at most once a second.
class UdpSource final : public Source {
public:
    struct PortInUse : std::runtime_error {
        using std::runtime_error::runtime_error;
    };
    UdpSource(asio::io_context& io, const config::InputConfig& cfg, SourceCallbacks cb);
    void start() override;
    void stop() override;
    // The bound port (useful when the config asks for port 0 in tests).
    std::uint16_t localPort() const;

private:
    void reopen() override;
    void read();
    void noteDropCounter(std::uint32_t total);
    void reportPendingDrops();
    std::string m_host;
    std::uint16_t m_port_number;
    int m_rcvbuf_bytes;
    asio::ip::udp::socket m_socket;
    asio::steady_timer m_drop_timer;
    std::array<char, 65536> m_buf{};
    bool m_stopped = false;
    bool m_starting = false;
    std::uint32_t m_drop_counter = 0;   // the socket's last drop counter (wraps at 2^32)
    std::uint64_t m_unreported = 0;     // drops not yet reported
    std::chrono::steady_clock::time_point m_last_report{};
    bool m_timer_armed = false;
};

// Fails (UdpSource::PortInUse) when a UDP input's listen address is held by another socket;
// run before the log is created so a second recorder leaves nothing behind.
void checkUdpPortsFree(const std::vector<config::InputConfig>& inputs);
// Takes a serial device for descriptor `fd` alone: flock(LOCK_EX | LOCK_NB), then TIOCEXCL.
// Empty when taken, else why not (*busy: another process holds the lock). Used by the serial
// readers and by the helm's serial outputs.
std::string takeSerialExclusive(int fd, bool* busy);

// Fails (SerialSource::DeviceBusy) when a serial input's device is held by another process
// (opened exclusively, or locked with flock); a device that does not exist (yet) passes: the
// source waits for it.
void checkSerialDevicesFree(const std::vector<config::InputConfig>& inputs);

// TCP client: connects to host:port, reconnects with exponential backoff (reconnect_min_s doubling
// to reconnect_max_s, at most 1 s) whenever the connection fails or the peer closes it; a connect
// that gets no answer is abandoned after 1 s and tried again.
class TcpSource final : public Source {
public:
    TcpSource(asio::io_context& io, const config::InputConfig& cfg, SourceCallbacks cb);
    void start() override { reopen(); }
    void stop() override;

private:
    void reopen() override;
    void read();
    std::string m_host;
    std::uint16_t m_port_number;
    static constexpr auto kConnectTimeout = std::chrono::seconds(1);
    asio::ip::tcp::resolver m_resolver;
    asio::ip::tcp::socket m_socket;
    asio::steady_timer m_connect_timer;
    std::array<char, 4096> m_buf{};
    bool m_stopped = false;
    bool m_connect_timed_out = false;
};

// File: read from the start to the end once (then Finished), or with follow = true keep polling
// for new bytes every 50 ms. A followed file that is removed starts an outage and is reopened
// with backoff; a file replaced (new inode) or truncated is read again from its start.
class FileSource final : public Source {
public:
    FileSource(asio::io_context& io, const config::InputConfig& cfg, SourceCallbacks cb);
    ~FileSource() override;
    void start() override { reopen(); }
    void stop() override;

private:
    void reopen() override;
    void poll();
    void closeFd();
    std::string m_path;
    bool m_follow;
    int m_fd = -1;
    std::uint64_t m_inode = 0;
    std::uint64_t m_offset = 0;
    asio::steady_timer m_poll;
    std::array<char, 65536> m_buf{};
    bool m_stopped = false;
};

}  // namespace sg::io
