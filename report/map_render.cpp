// Coverage map rendering; see map_render.hpp.
#include "report/map_render.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <memory>
#include <stdexcept>

#include <fmt/format.h>

#include "common/colour_code.hpp"

namespace sg::report {

namespace {

// The colours are the shared colour code's light scheme (src/common/colour_code.hpp), the same
// table the day screen uses: one code for screen and paper.
const colour::Scheme& kCode = colour::kLight;
const Rgb kNoSwath = toRgb(kCode.not_run_yet);
const Rgb kPlanLine = toRgb(kCode.plan_line);
const Rgb kGap = toRgb(kCode.gap);
const Rgb kInfill = toRgb(kCode.infill);
const Rgb kArea = toRgb(kCode.area);

void setColour(cairo_t* cr, Rgb c, double alpha = 1.0) { cairo_set_source_rgba(cr, c.r, c.g, c.b, alpha); }

std::uint32_t argb(Rgb c) {
    const auto u = [](double v) { return static_cast<std::uint32_t>(std::lround(std::clamp(v, 0.0, 1.0) * 255.0)); };
    return 0xFF000000U | (u(c.r) << 16) | (u(c.g) << 8) | u(c.b);
}

void font(cairo_t* cr, double size, bool bold = false) {
    cairo_select_font_face(cr, "DejaVu Sans", CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, size);
}

// Text with a white halo so it reads over any colour.
void haloText(cairo_t* cr, double x, double y, const std::string& text, Rgb colour) {
    cairo_move_to(cr, x, y);
    cairo_text_path(cr, text.c_str());
    cairo_set_source_rgba(cr, 1, 1, 1, 0.9);
    cairo_set_line_width(cr, 3.0);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    cairo_stroke(cr);
    cairo_move_to(cr, x, y);
    setColour(cr, colour);
    cairo_show_text(cr, text.c_str());
}

void ringPath(cairo_t* cr, const MapFrame& f, const coverage::Ring& ring) {
    if (ring.empty()) return;
    cairo_move_to(cr, f.toX(ring[0].e_m), f.toY(ring[0].n_m));
    for (std::size_t i = 1; i < ring.size(); ++i) cairo_line_to(cr, f.toX(ring[i].e_m), f.toY(ring[i].n_m));
    cairo_close_path(cr);
}

void areaPath(cairo_t* cr, const MapFrame& f, const coverage::MultiPolygon& mp) {
    for (const auto& p : mp) {
        ringPath(cr, f, p.exterior);
        for (const auto& h : p.holes) ringPath(cr, f, h);
    }
}

struct SurfaceDeleter {
    void operator()(cairo_surface_t* s) const { cairo_surface_destroy(s); }
};
using Surface = std::unique_ptr<cairo_surface_t, SurfaceDeleter>;

// The margin image of the frame at `ppu` pixels per device unit. Code-0 pixels (no swath) are
// transparent; every other pixel has the colour of the weakest cell whose centre lies in it.
Surface marginImage(const coverage::CoverageRaster& raster, const MapFrame& f, double ppu) {
    const int W = std::max(1, static_cast<int>(std::ceil(f.w * ppu)));
    const int H = std::max(1, static_cast<int>(std::ceil(f.h * ppu)));
    Surface img(cairo_image_surface_create(CAIRO_FORMAT_ARGB32, W, H));
    if (cairo_surface_status(img.get()) != CAIRO_STATUS_SUCCESS)
        throw std::runtime_error("map: cannot allocate a " + std::to_string(W) + " x " + std::to_string(H) + " image");
    cairo_surface_flush(img.get());
    auto* data = cairo_image_surface_get_data(img.get());
    const int stride = cairo_image_surface_get_stride(img.get());
    const double pm = 1.0 / (f.scale * ppu);  // metres per pixel
    const double cell = raster.cellSize();
    const auto& classes = marginClasses();
    std::vector<std::uint32_t> colour_of(256);
    for (int q = 0; q < 256; ++q) colour_of[static_cast<std::size_t>(q)] = argb(classes[static_cast<std::size_t>(marginClassOf(static_cast<std::uint8_t>(q)))].colour);
    const auto put = [&](int i, int j, std::uint8_t q) {
        auto* row = reinterpret_cast<std::uint32_t*>(data + static_cast<std::ptrdiff_t>(j) * stride);
        row[i] = q == 0 ? 0U : colour_of[q];
    };
    if (pm <= cell) {
        // Each pixel samples the cell under its centre.
        for (int j = 0; j < H; ++j) {
            const std::int64_t iy = raster.cellY(f.world.max_n - (j + 0.5) * pm);
            for (int i = 0; i < W; ++i) put(i, j, raster.code(raster.cellX(f.world.min_e + (i + 0.5) * pm), iy));
        }
    } else {
        // Each pixel gathers the cells whose centres fall in it: weakest code and count. A pixel
        // with fewer touched cells than cell centres holds an unreached cell: code 0.
        const std::size_t n = static_cast<std::size_t>(W) * static_cast<std::size_t>(H);
        std::vector<std::uint8_t> minc(n, 255);
        std::vector<std::uint32_t> cnt(n, 0);
        const auto ox = raster.origin().e_m, oy = raster.origin().n_m;
        const auto centresIn = [&](double a, double b, double o) {  // cell centres in [a, b)
            const auto first = static_cast<std::int64_t>(std::ceil((a - o) / cell - 0.5));
            const auto end = static_cast<std::int64_t>(std::ceil((b - o) / cell - 0.5));
            return static_cast<std::uint32_t>(std::max<std::int64_t>(0, end - first));
        };
        std::vector<std::uint32_t> colc(static_cast<std::size_t>(W)), rowc(static_cast<std::size_t>(H));
        for (int i = 0; i < W; ++i)
            colc[static_cast<std::size_t>(i)] = centresIn(f.world.min_e + i * pm, f.world.min_e + (i + 1) * pm, ox);
        for (int j = 0; j < H; ++j)
            rowc[static_cast<std::size_t>(j)] = centresIn(f.world.max_n - (j + 1) * pm, f.world.max_n - j * pm, oy);
        const double tile_m = cell * coverage::kTileCells;
        std::array<std::uint8_t, coverage::kCellsPerTile> codes{};  // one tile, row-major, row = north
        for (auto k : raster.sortedTileKeys()) {
            const std::int64_t tx0 = static_cast<std::int64_t>(coverage::tileX(k)) * coverage::kTileCells;
            const std::int64_t ty0 = static_cast<std::int64_t>(coverage::tileY(k)) * coverage::kTileCells;
            const double e0 = ox + static_cast<double>(tx0) * cell, n0 = oy + static_cast<double>(ty0) * cell;
            if (e0 > f.world.max_e || e0 + tile_m < f.world.min_e || n0 > f.world.max_n || n0 + tile_m < f.world.min_n)
                continue;
            const auto* tile = raster.tile(coverage::tileX(k), coverage::tileY(k));
            if (tile == nullptr) continue;
            raster.tileCodes(*tile, codes);
            for (std::int64_t iy = ty0; iy < ty0 + coverage::kTileCells; ++iy) {
                const double cn = oy + (static_cast<double>(iy) + 0.5) * cell;
                const double fj = std::floor((f.world.max_n - cn) / pm);
                if (fj < 0 || fj >= H) continue;
                const auto j = static_cast<std::size_t>(fj);
                for (std::int64_t ix = tx0; ix < tx0 + coverage::kTileCells; ++ix) {
                    const std::uint8_t q = codes[static_cast<std::size_t>((iy - ty0) * coverage::kTileCells + (ix - tx0))];
                    if (q == 0) continue;
                    const double fi = std::floor((ox + (static_cast<double>(ix) + 0.5) * cell - f.world.min_e) / pm);
                    if (fi < 0 || fi >= W) continue;
                    const std::size_t p = j * static_cast<std::size_t>(W) + static_cast<std::size_t>(fi);
                    minc[p] = std::min(minc[p], q);
                    ++cnt[p];
                }
            }
        }
        for (int j = 0; j < H; ++j)
            for (int i = 0; i < W; ++i) {
                const std::size_t p = static_cast<std::size_t>(j) * static_cast<std::size_t>(W) + static_cast<std::size_t>(i);
                const std::uint32_t total = colc[static_cast<std::size_t>(i)] * rowc[static_cast<std::size_t>(j)];
                put(i, j, cnt[p] == 0 || cnt[p] < total ? std::uint8_t{0} : minc[p]);
            }
    }
    cairo_surface_mark_dirty(img.get());
    return img;
}

// True when a label anchored at (x, y), about `width` long, fits inside the frame (a label
// outside would be clipped from the picture but still be text in a PDF).
bool inside(const MapFrame& f, double x, double y, double width) {
    return x >= f.x && x + width <= f.x + f.w && y - 8 >= f.y && y <= f.y + f.h;
}

// 1, 2 or 5 times a power of ten, at most `max_m`.
double niceLength(double max_m) {
    const double p = std::pow(10.0, std::floor(std::log10(max_m)));
    for (double m : {5.0, 2.0, 1.0})
        if (m * p <= max_m) return m * p;
    return p;
}

void drawScaleBar(cairo_t* cr, const MapFrame& f, double ls) {
    const double len_m = niceLength(0.25 * f.w / f.scale);
    const double len = len_m * f.scale;
    const double x = f.x + 10 * ls, y = f.y + f.h - 12 * ls;
    cairo_set_source_rgba(cr, 1, 1, 1, 0.85);
    cairo_rectangle(cr, x - 4 * ls, y - 16 * ls, len + 8 * ls + 60 * ls, 24 * ls);
    cairo_fill(cr);
    setColour(cr, kArea);
    cairo_rectangle(cr, x, y - 4 * ls, len / 2, 4 * ls);
    cairo_fill(cr);
    cairo_set_line_width(cr, 0.8 * ls);
    cairo_rectangle(cr, x, y - 4 * ls, len, 4 * ls);
    cairo_stroke(cr);
    font(cr, 8 * ls);
    cairo_move_to(cr, x, y - 7 * ls);
    cairo_show_text(cr, "0");
    const std::string t = len_m >= 1000 ? fmt::format("{:g} km", len_m / 1000) : fmt::format("{:g} m", len_m);
    cairo_move_to(cr, x + len + 4 * ls, y);
    cairo_show_text(cr, t.c_str());
}

void drawNorth(cairo_t* cr, const MapFrame& f, double ls) {
    const double x = f.x + f.w - 18 * ls, y = f.y + 10 * ls;
    cairo_set_source_rgba(cr, 1, 1, 1, 0.85);
    cairo_rectangle(cr, x - 12 * ls, y - 4 * ls, 24 * ls, 36 * ls);
    cairo_fill(cr);
    setColour(cr, kArea);
    cairo_move_to(cr, x, y);
    cairo_line_to(cr, x + 6 * ls, y + 16 * ls);
    cairo_line_to(cr, x, y + 12 * ls);
    cairo_line_to(cr, x - 6 * ls, y + 16 * ls);
    cairo_close_path(cr);
    cairo_fill(cr);
    font(cr, 8 * ls, true);
    cairo_move_to(cr, x - 3 * ls, y + 27 * ls);
    cairo_show_text(cr, "N");
}

}  // namespace

Rgb toRgb(colour::Rgb8 c) { return {c.r / 255.0, c.g / 255.0, c.b / 255.0}; }

const std::vector<MarginClass>& marginClasses() {
    static const std::vector<MarginClass> k = [] {
        std::vector<MarginClass> v{{"no swath", toRgb(colour::kLight.not_run_yet)}};
        for (int c = 0; c < colour::kMarginClassCount; ++c)
            v.push_back({colour::kMarginClassLabels[static_cast<std::size_t>(c)],
                         toRgb(colour::kLight.margin[static_cast<std::size_t>(c)])});
        return v;
    }();
    return k;
}

int marginClassOf(std::uint8_t code) {
    if (code == 0) return 0;
    return 1 + static_cast<int>(colour::marginClassOf(coverage::marginFromCode(code)));
}

MapFrame fitFrame(coverage::Box world, double x, double y, double w, double h) {
    MapFrame f;
    f.x = x;
    f.y = y;
    f.w = w;
    f.h = h;
    double ww = std::max(1e-3, world.max_e - world.min_e), wh = std::max(1e-3, world.max_n - world.min_n);
    f.scale = std::min(w / ww, h / wh);
    // Widen the window to the rectangle's shape, centred.
    const double cw = w / f.scale, ch = h / f.scale;
    const double ce = 0.5 * (world.min_e + world.max_e), cn = 0.5 * (world.min_n + world.max_n);
    f.world = {ce - cw / 2, cn - ch / 2, ce + cw / 2, cn + ch / 2};
    return f;
}

coverage::Box surveyWindow(const MapInput& in) {
    coverage::Box b{1e300, 1e300, -1e300, -1e300};
    const auto grow = [&](double e, double n) {
        b.min_e = std::min(b.min_e, e);
        b.min_n = std::min(b.min_n, n);
        b.max_e = std::max(b.max_e, e);
        b.max_n = std::max(b.max_n, n);
    };
    if (in.area != nullptr && !in.area->empty()) {
        const auto a = coverage::bounds(*in.area);
        grow(a.min_e, a.min_n);
        grow(a.max_e, a.max_n);
    } else if (in.raster != nullptr) {
        const double t = in.raster->cellSize() * coverage::kTileCells;
        for (auto k : in.raster->sortedTileKeys()) {
            const double e = in.raster->origin().e_m + coverage::tileX(k) * t;
            const double n = in.raster->origin().n_m + coverage::tileY(k) * t;
            grow(e, n);
            grow(e + t, n + t);
        }
    }
    if (in.infill != nullptr)
        for (const auto& l : in.infill->lines) {
            grow(l.start.e_m, l.start.n_m);
            grow(l.end.e_m, l.end.n_m);
        }
    if (b.empty()) return {0, 0, 100, 100};
    const double border = 0.04 * std::max(b.max_e - b.min_e, b.max_n - b.min_n) + 5.0;
    return {b.min_e - border, b.min_n - border, b.max_e + border, b.max_n + border};
}

void drawMap(cairo_t* cr, const MapInput& in, const MapFrame& f, const MapOptions& o) {
    const double ls = o.line_scale;
    cairo_save(cr);
    cairo_rectangle(cr, f.x, f.y, f.w, f.h);
    cairo_clip(cr);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_paint(cr);
    if (in.area != nullptr) {
        areaPath(cr, f, *in.area);
        cairo_set_fill_rule(cr, CAIRO_FILL_RULE_EVEN_ODD);
        setColour(cr, kNoSwath);
        cairo_fill(cr);
    }
    if (in.raster != nullptr) {
        auto img = marginImage(*in.raster, f, o.pixels_per_unit);
        // Paints the image over the frame (cells crisp), clipped to the area when `clip`.
        const auto paintImage = [&](double alpha, bool clip) {
            cairo_save(cr);
            if (clip) {
                areaPath(cr, f, *in.area);
                cairo_set_fill_rule(cr, CAIRO_FILL_RULE_EVEN_ODD);
                cairo_clip(cr);
            }
            cairo_translate(cr, f.x, f.y);
            cairo_scale(cr, 1.0 / o.pixels_per_unit, 1.0 / o.pixels_per_unit);
            cairo_set_source_surface(cr, img.get(), 0, 0);
            cairo_pattern_set_filter(cairo_get_source(cr), CAIRO_FILTER_NEAREST);
            cairo_paint_with_alpha(cr, alpha);
            cairo_restore(cr);
        };
        paintImage(in.area != nullptr ? 0.35 : 1.0, false);  // outside the area: faded
        if (in.area != nullptr) paintImage(1.0, true);
    }
    if (in.lines != nullptr) {
        setColour(cr, kPlanLine, 0.8);
        cairo_set_line_width(cr, 0.5 * ls);
        for (const auto& l : *in.lines) {
            cairo_move_to(cr, f.toX(l.start.e_m), f.toY(l.start.n_m));
            cairo_line_to(cr, f.toX(l.end.e_m), f.toY(l.end.n_m));
        }
        cairo_stroke(cr);
    }
    if (in.area != nullptr) {
        areaPath(cr, f, *in.area);
        setColour(cr, kArea);
        cairo_set_line_width(cr, 1.2 * ls);
        cairo_stroke(cr);
    }
    if (in.gaps != nullptr && in.gap_outlines != nullptr) {
        for (std::size_t g = 0; g < in.gaps->gaps.size() && g < in.gap_outlines->size(); ++g) {
            const auto& gap = in.gaps->gaps[g];
            areaPath(cr, f, (*in.gap_outlines)[g]);
            setColour(cr, kGap);
            cairo_set_line_width(cr, (gap.small ? 0.6 : (gap.id == o.highlight_gap ? 2.4 : 1.4)) * ls);
            cairo_stroke(cr);
        }
        if (o.label_gaps) {
            font(cr, 8 * ls, true);
            for (const auto& gap : in.gaps->gaps) {
                const double lx = f.toX(gap.bbox.max_e) + 2 * ls, ly = f.toY(gap.bbox.max_n) + 4 * ls;
                if (gap.small || !inside(f, lx, ly, 20 * ls)) continue;
                haloText(cr, lx, ly, fmt::format("G{}", gap.id), kGap);
            }
        }
    }
    if (in.infill != nullptr) {
        const double dash[] = {6 * ls, 3 * ls};
        for (const auto& l : in.infill->lines) {
            setColour(cr, kInfill);
            cairo_set_line_width(cr, 1.8 * ls);
            cairo_set_dash(cr, dash, 2, 0);
            const double x0 = f.toX(l.start.e_m), y0 = f.toY(l.start.n_m);
            const double x1 = f.toX(l.end.e_m), y1 = f.toY(l.end.n_m);
            cairo_move_to(cr, x0, y0);
            cairo_line_to(cr, x1, y1);
            cairo_stroke(cr);
            cairo_set_dash(cr, nullptr, 0, 0);
            // Arrow head at the end: the direction to fly.
            const double a = std::atan2(y1 - y0, x1 - x0), s = 6 * ls;
            cairo_move_to(cr, x1, y1);
            cairo_line_to(cr, x1 - s * std::cos(a - 0.4), y1 - s * std::sin(a - 0.4));
            cairo_line_to(cr, x1 - s * std::cos(a + 0.4), y1 - s * std::sin(a + 0.4));
            cairo_close_path(cr);
            cairo_fill(cr);
            if (o.label_infill && inside(f, x0 + 3 * ls, y0 - 3 * ls, 40 * ls)) {
                font(cr, 8 * ls, true);
                haloText(cr, x0 + 3 * ls, y0 - 3 * ls, l.name, kInfill);
            }
        }
    }
    drawScaleBar(cr, f, ls);
    drawNorth(cr, f, ls);
    cairo_restore(cr);
    // Frame.
    cairo_set_source_rgb(cr, 0.2, 0.2, 0.2);
    cairo_set_line_width(cr, 0.6 * ls);
    cairo_rectangle(cr, f.x, f.y, f.w, f.h);
    cairo_stroke(cr);
}

double drawLegend(cairo_t* cr, double x, double y, double size, bool row) {
    font(cr, 0.8 * size);
    double cx = x, cy = y;
    const auto advance = [&](const std::string& label) {
        cairo_text_extents_t te;
        cairo_text_extents(cr, label.c_str(), &te);
        cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
        cairo_move_to(cr, cx + 1.4 * size, cy + 0.8 * size);
        cairo_show_text(cr, label.c_str());
        if (row) cx += 1.4 * size + te.x_advance + 1.2 * size;
        else cy += 1.35 * size;
    };
    for (const auto& c : marginClasses()) {
        setColour(cr, c.colour);
        cairo_rectangle(cr, cx, cy, size, size);
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, 0.4, 0.4, 0.4);
        cairo_set_line_width(cr, 0.05 * size);
        cairo_stroke(cr);
        advance(c.label);
    }
    const auto symbol = [&](Rgb c, double width, bool dashed, const std::string& label) {
        setColour(cr, c);
        cairo_set_line_width(cr, width);
        const double dash[] = {0.4 * size, 0.2 * size};
        if (dashed) cairo_set_dash(cr, dash, 2, 0);
        cairo_move_to(cr, cx, cy + 0.5 * size);
        cairo_line_to(cr, cx + size, cy + 0.5 * size);
        cairo_stroke(cr);
        cairo_set_dash(cr, nullptr, 0, 0);
        advance(label);
    };
    symbol(kArea, 0.12 * size, false, "area of interest");
    symbol(kPlanLine, 0.06 * size, false, "planned line");
    symbol(kGap, 0.14 * size, false, "gap (G = id)");
    symbol(kInfill, 0.16 * size, true, "infill line");
    return row ? cx - x : cy - y;
}

PngSize writeMapPng(const MapInput& in, const coverage::Box& world, int long_px, const std::string& title,
                    const std::string& path, int highlight_gap) {
    const double ww = world.max_e - world.min_e, wh = world.max_n - world.min_n;
    int mw = long_px, mh = long_px;
    if (ww >= wh) mh = std::max(200, static_cast<int>(std::lround(long_px * wh / std::max(1e-3, ww))));
    else mw = std::max(200, static_cast<int>(std::lround(long_px * ww / std::max(1e-3, wh))));
    const double ls = std::max(1.0, long_px / 900.0);
    const int top = static_cast<int>(28 * ls), bottom = static_cast<int>(34 * ls);
    PngSize size{std::max(mw, static_cast<int>(900 * ls)), mh + top + bottom};
    Surface surf(cairo_image_surface_create(CAIRO_FORMAT_RGB24, size.width, size.height));
    cairo_t* cr = cairo_create(surf.get());
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_paint(cr);
    font(cr, 13 * ls, true);
    cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
    cairo_move_to(cr, 8 * ls, 19 * ls);
    cairo_show_text(cr, title.c_str());
    MapOptions o;
    o.line_scale = ls;
    o.highlight_gap = highlight_gap;
    const auto frame = fitFrame(world, (size.width - mw) / 2.0, top, mw, mh);
    drawMap(cr, in, frame, o);
    drawLegend(cr, 8 * ls, top + mh + 10 * ls, 11 * ls, true);
    cairo_destroy(cr);
    if (cairo_surface_write_to_png(surf.get(), path.c_str()) != CAIRO_STATUS_SUCCESS)
        throw std::runtime_error("cannot write " + path);
    return size;
}

}  // namespace sg::report
