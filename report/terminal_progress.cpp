#include "report/terminal_progress.hpp"

#include <cstdio>

#include <unistd.h>

#include "report/progress_text.hpp"

namespace tocsin {

bool stderr_is_terminal() { return ::isatty(2) == 1; }

TerminalProgress::TerminalProgress(PhaseLog& phases, bool enabled, std::FILE* terminal, double quiet_seconds)
    : terminal_(terminal), quiet_seconds_(quiet_seconds) {
    if (!enabled) return;
    phases.on_start([this](std::string_view name) {
        const std::lock_guard<std::mutex> guard(lock_);
        phase_ = std::string(name);
    });
    drawer_ = std::thread([this] { redraw_until_stopped(); });
}

TerminalProgress::~TerminalProgress() {
    if (!drawer_.joinable()) return;
    {
        const std::lock_guard<std::mutex> guard(lock_);
        stop_ = true;
    }
    wake_.notify_all();
    drawer_.join();
}

ProgressReport TerminalProgress::replications() {
    if (!drawer_.joinable()) return {};
    return [this](std::uint64_t done, std::uint64_t total) {
        const std::lock_guard<std::mutex> guard(lock_);
        done_ = done;
        total_ = total;
    };
}

void TerminalProgress::redraw_until_stopped() {
    std::unique_lock<std::mutex> guard(lock_);
    for (;;) {
        wake_.wait_for(guard, std::chrono::milliseconds(250), [this] { return stop_; });
        if (stop_) break;
        const double elapsed = std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
        if (elapsed < quiet_seconds_) continue;
        // A bar only while there are replications to count (simulate to evaluate).
        const bool counting = total_ > 1 && done_ < total_;
        std::fprintf(terminal_, "\r%-79s", progress_line(phase_, done_, counting ? total_ : 0, elapsed).c_str());
        std::fflush(terminal_);
        drawn_ = true;
    }
    if (drawn_) {
        std::fprintf(terminal_, "\r%79s\r", "");
        std::fflush(terminal_);
    }
}

}  // namespace tocsin
