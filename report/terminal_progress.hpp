#pragma once
// The phase a run is in and a bar over its replications, on stderr, only when
// stderr is a terminal (never when it is piped or redirected, so files, tests
// and goldens never see it) and only once the run has taken a couple of
// seconds. A small thread redraws the line, so a long phase with nothing to
// count (reading a log) still shows that it is alive.
#include <chrono>
#include <condition_variable>
#include <cstdio>
#include <cstdint>
#include <mutex>
#include <string>
#include <thread>

#include "models/phase_log.hpp"
#include "study/experiment.hpp"

namespace tocsin {

class TerminalProgress {
public:
    // Listens to `phases` and draws on `terminal` (stderr) once `quiet_seconds`
    // have passed; does nothing at all unless `enabled` (stderr is a terminal).
    TerminalProgress(PhaseLog& phases, bool enabled, std::FILE* terminal = stderr, double quiet_seconds = 2.0);
    ~TerminalProgress();  // stops redrawing and clears the line
    TerminalProgress(const TerminalProgress&) = delete;
    TerminalProgress& operator=(const TerminalProgress&) = delete;

    // The replications' progress callback (empty when not enabled).
    ProgressReport replications();

private:
    void redraw_until_stopped();
    std::FILE* terminal_ = nullptr;
    double quiet_seconds_ = 0;  // a run shorter than this shows nothing
    std::mutex lock_;
    std::condition_variable wake_;
    std::string phase_ = "starting";
    std::uint64_t done_ = 0, total_ = 0;
    bool stop_ = false, drawn_ = false;
    const std::chrono::steady_clock::time_point start_ = std::chrono::steady_clock::now();
    std::thread drawer_;
};

// Whether stderr is a terminal.
bool stderr_is_terminal();

}  // namespace tocsin
