// Drawing helpers shared by the time plots and the profiles: min/max decimation per pixel column
// (so a 12-hour series costs one pass over the samples in the window and a few vertices per
// column), polylines split into pieces that fit ImGui's 16-bit index buffers, axis ticks and
// time labels.
#pragma once

#include <cstddef>
#include <memory>
#include <string>
#include <unordered_map>
#include <vector>

#include <imgui.h>

#include "engine/snapshot.hpp"
#include "ui/layout.hpp"

namespace sg::ui {

// One pixel column of a decimated series.
struct Column {
    float lo = 0, hi = 0, first = 0, last = 0;  // values
    double t_first = 0, t_last = 0;             // times of the first and last sample, seconds
    int count = 0;
};

// Summaries of consecutive blocks of kSummaryBlock samples of immutable series chunks, kept per
// chunk for as long as the chunk lives, so a wide time window merges blocks instead of samples.
constexpr std::size_t kSummaryBlock = 16;

class SeriesSummaryCache {
public:
    // The block summaries of `chunk` (computed on first use); block k covers samples
    // [k*kSummaryBlock, (k+1)*kSummaryBlock), only whole blocks are listed.
    const std::vector<Column>& blocks(const std::shared_ptr<const std::vector<engine::SeriesPoint>>& chunk);
    // Forgets chunks that no snapshot holds any more. Call once per frame.
    void endFrame();
    std::size_t size() const { return m_entries.size(); }

private:
    struct Entry {
        std::weak_ptr<const std::vector<engine::SeriesPoint>> chunk;
        std::vector<Column> blocks;
    };
    std::unordered_map<const void*, Entry> m_entries;
    std::size_t m_frames = 0;
};

// Decimates the samples of `series` with t in [t0, t1] into `columns` equal time columns.
// Returns the number of samples covered. columns >= 1, t1 > t0. With a cache, whole blocks that
// fall inside one column are merged from their summaries (same result, fewer samples read).
std::size_t decimateSeries(const engine::Series& series, double t0, double t1, int columns,
                           std::vector<Column>& out, SeriesSummaryCache* cache = nullptr);

// Value range over decimated columns; returns false when no column has data.
bool columnsRange(const std::vector<Column>& cols, float& lo, float& hi);

// Draws decimated columns into `rect`, mapping t0..t1 to x and y_lo..y_hi to y (up),
// breaking the line where samples are more than break_after_s apart.
void drawColumns(ImDrawList* dl, const std::vector<Column>& cols, double t0, double t1, const Rect& rect,
                 double y_lo, double y_hi, double break_after_s, ImU32 colour, float thickness);

// AddPolyline in pieces of at most a few thousand points (16-bit indices).
void drawPolylineChunked(ImDrawList* dl, const std::vector<ImVec2>& pts, ImU32 colour, float thickness);

// Up to about max_ticks "nice" values (1, 2, 5 x 10^k steps) covering lo..hi.
std::vector<double> niceTicks(double lo, double hi, int max_ticks);

// "hh:mm:ss" (UTC) of t_s seconds since the epoch.
std::string formatUtcTime(double t_s);

// A dashed straight line (ImGui has none).
void drawDashedLine(ImDrawList* dl, ImVec2 a, ImVec2 b, ImU32 colour, float thickness, float dash_px);

}  // namespace sg::ui
