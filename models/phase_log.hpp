#pragma once
// Wall time, CPU time and peak memory of the phases of a run (read, prepare,
// simulate, staff, evaluate, write), measured by the very code the command
// line runs: the caller owns a PhaseLog and hands a pointer down (never a
// global), so a benchmark and the terminal's progress line see the same phases.
//
// A phase's figures run from the first time it is entered to the last time it
// is left, with the process's CPU time (every thread) over that span and the
// process's peak resident memory when it was last left. Phases run one after
// the other in a single-replication run; when replications run side by side
// their simulate/staff/evaluate spans overlap, and the figures say so (the
// spans' count is given).
#include <chrono>
#include <cstdint>
#include <functional>
#include <mutex>
#include <string>
#include <string_view>
#include <vector>

namespace tocsin {

struct PhaseFigures {
    std::string name;
    double wall_seconds = 0;
    double cpu_seconds = 0;           // user + system, every thread of the process
    std::int64_t peak_memory_kib = 0;  // the process's peak resident set so far (never falls)
    std::int64_t spans = 0;            // times the phase was entered
};

// The process's CPU seconds (user + system) and peak resident memory in KiB.
double process_cpu_seconds();
std::int64_t process_peak_memory_kib();

class PhaseLog {
public:
    // Told when a phase starts (e.g. to show it on a terminal); called with the
    // log's lock held, from whichever thread enters the phase.
    using Listener = std::function<void(std::string_view phase)>;

    // Ends the phase when it goes out of scope.
    class Span {
    public:
        Span(PhaseLog* log, std::string_view name);
        ~Span();
        Span(const Span&) = delete;
        Span& operator=(const Span&) = delete;

    private:
        PhaseLog* log_;
        std::size_t index_ = 0;
    };

    void on_start(Listener listener) { listener_ = std::move(listener); }
    // Figures of every phase in the order they were first entered.
    std::vector<PhaseFigures> figures() const;

private:
    struct Entry {
        PhaseFigures figures;
        std::chrono::steady_clock::time_point first_start;
        double cpu_at_start = 0;
    };
    std::size_t enter(std::string_view name);
    void leave(std::size_t index);
    mutable std::mutex lock_;
    std::vector<Entry> entries_;
    Listener listener_;
};

// `PhaseLog::Span` on a log that may be absent: `auto span = phase(log, "read");`.
inline PhaseLog::Span phase(PhaseLog* log, std::string_view name) { return PhaseLog::Span(log, name); }

}  // namespace tocsin
