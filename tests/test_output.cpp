// What reaches CSV and JSON files: numbers that read back to the same double,
// non-finite numbers spelled validly, and text that is valid UTF-8 whatever
// bytes a name carried.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <limits>
#include <string>

#include "analysis/table.hpp"
#include "test_support.hpp"

using namespace tocsin;
using namespace tocsin::testing;

namespace {

// Reads the text back with strtod, which the C library rounds correctly.
double read_back(const std::string& text) {
    char* end = nullptr;
    const double v = std::strtod(text.c_str(), &end);
    CHECK(*end == '\0');
    return v;
}

Table one_real(double v) {
    Table t;
    t.name = "t";
    t.columns = {"x"};
    t.add_row({v});
    return t;
}

// Every byte sequence decodes as UTF-8 (strict: no overlongs, surrogates or
// values above U+10FFFF). Written out here rather than through the library's
// decoder, so the check does not share the writer's mistakes.
bool strict_utf8(const std::string& s) {
    for (std::size_t i = 0; i < s.size();) {
        const auto b = [&](std::size_t k) { return static_cast<unsigned char>(s[k]); };
        const unsigned char c = b(i);
        std::size_t n = 0;
        std::uint32_t cp = 0;
        if (c < 0x80) { ++i; continue; }
        if ((c & 0xE0) == 0xC0) { n = 2; cp = c & 0x1F; }
        else if ((c & 0xF0) == 0xE0) { n = 3; cp = c & 0x0F; }
        else if ((c & 0xF8) == 0xF0) { n = 4; cp = c & 0x07; }
        else return false;
        if (i + n > s.size()) return false;
        for (std::size_t k = 1; k < n; ++k) {
            if ((b(i + k) & 0xC0) != 0x80) return false;
            cp = (cp << 6) | (b(i + k) & 0x3F);
        }
        const std::uint32_t least[] = {0, 0, 0x80, 0x800, 0x10000};
        if (cp < least[n] || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF)) return false;
        i += n;
    }
    return true;
}

}  // namespace

TEST_CASE("output.numbers_read_back_exactly") {
    // A small net benefit keeps its digits; sums that are not what they look
    // like keep theirs; very small and very large magnitudes survive.
    for (double v : {0.000012, 1.0 / 3.0, 0.1 + 0.2, 2.5e-9, 6.02214076e23, 1e-300, -0.000999, 123456.789, 5e-324,
                     std::numeric_limits<double>::max(), 0.5, 12.0, -7.25}) {
        CAPTURE(v);
        const std::string csv = to_csv(one_real(v));
        const std::string cell = csv.substr(2, csv.size() - 3);  // after "x\n", before the final newline
        CHECK(read_back(cell) == v);
        const std::string json = to_json(one_real(v));
        const std::size_t colon = json.find(": ");
        const std::string value = json.substr(colon + 2, json.find('}') - colon - 2);
        CHECK(read_back(value) == v);
    }
    CHECK(to_csv(one_real(0.000012)) == "x\n1.2e-05\n");
    CHECK(to_csv(one_real(0.5)) == "x\n0.5\n");
    CHECK(to_csv(one_real(12.0)) == "x\n12\n");
    CHECK(to_csv(one_real(-0.0)) == "x\n0\n");  // no "-0" for a zero difference
}

TEST_CASE("output.non_finite_numbers") {
    for (double v : {std::nan(""), std::numeric_limits<double>::infinity(), -std::numeric_limits<double>::infinity()}) {
        CAPTURE(v);
        CHECK(to_csv(one_real(v)) == "x\n\n");
        CHECK(to_json(one_real(v)) == "[\n {\"x\": null}\n]\n");
    }
}

TEST_CASE("output.terminal_text_stays_rounded") {
    CHECK(to_text(one_real(0.000012), 2).find("0\n") != std::string::npos);
    CHECK(to_text(one_real(1.0 / 3.0), 3).find("0.333\n") != std::string::npos);
}

TEST_CASE("output.text_is_valid_utf8") {
    const std::string bad[] = {
        std::string("caf\xE9"),                // Latin-1, not UTF-8
        std::string("\xC0\xAF"),               // overlong '/'
        std::string("\xED\xA0\x80"),           // a surrogate
        std::string("\xF4\x90\x80\x80"),       // above U+10FFFF
        std::string("cut \xE2\x82"),           // truncated sequence at the end
        std::string("\xFF\xFE plan"),
    };
    for (const std::string& s : bad) {
        CAPTURE(s);
        Table t;
        t.name = "t";
        t.columns = {"name", s};
        t.add_row({s, 1.0});
        const std::string csv = to_csv(t), json = to_json(t);
        CHECK(strict_utf8(csv));
        CHECK(strict_utf8(json));
        CHECK(csv.find("\xEF\xBF\xBD") != std::string::npos);
        CHECK(json.find("\xEF\xBF\xBD") != std::string::npos);
    }
    // Valid text passes unchanged, emoji included.
    const std::string fine = "4 Nord \xC3\xA9tage \xF0\x9F\x9A\x91 \xE2\x80\x94 \"B\\C\"";
    CHECK(csv_field(fine) == "\"4 Nord \xC3\xA9tage \xF0\x9F\x9A\x91 \xE2\x80\x94 \"\"B\\C\"\"\"");
    CHECK(json_escape(fine) == "\"4 Nord \xC3\xA9tage \xF0\x9F\x9A\x91 \xE2\x80\x94 \\\"B\\\\C\\\"\"");
}

TEST_CASE("output.json_escapes_control_characters") {
    CHECK(json_escape(std::string("a\x01" "b\x1F" "c\x7F" "d", 7)) == "\"a\\u0001b\\u001fc\\u007fd\"");
    CHECK(json_escape(std::string("nul\0x", 5)) == "\"nul\\u0000x\"");
    CHECK(json_escape("tab\tline\ncr\r") == "\"tab\\tline\\ncr\\r\"");
    // U+2028 and U+2029 are valid JSON but end a line in older JavaScript.
    CHECK(json_escape("a\xE2\x80\xA8" "b\xE2\x80\xA9") == "\"a\\u2028b\\u2029\"");
}
