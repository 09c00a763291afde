#pragma once
// UTF-8 decoding, in one place: the loaders check text read from input files
// with it, and the HTML report uses it to escape and shorten text safely.
#include <cstddef>
#include <string>
#include <string_view>

namespace tocsin {

// Length of the valid UTF-8 sequence starting at text[i], or 0 when invalid
// (RFC 3629: no overlong forms, no surrogates, nothing above U+10FFFF).
std::size_t utf8_sequence_length(std::string_view text, std::size_t i);

// U+FFFD, which stands in for a byte that is not UTF-8 when text is written out.
inline constexpr std::string_view replacement_character = "\xEF\xBF\xBD";

// Appends the valid UTF-8 sequence at text[i] to `out`, or U+FFFD when the
// byte there starts none, and moves `i` past what it read.
void append_utf8_or_replacement(std::string& out, std::string_view text, std::size_t& i);

// The shortest text that reads back (std::from_chars) to the same double,
// sign of zero included (std::to_chars); it may use an exponent (1.2e-05).
std::string round_trip_text(double value);

// A number rounded to at most `max_decimals`, trailing zeros dropped: for
// people (messages, the terminal, the report).
std::string format_real(double value, int max_decimals = 6);

// Why `text` is not acceptable as a name or id read from a file, or "" when it
// is: it must be valid UTF-8 without control characters (U+0000 to U+001F,
// U+007F to U+009F; tabs and line breaks included, since a unit name or id
// with one prints badly and is almost always an export fault). The message
// names the first offending byte or character, e.g. "byte 0xff is not UTF-8"
// or "control character U+0000".
std::string text_problem(std::string_view text);

}  // namespace tocsin
