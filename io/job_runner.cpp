// Jobs on worker threads; see job_runner.hpp.
#include "io/job_runner.hpp"

#include <algorithm>
#include <atomic>
#include <thread>

namespace sg::io {

void runJobs(std::vector<std::function<void()>>& jobs, unsigned threads) {
    if (jobs.empty()) return;
    if (threads == 0) threads = std::max(1U, std::thread::hardware_concurrency());
    threads = std::min<unsigned>(threads, static_cast<unsigned>(jobs.size()));
    std::atomic<std::size_t> next{0};
    auto worker = [&] {
        for (std::size_t i = next++; i < jobs.size(); i = next++) jobs[i]();
    };
    std::vector<std::thread> pool;
    for (unsigned t = 1; t < threads; ++t) pool.emplace_back(worker);
    worker();
    for (auto& t : pool) t.join();
}

}  // namespace sg::io
