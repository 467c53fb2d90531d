// Serial, UDP, TCP and file sources; see sources.hpp.
#include "io/sources.hpp"

#include <fcntl.h>
#include <linux/sock_diag.h>
#include <sys/file.h>
#include <sys/ioctl.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <termios.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <optional>

#include <boost/asio/connect.hpp>
#include <boost/asio/post.hpp>
#include <fmt/format.h>

namespace sg::io {

using boost::system::error_code;

// ---------------------------------------------------------------- serial

namespace {

std::string deviceBusyMessage(const std::string& input, const std::string& device,
                              const char* how) {
    return fmt::format("input '{}': serial device {} is held by another process ({}); is another "
                       "recorder or a terminal program using it? Stop it, or choose another device",
                       input, device, how);
}

}  // namespace

std::string takeSerialExclusive(int fd, bool* busy) {
    *busy = false;
    if (::flock(fd, LOCK_EX | LOCK_NB) != 0) {
        *busy = errno == EWOULDBLOCK;
        return *busy ? std::string("locked") : std::string("flock: ") + std::strerror(errno);
    }
    if (::ioctl(fd, TIOCEXCL) != 0) return std::string("TIOCEXCL: ") + std::strerror(errno);
    return {};
}

void checkSerialDevicesFree(const std::vector<config::InputConfig>& inputs) {
    for (const auto& in : inputs) {
        if (in.transport != config::Transport::Serial || in.serial.device.empty()) continue;
        const int fd = ::open(in.serial.device.c_str(), O_RDWR | O_NOCTTY | O_NONBLOCK | O_CLOEXEC);
        if (fd < 0) {
            if (errno == EBUSY)
                throw SerialSource::DeviceBusy(
                    deviceBusyMessage(in.name, in.serial.device, "opened exclusively"));
            continue;  // missing or not permitted: the source reports it and retries
        }
        const bool held = ::flock(fd, LOCK_EX | LOCK_NB) != 0 && errno == EWOULDBLOCK;
        ::close(fd);  // releases the probe's lock; TIOCEXCL was not set on it
        if (held)
            throw SerialSource::DeviceBusy(deviceBusyMessage(in.name, in.serial.device, "locked"));
    }
}

SerialSource::SerialSource(asio::io_context& io, const config::InputConfig& cfg,
                           SourceCallbacks cb)
    : Source(io, cfg.name, std::move(cb)), m_settings(cfg.serial), m_port(io) {}

void SerialSource::reopen() {
    if (m_stopped) return;
    error_code ec;
    m_port.close(ec);
    m_port.open(m_settings.device, ec);
    if (ec == boost::system::errc::device_or_resource_busy && m_starting) {
        m_stopped = true;
        throw DeviceBusy(deviceBusyMessage(name(), m_settings.device, "opened exclusively"));
    }
    if (ec) return markLost(fmt::format("open {}: {}", m_settings.device, ec.message()));
    {
        bool busy = false;
        const std::string why = takeSerialExclusive(m_port.native_handle(), &busy);
        if (!why.empty()) {
            error_code ignore;
            m_port.close(ignore);
            if (busy && m_starting) {
                m_stopped = true;
                throw DeviceBusy(deviceBusyMessage(name(), m_settings.device, "locked"));
            }
            return markLost(busy ? deviceBusyMessage(name(), m_settings.device, "locked")
                                 : fmt::format("open {}: {}", m_settings.device, why));
        }
    }
    using sp = asio::serial_port_base;
    const auto parity = m_settings.parity == config::Parity::None ? sp::parity::none
                        : m_settings.parity == config::Parity::Even ? sp::parity::even
                                                                     : sp::parity::odd;
    m_port.set_option(sp::baud_rate(m_settings.baud), ec);
    if (!ec) m_port.set_option(sp::parity(parity), ec);
    if (!ec) m_port.set_option(sp::character_size(m_settings.data_bits), ec);
    if (!ec)
        m_port.set_option(
            sp::stop_bits(m_settings.stop_bits == 2 ? sp::stop_bits::two : sp::stop_bits::one), ec);
    if (!ec) m_port.set_option(sp::flow_control(sp::flow_control::none), ec);
    if (ec) {
        m_port.close(ec);
        return markLost(fmt::format("configure {}: {}", m_settings.device, ec.message()));
    }
    // Bytes queued before we opened carry no honest receive time (BUILD-NOTES pitfall 7).
    ::tcflush(m_port.native_handle(), TCIFLUSH);
    markConnected();
    read();
}

void SerialSource::read() {
    m_port.async_read_some(asio::buffer(m_buf), [this](const error_code& ec, std::size_t n) {
        if (m_stopped || ec == asio::error::operation_aborted) return;
        if (n > 0) onBytes(std::string_view(m_buf.data(), n));
        if (ec) {
            error_code ignore;
            m_port.close(ignore);
            return markLost(fmt::format("read {}: {}", m_settings.device, ec.message()));
        }
        read();
    });
}

void SerialSource::stop() {
    m_stopped = true;
    cancelRetry();
    error_code ec;
    m_port.close(ec);
    flushPartial();
}

// ---------------------------------------------------------------- UDP

namespace {

// The socket's drop counter now (Linux SO_MEMINFO, sock_diag.h SK_MEMINFO_DROPS), if known.
std::optional<std::uint32_t> socketDrops(int fd) {
    std::uint32_t info[SK_MEMINFO_VARS] = {};
    socklen_t len = sizeof info;
    if (::getsockopt(fd, SOL_SOCKET, SO_MEMINFO, info, &len) != 0 ||
        len < sizeof(std::uint32_t) * (SK_MEMINFO_DROPS + 1))
        return std::nullopt;
    return info[SK_MEMINFO_DROPS];
}

std::string portInUseMessage(const config::InputConfig& cfg) {
    return fmt::format("input '{}': listen {}:{}: port in use by another process (is another "
                       "recorder running?); stop it or choose another port",
                       cfg.name, cfg.listen_host, cfg.listen_port);
}

}  // namespace

void checkUdpPortsFree(const std::vector<config::InputConfig>& inputs) {
    for (const auto& in : inputs) {
        if (in.transport != config::Transport::Udp || in.listen_port == 0) continue;
        asio::io_context io;
        asio::ip::udp::socket probe(io);
        error_code ec;
        const auto addr = asio::ip::make_address(in.listen_host, ec);
        if (ec) continue;  // reported by the source itself
        const asio::ip::udp::endpoint ep(addr, in.listen_port);
        probe.open(ep.protocol(), ec);
        if (!ec) probe.bind(ep, ec);
        if (ec == asio::error::address_in_use) throw UdpSource::PortInUse(portInUseMessage(in));
    }
}

UdpSource::UdpSource(asio::io_context& io, const config::InputConfig& cfg, SourceCallbacks cb)
    : Source(io, cfg.name, std::move(cb)),
      m_host(cfg.listen_host),
      m_port_number(cfg.listen_port),
      m_rcvbuf_bytes(static_cast<int>(std::min<std::int64_t>(cfg.receive_buffer_bytes, 1 << 30))),
      m_socket(io),
      m_drop_timer(io) {}

void UdpSource::start() {
    m_starting = true;
    reopen();
    m_starting = false;
}

void UdpSource::reopen() {
    if (m_stopped) return;
    error_code ec;
    m_socket.close(ec);
    m_drop_counter = 0;  // a new socket counts from zero
    const auto addr = asio::ip::make_address(m_host, ec);
    if (ec) return markLost(fmt::format("listen address '{}': {}", m_host, ec.message()));
    const asio::ip::udp::endpoint ep(addr, m_port_number);
    m_socket.open(ep.protocol(), ec);
    // No SO_REUSEADDR: on Linux it lets two UDP sockets share a port, and the second one would
    // silently take the stream from the first.
    // A large receive buffer rides out a busy moment without the kernel dropping datagrams.
    if (!ec) m_socket.set_option(asio::socket_base::receive_buffer_size(m_rcvbuf_bytes), ec);
    if (!ec) {
        // The socket's drop counter on every datagram (socket(7), SO_RXQ_OVFL).
        const int one = 1;
        if (::setsockopt(m_socket.native_handle(), SOL_SOCKET, SO_RXQ_OVFL, &one, sizeof one) != 0)
            ec = error_code(errno, boost::system::system_category());
    }
    if (!ec) m_socket.bind(ep, ec);
    if (ec) {
        error_code ignore;
        m_socket.close(ignore);
        if (ec == asio::error::address_in_use && m_starting) {
            m_stopped = true;
            throw PortInUse(fmt::format("input '{}': listen {}:{}: port in use by another process "
                                        "(is another recorder running?); stop it or choose "
                                        "another port",
                                        name(), m_host, m_port_number));
        }
        return markLost(fmt::format("listen {}:{}: {}", m_host, m_port_number, ec.message()));
    }
    markConnected();
    read();
}

std::uint16_t UdpSource::localPort() const {
    error_code ec;
    auto ep = m_socket.local_endpoint(ec);
    return ec ? 0 : ep.port();
}

void UdpSource::noteDropCounter(std::uint32_t total) {
    // Modulo 2^32; a datagram queued before a later SO_MEMINFO reading carries an older value.
    const std::uint32_t fresh = total - m_drop_counter;
    if (fresh == 0 || fresh > 0x7fffffffu) return;
    m_drop_counter = total;
    m_unreported += fresh;
    // At most one report a second (a burst would otherwise write an event per datagram).
    const auto now = std::chrono::steady_clock::now();
    if (now - m_last_report >= std::chrono::seconds(1)) return reportPendingDrops();
    if (m_timer_armed) return;
    m_timer_armed = true;
    m_drop_timer.expires_at(m_last_report + std::chrono::seconds(1));
    m_drop_timer.async_wait([this](const error_code& ec) {
        m_timer_armed = false;
        if (ec || m_stopped) return;
        if (auto d = socketDrops(m_socket.native_handle())) noteDropCounter(*d);
        reportPendingDrops();
    });
}

void UdpSource::reportPendingDrops() {
    if (m_unreported == 0) return;
    const std::uint64_t n = m_unreported;
    m_unreported = 0;
    m_last_report = std::chrono::steady_clock::now();
    reportDrops(n, fmt::format("{} datagrams dropped by the kernel (receive buffer full); {} in "
                               "total",
                               n, dropped() + n));
}

void UdpSource::read() {
    m_socket.async_wait(asio::ip::udp::socket::wait_read, [this](const error_code& ec) {
        if (m_stopped || ec == asio::error::operation_aborted) return;
        if (ec) {
            error_code ignore;
            m_socket.close(ignore);
            return markLost(fmt::format("receive: {}", ec.message()));
        }
        const int fd = m_socket.native_handle();
        // Drain what is queued (bounded, so the other sources get their turn).
        for (int i = 0; i < 256; ++i) {
            iovec iov{m_buf.data(), m_buf.size()};
            alignas(cmsghdr) char control[CMSG_SPACE(sizeof(std::uint32_t))];
            msghdr msg{};
            msg.msg_iov = &iov;
            msg.msg_iovlen = 1;
            msg.msg_control = control;
            msg.msg_controllen = sizeof control;
            const ssize_t n = ::recvmsg(fd, &msg, MSG_DONTWAIT);
            if (n < 0) {
                if (errno == EINTR) continue;
                if (errno == EAGAIN || errno == EWOULDBLOCK) break;
                const std::string what = std::strerror(errno);
                error_code ignore;
                m_socket.close(ignore);
                return markLost(fmt::format("receive: {}", what));
            }
            for (cmsghdr* c = CMSG_FIRSTHDR(&msg); c != nullptr; c = CMSG_NXTHDR(&msg, c)) {
                if (c->cmsg_level == SOL_SOCKET && c->cmsg_type == SO_RXQ_OVFL) {
                    std::uint32_t total = 0;
                    std::memcpy(&total, CMSG_DATA(c), sizeof total);
                    noteDropCounter(total);
                }
            }
            onBytes(std::string_view(m_buf.data(), static_cast<std::size_t>(n)));
            flushPartial();
        }
        read();
    });
}

void UdpSource::stop() {
    if (!m_stopped && m_socket.is_open())
        if (auto d = socketDrops(m_socket.native_handle())) noteDropCounter(*d);
    reportPendingDrops();
    m_stopped = true;
    cancelRetry();
    m_drop_timer.cancel();
    error_code ec;
    m_socket.close(ec);
}

// ---------------------------------------------------------------- TCP

TcpSource::TcpSource(asio::io_context& io, const config::InputConfig& cfg, SourceCallbacks cb)
    : Source(io, cfg.name, std::move(cb), cfg.reconnect_min_s, cfg.reconnect_max_s),
      m_host(cfg.connect_host),
      m_port_number(cfg.connect_port),
      m_resolver(io),
      m_socket(io),
      m_connect_timer(io) {}

void TcpSource::reopen() {
    if (m_stopped) return;
    error_code ec;
    m_socket.close(ec);
    m_resolver.async_resolve(
        m_host, std::to_string(m_port_number),
        [this](const error_code& rec, const asio::ip::tcp::resolver::results_type& results) {
            if (m_stopped || rec == asio::error::operation_aborted) return;
            if (rec) return markLost(fmt::format("resolve {}: {}", m_host, rec.message()));
            // A host that does not answer at all would hold a connect for minutes (SYN
            // retries): give up after kConnectTimeout and try again, so a source that returns
            // is found within about a second.
            m_connect_timed_out = false;
            m_connect_timer.expires_after(kConnectTimeout);
            m_connect_timer.async_wait([this](const error_code& tec) {
                if (tec || m_stopped) return;
                m_connect_timed_out = true;
                error_code ignore;
                m_socket.close(ignore);
            });
            asio::async_connect(m_socket, results,
                                [this](const error_code& cec, const asio::ip::tcp::endpoint&) {
                m_connect_timer.cancel();
                if (m_stopped) return;
                if (cec == asio::error::operation_aborted && !m_connect_timed_out) return;
                if (cec) {
                    error_code ignore;
                    m_socket.close(ignore);
                    return markLost(fmt::format("connect {}:{}: {}", m_host, m_port_number,
                                                m_connect_timed_out ? std::string("timed out")
                                                                    : cec.message()));
                }
                // A retried connect to a local port in the ephemeral range can be given that
                // very port and connect to itself (TCP simultaneous open): not the source.
                error_code lec, rec2;
                if (m_socket.local_endpoint(lec) == m_socket.remote_endpoint(rec2) && !lec && !rec2) {
                    error_code ignore;
                    m_socket.close(ignore);
                    return markLost(fmt::format("connect {}:{}: connected to itself", m_host,
                                                m_port_number));
                }
                markConnected();
                read();
            });
        });
}

void TcpSource::read() {
    m_socket.async_read_some(asio::buffer(m_buf), [this](const error_code& ec, std::size_t n) {
        if (m_stopped || ec == asio::error::operation_aborted) return;
        if (n > 0) onBytes(std::string_view(m_buf.data(), n));
        if (ec) {
            error_code ignore;
            m_socket.close(ignore);
            return markLost(ec == asio::error::eof ? std::string("peer closed the connection")
                                                   : fmt::format("read: {}", ec.message()));
        }
        read();
    });
}

void TcpSource::stop() {
    m_stopped = true;
    cancelRetry();
    m_connect_timer.cancel();
    m_resolver.cancel();
    error_code ec;
    m_socket.close(ec);
    flushPartial();
}

// ---------------------------------------------------------------- file

namespace {
constexpr auto kFilePoll = std::chrono::milliseconds(50);
}

FileSource::FileSource(asio::io_context& io, const config::InputConfig& cfg, SourceCallbacks cb)
    : Source(io, cfg.name, std::move(cb)), m_path(cfg.path), m_follow(cfg.follow), m_poll(io) {}

FileSource::~FileSource() { closeFd(); }

void FileSource::closeFd() {
    if (m_fd >= 0) ::close(m_fd);
    m_fd = -1;
}

void FileSource::reopen() {
    if (m_stopped) return;
    closeFd();
    m_fd = ::open(m_path.c_str(), O_RDONLY | O_CLOEXEC);
    if (m_fd < 0) return markLost(fmt::format("open {}: {}", m_path, std::strerror(errno)));
    struct stat st {};
    ::fstat(m_fd, &st);
    m_inode = st.st_ino;
    m_offset = 0;
    markConnected();
    poll();
}

void FileSource::poll() {
    if (m_stopped || m_fd < 0) return;
    // Read at most a few chunks per turn so one big file does not starve the other sources.
    for (int i = 0; i < 16; ++i) {
        const ssize_t n = ::read(m_fd, m_buf.data(), m_buf.size());
        if (n < 0) {
            if (errno == EINTR) continue;
            const std::string msg = fmt::format("read {}: {}", m_path, std::strerror(errno));
            closeFd();
            return markLost(msg);
        }
        if (n == 0) {
            if (!m_follow) {
                closeFd();
                return markFinished();
            }
            // At the end: has the file been removed, replaced or truncated meanwhile?
            struct stat st {};
            if (::stat(m_path.c_str(), &st) != 0) {
                closeFd();
                return markLost(fmt::format("{} removed", m_path));
            }
            if (st.st_ino != m_inode) {
                flushPartial();
                return reopen();
            }
            if (static_cast<std::uint64_t>(st.st_size) < m_offset) {
                flushPartial();
                ::lseek(m_fd, 0, SEEK_SET);
                m_offset = 0;
            }
            m_poll.expires_after(kFilePoll);
            m_poll.async_wait([this](const error_code& ec) {
                if (!ec) poll();
            });
            return;
        }
        m_offset += static_cast<std::uint64_t>(n);
        onBytes(std::string_view(m_buf.data(), static_cast<std::size_t>(n)));
    }
    asio::post(m_io, [this] { poll(); });
}

void FileSource::stop() {
    m_stopped = true;
    cancelRetry();
    m_poll.cancel();
    closeFd();
    flushPartial();
}

// ---------------------------------------------------------------- factory

std::unique_ptr<Source> makeSource(asio::io_context& io, const config::InputConfig& cfg,
                                   SourceCallbacks cb) {
    switch (cfg.transport) {
    case config::Transport::Serial: return std::make_unique<SerialSource>(io, cfg, std::move(cb));
    case config::Transport::Udp: return std::make_unique<UdpSource>(io, cfg, std::move(cb));
    case config::Transport::Tcp: return std::make_unique<TcpSource>(io, cfg, std::move(cb));
    case config::Transport::File: return std::make_unique<FileSource>(io, cfg, std::move(cb));
    }
    return nullptr;
}

}  // namespace sg::io
