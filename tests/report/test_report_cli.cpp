// `swathguard report` end to end on the demo survey log: the report's numbers are the numbers
// `swathguard gaps --json` prints (summary.json identical; the PDF's text, read back with
// pdftotext from Debian poppler-utils, carries the same coverage percentage and gap count), the
// PDF renders with pdftoppm, the GeoTIFF read with GDAL has the survey EPSG code and the core's
// covered-cell count, and the CSV tables have one row per item.
#include <gtest/gtest.h>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <memory>
#include <sstream>
#include <string>

#include <cairo.h>
#include <fmt/format.h>
#include <gdal_priv.h>
#include <nlohmann/json.hpp>
#include <ogr_spatialref.h>

#include "report/map_render.hpp"

namespace {

namespace fs = std::filesystem;

// Runs a shell command; stdout (and stderr unless the command redirects it) into *out.
int run(const std::string& cmd, std::string* out = nullptr) {
    const bool own_stderr = cmd.find("2>") != std::string::npos;
    std::unique_ptr<FILE, int (*)(FILE*)> p(popen((own_stderr ? cmd : cmd + " 2>&1").c_str(), "r"), pclose);
    if (!p) return -1;
    std::array<char, 4096> buf{};
    std::string text;
    while (fgets(buf.data(), static_cast<int>(buf.size()), p.get()) != nullptr) text += buf.data();
    const int rc = pclose(p.release());
    if (out) *out = text;
    return rc;
}

std::string slurp(const std::string& path) {
    std::ifstream f(path, std::ios::binary);
    std::stringstream ss;
    ss << f.rdbuf();
    return ss.str();
}

std::size_t csvRows(const std::string& path) {
    std::size_t n = 0;
    std::istringstream in(slurp(path));
    std::string line;
    while (std::getline(in, line)) n += line.empty() ? 0 : 1;
    return n - 1;  // header
}

// The demo log, its `gaps --json` and its report, made once for every test below. A failure here
// fails each test that needs it (a failed SetUpTestSuite would only mark them skipped).
struct ReportRun {
    std::string dir, log, report_out, error;
    nlohmann::json gaps_json;
    bool ok = false;
};

const ReportRun& reportRun() {
    static const ReportRun r = [] {
        ReportRun x;
        x.dir = (fs::temp_directory_path() / ("sg_report_" + std::to_string(::getpid()))).string();
        fs::remove_all(x.dir);
        const std::string bin = std::string(SG_BINARY_DIR) + "/app/swathguard";
        const std::string src = SG_SOURCE_DIR;
        std::string out;
        if (run(bin + " demo --headless --scenario " + src + "/replay_logs/demo/scenario.toml --config " + src +
                    "/replay_logs/demo/survey.toml --out " + x.dir + "/demo",
                &out) != 0) {
            x.error = "demo failed: " + out;
            return x;
        }
        x.log = x.dir + "/demo/demo.sglog";
        if (run(bin + " gaps " + x.log + " --json 2>/dev/null", &out) != 0 || out.find('{') == std::string::npos) {
            x.error = "gaps failed: " + out;
            return x;
        }
        x.gaps_json = nlohmann::json::parse(out.substr(out.find('{')));
        if (run(bin + " report " + x.log + " --out " + x.dir + "/report", &x.report_out) != 0) {
            x.error = "report failed: " + x.report_out;
            return x;
        }
        x.ok = true;
        return x;
    }();
    return r;
}

class ReportCli : public ::testing::Test {
protected:
    void SetUp() override {
        ASSERT_TRUE(reportRun().ok) << reportRun().error;
        dir = reportRun().dir;
        log = reportRun().log;
        report_out = reportRun().report_out;
        gaps_json = reportRun().gaps_json;
    }
    static void TearDownTestSuite() { fs::remove_all(reportRun().dir); }

    std::string dir, log, report_out;
    nlohmann::json gaps_json;
};

TEST_F(ReportCli, SummaryJsonIsWhatGapsPrints) {
    auto report = nlohmann::json::parse(slurp(dir + "/report/summary.json"));
    auto gaps = gaps_json;
    gaps.erase("exports");  // `gaps` lists the files it wrote
    EXPECT_EQ(report, gaps);
    // The demo has something to report: gaps, infill that closes them, alarms.
    EXPECT_GT(gaps_json["gap_count"].get<int>(), 0);
    EXPECT_EQ(gaps_json["infill"]["gaps_left_after_flying"].get<int>(), 0);
    EXPECT_FALSE(gaps_json["alarms"].empty());
}

TEST_F(ReportCli, PdfTextCarriesTheCoverageAndGapCount) {
    std::string text;
    ASSERT_EQ(run("pdftotext " + dir + "/report/report.pdf -", &text), 0) << text;
    // Wrapped lines: compare with every run of whitespace as one space.
    std::string flat;
    for (char c : text) {
        const bool ws = c == ' ' || c == '\n' || c == '\r' || c == '\t' || c == '\f';
        if (!ws) flat += c;
        else if (!flat.empty() && flat.back() != ' ') flat += ' ';
    }
    text = flat;
    const auto pct = fmt::format("{:.2f} %", gaps_json["coverage_pct"].get<double>());
    EXPECT_NE(text.find("Coverage of the area: " + pct), std::string::npos) << pct << "\n" << text.substr(0, 2000);
    EXPECT_NE(text.find(fmt::format("Gaps: {} (plus {} narrower", gaps_json["gap_count"].get<int>(),
                                    gaps_json["small_gap_count"].get<int>())),
              std::string::npos);
    EXPECT_NE(text.find(fmt::format("Infill: {} line(s)", gaps_json["infill"]["lines"].size())), std::string::npos);
    // Every infill line and gap id is in the tables; the cautions and the sign-off are there.
    for (const auto& l : gaps_json["infill"]["lines"])
        EXPECT_NE(text.find(l["name"].get<std::string>()), std::string::npos);
    EXPECT_NE(text.find("licensed specialists"), std::string::npos);
    EXPECT_NE(text.find("master decides"), std::string::npos);
    EXPECT_NE(text.find("Client representative"), std::string::npos);
    EXPECT_NE(text.find("Detection model and assumptions"), std::string::npos);
}

// A survey whose classes all use the mass rule needs no ambient field: the report states so and
// prints no field (the demo config's [geomagnetic] and dipole classes removed; same log).
TEST_F(ReportCli, MassRuleOnlySurveyPrintsNoFieldAndSaysNoneIsNeeded) {
    const std::string src = SG_SOURCE_DIR;
    std::string cfg = slurp(src + "/replay_logs/demo/survey.toml");
    const auto cut = [&cfg](const std::string& from, const std::string& to) {
        const auto a = cfg.find(from), b = cfg.find(to);
        ASSERT_NE(a, std::string::npos) << from;
        ASSERT_NE(b, std::string::npos) << to;
        cfg.erase(a, b - a);
    };
    cut("[geomagnetic]", "[detection]");
    cut("[[target]]\nname = \"small shell\"", "[[target]]\nname = \"anchor");
    for (const std::string f : {"plan_area.geojson", "plan_lines.geojson"}) {
        const auto at = cfg.find("\"" + f + "\"");
        ASSERT_NE(at, std::string::npos) << f;
        cfg.replace(at, f.size() + 2, "\"" + src + "/replay_logs/demo/" + f + "\"");
    }
    ASSERT_EQ(cfg.find("dipole"), std::string::npos);
    ASSERT_EQ(cfg.find("[geomagnetic]"), std::string::npos);
    const std::string cfg_path = dir + "/mass_only.toml";
    std::ofstream(cfg_path) << cfg;
    const std::string bin = std::string(SG_BINARY_DIR) + "/app/swathguard";
    std::string out;
    ASSERT_EQ(run(bin + " report " + log + " --out " + dir + "/mass_only --config " + cfg_path, &out), 0) << out;
    std::string text;
    ASSERT_EQ(run("pdftotext " + dir + "/mass_only/report.pdf -", &text), 0) << text;
    EXPECT_NE(text.find("mass rule: no field needed"), std::string::npos);
    EXPECT_EQ(text.find("49800 nT"), std::string::npos) << "a field nothing used is printed";
    EXPECT_EQ(text.find("inclination 67.5"), std::string::npos);
    const auto j = nlohmann::json::parse(slurp(dir + "/mass_only/summary.json"));
    EXPECT_TRUE(j["detection"]["inclination_deg"].is_null());
    EXPECT_TRUE(j["detection"]["intensity_nT"].is_null());
    EXPECT_EQ(j["detection"]["ambient_field"], "mass rule: no field needed");
    // The demo's own report (dipole classes) prints the field it used.
    ASSERT_EQ(run("pdftotext " + dir + "/report/report.pdf -", &text), 0) << text;
    EXPECT_NE(text.find("inclination 67.5 deg, declination 1.5 deg, 49800 nT"), std::string::npos);
}

TEST_F(ReportCli, PdfRendersEveryPage) {
    std::string info;
    ASSERT_EQ(run("pdfinfo " + dir + "/report/report.pdf", &info), 0) << info;
    const auto at = info.find("Pages:");
    ASSERT_NE(at, std::string::npos);
    const int pages = std::stoi(info.substr(at + 6));
    EXPECT_GE(pages, 4);
    std::string out;
    ASSERT_EQ(run("pdftoppm -r 30 -png " + dir + "/report/report.pdf " + dir + "/page", &out), 0) << out;
    int rendered = 0;
    for (const auto& e : fs::directory_iterator(dir))
        rendered += e.path().filename().string().rfind("page-", 0) == 0 ? 1 : 0;
    EXPECT_EQ(rendered, pages);
}

// Every word lies inside its page's margins (pdftotext -bbox gives each page's size and each
// word's box): nothing is cut off, whatever the page's orientation.
TEST_F(ReportCli, EveryWordLiesInsideItsPage) {
    std::string html;
    ASSERT_EQ(run("pdftotext -bbox " + dir + "/report/report.pdf -", &html), 0);
    const auto attr = [](const std::string& tag, const std::string& name) {
        const auto at = tag.find(name + "=\"");
        return at == std::string::npos ? -1.0 : std::stod(tag.substr(at + name.size() + 2));
    };
    double page_w = 0, page_h = 0;
    int pages = 0, words = 0;
    std::istringstream in(html);
    std::string line;
    while (std::getline(in, line)) {
        if (line.find("<page ") != std::string::npos) {
            page_w = attr(line, "width");
            page_h = attr(line, "height");
            ++pages;
        } else if (line.find("<word ") != std::string::npos) {
            ++words;
            EXPECT_GE(attr(line, "xMin"), 30.0) << "page " << pages << ": " << line;
            EXPECT_LE(attr(line, "xMax"), page_w - 30.0) << "page " << pages << ": " << line;
            EXPECT_LE(attr(line, "yMax"), page_h - 20.0) << "page " << pages << ": " << line;
        }
    }
    EXPECT_GE(pages, 4);
    EXPECT_GT(words, 500);
}

TEST_F(ReportCli, GeoTiffHasTheSurveyCrsAndTheCoresCoveredCells) {
    GDALAllRegister();
    std::unique_ptr<GDALDataset> ds(GDALDataset::Open((dir + "/report/coverage_margin.tif").c_str(), GDAL_OF_RASTER));
    ASSERT_TRUE(ds);
    ASSERT_NE(ds->GetSpatialRef(), nullptr);
    EXPECT_EQ(std::string(ds->GetSpatialRef()->GetAuthorityCode(nullptr)),
              std::to_string(gaps_json["crs"]["epsg"].get<int>()));
    double gt[6];
    ASSERT_EQ(ds->GetGeoTransform(gt), CE_None);
    EXPECT_DOUBLE_EQ(gt[1], gaps_json["cell_size_m"].get<double>());
    auto* band = ds->GetRasterBand(1);
    const int w = ds->GetRasterXSize(), h = ds->GetRasterYSize();
    std::vector<float> row(static_cast<std::size_t>(w));
    std::uint64_t covered = 0;
    for (int y = 0; y < h; ++y) {
        ASSERT_EQ(band->RasterIO(GF_Read, 0, y, w, 1, row.data(), w, 1, GDT_Float32, 0, 0), CE_None);
        for (float v : row) covered += v >= 1.0f ? 1 : 0;
    }
    EXPECT_EQ(covered, gaps_json["raster_covered_cells"].get<std::uint64_t>());
}

TEST_F(ReportCli, CsvTablesHaveOneRowPerItem) {
    EXPECT_EQ(csvRows(dir + "/report/runs.csv"), gaps_json["runs"].size());
    EXPECT_EQ(csvRows(dir + "/report/lines.csv"), gaps_json["lines"].size());
    EXPECT_EQ(csvRows(dir + "/report/alarms.csv"), gaps_json["alarms"].size());
    EXPECT_EQ(csvRows(dir + "/report/outages.csv"), gaps_json["outages"].size());
    EXPECT_EQ(csvRows(dir + "/report/gaps.csv"), gaps_json["gaps"].size());
    EXPECT_EQ(csvRows(dir + "/report/infill.csv"), gaps_json["infill"]["lines"].size());
}

TEST_F(ReportCli, OverviewPngShowsCoverageAndGapOutlines) {
    cairo_surface_t* img = cairo_image_surface_create_from_png((dir + "/report/coverage_map.png").c_str());
    ASSERT_EQ(cairo_surface_status(img), CAIRO_STATUS_SUCCESS);
    const int w = cairo_image_surface_get_width(img), h = cairo_image_surface_get_height(img);
    const int stride = cairo_image_surface_get_stride(img);
    const auto* data = cairo_image_surface_get_data(img);
    const auto rgb = [](sg::report::Rgb c) {
        const auto u = [](double v) { return static_cast<std::uint32_t>(std::lround(v * 255)); };
        return (u(c.r) << 16) | (u(c.g) << 8) | u(c.b);
    };
    const std::uint32_t strong = rgb(sg::report::marginClasses()[4].colour);
    const std::uint32_t gap = rgb(sg::report::toRgb(sg::colour::kLight.gap));  // the shared colour code's gap
    std::uint64_t n_strong = 0, n_gap = 0;
    for (int y = 0; y < h; ++y) {
        const auto* row = reinterpret_cast<const std::uint32_t*>(data + static_cast<std::ptrdiff_t>(y) * stride);
        for (int x = 0; x < w; ++x) {
            const std::uint32_t p = row[x] & 0xFFFFFFU;
            n_strong += p == strong ? 1 : 0;
            n_gap += p == gap ? 1 : 0;
        }
    }
    cairo_surface_destroy(img);
    EXPECT_GT(n_strong, 1000u);  // the demo's block is mostly covered with a good margin
    EXPECT_GT(n_gap, 50u);       // and its gaps are outlined
}

TEST_F(ReportCli, PrintsWhereItWroteAndHowLong) {
    EXPECT_NE(report_out.find("report.pdf"), std::string::npos) << report_out;
    EXPECT_NE(report_out.find("coverage_margin.tif"), std::string::npos);
    EXPECT_NE(report_out.find("100 %"), std::string::npos);  // the progress reached its end
}

}  // namespace
