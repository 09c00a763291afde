#include "models/errors.hpp"

namespace tocsin {

std::string describe_location(const std::string& file, long line, long column,
                              const std::string& field) {
    std::string out = file.empty() ? std::string("<input>") : file;
    if (line > 0) out.append(":").append(std::to_string(line));
    if (column > 0) out.append(":").append(std::to_string(column));
    if (!field.empty()) out.append(": ").append(field);
    return out;
}

InputError::InputError(std::string file_, long line_, long column_, std::string field_,
                       const std::string& message)
    : std::runtime_error(describe_location(file_, line_, column_, field_).append(": ").append(message)),
      file(std::move(file_)), line(line_), column(column_), field(std::move(field_)), detail(message) {}

}  // namespace tocsin
