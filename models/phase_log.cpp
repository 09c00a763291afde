#include "models/phase_log.hpp"

#include <sys/resource.h>

namespace tocsin {

double process_cpu_seconds() {
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    auto seconds = [](const timeval& t) { return static_cast<double>(t.tv_sec) + static_cast<double>(t.tv_usec) * 1e-6; };
    return seconds(u.ru_utime) + seconds(u.ru_stime);
}

std::int64_t process_peak_memory_kib() {
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    return u.ru_maxrss;  // KiB on Linux
}

PhaseLog::Span::Span(PhaseLog* log, std::string_view name) : log_(log) {
    if (log_) index_ = log_->enter(name);
}

PhaseLog::Span::~Span() {
    if (log_) log_->leave(index_);
}

std::size_t PhaseLog::enter(std::string_view name) {
    const std::lock_guard<std::mutex> guard(lock_);
    std::size_t i = 0;
    while (i < entries_.size() && entries_[i].figures.name != name) ++i;
    if (i == entries_.size()) {
        Entry e;
        e.figures.name = std::string(name);
        e.first_start = std::chrono::steady_clock::now();
        e.cpu_at_start = process_cpu_seconds();
        entries_.push_back(std::move(e));
    }
    ++entries_[i].figures.spans;
    if (listener_) listener_(name);
    return i;
}

void PhaseLog::leave(std::size_t index) {
    const std::lock_guard<std::mutex> guard(lock_);
    Entry& e = entries_[index];
    e.figures.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - e.first_start).count();
    e.figures.cpu_seconds = process_cpu_seconds() - e.cpu_at_start;
    e.figures.peak_memory_kib = process_peak_memory_kib();
}

std::vector<PhaseFigures> PhaseLog::figures() const {
    const std::lock_guard<std::mutex> guard(lock_);
    std::vector<PhaseFigures> out;
    for (const Entry& e : entries_) out.push_back(e.figures);
    return out;
}

}  // namespace tocsin
