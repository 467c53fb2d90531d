// Serial, UDP, TCP and file sources; see sources.hpp.
#include "io/sources.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <termios.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

#include <boost/asio/connect.hpp>
#include <boost/asio/post.hpp>
#include <fmt/format.h>

namespace sg::io {

using boost::system::error_code;

// ---------------------------------------------------------------- serial

SerialSource::SerialSource(asio::io_context& io, const config::InputConfig& cfg,
                           SourceCallbacks cb)
    : Source(io, cfg.name, std::move(cb)), m_settings(cfg.serial), m_port(io) {}

void SerialSource::reopen() {
    if (m_stopped) return;
    error_code ec;
    m_port.close(ec);
    m_port.open(m_settings.device, ec);
    if (ec) return markLost(fmt::format("open {}: {}", m_settings.device, ec.message()));
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

UdpSource::UdpSource(asio::io_context& io, const config::InputConfig& cfg, SourceCallbacks cb)
    : Source(io, cfg.name, std::move(cb)),
      m_host(cfg.listen_host),
      m_port_number(cfg.listen_port),
      m_socket(io) {}

void UdpSource::reopen() {
    if (m_stopped) return;
    error_code ec;
    m_socket.close(ec);
    const auto addr = asio::ip::make_address(m_host, ec);
    if (ec) return markLost(fmt::format("listen address '{}': {}", m_host, ec.message()));
    const asio::ip::udp::endpoint ep(addr, m_port_number);
    m_socket.open(ep.protocol(), ec);
    if (!ec) m_socket.set_option(asio::socket_base::reuse_address(true), ec);
    // A large receive buffer rides out a busy moment without the kernel dropping datagrams.
    if (!ec) m_socket.set_option(asio::socket_base::receive_buffer_size(4 << 20), ec);
    if (!ec) m_socket.bind(ep, ec);
    if (ec) {
        error_code ignore;
        m_socket.close(ignore);
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

void UdpSource::read() {
    m_socket.async_receive_from(asio::buffer(m_buf), m_from,
                                [this](const error_code& ec, std::size_t n) {
        if (m_stopped || ec == asio::error::operation_aborted) return;
        if (ec) {
            error_code ignore;
            m_socket.close(ignore);
            return markLost(fmt::format("receive: {}", ec.message()));
        }
        onBytes(std::string_view(m_buf.data(), n));
        flushPartial();
        read();
    });
}

void UdpSource::stop() {
    m_stopped = true;
    cancelRetry();
    error_code ec;
    m_socket.close(ec);
}

// ---------------------------------------------------------------- TCP

TcpSource::TcpSource(asio::io_context& io, const config::InputConfig& cfg, SourceCallbacks cb)
    : Source(io, cfg.name, std::move(cb), cfg.reconnect_min_s, cfg.reconnect_max_s),
      m_host(cfg.connect_host),
      m_port_number(cfg.connect_port),
      m_resolver(io),
      m_socket(io) {}

void TcpSource::reopen() {
    if (m_stopped) return;
    error_code ec;
    m_socket.close(ec);
    m_resolver.async_resolve(
        m_host, std::to_string(m_port_number),
        [this](const error_code& rec, const asio::ip::tcp::resolver::results_type& results) {
            if (m_stopped || rec == asio::error::operation_aborted) return;
            if (rec) return markLost(fmt::format("resolve {}: {}", m_host, rec.message()));
            asio::async_connect(m_socket, results,
                                [this](const error_code& cec, const asio::ip::tcp::endpoint&) {
                if (m_stopped || cec == asio::error::operation_aborted) return;
                if (cec) {
                    error_code ignore;
                    m_socket.close(ignore);
                    return markLost(fmt::format("connect {}:{}: {}", m_host, m_port_number,
                                                cec.message()));
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
