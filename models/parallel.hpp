#pragma once
// One way to run independent pieces of work on several threads. It knows
// nothing of the domain: callers give it a count of items and a body that
// works on one item, writing only that item's own slot of its output, so the
// result does not depend on the thread count.
#include <algorithm>
#include <atomic>
#include <cstddef>
#include <exception>
#include <mutex>
#include <system_error>
#include <thread>
#include <vector>

namespace tocsin {

// Calls body(i) for every i in [0, count), on at most `threads` threads (the
// calling thread is one of them; 0 counts as 1), handing out the indices in
// increasing order as threads become free; returns when every call has
// returned. When a call throws, no further index is handed out (calls already
// running finish); once every thread has stopped, the exception of the
// lowest-numbered failing index is rethrown.
template <class Body>
void parallel_for(std::size_t count, unsigned threads, Body&& body) {
    const std::size_t workers = std::min<std::size_t>(std::max(1u, threads), count);
    if (workers <= 1) {
        for (std::size_t i = 0; i < count; ++i) body(i);
        return;
    }
    std::atomic<std::size_t> next{0};
    std::mutex lock;
    std::size_t failed = count;  // lowest failing index so far
    std::exception_ptr error;
    auto work = [&] {
        for (std::size_t i = next.fetch_add(1); i < count; i = next.fetch_add(1)) {
            try {
                body(i);
            } catch (...) {
                const std::lock_guard<std::mutex> guard(lock);
                if (i < failed) {
                    failed = i;
                    error = std::current_exception();
                }
                next.store(count);  // stop handing out work
            }
        }
    };
    std::vector<std::thread> pool;
    pool.reserve(workers - 1);
    try {
        for (std::size_t w = 1; w < workers; ++w) pool.emplace_back(work);
    } catch (const std::system_error&) {
        // No more threads to be had: the ones started and this one do the work.
    }
    work();
    for (auto& t : pool) t.join();
    if (error) std::rethrow_exception(error);
}

}  // namespace tocsin
