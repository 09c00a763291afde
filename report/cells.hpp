#pragma once
// Table cells from typed figures: an undefined figure is an empty cell.
#include <cmath>
#include <cstdint>
#include <optional>

#include "analysis/table.hpp"

namespace tocsin {

template <typename T>
Cell cell_or_empty(const std::optional<T>& value) {
    return value ? Cell(*value) : Cell();
}
// A real that is not finite (NaN: no value) is an empty cell.
inline Cell finite_or_empty(double value) { return std::isfinite(value) ? Cell(value) : Cell(); }
// A yes/no column: 1 or 0.
inline Cell flag_cell(bool value) { return std::int64_t{value ? 1 : 0}; }

}  // namespace tocsin
