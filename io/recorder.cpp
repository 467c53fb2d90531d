// Live acquisition into the log; see recorder.hpp.
#include "io/recorder.hpp"

namespace sg::io {

namespace {
// Rows go to the writer at this pace (and whenever 5000 lines wait): short enough that the
// writer's once-a-second commit never misses a line older than ~1.1 s.
constexpr auto kFlushEvery = std::chrono::milliseconds(100);
constexpr std::size_t kFlushLines = 5000;
}  // namespace

Recorder::Recorder(asio::io_context& io, std::vector<config::InputConfig> inputs,
                   std::vector<decode::FieldMap> maps, LogWriter& writer)
    : m_io(io),
      m_writer(writer),
      m_dispatcher(std::move(inputs), std::move(maps), [&writer] { return writer.nextEventId(); }),
      m_flush_timer(io) {
    for (const auto& in : m_dispatcher.inputs()) {
        SourceCallbacks cb;
        cb.line = [this](ReceivedLine&& l) {
            m_dispatcher.onLine(l);
            if (m_dispatcher.pendingRaw() >= kFlushLines) flush();
        };
        cb.event = [this](const SourceEvent& e) { m_dispatcher.onEvent(e); };
        m_sources.push_back(makeSource(io, in, std::move(cb)));
    }
}

Recorder::~Recorder() { stop(); }

void Recorder::start() {
    m_running = true;
    for (auto& s : m_sources) s->start();
    schedule();
}

void Recorder::schedule() {
    m_flush_timer.expires_after(kFlushEvery);
    m_flush_timer.async_wait([this](const boost::system::error_code& ec) {
        if (ec || !m_running) return;
        flush();
        schedule();
    });
}

void Recorder::flush() { m_writer.post(m_dispatcher.takeBatch()); }

void Recorder::stop() {
    if (!m_running) return;
    m_running = false;
    m_flush_timer.cancel();
    for (auto& s : m_sources) s->stop();
    flush();
}

bool Recorder::allFinished() const {
    for (const auto& s : m_sources)
        if (!s->finished()) return false;
    return !m_sources.empty();
}

Source* Recorder::source(std::string_view name) const {
    for (const auto& s : m_sources)
        if (s->name() == name) return s.get();
    return nullptr;
}

}  // namespace sg::io
