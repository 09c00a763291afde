// parallel_for (models/parallel.hpp): every index once, results independent
// of the thread count, and the error of the lowest-numbered failing index.
#include <doctest/doctest.h>

#include <atomic>
#include <stdexcept>
#include <string>
#include <vector>

#include "models/parallel.hpp"

using namespace tocsin;

TEST_CASE("parallel.every_index_once_whatever_the_thread_count") {
    for (unsigned threads : {0u, 1u, 2u, 3u, 8u, 100u}) {
        std::vector<int> visits(37, 0);
        parallel_for(visits.size(), threads, [&](std::size_t i) { visits[i] += static_cast<int>(i) + 1; });
        for (std::size_t i = 0; i < visits.size(); ++i) CHECK(visits[i] == static_cast<int>(i) + 1);
    }
    int calls = 0;
    parallel_for(0, 4, [&](std::size_t) { ++calls; });
    CHECK(calls == 0);
}

TEST_CASE("parallel.runs_on_several_threads") {
    // Two items that each wait for the other to start can only finish when
    // they run at the same time.
    std::atomic<int> started{0};
    parallel_for(2, 2, [&](std::size_t) {
        ++started;
        while (started.load() < 2) {
        }
    });
    CHECK(started.load() == 2);
}

TEST_CASE("parallel.lowest_failing_index_is_rethrown_after_all_stop") {
    for (unsigned threads : {1u, 2u, 4u}) {
        std::atomic<int> running{0};
        std::atomic<int> most{0};
        try {
            parallel_for(20, threads, [&](std::size_t i) {
                const int now = ++running;
                for (int m = most.load(); now > m && !most.compare_exchange_weak(m, now);) {
                }
                --running;
                if (i == 3 || i == 5) throw std::runtime_error("item " + std::to_string(i));
            });
            FAIL("no exception");
        } catch (const std::runtime_error& e) {
            CHECK(std::string(e.what()) == "item 3");
        }
        CHECK(running.load() == 0);  // every call had returned
        CHECK(most.load() <= static_cast<int>(threads));
    }
}
