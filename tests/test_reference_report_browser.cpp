// The report in a real browser: Debian's headless Chromium renders a report
// built from an invented input; the screenshot must show a page (not one
// flat colour) and the browser's log must hold no console message (the page
// has no script, so any message means something failed to load or parse).
// Two control cases show that both checks can fail: a blank page is judged
// blank, and a page that writes to the console is caught.
#include <doctest/doctest.h>

#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <map>
#include <regex>
#include <sstream>
#include <vector>

#ifdef TOCSIN_HAVE_ZLIB
#include <zlib.h>
#endif

#include "report/report.hpp"
#include "report_sample.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

const char* const chromium = "/usr/bin/chromium";

struct Rendering {
    bool ran = false;
    std::string log;         // the browser's stdout and stderr
    std::string screenshot;  // PNG bytes
};

// One headless run with a fresh profile, no network services, a fixed window.
Rendering render_in_chromium(const ScratchDir& dir, const std::string& name, const std::string& html,
                             const std::string& window = "1200,2000") {
    const std::string page = dir.file(name + ".html", html);
    const std::string png = dir.path(name + ".png");
    const std::string command = std::string("timeout 120 ") + chromium +
                                " --headless --no-sandbox --disable-gpu --disable-quic --no-first-run"
                                " --disable-background-networking --disable-component-update --disable-sync"
                                " --hide-scrollbars --user-data-dir=" + dir.path(name + "-profile") +
                                " --screenshot=" + png + " --window-size=" + window +
                                " --enable-logging=stderr --v=0 file://" + page;
    const CommandResult r = run_command(command);
    Rendering out;
    out.ran = r.exit_code == 0;
    out.log = r.output;
    if (std::filesystem::exists(png)) out.screenshot = read_file(png);
    return out;
}

// Lines of the browser's log that report a console message or a failed load.
std::vector<std::string> console_lines(const std::string& log) {
    std::vector<std::string> found;
    std::istringstream in(log);
    for (std::string line; std::getline(in, line);)
        if (line.find(":CONSOLE") != std::string::npos || line.find("Uncaught") != std::string::npos ||
            line.find("Failed to load resource") != std::string::npos || line.find("net::ERR_") != std::string::npos)
            found.push_back(line);
    return found;
}

struct Image {
    std::uint32_t width = 0, height = 0;
    std::vector<std::uint8_t> rgb;  // width x height x 3
};

std::uint32_t big_endian(const std::string& s, std::size_t at) {
    return (std::uint32_t(std::uint8_t(s[at])) << 24) | (std::uint32_t(std::uint8_t(s[at + 1])) << 16) |
           (std::uint32_t(std::uint8_t(s[at + 2])) << 8) | std::uint32_t(std::uint8_t(s[at + 3]));
}

#ifdef TOCSIN_HAVE_ZLIB
// Decodes the PNGs Chromium writes: 8-bit RGB or RGBA, not interlaced (PNG
// specification, W3C 2003, sections 9 and 11). Returns an empty image otherwise.
Image decode_png(const std::string& png) {
    Image image;
    if (png.size() < 33 || png.compare(0, 8, "\x89PNG\r\n\x1a\n") != 0) return image;
    std::string compressed;
    int colour_type = -1, bit_depth = 0, interlace = 0;
    for (std::size_t at = 8; at + 12 <= png.size();) {
        const std::uint32_t length = big_endian(png, at);
        const std::string type = png.substr(at + 4, 4);
        if (at + 12 + length > png.size()) return Image{};
        if (type == "IHDR") {
            image.width = big_endian(png, at + 8);
            image.height = big_endian(png, at + 12);
            bit_depth = std::uint8_t(png[at + 16]);
            colour_type = std::uint8_t(png[at + 17]);
            interlace = std::uint8_t(png[at + 20]);
        } else if (type == "IDAT") {
            compressed += png.substr(at + 8, length);
        }
        at += 12 + length;
    }
    if (bit_depth != 8 || (colour_type != 2 && colour_type != 6) || interlace != 0) return Image{};
    const std::size_t channels = colour_type == 6 ? 4 : 3, stride = image.width * channels;
    std::vector<std::uint8_t> raw((stride + 1) * image.height);
    uLongf raw_size = raw.size();
    if (uncompress(raw.data(), &raw_size, reinterpret_cast<const Bytef*>(compressed.data()), compressed.size()) != Z_OK ||
        raw_size != raw.size())
        return Image{};
    // Undo the per-row filters (none, sub, up, average, Paeth).
    std::vector<std::uint8_t> previous(stride, 0), row(stride);
    image.rgb.reserve(std::size_t(image.width) * image.height * 3);
    for (std::uint32_t y = 0; y < image.height; ++y) {
        const std::uint8_t filter = raw[y * (stride + 1)];
        const std::uint8_t* in = &raw[y * (stride + 1) + 1];
        for (std::size_t i = 0; i < stride; ++i) {
            const int a = i >= channels ? row[i - channels] : 0, b = previous[i], c = i >= channels ? previous[i - channels] : 0;
            int predictor = 0;
            switch (filter) {
                case 1: predictor = a; break;
                case 2: predictor = b; break;
                case 3: predictor = (a + b) / 2; break;
                case 4: {
                    const int p = a + b - c, pa = std::abs(p - a), pb = std::abs(p - b), pc = std::abs(p - c);
                    predictor = (pa <= pb && pa <= pc) ? a : (pb <= pc ? b : c);
                    break;
                }
                default: break;
            }
            row[i] = std::uint8_t(in[i] + predictor);
        }
        for (std::size_t x = 0; x < image.width; ++x)
            for (std::size_t k = 0; k < 3; ++k) image.rgb.push_back(row[x * channels + k]);
        previous = row;
    }
    return image;
}
#endif

// What the screenshot shows: how many colours, and the share of dark ("ink")
// pixels in the top and bottom halves of the window. A blank page has one
// colour and no ink; a rendered report has text and charts in both halves.
struct Looks {
    std::size_t colours = 0;
    double ink_top = 0, ink_bottom = 0;
};

#ifdef TOCSIN_HAVE_ZLIB
Looks look_at(const Image& image) {
    Looks looks;
    std::map<std::uint32_t, std::size_t> colours;
    std::size_t ink[2] = {0, 0};
    for (std::uint32_t y = 0; y < image.height; ++y)
        for (std::uint32_t x = 0; x < image.width; ++x) {
            const std::uint8_t* p = &image.rgb[(std::size_t(y) * image.width + x) * 3];
            ++colours[(std::uint32_t(p[0]) << 16) | (std::uint32_t(p[1]) << 8) | p[2]];
            // Rec. 601 luma; the page's ink (#1f2a33) is about 40, its paper about 250.
            const double luma = 0.299 * p[0] + 0.587 * p[1] + 0.114 * p[2];
            if (luma < 128) ++ink[y < image.height / 2 ? 0 : 1];
        }
    looks.colours = colours.size();
    const double half = double(image.width) * image.height / 2;
    looks.ink_top = ink[0] / half;
    looks.ink_bottom = ink[1] / half;
    return looks;
}
#endif

bool chromium_available() {
    if (std::filesystem::exists(chromium)) return true;
    MESSAGE("SKIPPED: chromium not installed at " << chromium
            << " (Debian package 'chromium'; ./go test installs it); the report was not checked in a browser");
    return false;
}

const std::string blank_page = "<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>blank</title></head>"
                               "<body></body></html>\n";

}  // namespace

TEST_CASE("report_browser.renders_without_console_errors") {
    if (!chromium_available()) return;
    ScratchDir dir;
    const Rendering report = render_in_chromium(dir, "report", render_report(sample_report_input("<b>&amp;</b>\"'")));
    {
        INFO(report.log);
        REQUIRE(report.ran);
        REQUIRE_FALSE(report.screenshot.empty());
        CHECK(report.screenshot.compare(0, 8, "\x89PNG\r\n\x1a\n") == 0);
        const auto console = console_lines(report.log);
        CHECK(console.empty());
        for (const std::string& line : console) MESSAGE("console: " << line);
    }
    // To look at the page: TOCSIN_KEEP_SCREENSHOT=/tmp/report.png
    if (const char* keep = std::getenv("TOCSIN_KEEP_SCREENSHOT")) {
        std::ofstream(keep, std::ios::binary) << report.screenshot;
        MESSAGE("screenshot kept at " << std::string(keep));
    }
#ifdef TOCSIN_HAVE_ZLIB
    const Image image = decode_png(report.screenshot);
    REQUIRE(image.width == 1200);
    REQUIRE(image.height == 2000);
    const Looks looks = look_at(image);
    MESSAGE("screenshot: " << looks.colours << " colours, dark pixels " << looks.ink_top * 100 << "% (top half), "
                           << looks.ink_bottom * 100 << "% (bottom half)");
    // Thresholds well below what the sample report shows (hundreds of
    // colours from antialiased text and charts; text covers a few percent of
    // each half) and far above a blank page (1 colour, 0%).
    CHECK(looks.colours >= 50);
    CHECK(looks.ink_top > 0.005);
    CHECK(looks.ink_bottom > 0.005);
#else
    // Without zlib the pixels cannot be read; a page of text and charts
    // compresses far worse than an empty one of the same size.
    MESSAGE("zlib not found at build time: judging the screenshot by its size against a blank page");
    const Rendering blank = render_in_chromium(dir, "blank", blank_page);
    REQUIRE_FALSE(blank.screenshot.empty());
    CHECK(report.screenshot.size() > 5 * blank.screenshot.size());
#endif
}

TEST_CASE("report_browser.controls_show_the_checks_can_fail") {
    if (!chromium_available()) return;
    ScratchDir dir;
    // A page that writes to the console is caught by the log check.
    const Rendering noisy = render_in_chromium(
        dir, "noisy",
        "<!DOCTYPE html><html><head><meta charset=\"utf-8\"><title>noisy</title></head><body><p>x</p>"
        "<script>console.error(\"planted error\")</script></body></html>\n");
    INFO(noisy.log);
    REQUIRE(noisy.ran);
    const auto console = console_lines(noisy.log);
    REQUIRE(console.size() == 1);
    CHECK(console[0].find("planted error") != std::string::npos);
#ifdef TOCSIN_HAVE_ZLIB
    // A blank page is judged blank.
    const Rendering blank = render_in_chromium(dir, "blank", blank_page);
    REQUIRE(blank.ran);
    const Image image = decode_png(blank.screenshot);
    REQUIRE(image.width == 1200);
    const Looks looks = look_at(image);
    CHECK(looks.colours == 1);
    CHECK(looks.ink_top == 0);
    CHECK(looks.ink_bottom == 0);
#else
    MESSAGE("zlib not found at build time: blank-page pixel control skipped");
#endif
}

namespace {

// An A4 page less the report's 14 mm margins is 182 mm wide, 688 CSS pixels
// (96 per inch). The page's print rules are applied on screen in a window that
// wide, and a script logs the right edge of the widest table.
double widest_table_in_print(const ScratchDir& dir, const std::string& name, std::string html) {
    const auto print = html.find("@media print{");
    REQUIRE(print != std::string::npos);
    html.replace(print, 13, "@media all{");
    const auto body_end = html.rfind("</body>");
    REQUIRE(body_end != std::string::npos);
    html.insert(body_end, "<script>var w=0;document.querySelectorAll('table').forEach(function(t){"
                          "w=Math.max(w,t.getBoundingClientRect().right)});console.log('widest_table_right='+w)</script>");
    const Rendering r = render_in_chromium(dir, name, html, "688,3000");
    INFO(r.log);
    REQUIRE(r.ran);
    const auto at = r.log.find("widest_table_right=");
    REQUIRE(at != std::string::npos);
    return std::stod(r.log.substr(at + 19));
}

}  // namespace

TEST_CASE("report_browser.wide_tables_fit_a_printed_page") {
    if (!chromium_available()) return;
    ScratchDir dir;
    // The sweep's report (ten plans, tables of up to 14 columns), with its plans
    // under long names, as sweeps named them before: "page-70 threshold=50, snooze_minutes=60".
    const std::string sweep =
        std::regex_replace(read_file(std::string(TOCSIN_SOURCE_DIR) + "/tests/golden/sweep_report.html"),
                           std::regex("page-70 t([0-9]+) s([0-9]+)"), "page-70 threshold=$1, snooze_minutes=$2");
    REQUIRE(sweep.find("page-70 threshold=50, snooze_minutes=60") != std::string::npos);
    CHECK(widest_table_in_print(dir, "sweep", sweep) <= 688.5);
    // Control: without the print rules that let cells and intervals wrap, the
    // same tables run off the page.
    std::string stiff = sweep;
    const std::pair<std::string, std::string> rules[] = {
        {"th,td{padding:.25em .35em;overflow-wrap:anywhere}", "th,td{padding:.25em .35em}"},
        {"\n.interval{white-space:normal}", ""}};
    for (const auto& [rule, without] : rules) {
        const auto at = stiff.find(rule);
        REQUIRE(at != std::string::npos);
        stiff.replace(at, rule.size(), without);
    }
    CHECK(widest_table_in_print(dir, "stiff", stiff) > 688.5);
}
