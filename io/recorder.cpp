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
    : m_io(io), m_writer(writer), m_flush_timer(io) {
    m_own_decoder = std::make_unique<engine::LineDecoder>(
        std::move(inputs), std::move(maps), [&writer] { return writer.nextEventId(); });
    m_decoder = m_own_decoder.get();
    makeSources(m_decoder->inputs());
}

Recorder::Recorder(asio::io_context& io, const engine::SurveyConfig& config, LogWriter& writer)
    : m_io(io), m_writer(writer), m_flush_timer(io) {
    m_pipeline = std::make_unique<engine::Pipeline>(config, [&writer] { return writer.nextEventId(); });
    m_decoder = &m_pipeline->decoder();
    makeSources(m_decoder->inputs());
}

void Recorder::makeSources(const std::vector<config::InputConfig>& inputs) {
    for (const auto& in : inputs) {
        SourceCallbacks cb;
        cb.line = [this](ReceivedLine&& l) {
            if (m_pipeline) m_pipeline->feed(l);
            else m_decoder->onLine(l);
            if (m_decoder->pendingRaw() >= kFlushLines) flush();
        };
        cb.event = [this](const SourceEvent& e) {
            if (m_pipeline) m_pipeline->onSourceEvent(e);
            else m_decoder->onEvent(e);
        };
        m_sources.push_back(makeSource(m_io, in, std::move(cb)));
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

void Recorder::flush() {
    if (m_pipeline) {
        // The receive clock moves on even when every input is silent (silence checks).
        const auto now = std::chrono::system_clock::now().time_since_epoch();
        m_pipeline->tick(std::chrono::duration_cast<std::chrono::nanoseconds>(now).count());
        m_writer.post(m_pipeline->takeBatch());
    } else {
        m_writer.post(m_decoder->takeBatch());
    }
    if (m_on_flush) m_on_flush();
}

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
