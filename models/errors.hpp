#pragma once
// Errors in user input (scenario files, CSV logs). Each names where the
// problem is, so a user can open the file at the right line and fix it.
#include <stdexcept>
#include <string>

namespace tocsin {

struct InputError : std::runtime_error {
    std::string file;   // empty when not from a file
    long line = 0;      // 1-based; 0 when unknown
    long column = 0;    // 1-based; 0 when unknown
    std::string field;  // key or CSV column name; may be empty
    std::string detail; // what was wrong and what was expected, without the location

    InputError(std::string file_, long line_, long column_, std::string field_,
               const std::string& message);
};

// "file:line:column: field: message" with the parts that are known.
std::string describe_location(const std::string& file, long line, long column,
                              const std::string& field);

}  // namespace tocsin
