// Where the simulated lines go: one channel per instrument, as files (one per instrument in a
// directory), UDP datagrams (one port each, to 127.0.0.1), TCP servers (one port each, listening
// on 127.0.0.1 only) or pseudo terminals (one each, created here). Each line is sent with CR LF.
// Plain POSIX sockets; single-threaded: the caller calls poll() between lines (TCP accepts).
#pragma once

#include <array>
#include <cstdint>
#include <memory>
#include <string>

#include "drivers_sim/simulator.hpp"

namespace sg::sim {

struct ChannelCounts {
    std::uint64_t produced = 0;  // lines the simulator produced (garbage bursts included)
    std::uint64_t sent = 0;      // lines written out (to at least one TCP client)
    std::uint64_t dropped = 0;   // not written: port closed, no TCP client, pty buffer full
    std::uint64_t garbage = 0;   // garbage bursts among the produced lines
    std::uint64_t bytes = 0;     // bytes written, terminators included
};

enum class OutputKind { File, Udp, Tcp, Pty };

class Output {
public:
    virtual ~Output() = default;
    // Writes one line (adds CR LF) and counts it.
    void write(const SimLine& line);
    // A port_close fault: closes or reopens the channel's port (network and pty outputs).
    virtual void event(const PortEvent& e) = 0;
    // Accepts pending TCP connections; no-op for the others.
    virtual void poll() {}
    // Flushes and closes everything.
    virtual void close() = 0;
    // Human-readable endpoint of a channel: file path, udp/tcp address, pty path.
    virtual std::string endpoint(Channel c) const = 0;
    const std::array<ChannelCounts, kChannelCount>& counts() const { return m_counts; }

protected:
    // Returns true when the bytes were written.
    virtual bool send(Channel c, const std::string& bytes) = 0;

private:
    std::array<ChannelCounts, kChannelCount> m_counts{};
};

// `dir` must exist for File (and is where Pty puts <channel>.pty symlinks, if not empty).
// Throws std::runtime_error when a file, socket or pty cannot be opened.
std::unique_ptr<Output> makeOutput(OutputKind kind, const std::string& dir, int base_port);

}  // namespace sg::sim
