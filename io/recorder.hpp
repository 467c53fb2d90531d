// Live acquisition: the configured sources on one io_context, their lines through the Dispatcher,
// the rows posted to the LogWriter every 100 ms (the writer commits them at its own interval).
// Used by `swathguard record` and by the tests; the engine will later take the Dispatcher's place.
#pragma once

#include <memory>
#include <string>
#include <vector>

#include "io/dispatcher.hpp"
#include "io/log_writer.hpp"
#include "io/source.hpp"

namespace sg::io {

class Recorder {
public:
    Recorder(asio::io_context& io, std::vector<config::InputConfig> inputs,
             std::vector<decode::FieldMap> maps, LogWriter& writer);
    ~Recorder();

    void start();
    // Stops every source, hands the last rows to the writer (call writer.stop() after).
    void stop();
    // True when every source is finite (file, follow = false) and has reached its end.
    bool allFinished() const;

    const Dispatcher& dispatcher() const { return m_dispatcher; }
    const std::vector<std::unique_ptr<Source>>& sources() const { return m_sources; }
    Source* source(std::string_view name) const;
    // Posts the pending rows to the writer now.
    void flush();

private:
    void schedule();
    asio::io_context& m_io;
    LogWriter& m_writer;
    Dispatcher m_dispatcher;
    std::vector<std::unique_ptr<Source>> m_sources;
    asio::steady_timer m_flush_timer;
    bool m_running = false;
};

}  // namespace sg::io
