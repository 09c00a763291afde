#pragma once
// A streaming RFC 4180 reader: fields separated by commas, records by LF,
// CRLF or a lone CR (spreadsheet exports differ; all three read alike and
// count as one line each, in the header, in rows and inside quoted fields);
// double-quoted fields may hold commas, quotes ("") and line breaks.
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
    // Throws InputError naming the file (line 1) when it cannot be opened or
    // is a directory.
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
    // Byte offset in the file of the first byte not yet returned: after next(),
    // the start of the following record.
    long long offset() const { return buffer_origin_ + static_cast<long long>(begin_); }

private:
    bool refill();
    // Parses one whole record starting at buffer_[begin_] into spans_ (and
    // unquoted_): sets record_end just past its line break and record_lines to
    // the lines it spans; false when the buffer ends before the record does.
    bool parse_record(std::size_t& record_end, long& record_lines);
    // Parses the quoted field starting at buffer_[p] into unquoted_[quoted_used]
    // and appends its span; false when the buffer ends inside it.
    bool parse_quoted(std::size_t& p, long& lines, std::size_t& quoted_used);
    std::string path_;
    std::FILE* file_ = nullptr;
    std::vector<char> buffer_;
    std::size_t begin_ = 0, end_ = 0;
    bool eof_ = false;
    bool saw_quote_ = false;
    long long buffer_origin_ = 0;  // file offset of buffer_[0]
    long long remaining_ = -1;  // bytes left to read in a bounded range; -1 = to end of file
    long next_line_ = 1, record_line_ = 0;
    std::vector<std::string> unquoted_;
    std::vector<std::pair<std::size_t, std::size_t>> spans_;  // storage for fields that needed unescaping
};

// The offset of the first record that starts at or after `from`, i.e. just
// after the first line break (LF, CRLF or lone CR) at or after `from`, where
// `from` is not itself just after a line break; `size` when there is none.
// Used to cut a file into chunks that each start at a record.
long long next_record_start(const std::string& path, long long from, long long size);

// Positions of `required` columns in a header row (a UTF-8 byte order mark
// before the first name is ignored). Throws InputError at the header line for
// a repeated or missing column.
std::vector<std::size_t> header_columns(const CsvReader& reader, const std::vector<std::string_view>& header,
                                        const std::vector<std::string_view>& required);

}  // namespace tocsin
