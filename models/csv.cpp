#include "models/csv.hpp"

#include <algorithm>
#include <cstdint>
#include <cstring>
#include <filesystem>

#include "models/errors.hpp"

namespace tocsin {

namespace {
constexpr std::size_t block_size = std::size_t{8} << 20;

// The bytes that end or break an unquoted field: one table look-up per byte
// instead of four comparisons.
struct FieldStops {
    bool stop[256] = {};
    constexpr FieldStops() {
        stop[static_cast<unsigned char>(',')] = stop[static_cast<unsigned char>('\n')] = true;
        stop[static_cast<unsigned char>('\r')] = stop[static_cast<unsigned char>('"')] = true;
    }
};
constexpr FieldStops field_stops;
}

CsvReader::CsvReader(const std::string& path) : path_(path) {
    // fopen succeeds on a directory on Linux and the first read fails, which
    // would read as an empty file.
    std::error_code ec;
    if (std::filesystem::is_directory(path, ec))
        throw InputError(path, 1, 0, "", "is a directory, not a CSV file");
    file_ = std::fopen(path.c_str(), "rb");
    if (!file_) throw InputError(path, 1, 0, "", std::string("cannot open file: ") + std::strerror(errno));
    // A small file gets a small buffer: zero-filling a whole block for a
    // few lines made every open of a small file cost milliseconds. A file
    // whose size is unknown (a pipe) starts at a whole block.
    const auto size = std::filesystem::file_size(path, ec);
    buffer_.resize(ec ? block_size : static_cast<std::size_t>(std::clamp<std::uintmax_t>(size, 1, block_size)));
}

CsvReader::CsvReader(const std::string& path, long long begin, long long end) : CsvReader(path) {
    if (std::fseek(file_, begin, SEEK_SET) != 0)
        throw InputError(path, 1, 0, "", "cannot seek in file");
    buffer_origin_ = begin;
    remaining_ = end - begin;
    if (remaining_ < static_cast<long long>(buffer_.size())) buffer_.resize(static_cast<std::size_t>(std::max(1LL, remaining_)));
}

CsvReader::~CsvReader() {
    if (file_) std::fclose(file_);
}

bool CsvReader::refill() {
    if (eof_) return false;
    // Keep the unread tail, then read more behind it; grow when one record is
    // longer than the buffer.
    std::size_t tail = end_ - begin_;
    if (begin_ > 0) std::memmove(buffer_.data(), buffer_.data() + begin_, tail);
    buffer_origin_ += static_cast<long long>(begin_);
    begin_ = 0;
    end_ = tail;
    if (end_ == buffer_.size()) buffer_.resize(buffer_.size() * 2);
    std::size_t want = buffer_.size() - end_;
    if (remaining_ >= 0 && static_cast<long long>(want) > remaining_) want = static_cast<std::size_t>(remaining_);
    std::size_t got = want ? std::fread(buffer_.data() + end_, 1, want, file_) : 0;
    if (remaining_ >= 0) remaining_ -= static_cast<long long>(got);
    end_ += got;
    if (got == 0) eof_ = true;
    return got > 0;
}

bool CsvReader::next(std::vector<std::string_view>& fields) {
    fields.clear();
    for (;;) {
        if (begin_ == end_) {
            if (!refill()) return false;
            continue;
        }
        std::size_t p = 0;
        long lines = 0;
        if (!parse_record(p, lines)) {
            // The buffer ends inside the record: read more and parse it again.
            if (!refill() && end_ == begin_) return false;
            continue;
        }
        record_line_ = next_line_;
        next_line_ += lines;
        begin_ = p;
        for (const auto& [a, b] : spans_) {
            if (b == SIZE_MAX) fields.emplace_back(unquoted_[a]);
            else fields.emplace_back(buffer_.data() + a, b);
        }
        return true;
    }
}

bool CsvReader::parse_record(std::size_t& record_end, long& record_lines) {
    // Locals, not the references, in the loop: the compiler keeps them in
    // registers (stores into spans_ could otherwise alias them).
    std::size_t p = begin_;
    long lines = 0;
    const char* base = buffer_.data();
    const std::size_t end = end_;
    const bool eof = eof_;
    spans_.clear();
    std::size_t quoted_used = 0;
    auto done = [&] {
        record_end = p;
        record_lines = lines;
        return true;
    };
    for (;;) {
        if (p < end && base[p] == '"') {
            std::size_t q = p;  // a copy, so that p's address is never taken
            long quoted_lines = lines;
            if (!parse_quoted(q, quoted_lines, quoted_used)) return false;
            p = q;
            lines = quoted_lines;
        } else {
            const std::size_t start = p;
            while (p < end && !field_stops.stop[static_cast<unsigned char>(base[p])]) ++p;
            if (p < end && base[p] == '"')
                throw InputError(path_, next_line_, static_cast<long>(spans_.size() + 1), "",
                                 "a quote inside an unquoted field (quote the whole field and double inner quotes)");
            if (p == end && !eof) return false;
            spans_.emplace_back(start, p - start);
        }
        if (p == end) return eof && done();  // the last record of the file ends without a line break
        const char c = base[p];
        if (c == ',') {
            ++p;
            if (p == end && !eof) return false;
            if (p == end) {  // trailing comma at end of file: one more empty field
                spans_.emplace_back(p, 0);
                return done();
            }
            continue;
        }
        if (c == '\r') {
            if (p + 1 == end && !eof) return false;
            ++p;
            if (p < end && base[p] == '\n') ++p;
        } else if (c == '\n') {
            ++p;
        } else {
            throw InputError(path_, next_line_, static_cast<long>(spans_.size()), "",
                             "unexpected character after a closing quote");
        }
        ++lines;
        return done();
    }
}

bool CsvReader::parse_quoted(std::size_t& p, long& lines, std::size_t& quoted_used) {
    const char* base = buffer_.data();
    saw_quote_ = true;
    if (unquoted_.size() <= quoted_used) unquoted_.emplace_back();
    std::string& out = unquoted_[quoted_used];
    out.clear();
    ++p;
    while (p < end_) {
        const char c = base[p];
        if (c == '"') {
            if (p + 1 < end_ && base[p + 1] == '"') {
                out += '"';
                p += 2;
                continue;
            }
            if (p + 1 == end_ && !eof_) return false;  // need to see the next byte
            ++p;
            spans_.emplace_back(quoted_used++, SIZE_MAX);
            return true;
        }
        // A line break inside quotes counts like one between records:
        // CRLF once, LF or a lone CR once each.
        if (c == '\r') {
            if (p + 1 == end_ && !eof_) return false;  // need to see whether LF follows
            if (p + 1 == end_ || base[p + 1] != '\n') ++lines;
        } else if (c == '\n') {
            ++lines;
        }
        out += c;
        ++p;
    }
    if (eof_)
        throw InputError(path_, next_line_, static_cast<long>(spans_.size() + 1), "",
                         "a quoted field is never closed (missing \")");
    return false;
}

long long next_record_start(const std::string& path, long long from, long long size) {
    std::FILE* f = std::fopen(path.c_str(), "rb");
    if (!f || std::fseek(f, from, SEEK_SET) != 0) {
        if (f) std::fclose(f);
        throw InputError(path, 1, 0, "", "cannot seek in file");
    }
    std::vector<char> block(1 << 16);
    long long at = from;
    bool after_cr = false;  // the previous byte was a CR: a following LF belongs to it
    long long found = size;
    for (;;) {
        const std::size_t got = std::fread(block.data(), 1, block.size(), f);
        if (got == 0) {
            if (after_cr) found = at;
            break;
        }
        std::size_t i = 0;
        if (after_cr) {
            found = block[0] == '\n' ? at + 1 : at;
            break;
        }
        for (; i < got; ++i)
            if (block[i] == '\n' || block[i] == '\r') break;
        if (i == got) {
            at += static_cast<long long>(got);
            continue;
        }
        if (block[i] == '\n') {
            found = at + static_cast<long long>(i) + 1;
            break;
        }
        if (i + 1 < got) {
            found = at + static_cast<long long>(i) + (block[i + 1] == '\n' ? 2 : 1);
            break;
        }
        after_cr = true;
        at += static_cast<long long>(got);
    }
    std::fclose(f);
    return std::min(found, size);
}

std::vector<std::size_t> header_columns(const CsvReader& reader, const std::vector<std::string_view>& header,
                                        const std::vector<std::string_view>& required) {
    std::vector<std::size_t> at(required.size(), SIZE_MAX);
    for (std::size_t i = 0; i < header.size(); ++i) {
        std::string_view name = header[i];
        if (i == 0 && name.substr(0, 3) == "\xEF\xBB\xBF") name.remove_prefix(3);  // UTF-8 byte order mark
        for (std::size_t r = 0; r < required.size(); ++r) {
            if (name != required[r]) continue;
            if (at[r] != SIZE_MAX)
                throw InputError(reader.path(), reader.line(), static_cast<long>(i + 1), std::string(name),
                                 "column appears twice in the header");
            at[r] = i;
        }
    }
    for (std::size_t r = 0; r < required.size(); ++r) {
        if (at[r] != SIZE_MAX) continue;
        std::string expected;
        for (auto n : required) expected += (expected.empty() ? "" : ",") + std::string(n);
        throw InputError(reader.path(), reader.line(), 0, std::string(required[r]),
                         "required column is missing from the header (expected columns " + expected +
                             " in any order; extra columns are ignored)");
    }
    return at;
}

}  // namespace tocsin
