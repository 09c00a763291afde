#include "models/text.hpp"

#include <cassert>
#include <charconv>
#include <cmath>
#include <cstdio>

namespace tocsin {

std::size_t utf8_sequence_length(std::string_view text, std::size_t i) {
    const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(text[k]); };
    const unsigned char lead = byte(i);
    if (lead < 0x80) return 1;
    std::size_t length = 0;
    unsigned char second_lo = 0x80, second_hi = 0xBF;
    if (lead >= 0xC2 && lead <= 0xDF) length = 2;
    else if (lead >= 0xE0 && lead <= 0xEF) {
        length = 3;
        if (lead == 0xE0) second_lo = 0xA0;
        if (lead == 0xED) second_hi = 0x9F;
    } else if (lead >= 0xF0 && lead <= 0xF4) {
        length = 4;
        if (lead == 0xF0) second_lo = 0x90;
        if (lead == 0xF4) second_hi = 0x8F;
    } else {
        return 0;
    }
    if (i + length > text.size()) return 0;
    if (byte(i + 1) < second_lo || byte(i + 1) > second_hi) return 0;
    for (std::size_t k = 2; k < length; ++k)
        if (byte(i + k) < 0x80 || byte(i + k) > 0xBF) return 0;
    return length;
}

std::string text_problem(std::string_view text) {
    char buf[64];
    for (std::size_t i = 0; i < text.size();) {
        const auto lead = static_cast<unsigned char>(text[i]);
        const std::size_t length = utf8_sequence_length(text, i);
        if (length == 0) {
            std::snprintf(buf, sizeof buf, "byte 0x%02x at byte %zu is not UTF-8", lead, i + 1);
            return buf;
        }
        // C1 controls are the two-byte sequences C2 80 to C2 9F.
        const unsigned code = length == 1 ? lead
                              : length == 2 ? ((lead & 0x1Fu) << 6) | (static_cast<unsigned char>(text[i + 1]) & 0x3Fu)
                                            : 0xFFFFu;
        if (code < 0x20 || (code >= 0x7F && code <= 0x9F)) {
            std::snprintf(buf, sizeof buf, "control character U+%04X at byte %zu", code, i + 1);
            return buf;
        }
        i += length;
    }
    return "";
}

void append_utf8_or_replacement(std::string& out, std::string_view text, std::size_t& i) {
    const std::size_t length = utf8_sequence_length(text, i);
    if (length == 0) {
        out += replacement_character;
        ++i;
    } else {
        out.append(text.substr(i, length));
        i += length;
    }
}

std::string format_real(double v, int max_decimals) {
    if (!std::isfinite(v)) return std::isnan(v) ? "NaN" : (v > 0 ? "Inf" : "-Inf");
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", max_decimals, v);
    std::string s = buf;
    if (s.find('.') != std::string::npos) {
        while (!s.empty() && s.back() == '0') s.pop_back();
        if (!s.empty() && s.back() == '.') s.pop_back();
    }
    if (s == "-0") s = "0";
    return s;
}

std::string round_trip_text(double v) {
    char buf[32];
    const auto [end, ec] = std::to_chars(buf, buf + sizeof buf, v);
    assert(ec == std::errc());
    return std::string(buf, end);
}

}  // namespace tocsin
