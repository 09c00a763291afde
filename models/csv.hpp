#pragma once
// A streaming RFC 4180 reader: fields separated by commas, records by LF or
// CRLF, double-quoted fields may hold commas, quotes ("") and line breaks.
// Reads the file in blocks so a multi-gigabyte log never sits in memory whole.
#include <cstdio>
#include <memory>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace tocsin {

class CsvReader {
public:
    // Throws InputError naming the file when it cannot be opened.
    explicit CsvReader(const std::string& path);
    // Reads only bytes [begin, end) of the file, which must start at a record
    // boundary; line numbers count from 1 at `begin`.
    CsvReader(const std::string& path, long long begin, long long end);
    ~CsvReader();
    CsvReader(const CsvReader&) = delete;
    CsvReader& operator=(const CsvReader&) = delete;

    // Reads the next record into `fields` (views valid until the next call).
    // Returns false at end of file. Throws InputError on an unterminated quote.
    bool next(std::vector<std::string_view>& fields);
    // 1-based line on which the last record returned started.
    long line() const { return record_line_; }
    // 1-based column (field number) helper for messages.
    const std::string& path() const { return path_; }
    // Physical lines consumed so far.
    long lines_read() const { return next_line_ - 1; }
    // True once any quoted field was read.
    bool saw_quote() const { return saw_quote_; }

private:
    bool refill();
    std::string path_;
    std::FILE* file_ = nullptr;
    std::vector<char> buffer_;
    std::size_t begin_ = 0, end_ = 0;
    bool eof_ = false;
    bool saw_quote_ = false;
    long long remaining_ = -1;  // bytes left to read in a bounded range; -1 = to end of file
    long next_line_ = 1, record_line_ = 0;
    std::vector<std::string> unquoted_;
    std::vector<std::pair<std::size_t, std::size_t>> spans_;  // storage for fields that needed unescaping
};

}  // namespace tocsin
