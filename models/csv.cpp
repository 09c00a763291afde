#include "models/csv.hpp"

#include <cstring>

#include "models/errors.hpp"

namespace tocsin {

namespace {
constexpr std::size_t block_size = std::size_t{8} << 20;
}

CsvReader::CsvReader(const std::string& path) : path_(path) {
    file_ = std::fopen(path.c_str(), "rb");
    if (!file_) throw InputError(path, 0, 0, "", std::string("cannot open file: ") + std::strerror(errno));
    buffer_.resize(block_size);
}

CsvReader::CsvReader(const std::string& path, long long begin, long long end) : CsvReader(path) {
    if (std::fseek(file_, begin, SEEK_SET) != 0)
        throw InputError(path, 0, 0, "", "cannot seek in file");
    remaining_ = end - begin;
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
    std::size_t quoted_used = 0;
    for (;;) {
        // Try to parse one whole record from buffer_[begin_, end_).
        const char* base = buffer_.data();
        std::size_t p = begin_;
        long lines = 0;
        bool complete = false;
        auto& spans = spans_;  // (offset, length); length SIZE_MAX marks an unquoted_ index
        spans.clear();
        quoted_used = 0;
        if (p == end_) {
            if (!refill()) return false;
            continue;
        }
        for (;;) {
            if (p < end_ && base[p] == '"') {
                // Quoted field.
                saw_quote_ = true;
                if (unquoted_.size() <= quoted_used) unquoted_.emplace_back();
                std::string& out = unquoted_[quoted_used];
                out.clear();
                ++p;
                bool closed = false;
                while (p < end_) {
                    char c = base[p];
                    if (c == '"') {
                        if (p + 1 < end_ && base[p + 1] == '"') {
                            out += '"';
                            p += 2;
                            continue;
                        }
                        if (p + 1 == end_ && !eof_) break;  // need to see the next byte
                        closed = true;
                        ++p;
                        break;
                    }
                    if (c == '\n') ++lines;
                    out += c;
                    ++p;
                }
                if (!closed) {
                    if (eof_ && p >= end_)
                        throw InputError(path_, next_line_, static_cast<long>(spans.size() + 1), "",
                                         "a quoted field is never closed (missing \")");
                    break;  // incomplete: refill and retry
                }
                spans.emplace_back(quoted_used++, SIZE_MAX);
            } else {
                std::size_t start = p;
                while (p < end_ && base[p] != ',' && base[p] != '\n' && base[p] != '\r') {
                    if (base[p] == '"')
                        throw InputError(path_, next_line_, static_cast<long>(spans.size() + 1), "",
                                         "a quote inside an unquoted field (quote the whole field and double inner quotes)");
                    ++p;
                }
                if (p == end_ && !eof_) break;
                spans.emplace_back(start, p - start);
            }
            if (p == end_) {
                if (!eof_) break;
                complete = true;
                break;
            }
            char c = base[p];
            if (c == ',') {
                ++p;
                if (p == end_ && !eof_) break;
                if (p == end_) {  // trailing comma at end of file: one more empty field
                    spans.emplace_back(p, 0);
                    complete = true;
                    break;
                }
                continue;
            }
            if (c == '\r') {
                if (p + 1 == end_ && !eof_) break;
                ++p;
                if (p < end_ && base[p] == '\n') ++p;
            } else if (c == '\n') {
                ++p;
            } else {
                throw InputError(path_, next_line_, static_cast<long>(spans.size()), "",
                                 "unexpected character after a closing quote");
            }
            ++lines;
            complete = true;
            break;
        }
        if (!complete) {
            if (!refill()) {
                if (end_ == begin_) return false;
            }
            continue;
        }
        record_line_ = next_line_;
        next_line_ += lines;
        begin_ = p;
        for (const auto& [a, b] : spans) {
            if (b == SIZE_MAX) fields.emplace_back(unquoted_[a]);
            else fields.emplace_back(buffer_.data() + a, b);
        }
        return true;
    }
}

}  // namespace tocsin
