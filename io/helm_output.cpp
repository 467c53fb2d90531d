// The helm's NMEA 0183 output; see helm_output.hpp.
#include "io/helm_output.hpp"

#include <cerrno>
#include <chrono>
#include <cstring>
#include <cmath>
#include <stdexcept>

#include <fcntl.h>
#include <termios.h>
#include <unistd.h>

#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/udp.hpp>
#include <boost/asio/serial_port.hpp>
#include <fmt/format.h>
#include <spdlog/spdlog.h>

#include "engine/helm_steering.hpp"
#include "engine/survey_engine.hpp"
#include "io/sources.hpp"
#include "log/log_store.hpp"

namespace sg::io {

namespace asio = boost::asio;

namespace {

// One datagram per sentence (the usual NMEA-over-UDP convention: a receiver frames by datagram
// or by CR LF, both work).
class UdpLineSink final : public LineSink {
public:
    explicit UdpLineSink(const helm::OutputConfig& cfg) : m_socket(m_io) {
        boost::system::error_code ec;
        asio::ip::udp::resolver resolver(m_io);
        const auto found = resolver.resolve(asio::ip::udp::v4(), cfg.host, std::to_string(cfg.port), ec);
        if (ec || found.empty())
            throw std::runtime_error(fmt::format("output '{}': host '{}' port {}: cannot resolve ({})", cfg.name,
                                                 cfg.host, cfg.port, ec ? ec.message() : "no address"));
        m_dest = *found.begin();
        m_socket.open(asio::ip::udp::v4(), ec);
        if (!ec) m_socket.non_blocking(true, ec);
        if (ec) throw std::runtime_error(fmt::format("output '{}': cannot open a UDP socket ({})", cfg.name, ec.message()));
    }
    bool send(std::string_view bytes, std::string& error) override {
        boost::system::error_code ec;
        const auto n = m_socket.send_to(asio::buffer(bytes.data(), bytes.size()), m_dest, 0, ec);
        if (ec) {
            error = ec.message();
            return false;
        }
        if (n != bytes.size()) {
            error = fmt::format("datagram cut: {} of {} bytes", n, bytes.size());
            return false;
        }
        return true;
    }

private:
    asio::io_context m_io;
    asio::ip::udp::socket m_socket;
    asio::ip::udp::endpoint m_dest;
};

// A serial port written without blocking: a port that does not take the bytes (flow stopped,
// adapter gone) gives a failed send, not a stalled survey; after an error the port is reopened
// at the next send.
class SerialLineSink final : public LineSink {
public:
    explicit SerialLineSink(const helm::OutputConfig& cfg) : m_cfg(cfg), m_port(m_io) {
        if (auto err = open(); !err.empty())
            throw std::runtime_error(fmt::format("output '{}': device '{}' at {} baud: {}", cfg.name, cfg.device,
                                                 cfg.baud, err));
    }
    bool send(std::string_view bytes, std::string& error) override {
        if (!m_port.is_open()) {
            if (auto err = open(); !err.empty()) {
                error = "reopening: " + err;
                return false;
            }
        }
        // A plain non-blocking write(2): Asio's synchronous write would wait for the port.
        const ssize_t n = ::write(m_port.native_handle(), bytes.data(), bytes.size());
        if (n < 0) {
            const int e = errno;
            error = std::strerror(e);
            boost::system::error_code ignore;
            if (e != EAGAIN && e != EWOULDBLOCK && e != EINTR) m_port.close(ignore);
            return false;
        }
        if (static_cast<std::size_t>(n) != bytes.size()) {
            error = fmt::format("partial write: {} of {} bytes (port busy)", n, bytes.size());
            return false;
        }
        return true;
    }

private:
    std::string open() {
        boost::system::error_code ec;
        m_port.open(m_cfg.device, ec);
        using sp = asio::serial_port_base;
        if (!ec) m_port.set_option(sp::baud_rate(static_cast<unsigned>(m_cfg.baud)), ec);
        if (!ec) m_port.set_option(sp::character_size(8), ec);
        if (!ec) m_port.set_option(sp::parity(sp::parity::none), ec);
        if (!ec) m_port.set_option(sp::stop_bits(sp::stop_bits::one), ec);
        if (!ec) m_port.set_option(sp::flow_control(sp::flow_control::none), ec);
        std::string why;
        if (!ec) {
            const int fd = m_port.native_handle();
            // Ours alone (like a serial input): a second program writing to the bridge's port
            // would interleave its bytes with our sentences.
            bool busy = false;
            why = takeSerialExclusive(fd, &busy);
            if (busy) why = "held by another process (locked); is another program writing to it?";
            // Raw output: no output processing (OPOST off), so CR LF goes out as sent, never
            // CR CR LF (termios(3): ONLCR maps NL to CR NL when OPOST is set). Asio's open already
            // makes the port raw (cfmakeraw in reactive_serial_port_service.ipp); set here so the sink
            // does not rest on that.
            termios tio{};
            if (why.empty() && ::tcgetattr(fd, &tio) == 0) {
                tio.c_oflag &= ~static_cast<tcflag_t>(OPOST);
                if (::tcsetattr(fd, TCSANOW, &tio) != 0) why = std::string("tcsetattr: ") + std::strerror(errno);
            }
            const int flags = ::fcntl(fd, F_GETFL, 0);
            if (why.empty() && (flags < 0 || ::fcntl(fd, F_SETFL, flags | O_NONBLOCK) < 0))
                ec = boost::system::error_code(errno, boost::system::system_category());
        }
        if (ec || !why.empty()) {
            boost::system::error_code ignore;
            m_port.close(ignore);
            return ec ? ec.message() : why;
        }
        return {};
    }
    helm::OutputConfig m_cfg;
    asio::io_context m_io;
    asio::serial_port m_port;
};

constexpr const char* kHelmSentDdl =
    "CREATE TABLE IF NOT EXISTS helm_sent("
    "id INTEGER PRIMARY KEY, output TEXT NOT NULL, survey_utc_ns INTEGER NOT NULL, "
    "sent_utc_ns INTEGER NOT NULL, sentence TEXT NOT NULL, ok INTEGER NOT NULL, error TEXT)";

}  // namespace

std::unique_ptr<LineSink> openLineSink(const helm::OutputConfig& cfg) {
    if (cfg.transport == "udp") return std::make_unique<UdpLineSink>(cfg);
    return std::make_unique<SerialLineSink>(cfg);
}

struct HelmOutputs::Rows final : log::RowSet {
    struct Row {
        std::string output;
        TimeNs survey_ns = 0, sent_ns = 0;
        std::string sentence;
        bool ok = true;
        std::string error;
    };
    std::vector<Row> rows;
    void write(log::LogStore& store) override {
        store.addExtension("helm_sent", kHelmSentDdl);
        auto& s = store.statement(
            "INSERT INTO helm_sent(output, survey_utc_ns, sent_utc_ns, sentence, ok, error) "
            "VALUES (?1, ?2, ?3, ?4, ?5, ?6)");
        for (const auto& r : rows) {
            s.bind(1, std::string_view(r.output));
            s.bind(2, static_cast<std::int64_t>(r.survey_ns));
            s.bind(3, static_cast<std::int64_t>(r.sent_ns));
            s.bind(4, std::string_view(r.sentence));
            s.bind(5, static_cast<std::int64_t>(r.ok ? 1 : 0));
            if (r.ok) s.bindNull(6);
            else s.bind(6, std::string_view(r.error));
            s.run();
        }
    }
};

HelmOutputs::HelmOutputs(const std::vector<helm::OutputConfig>& outputs) : m_outputs(outputs) {
    for (const auto& o : m_outputs) m_sinks.push_back(openLineSink(o));
    m_counts.resize(m_outputs.size());
    m_next_due_ns.assign(m_outputs.size(), 0);
    m_outage_event.assign(m_outputs.size(), 0);
    m_outage_start_ns.assign(m_outputs.size(), 0);
}

HelmOutputs::HelmOutputs(const std::vector<helm::OutputConfig>& outputs, std::vector<std::unique_ptr<LineSink>> sinks)
    : m_outputs(outputs), m_sinks(std::move(sinks)) {
    if (m_sinks.size() != m_outputs.size()) throw std::invalid_argument("HelmOutputs: one sink per output");
    m_counts.resize(m_outputs.size());
    m_next_due_ns.assign(m_outputs.size(), 0);
    m_outage_event.assign(m_outputs.size(), 0);
    m_outage_start_ns.assign(m_outputs.size(), 0);
}

HelmOutputs::~HelmOutputs() = default;

void HelmOutputs::send(std::size_t k, const std::string& sentence, TimeNs survey_ns, TimeNs recv_utc_ns) {
    std::string error;
    const std::string bytes = sentence + "\r\n";
    const bool ok = m_sinks[k]->send(bytes, error);
    auto& c = m_counts[k];
    const auto& name = m_outputs[k].name;
    if (ok) {
        ++c.sent;
        if (c.in_outage) {
            // The outage ends at the first good send (for a serial port: after the reopen).
            c.in_outage = false;
            const double secs = static_cast<double>(recv_utc_ns - m_outage_start_ns[k]) * 1e-9;
            spdlog::info("output '{}': sending again after {:.1f} s", name, secs);
            if (m_outage_event[k] != 0) m_event_ends.push_back({m_outage_event[k], recv_utc_ns, secs});
            m_outage_event[k] = 0;
        }
    } else {
        ++c.failed;
        c.last_error = error;
        if (!c.in_outage) {
            // Reported once per outage; every failed sentence is still a helm_sent row.
            c.in_outage = true;
            ++c.outages;
            m_outage_start_ns[k] = recv_utc_ns;
            spdlog::warn("output '{}': sending failed: {} (retried every sentence; the port is reopened)", name,
                         error);
            if (m_next_event_id) {
                log::EventRow e;
                e.id = m_next_event_id();
                e.kind = "output_outage";
                e.source = name;
                e.start_utc_ns = recv_utc_ns;
                e.detail = error;
                m_outage_event[k] = e.id;
                m_events.push_back(std::move(e));
            }
        }
    }
    if (!m_rows) m_rows = std::make_unique<Rows>();
    m_rows->rows.push_back({m_outputs[k].name, survey_ns, recv_utc_ns, sentence, ok, error});
}

void HelmOutputs::update(const engine::SurveyEngine& engine, TimeNs recv_utc_ns) {
    const TimeNs s = engine.surveyClock_ns();
    if (s <= 0) return;  // no survey time yet
    for (std::size_t k = 0; k < m_outputs.size(); ++k) {
        const auto& o = m_outputs[k];
        const auto period = static_cast<TimeNs>(std::llround(1e9 / o.rate_hz));
        if (m_next_due_ns[k] != 0 && s < m_next_due_ns[k]) continue;
        // The next whole multiple of the period after s: the same instants live and in replay.
        m_next_due_ns[k] = (s / period + 1) * period;
        const auto fix = engine::steeringFix(engine, o);
        if (!fix.valid && !o.void_when_no_line) continue;
        for (const auto& type : o.sentences) send(k, helm::buildSteering(type, fix, o.sentence), s, recv_utc_ns);
    }
}

std::uint64_t HelmOutputs::sendNow(const std::vector<std::string>& sentences, TimeNs survey_ns, TimeNs recv_utc_ns) {
    std::uint64_t failed = 0;
    for (std::size_t k = 0; k < m_outputs.size(); ++k) {
        const auto before = m_counts[k].failed;
        for (const auto& s : sentences) send(k, s, survey_ns, recv_utc_ns);
        failed += m_counts[k].failed - before;
    }
    return failed;
}

std::string HelmOutputs::summaryText(std::string_view cmd) const {
    std::string out;
    for (std::size_t k = 0; k < m_outputs.size(); ++k) {
        const auto& o = m_outputs[k];
        const auto& c = m_counts[k];
        const std::string where = o.transport == "udp" ? fmt::format("udp {}:{}", o.host, o.port)
                                                       : fmt::format("serial {} {} baud", o.device, o.baud);
        out += fmt::format("{}: output '{}' ({}): {} sentences sent, {} failed{}{}\n", cmd, o.name, where, c.sent,
                           c.failed, c.outages > 0 ? fmt::format(" in {} outage(s)", c.outages) : "",
                           c.failed > 0 ? fmt::format(" (last error: {})", c.last_error) : "");
    }
    return out;
}

void HelmOutputs::takeRows(log::Batch& batch) {
    if (m_rows && !m_rows->rows.empty()) batch.extra.push_back(std::move(m_rows));
    m_rows.reset();
    for (auto& e : m_events) batch.events.push_back(std::move(e));
    for (auto& e : m_event_ends) batch.event_ends.push_back(e);
    m_events.clear();
    m_event_ends.clear();
}

}  // namespace sg::io
