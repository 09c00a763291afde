#pragma once
#include <string>

namespace tocsin {

// The cautions every report carries (DESIGN.md, "Cautions the product must carry").
std::string cautions_text();

}  // namespace tocsin
