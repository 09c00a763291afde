// The one UTF-8 decoder (RFC 3629, section 4 syntax) and the text check the
// loaders apply to ids, unit names and roles.
#include <doctest/doctest.h>

#include "models/text.hpp"

using namespace tocsin;

TEST_CASE("text.utf8_sequence_length_follows_rfc3629") {
    CHECK(utf8_sequence_length("a", 0) == 1);
    CHECK(utf8_sequence_length("\xc3\xbc", 0) == 2);          // U+00FC
    CHECK(utf8_sequence_length("\xe2\x80\x93", 0) == 3);      // U+2013
    CHECK(utf8_sequence_length("\xf4\x8f\xbf\xbf", 0) == 4);  // U+10FFFF, the last code point
    CHECK(utf8_sequence_length("\xc0\xaf", 0) == 0);          // overlong '/'
    CHECK(utf8_sequence_length("\xe0\x80\xaf", 0) == 0);      // overlong, three bytes
    CHECK(utf8_sequence_length("\xed\xa0\x80", 0) == 0);      // U+D800, a surrogate
    CHECK(utf8_sequence_length("\xf4\x90\x80\x80", 0) == 0);  // above U+10FFFF
    CHECK(utf8_sequence_length("\xe2\x80", 0) == 0);          // cut short
    CHECK(utf8_sequence_length("\x80", 0) == 0);              // a lone continuation byte
    CHECK(utf8_sequence_length("\xff", 0) == 0);
}

TEST_CASE("text.problem_names_the_first_offending_byte_or_character") {
    CHECK(text_problem("Station S\xc3\xbc" "d \xe2\x80\x93 3") == "");
    CHECK(text_problem("") == "");
    CHECK(text_problem("ward\xff") == "byte 0xff at byte 5 is not UTF-8");
    CHECK(text_problem(std::string("a\0b", 3)) == "control character U+0000 at byte 2");
    CHECK(text_problem("a\tb") == "control character U+0009 at byte 2");
    CHECK(text_problem("a\x7f") == "control character U+007F at byte 2");
    CHECK(text_problem("a\xc2\x9f") == "control character U+009F at byte 2");
    CHECK(text_problem("a\xc2\xa0") == "");  // U+00A0, no-break space, is printable
}
