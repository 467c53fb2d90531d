// Stable gap names by overlap with the last committed evaluation; see gap_names.hpp.
#include "coverage/gap_names.hpp"

#include <algorithm>
#include <map>

namespace sg::coverage {

void GapNamer::name(GapReport& report, bool commit) {
    const std::size_t n = report.gaps.size();
    // Overlapping cells between each earlier number and each new gap (both run lists are sorted by
    // row, then i0: one merge walk).
    std::map<std::pair<int, int>, std::int64_t> overlap;  // (number, new gap index) -> cells
    std::size_t p = 0;
    for (const auto& r : report.runs) {
        while (p < m_runs.size() && (m_runs[p].row < r.row || (m_runs[p].row == r.row && m_runs[p].i1 <= r.i0))) ++p;
        for (std::size_t q = p; q < m_runs.size() && m_runs[q].row == r.row && m_runs[q].i0 < r.i1; ++q) {
            const std::int64_t c = std::min(r.i1, m_runs[q].i1) - std::max(r.i0, m_runs[q].i0);
            if (c > 0) overlap[{m_runs[q].number, r.gap}] += c;
        }
    }
    // Each earlier number goes to the new gap holding most of its cells (ties: report order).
    std::map<int, std::pair<int, std::int64_t>> heir;  // number -> (gap index, cells)
    for (const auto& [key, cells] : overlap) {
        auto it = heir.find(key.first);
        if (it == heir.end() || cells > it->second.second ||
            (cells == it->second.second && key.second < it->second.first))
            heir[key.first] = {key.second, cells};
    }
    std::vector<int> number(n, 0);
    for (const auto& [num, h] : heir) {  // ascending numbers: the oldest is met first
        int& slot = number[static_cast<std::size_t>(h.first)];
        if (slot == 0) slot = num;
    }
    // New gaps take the next free numbers in report order (significant first, largest first).
    // Uncommitted evaluations only preview them.
    int next = m_next;
    for (std::size_t k = 0; k < n; ++k) {
        if (number[k] == 0) number[k] = next++;
        report.gaps[k].id = number[k];
    }
    if (!commit) return;
    m_next = next;
    ++m_commits;
    m_runs.clear();
    m_runs.reserve(report.runs.size());
    for (const auto& r : report.runs) m_runs.push_back({r.row, r.i0, r.i1, number[static_cast<std::size_t>(r.gap)]});
}

void GapNamer::adopt(const Committed& c) {
    m_next = std::max(m_next, c.next);
    m_runs = c.runs;
    std::sort(m_runs.begin(), m_runs.end(), [](const NamedRun& a, const NamedRun& b) {
        return a.row != b.row ? a.row < b.row : a.i0 < b.i0;
    });
}

}  // namespace sg::coverage
