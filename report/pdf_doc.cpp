// PDF page flow; see pdf_doc.hpp.
#include "report/pdf_doc.hpp"

#include <cairo-pdf.h>

#include <sstream>
#include <stdexcept>

#include <fmt/format.h>

namespace sg::report {

PdfDoc::PdfDoc(const std::string& path, std::string footer_text) : m_footer(std::move(footer_text)) {
    m_surface = cairo_pdf_surface_create(path.c_str(), kWidth, kHeight);
    if (cairo_surface_status(m_surface) != CAIRO_STATUS_SUCCESS) {
        cairo_surface_destroy(m_surface);
        throw std::runtime_error("cannot create " + path);
    }
    cairo_pdf_surface_set_metadata(m_surface, CAIRO_PDF_METADATA_CREATOR, "swathguard");
    cairo_pdf_surface_set_metadata(m_surface, CAIRO_PDF_METADATA_TITLE, "Site coverage report");
    m_cr = cairo_create(m_surface);
}

PdfDoc::~PdfDoc() {
    finish();
}

void PdfDoc::finish() {
    if (m_finished) return;
    m_finished = true;
    footer();
    cairo_show_page(m_cr);
    cairo_destroy(m_cr);
    cairo_surface_finish(m_surface);
    cairo_surface_destroy(m_surface);
}

void PdfDoc::footer() {
    font(7.0);
    cairo_set_source_rgb(m_cr, 0.35, 0.35, 0.35);
    text(kMargin, m_h - kMargin + 8.0, m_footer);
    const std::string p = fmt::format("page {}", m_page);
    text(m_w - kMargin - textAdvance(p), m_h - kMargin + 8.0, p);
    cairo_set_source_rgb(m_cr, 0, 0, 0);
}

void PdfDoc::newPage(bool landscape) {
    footer();
    cairo_show_page(m_cr);
    m_w = landscape ? kHeight : kWidth;
    m_h = landscape ? kWidth : kHeight;
    cairo_pdf_surface_set_size(m_surface, m_w, m_h);
    ++m_page;
    m_y = kMargin;
}

void PdfDoc::ensure(double height) {
    if (m_y + height > bottom()) newPage();
}

void PdfDoc::font(double size, bool bold) {
    cairo_select_font_face(m_cr, "DejaVu Sans", CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(m_cr, size);
}

double PdfDoc::textAdvance(const std::string& s) {
    cairo_text_extents_t te;
    cairo_text_extents(m_cr, s.c_str(), &te);
    return te.x_advance;
}

void PdfDoc::text(double x, double y, const std::string& s) {
    cairo_move_to(m_cr, x, y);
    cairo_show_text(m_cr, s.c_str());
}

std::vector<std::string> PdfDoc::wrap(const std::string& s, double width) {
    std::vector<std::string> lines;
    std::istringstream words(s);
    std::string word, line;
    while (words >> word) {
        const std::string candidate = line.empty() ? word : line + " " + word;
        if (!line.empty() && textAdvance(candidate) > width) {
            lines.push_back(line);
            line = word;
        } else {
            line = candidate;
        }
    }
    if (!line.empty()) lines.push_back(line);
    return lines;
}

void PdfDoc::title(const std::string& s) {
    ensure(40);
    font(18, true);
    cairo_set_source_rgb(m_cr, 0.08, 0.20, 0.30);
    text(kMargin, m_y + 18, s);
    cairo_set_source_rgb(m_cr, 0, 0, 0);
    m_y += 28;
}

void PdfDoc::heading(const std::string& s) {
    ensure(60);  // never strand a heading at the foot of a page
    m_y += 6;
    font(13, true);
    cairo_set_source_rgb(m_cr, 0.08, 0.20, 0.30);
    text(kMargin, m_y + 13, s);
    cairo_set_line_width(m_cr, 0.6);
    cairo_move_to(m_cr, kMargin, m_y + 17);
    cairo_line_to(m_cr, m_w - kMargin, m_y + 17);
    cairo_stroke(m_cr);
    cairo_set_source_rgb(m_cr, 0, 0, 0);
    m_y += 24;
}

void PdfDoc::subheading(const std::string& s) {
    ensure(40);
    m_y += 3;
    font(10, true);
    text(kMargin, m_y + 10, s);
    m_y += 15;
}

void PdfDoc::para(const std::string& s, double size, bool bold) {
    font(size, bold);
    for (const auto& line : wrap(s, textWidth())) {
        ensure(size * 1.35);
        text(kMargin, m_y + size, line);
        m_y += size * 1.35;
    }
    m_y += size * 0.4;
}

void PdfDoc::bullet(const std::string& s, double size) {
    font(size);
    bool first = true;
    for (const auto& line : wrap(s, textWidth() - 12)) {
        ensure(size * 1.35);
        if (first) text(kMargin + 2, m_y + size, "-");
        text(kMargin + 12, m_y + size, line);
        m_y += size * 1.35;
        first = false;
    }
    m_y += size * 0.25;
}

void PdfDoc::keyValue(const std::string& key, const std::string& value, double value_x) {
    font(9, true);
    const auto lines = [&] {
        font(9);
        return wrap(value, textWidth() - value_x);
    }();
    ensure(12.0 * static_cast<double>(std::max<std::size_t>(1, lines.size())));
    font(9, true);
    text(kMargin, m_y + 9, key);
    font(9);
    for (const auto& l : lines) {
        text(kMargin + value_x, m_y + 9, l);
        m_y += 12;
    }
    if (lines.empty()) m_y += 12;
}

void PdfDoc::table(const std::vector<Column>& columns, const std::vector<std::vector<std::string>>& rows,
                   double size) {
    const double row_h = size * 1.5;
    double table_w = 0;
    for (const auto& c : columns) table_w += c.width;
    const auto shade = [&](double grey_r, double grey_g, double grey_b) {  // the current row's background
        cairo_set_source_rgb(m_cr, grey_r, grey_g, grey_b);
        cairo_rectangle(m_cr, kMargin, m_y, table_w, row_h);
        cairo_fill(m_cr);
        cairo_set_source_rgb(m_cr, 0, 0, 0);
    };
    const auto header = [&] {
        ensure(2 * row_h);
        shade(0.88, 0.91, 0.93);
        font(size, true);
        double x = kMargin;
        for (const auto& c : columns) {
            const double a = textAdvance(c.title);
            text(c.right ? x + c.width - 3 - a : x + 3, m_y + size * 1.1, c.title);
            x += c.width;
        }
        m_y += row_h;
    };
    header();
    for (std::size_t r = 0; r < rows.size(); ++r) {
        if (m_y + row_h > bottom()) {
            newPage();
            header();
        }
        if (r % 2 == 1) shade(0.96, 0.96, 0.96);
        font(size);
        double x = kMargin;
        for (std::size_t i = 0; i < columns.size(); ++i) {
            std::string cell = i < rows[r].size() ? rows[r][i] : std::string();
            // Clip overlong cells with an ellipsis rather than overwrite the next column.
            while (cell.size() > 1 && textAdvance(cell) > columns[i].width - 5) cell = cell.substr(0, cell.size() - 2) + "~";
            const double a = textAdvance(cell);
            text(columns[i].right ? x + columns[i].width - 3 - a : x + 3, m_y + size * 1.1, cell);
            x += columns[i].width;
        }
        m_y += row_h;
    }
    m_y += 6;
}

}  // namespace sg::report
