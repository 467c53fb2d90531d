// A small page-flow layer over a Cairo PDF surface (A4 portrait, points): a cursor that moves down
// the page, headings, wrapped paragraphs, key/value rows and tables that break across pages and
// repeat their header, and a footer on every page. Text uses the DejaVu Sans font (Debian
// fonts-dejavu-core), embedded by Cairo so that pdftotext reads it back.
#pragma once

#include <string>
#include <vector>

#include <cairo.h>

namespace sg::report {

class PdfDoc {
public:
    static constexpr double kWidth = 595.28, kHeight = 841.89, kMargin = 42.0;

    // Throws std::runtime_error when the file cannot be created.
    PdfDoc(const std::string& path, std::string footer);
    ~PdfDoc();
    PdfDoc(const PdfDoc&) = delete;
    PdfDoc& operator=(const PdfDoc&) = delete;

    cairo_t* cr() { return m_cr; }
    double y() const { return m_y; }
    void setY(double y) { m_y = y; }
    double left() const { return kMargin; }
    double textWidth() const { return m_w - 2 * kMargin; }
    double bottom() const { return m_h - kMargin - 14.0; }  // above the footer
    bool landscape() const { return m_w > m_h; }
    int pages() const { return m_page; }

    // Starts a new A4 page, portrait or landscape.
    void newPage(bool landscape = false);
    // Starts a new page unless `height` more points fit below the cursor.
    void ensure(double height);

    void title(const std::string& text);
    void heading(const std::string& text);
    void subheading(const std::string& text);
    // Wrapped text at `size` points; bold optional.
    void para(const std::string& text, double size = 9.0, bool bold = false);
    void bullet(const std::string& text, double size = 9.0);
    // A label and its value on one row (value column at `value_x` from the left margin).
    void keyValue(const std::string& key, const std::string& value, double value_x = 150.0);
    void space(double points) { m_y += points; }

    // A table: column titles, column widths in points (summing to at most textWidth()), rows of
    // cells. Numeric-looking columns are right-aligned when `right` is set for them.
    struct Column {
        std::string title;
        double width = 60.0;
        bool right = false;
    };
    void table(const std::vector<Column>& columns, const std::vector<std::vector<std::string>>& rows,
               double size = 7.5);

    // Sets the font for direct drawing.
    void font(double size, bool bold = false);
    double textAdvance(const std::string& text);
    void text(double x, double y, const std::string& text);
    // Finishes the document (also done by the destructor).
    void finish();

private:
    std::vector<std::string> wrap(const std::string& text, double width);
    void footer();

    cairo_surface_t* m_surface = nullptr;
    cairo_t* m_cr = nullptr;
    std::string m_footer;
    double m_y = kMargin;
    double m_w = kWidth, m_h = kHeight;  // current page size
    int m_page = 1;
    bool m_finished = false;
};

}  // namespace sg::report
