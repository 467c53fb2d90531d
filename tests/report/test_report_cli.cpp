// `swathguard report` end to end on the demo survey log: the report's numbers are the numbers
// `swathguard gaps --json` prints (summary.json identical; the PDF's text, read back with
// pdftotext from Debian poppler-utils, carries the same coverage percentage and gap count), the
// PDF renders with pdftoppm, the GeoTIFF read with GDAL has the survey EPSG code and the core's
// covered-cell count, and the CSV tables have one row per item. The line profiles and the picks map
// (issue #13) are found in the PDF's text and on its pages rendered by pdftoppm, where the layout
// functions of report/pick_plots.hpp put them, and the profiles agree with runs.csv; no internal
// check identifier is in the PDF's text (issue #12).
#include <gtest/gtest.h>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <algorithm>
#include <cmath>
#include <memory>
#include <regex>
#include <set>
#include <vector>
#include <sstream>
#include <string>

#include <cairo.h>
#include <fmt/format.h>
#include <gdal_priv.h>
#include <nlohmann/json.hpp>
#include <ogr_spatialref.h>

#include "checks/check_set.hpp"
#include "coverage/gaps.hpp"
#include "engine/log_replay.hpp"
#include "engine/survey_summary.hpp"
#include "report/map_render.hpp"
#include "report/pick_plots.hpp"

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

// ---- line profiles and the picks map (issue #13), check words (issue #12) ----------------------

// The demo log replayed in this process, as `swathguard report` does (engine::LogReplay, then
// engine::summarise): the summary the report drew, with the engine for its map input.
struct Replayed {
    std::unique_ptr<sg::engine::LogReplay> replay;
    sg::engine::SurveySummary summary;
};
const Replayed& replayed() {
    static const Replayed r = [] {
        Replayed x;
        x.replay = std::make_unique<sg::engine::LogReplay>(reportRun().log, std::nullopt);
        x.replay->runToEnd();
        x.summary = sg::engine::summarise(x.replay->pipeline().engine(), x.replay->linesFed(), x.replay->context());
        return x;
    }();
    return r;
}

// A CSV file as rows of cells (the report's CSVs quote no comma in these columns).
std::vector<std::vector<std::string>> csvCells(const std::string& path) {
    std::vector<std::vector<std::string>> rows;
    std::istringstream in(slurp(path));
    std::string line;
    while (std::getline(in, line)) {
        if (line.empty()) continue;
        std::vector<std::string> cells;
        std::istringstream l(line);
        std::string c;
        while (std::getline(l, c, ',')) cells.push_back(c);
        rows.push_back(cells);
    }
    return rows;
}
std::size_t column(const std::vector<std::string>& header, const std::string& name) {
    for (std::size_t i = 0; i < header.size(); ++i)
        if (header[i] == name) return i;
    ADD_FAILURE() << "no column " << name;
    return 0;
}

// The text of every page (pdftotext, one page at a time).
std::vector<std::string> pageTexts(const std::string& pdf) {
    std::string info;
    run("pdfinfo " + pdf, &info);
    const auto at = info.find("Pages:");
    const int pages = at == std::string::npos ? 0 : std::stoi(info.substr(at + 6));
    std::vector<std::string> out;
    for (int i = 1; i <= pages; ++i) {
        std::string t;
        run(fmt::format("pdftotext -f {0} -l {0} {1} -", i, pdf), &t);
        out.push_back(t);
    }
    return out;
}

// A page rendered at 144 dpi (2 px per point) by pdftoppm, read back by Cairo.
struct PagePng {
    cairo_surface_t* s = nullptr;
    PagePng(const std::string& pdf, int page, const std::string& stem) {
        run(fmt::format("pdftoppm -r 144 -png -singlefile -f {0} -l {0} {1} {2}", page, pdf, stem));
        s = cairo_image_surface_create_from_png((stem + ".png").c_str());
        cairo_surface_flush(s);
    }
    ~PagePng() { cairo_surface_destroy(s); }
    PagePng(const PagePng&) = delete;
    PagePng& operator=(const PagePng&) = delete;
    bool ok() const { return cairo_surface_status(s) == CAIRO_STATUS_SUCCESS; }
    int width() const { return cairo_image_surface_get_width(s); }
    sg::colour::Rgb8 at(int x, int y) const {
        const auto* row = reinterpret_cast<const std::uint32_t*>(cairo_image_surface_get_data(s) +
                                                                 static_cast<std::ptrdiff_t>(y) * cairo_image_surface_get_stride(s));
        const std::uint32_t v = row[x];
        return {static_cast<std::uint8_t>(v >> 16), static_cast<std::uint8_t>(v >> 8), static_cast<std::uint8_t>(v)};
    }
    // Pixels within `r` px of the page point (x_pt, y_pt) that are within `tol` of colour c.
    int near(double x_pt, double y_pt, int r, sg::colour::Rgb8 c, int tol = 40) const {
        int n = 0;
        const int cx = static_cast<int>(std::lround(2 * x_pt)), cy = static_cast<int>(std::lround(2 * y_pt));
        for (int y = cy - r; y <= cy + r; ++y)
            for (int x = cx - r; x <= cx + r; ++x) {
                if (x < 0 || y < 0 || x >= width() || y >= cairo_image_surface_get_height(s)) continue;
                const auto p = at(x, y);
                n += std::abs(p.r - c.r) <= tol && std::abs(p.g - c.g) <= tol && std::abs(p.b - c.b) <= tol ? 1 : 0;
            }
        return n;
    }
};

// Each run's profile agrees with the run's own figures in runs.csv: the highest altitude bin is the
// run's worst altitude, the deviation bin of largest magnitude its worst deviation, the highest
// noise bin its worst noise (the bins keep the worst value; LineTracker keeps the same worsts by
// its own code path).
TEST_F(ReportCli, LineProfilesAgreeWithRunsCsv) {
    const auto& s = replayed().summary;
    const auto rows = csvCells(dir + "/report/runs.csv");
    ASSERT_GE(rows.size(), 2u);
    const auto& h = rows[0];
    ASSERT_EQ(s.profiles.size(), rows.size() - 1);
    for (std::size_t i = 1; i < rows.size(); ++i) {
        const auto& row = rows[i];
        const int id = std::stoi(row[column(h, "run")]);
        const sg::engine::RunProfileSummary* rp = nullptr;
        for (const auto& p : s.profiles) rp = p.profile.run == id ? &p : rp;
        ASSERT_NE(rp, nullptr) << "run " << id;
        EXPECT_EQ(sg::engine::lineName(s, rp->profile.line), row[column(h, "line")]);
        double alt = 0, dev = 0, noise = 0;
        for (const auto& b : rp->profile.bins) {
            if (b.altitude_m) alt = std::max(alt, *b.altitude_m);
            if (b.deviation_m && std::abs(*b.deviation_m) > std::abs(dev)) dev = *b.deviation_m;
            if (b.noise_nT) noise = std::max(noise, *b.noise_nT);
        }
        EXPECT_GT(rp->profile.bins.size(), 500u) << "run " << id;  // a 604 m line in 1 m bins
        EXPECT_NEAR(alt, std::stod(row[column(h, "worst_altitude_m")]), 0.005) << "run " << id;
        EXPECT_NEAR(dev, std::stod(row[column(h, "worst_deviation_m")]), 0.005) << "run " << id;
        EXPECT_NEAR(noise, std::stod(row[column(h, "worst_noise_nT")]), 0.00005) << "run " << id;
    }
    // Every pick observation is placed on its run's profile, inside the line.
    std::size_t observations = 0, placed = 0;
    for (const auto& k : s.picks.picks) observations += k.observations.size();
    for (const auto& p : s.profiles)
        for (const auto& pk : p.picks) {
            ++placed;
            EXPECT_GE(pk.along_m, -10.0);
            EXPECT_LE(pk.along_m, s.line_coverage[static_cast<std::size_t>(p.profile.line)].length_m + 10.0);
        }
    EXPECT_GT(observations, 0u);
    EXPECT_EQ(placed, observations);
}

// The PDF has the line-profile pages (each run line with its four panels) and the picks map.
TEST_F(ReportCli, PdfHasLineProfilesAndPicksMapPages) {
    const auto pages = pageTexts(dir + "/report/report.pdf");
    const auto& s = replayed().summary;
    std::string profiles;
    int profile_pages = 0, map_page = 0, table_page = 0;
    for (std::size_t i = 0; i < pages.size(); ++i) {
        if (pages[i].rfind("Line profiles", 0) == 0) {
            ++profile_pages;
            profiles += pages[i];
        }
        if (pages[i].rfind("Anomaly picks: map", 0) == 0) map_page = static_cast<int>(i) + 1;
        else if (pages[i].rfind("Anomaly picks", 0) == 0) table_page = static_cast<int>(i) + 1;
    }
    const auto runs = csvCells(dir + "/report/runs.csv");
    std::set<std::string> lines;
    for (std::size_t i = 1; i < runs.size(); ++i) lines.insert(runs[i][1]);
    ASSERT_FALSE(lines.empty());
    // Three lines a page.
    EXPECT_EQ(profile_pages, static_cast<int>((lines.size() + 2) / 3));
    for (const auto& l : lines) EXPECT_NE(profiles.find(l + "\n"), std::string::npos) << l;
    for (const char* panel : {"altitude m", "deviation m", "noise nT", "pick / thr."}) {
        std::size_t n = 0;
        for (auto at = profiles.find(panel); at != std::string::npos; at = profiles.find(panel, at + 1)) ++n;
        EXPECT_EQ(n, lines.size()) << panel;
    }
    EXPECT_GT(table_page, 0);
    ASSERT_GT(map_page, 0);
    const auto& map = pages[static_cast<std::size_t>(map_page - 1)];
    EXPECT_NE(map.find(fmt::format("({} in all", s.picks.picks.size())), std::string::npos) << map;
    EXPECT_EQ(csvRows(dir + "/report/picks.csv"), s.picks.picks.size());
    EXPECT_NE(map.find("not a clearance"), std::string::npos);
}

// On the rendered pages: every pick's diamond (the shared pick colour) where the picks map's frame
// puts its easting and northing; on the first profile page, the altitude alarm limit across the
// altitude panel, the first run's trace through its highest bin and each pick on the picks panel.
TEST_F(ReportCli, RenderedPagesShowPicksAndProfilesWhereTheLayoutPutsThem) {
    const auto& s = replayed().summary;
    const auto& e = replayed().replay->pipeline().engine();
    const auto pages = pageTexts(dir + "/report/report.pdf");
    int map_page = 0, profile_page = 0;
    for (std::size_t i = 0; i < pages.size(); ++i) {
        if (pages[i].rfind("Anomaly picks: map", 0) == 0) map_page = static_cast<int>(i) + 1;
        if (profile_page == 0 && pages[i].rfind("Line profiles", 0) == 0) profile_page = static_cast<int>(i) + 1;
    }
    ASSERT_GT(map_page, 0);
    ASSERT_GT(profile_page, 0);
    const auto pick = sg::colour::kLight.pick;

    // The picks map: the same map input the report builds.
    const auto outlines = sg::coverage::gapOutlines(s.gaps);
    sg::report::MapInput in;
    in.raster = &e.raster();
    in.area = e.plan() ? &e.plan()->area : nullptr;
    in.lines = e.plan() ? &e.plan()->lines : nullptr;
    in.gaps = &s.gaps;
    in.gap_outlines = &outlines;
    in.infill = &s.infill.plan;
    const auto layout = sg::report::picksMapLayout(in);
    PagePng map(dir + "/report/report.pdf", map_page, dir + "/picks_map");
    ASSERT_TRUE(map.ok());
    EXPECT_EQ(map.width() > 1000, layout.landscape);  // 842 pt landscape, 595 pt portrait at 2 px/pt
    ASSERT_FALSE(s.picks.picks.empty());
    for (const auto& k : s.picks.picks) {
        // The diamond's half diagonal is 4.5 pt (9 px): its centre 3 x 3 px are the pick colour.
        EXPECT_GE(map.near(layout.frame.toX(k.easting_m), layout.frame.toY(k.northing_m), 1, pick, 12), 9) << "P" << k.id;
    }
    // Away from every pick (the map's centre of an empty corner) no pick colour.
    EXPECT_EQ(map.near(layout.frame.x + 20, layout.frame.y + layout.frame.h - 40, 6, pick, 12), 0);

    // The first profile page: block 0.
    const auto blocks = sg::report::lineProfileLayout(s);
    ASSERT_FALSE(blocks.empty());
    const auto& b = blocks[0];
    ASSERT_EQ(b.page, 0);
    PagePng pg(dir + "/report/report.pdf", profile_page, dir + "/profiles");
    ASSERT_TRUE(pg.ok());
    const auto& alt = b.panels[sg::report::kAltitude];
    ASSERT_TRUE(s.profile_limits.altitude.enabled);
    const double y_alarm = alt.toY(s.profile_limits.altitude.alarm);
    int on_limit = 0, samples = 0;
    for (double x = alt.x + 5; x < alt.x + alt.w - 5; x += 10, ++samples)
        on_limit += pg.near(x, y_alarm, 1, sg::report::kLimitColour, 60) > 0 ? 1 : 0;
    EXPECT_GE(on_limit, samples - 3) << "alarm limit at y " << y_alarm;
    // The first run's highest bin: its trace passes there (dark pixels within 2 px).
    const auto* rp = b.runs.front();
    const sg::coverage::ProfileBin* top = nullptr;
    for (const auto& bin : rp->profile.bins)
        if (bin.altitude_m && (!top || *bin.altitude_m > *top->altitude_m)) top = &bin;
    ASSERT_NE(top, nullptr);
    EXPECT_GT(pg.near(b.toX(top->along_m), alt.toY(*top->altitude_m), 2, sg::report::kRunTrace[0], 60), 0);
    // Nothing is drawn above the trace's top in that column (the panel's frame aside).
    EXPECT_EQ(pg.near(b.toX(top->along_m), alt.toY(*top->altitude_m) - 8, 2, sg::report::kRunTrace[0], 60), 0);
    const auto& pk_panel = b.panels[sg::report::kPicks];
    for (const auto* r : b.runs)
        for (const auto& pk : r->picks)
            EXPECT_GE(pg.near(b.toX(pk.along_m), pk_panel.toY(std::min(pk.snr, pk_panel.hi)), 1, pick, 12), 4)
                << "P" << pk.id;
}

// Issue #12: the report names checks in the screen's words (checks::checkWords), never by the
// internal identifier. The demo raises alarms whose identifiers are in alarms.csv (a machine
// file, identifiers kept); the PDF has their words and none of the identifiers.
TEST_F(ReportCli, PdfNamesChecksInWordsNotIdentifiers) {
    std::string text;
    ASSERT_EQ(run("pdftotext " + dir + "/report/report.pdf -", &text), 0);
    // pdftotext breaks lines inside table cells: join them for the phrase search.
    std::string flat = text;
    std::replace(flat.begin(), flat.end(), '\n', ' ');
    const std::string alarms = slurp(dir + "/report/alarms.csv");
    int raised = 0;
    for (const auto& c : sg::checks::catalogue()) {
        const std::string id(c.name);
        if (id.find('_') != std::string::npos) {
            EXPECT_EQ(text.find(id), std::string::npos) << "identifier " << id << " in the report";
        }
        if (alarms.find(id + ",") == std::string::npos) continue;
        ++raised;
        EXPECT_NE(flat.find(std::string(sg::checks::checkWords(id))), std::string::npos) << id;
    }
    // The demo raises several checks, the underscored ones among them.
    EXPECT_GE(raised, 5);
    for (const char* id : {"forming_gap", "mag_silence", "gnss_silence", "fix_quality"})
        EXPECT_NE(alarms.find(id), std::string::npos) << id;
    // A fix-quality peak reads as its fix type, not as a rank number.
    EXPECT_FALSE(std::regex_search(text, std::regex(R"(\d rank)")));
}

}  // namespace
