#include "report/progress_text.hpp"

#include <algorithm>
#include <cstdio>

namespace tocsin {

std::string progress_line(std::string_view phase, std::uint64_t done, std::uint64_t total, double elapsed_seconds,
                          std::size_t width) {
    char buf[160];
    std::string line = "  " + std::string(phase);
    if (total > 0) {
        done = std::min(done, total);
        constexpr int bar = 20;
        const int filled = static_cast<int>(bar * done / total);
        std::snprintf(buf, sizeof buf, "  replication %llu/%llu [%s%s] %3d%%", static_cast<unsigned long long>(done),
                      static_cast<unsigned long long>(total), std::string(static_cast<std::size_t>(filled), '#').c_str(),
                      std::string(static_cast<std::size_t>(bar - filled), '.').c_str(),
                      static_cast<int>(100 * done / total));
        line += buf;
    }
    std::snprintf(buf, sizeof buf, "  %.0f s", elapsed_seconds);
    line += buf;
    if (total > 0 && done > 0 && done < total) {
        const double left = elapsed_seconds * static_cast<double>(total - done) / static_cast<double>(done);
        std::snprintf(buf, sizeof buf, ", ~%.0f s left", left);
        line += buf;
    }
    if (line.size() > width) line.resize(width);
    return line;
}

std::string phase_table_text(const std::vector<PhaseFigures>& phases, const PhaseFigures& total) {
    std::string out = "phase        wall s   CPU s  peak MiB  spans\n";
    char buf[128];
    auto row = [&](const PhaseFigures& p) {
        std::snprintf(buf, sizeof buf, "%-10s %8.2f %7.2f %9.0f %6lld\n", p.name.c_str(), p.wall_seconds, p.cpu_seconds,
                      static_cast<double>(p.peak_memory_kib) / 1024.0, static_cast<long long>(p.spans));
        out += buf;
    };
    for (const PhaseFigures& p : phases) row(p);
    row(total);
    return out;
}

}  // namespace tocsin
