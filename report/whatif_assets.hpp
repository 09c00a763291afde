#pragma once
// The what-if page's inline style sheet and script (report/whatif.hpp).
#include <string>

namespace tocsin {

// Large type and strong contrast for a projector; a print style that keeps
// the selected plan, its figures, the chart and the cautions.
const std::string& whatif_style();
// Plain JavaScript, no library: reads the page's JSON, builds one labelled
// control per swept key, and shows the selected plan. Names reach the page
// only through textContent.
const std::string& whatif_script();

}  // namespace tocsin
