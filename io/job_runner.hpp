// Runs independent jobs on every core (the core library has no threads of its own: a site's
// session summaries are rebuilt through this, see site::refreshSummaries).
#pragma once

#include <functional>
#include <vector>

namespace sg::io {

// Runs `jobs` on min(threads, jobs.size()) worker threads (threads == 0: one per core) and returns
// when all have finished. Jobs must not throw (they record their own errors).
void runJobs(std::vector<std::function<void()>>& jobs, unsigned threads = 0);

}  // namespace sg::io
