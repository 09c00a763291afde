// The CSV reader (RFC 4180, models/csv.hpp). Properties, for any input:
//  - line endings: the same input written with LF, CRLF or lone-CR line
//    breaks gives the same records (breaks inside quoted fields compared as
//    one kind) on the same line numbers, or the same error on the same line;
//  - round trip: records written back in RFC 4180 form read back equal;
//  - ranges: cut at line breaks outside quotes, the bounded reader used by
//    the parallel score loader (models/replay.cpp) gives, range after range,
//    the same records on the same lines as one whole-file read;
//  - the only exception is InputError, naming the file and a line >= 1.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "fuzz_support.hpp"
#include "models/csv.hpp"
#include "models/errors.hpp"

using namespace tocsin;
using tocsin::fuzz::broken;

namespace {

struct Record {
    long line = 0;
    std::vector<std::string> fields;
    bool operator==(const Record&) const = default;
};

struct Reading {
    std::vector<Record> records;
    std::optional<InputError> error;
    long lines_read = 0;
};

std::string show(const std::string& s) {
    std::string out;
    for (unsigned char c : s) {
        if (c == '\n') out += "\\n";
        else if (c == '\r') out += "\\r";
        else if (c < 32 || c > 126) out += "\\x" + std::string(1, "0123456789abcdef"[c >> 4]) + "0123456789abcdef"[c & 15];
        else out += static_cast<char>(c);
    }
    return out;
}

Reading read_all(CsvReader& reader, const std::string& path) {
    Reading r;
    std::vector<std::string_view> fields;
    try {
        while (reader.next(fields)) r.records.push_back({reader.line(), {fields.begin(), fields.end()}});
    } catch (const InputError& e) {
        if (e.file != path) broken("CSV error names '" + e.file + "', not " + path);
        if (e.line < 1) broken("CSV error without a line: " + std::string(e.what()));
        r.error = e;
    } catch (const std::exception& e) {
        broken(std::string("CSV reader threw something other than InputError: ") + e.what());
    }
    r.lines_read = reader.lines_read();
    return r;
}

Reading read_file(const std::string& path) {
    CsvReader reader(path);
    return read_all(reader, path);
}

// Every line break (CRLF, lone CR, LF) replaced by `eol`.
std::string with_line_breaks(const std::string& text, const std::string& eol) {
    std::string out;
    for (std::size_t i = 0; i < text.size(); ++i) {
        if (text[i] == '\r') {
            out += eol;
            if (i + 1 < text.size() && text[i + 1] == '\n') ++i;
        } else if (text[i] == '\n') {
            out += eol;
        } else {
            out += text[i];
        }
    }
    return out;
}

std::string rfc4180(const std::vector<Record>& records) {
    std::string out;
    for (const Record& r : records) {
        for (std::size_t i = 0; i < r.fields.size(); ++i) {
            const std::string& f = r.fields[i];
            if (i) out += ',';
            if (f.find_first_of(",\"\r\n") == std::string::npos) {
                out += f;
                continue;
            }
            out += '"';
            for (char c : f) out += c == '"' ? std::string("\"\"") : std::string(1, c);
            out += '"';
        }
        out += '\n';
    }
    return out;
}

void same(const Reading& a, const Reading& b, const std::string& what, const std::string& input) {
    const bool same_error = a.error.has_value() == b.error.has_value() &&
                            (!a.error || (a.error->line == b.error->line && a.error->detail == b.error->detail));
    if (a.records != b.records || !same_error)
        broken(what + " (" + std::to_string(a.records.size()) + " vs " + std::to_string(b.records.size()) +
               " records; errors: '" + (a.error ? a.error->what() : std::string("none")) + "' vs '" +
               (b.error ? b.error->what() : std::string("none")) + "') for input \"" + show(input) + "\"");
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string input(reinterpret_cast<const char*>(data), size);
    const auto& scratch = tocsin::fuzz::scratch();

    // Line endings. Breaks inside quoted fields change with the file's, so
    // the records are compared with every break in them made LF.
    Reading lf;
    {
        const std::string text = with_line_breaks(input, "\n");
        lf = read_file(scratch.write("lf.csv", text));
        for (Record& r : lf.records)
            for (std::string& f : r.fields) f = with_line_breaks(f, "\n");
        for (const char* eol : {"\r\n", "\r"}) {
            Reading other = read_file(scratch.write("eol.csv", with_line_breaks(input, eol)));
            for (Record& r : other.records)
                for (std::string& f : r.fields) f = with_line_breaks(f, "\n");
            same(lf, other, std::string(eol[1] ? "CRLF" : "lone-CR") + " line breaks read differently from LF", input);
        }
    }

    const std::string path = scratch.write("input.csv", input);
    const Reading whole = read_file(path);

    if (!whole.error) {
        Reading back = read_file(scratch.write("back.csv", rfc4180(whole.records)));
        // Written back, each record takes as many lines as its fields' LFs
        // (plus CRs, written as they are), so compare fields only.
        for (Record& r : back.records) r.line = 0;
        Reading fields_only = whole;
        for (Record& r : fields_only.records) r.line = 0;
        same(fields_only, back, "records written back in RFC 4180 form read back differently", input);
    }

    // Ranges: cut after some of the LFs outside quotes (the first input byte
    // picks which), as the parallel score loader cuts after a line break.
    std::vector<long long> cuts{0};
    {
        bool in_quotes = false;
        const unsigned pick = size ? data[0] : 0;
        unsigned nth = 0;
        for (std::size_t i = 0; i < size; ++i) {
            if (input[i] == '"') in_quotes = !in_quotes;
            if (input[i] == '\n' && !in_quotes && ((pick >> (nth++ % 8)) & 1)) cuts.push_back(static_cast<long long>(i + 1));
        }
        if (cuts.back() != static_cast<long long>(size)) cuts.push_back(static_cast<long long>(size));
    }
    if (cuts.size() > 2) {
        Reading joined;
        long offset = 0;
        for (std::size_t k = 0; k + 1 < cuts.size() && !joined.error; ++k) {
            CsvReader reader(path, cuts[k], cuts[k + 1]);
            Reading part = read_all(reader, path);
            for (Record& r : part.records) {
                r.line += offset;
                joined.records.push_back(std::move(r));
            }
            if (part.error) {
                joined.error = part.error;
                joined.error->line += offset;
            }
            offset += part.lines_read;
        }
        same(whole, joined, "reading in ranges differs from reading the whole file", input);
    }
    return 0;
}
