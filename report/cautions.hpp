#pragma once
#include <string>

namespace tocsin {

// The cautions every report carries: results rest on the scenario, not a medical device, local governance decides.
std::string cautions_text();

}  // namespace tocsin
