#pragma once
// What a long run shows on a terminal while it works (the phase it is in, a
// bar over the replications) and the table of its phases' time and memory
// (`--phases`, bench/bench_end_to_end). Plain functions of their inputs, so the
// tests can read them; cli/ decides when and where they are shown.
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "models/phase_log.hpp"

namespace tocsin {

// One line, no line break, at most `width` characters:
//   "  simulate  replication 3/20 [######..........]  15%  12 s, ~68 s left"
// `total` 0 means the phase has no count to show (reading a log): only the
// phase and the seconds so far.
std::string progress_line(std::string_view phase, std::uint64_t done, std::uint64_t total, double elapsed_seconds,
                          std::size_t width = 79);

// The phases as an aligned text table: wall and CPU seconds, the peak
// resident memory (MiB) when each ended, and how often it was entered; then
// `total` (the whole command) on the last line.
std::string phase_table_text(const std::vector<PhaseFigures>& phases, const PhaseFigures& total);

}  // namespace tocsin
