// Live acquisition: the configured sources on one io_context, their lines through the core's
// Pipeline (decode, then navigation, detection, coverage and checks), the rows posted to the
// LogWriter every 100 ms (the writer commits them at its own interval). A Recorder made from
// inputs and field maps alone only decodes (used by the reader tests).
#pragma once

#include <memory>
#include <string>
#include <vector>

#include "engine/line_decoder.hpp"
#include "engine/pipeline.hpp"
#include "io/log_writer.hpp"
#include "io/source.hpp"

namespace sg::io {

class Recorder {
public:
    Recorder(asio::io_context& io, std::vector<config::InputConfig> inputs,
             std::vector<decode::FieldMap> maps, LogWriter& writer);
    // The full core: lines go through an engine::Pipeline built from the survey config.
    Recorder(asio::io_context& io, const engine::SurveyConfig& config, LogWriter& writer);
    ~Recorder();

    void start();
    // Stops every source, hands the last rows to the writer (call writer.stop() after).
    void stop();
    // True when every source is finite (file, follow = false) and has reached its end.
    bool allFinished() const;

    const engine::LineDecoder& dispatcher() const { return *m_decoder; }
    // Null for a decode-only Recorder.
    engine::Pipeline* pipeline() { return m_pipeline.get(); }
    // Called after every flush on the io_context thread (e.g. to publish a snapshot).
    void onFlush(std::function<void()> fn) { m_on_flush = std::move(fn); }
    const std::vector<std::unique_ptr<Source>>& sources() const { return m_sources; }
    Source* source(std::string_view name) const;
    // Posts the pending rows to the writer now.
    void flush();

private:
    void schedule();
    asio::io_context& m_io;
    LogWriter& m_writer;
    void makeSources(const std::vector<config::InputConfig>& inputs);

    std::unique_ptr<engine::LineDecoder> m_own_decoder;
    std::unique_ptr<engine::Pipeline> m_pipeline;
    engine::LineDecoder* m_decoder = nullptr;
    std::function<void()> m_on_flush;
    std::vector<std::unique_ptr<Source>> m_sources;
    asio::steady_timer m_flush_timer;
    bool m_running = false;
};

}  // namespace sg::io
