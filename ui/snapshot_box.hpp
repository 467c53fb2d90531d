// Thread-safe hand-over between the acquisition side and the screen thread.
//
// SnapshotBox holds the latest immutable Snapshot: publish() swaps a shared_ptr under a mutex held
// for a pointer swap only (no allocation, no copy, no drawing), so a slow or paused screen never
// holds up the producer; the previous snapshot is released outside the lock (on whichever thread
// drops the last reference). Older snapshots that the screen never saw are simply superseded:
// the screen shows state, not a stream.
//
// CommandQueue carries UiCommands from the screen to the core's owner, which drains it on its own
// schedule (e.g. once per processed batch of lines).
#pragma once

#include <cstdint>
#include <deque>
#include <memory>
#include <mutex>
#include <utility>
#include <vector>

#include "engine/snapshot.hpp"

namespace sg::ui {

class SnapshotBox {
public:
    void publish(std::shared_ptr<const engine::Snapshot> snapshot) {
        std::shared_ptr<const engine::Snapshot> old;
        {
            std::lock_guard lock(m_mutex);
            old = std::exchange(m_latest, std::move(snapshot));
            ++m_published;
        }
        // `old` is released here, outside the lock.
    }
    std::shared_ptr<const engine::Snapshot> latest() const {
        std::lock_guard lock(m_mutex);
        return m_latest;
    }
    // Number of publish() calls so far.
    std::uint64_t publishedCount() const {
        std::lock_guard lock(m_mutex);
        return m_published;
    }

private:
    mutable std::mutex m_mutex;
    std::shared_ptr<const engine::Snapshot> m_latest;
    std::uint64_t m_published = 0;
};

// Where the screen sends its commands (an interface so tests can record them).
class CommandSink {
public:
    virtual ~CommandSink() = default;
    virtual void send(engine::UiCommand command) = 0;
};

class CommandQueue final : public CommandSink {
public:
    void send(engine::UiCommand command) override {
        std::lock_guard lock(m_mutex);
        m_queue.push_back(std::move(command));
    }
    // Takes every queued command, oldest first.
    std::vector<engine::UiCommand> drain() {
        std::lock_guard lock(m_mutex);
        std::vector<engine::UiCommand> out(std::make_move_iterator(m_queue.begin()),
                                           std::make_move_iterator(m_queue.end()));
        m_queue.clear();
        return out;
    }

private:
    std::mutex m_mutex;
    std::deque<engine::UiCommand> m_queue;
};

}  // namespace sg::ui
