// The event core on its own: the order of simultaneous events (priority, then
// the order they were scheduled), the clock, and the assertion that an event
// cannot be scheduled before the clock.
//
// The assertions of sim/event_queue.hpp are switched on in this file whatever
// the build type, so the clock assertion is checked in Release builds too.
#ifdef NDEBUG
#undef NDEBUG
#endif
#include <cassert>

#include <doctest/doctest.h>

#include <csignal>
#include <string>
#include <vector>

#include <fcntl.h>
#include <sys/wait.h>
#include <unistd.h>

#include "sim/event_queue.hpp"

using namespace tocsin;

namespace {

// A payload type of this file only, so no other translation unit instantiates
// the same EventQueue (with its assertions compiled differently).
struct Tag {
    std::string name;
};

// The names of the events in the order they are popped.
std::vector<std::string> drain(EventQueue<Tag>& queue) {
    std::vector<std::string> out;
    while (!queue.empty()) out.push_back(queue.pop().payload.name);
    return out;
}

// Runs `body` in a child process; true when the child was killed by SIGABRT
// (a failed assert), false when it returned normally.
template <class Body>
bool aborts(Body body) {
    const pid_t child = fork();
    REQUIRE(child >= 0);
    if (child == 0) {
        std::signal(SIGABRT, SIG_DFL);  // doctest's crash handler would report the abort as a failure
        const int devnull = open("/dev/null", O_WRONLY);
        if (devnull >= 0) dup2(devnull, STDERR_FILENO);  // keep the assert's message out of the test log
        body();
        _exit(0);
    }
    int status = 0;
    REQUIRE(waitpid(child, &status, 0) == child);
    return WIFSIGNALED(status) && WTERMSIG(status) == SIGABRT;
}

}  // namespace

TEST_CASE("event_queue.earlier_instants_first") {
    EventQueue<Tag> queue;
    queue.schedule(30, 0, {"c"});
    queue.schedule(10, 5, {"a"});
    queue.schedule(20, 0, {"b"});
    CHECK(queue.size() == 3);
    CHECK(queue.next_at() == 10);
    CHECK(queue.next_priority() == 5);
    CHECK(drain(queue) == std::vector<std::string>{"a", "b", "c"});
    CHECK(queue.empty());
}

TEST_CASE("event_queue.same_instant_lower_priority_first") {
    EventQueue<Tag> queue;
    queue.schedule(10, 2, {"low"});
    queue.schedule(10, 0, {"high"});
    queue.schedule(10, 1, {"middle"});
    CHECK(queue.next_priority() == 0);
    CHECK(drain(queue) == std::vector<std::string>{"high", "middle", "low"});
}

TEST_CASE("event_queue.ties_run_in_scheduling_order") {
    // Same instant and priority: first scheduled, first popped, whatever the
    // heap does with equal keys.
    EventQueue<Tag> queue;
    const std::vector<std::string> names{"e0", "e1", "e2", "e3", "e4", "e5", "e6", "e7", "e8", "e9"};
    for (const auto& n : names) queue.schedule(100, 1, {n});
    queue.schedule(100, 0, {"first"});
    queue.schedule(99, 1, {"earliest"});
    std::vector<std::string> expected{"earliest", "first"};
    expected.insert(expected.end(), names.begin(), names.end());
    CHECK(drain(queue) == expected);
}

TEST_CASE("event_queue.clock_follows_popped_events") {
    EventQueue<Tag> queue;
    queue.start_at(5);
    CHECK(queue.now() == 5);
    queue.schedule(5, 0, {"now"});  // at the clock is allowed
    queue.schedule(8, 0, {"later"});
    CHECK(queue.pop().payload.name == "now");
    CHECK(queue.now() == 5);
    // Scheduled while running: at the current instant, after the waiting event's instant.
    queue.schedule(5, 1, {"same instant"});
    queue.schedule(12, 0, {"last"});
    CHECK(queue.pop().payload.name == "same instant");
    CHECK(queue.now() == 5);
    CHECK(queue.pop().payload.name == "later");
    CHECK(queue.now() == 8);
    CHECK(queue.pop().payload.name == "last");
    CHECK(queue.now() == 12);
    CHECK(queue.empty());
}

TEST_CASE("event_queue.scheduling_in_the_past_is_refused") {
    // The clock never runs backwards: once an event at 10 was popped, an event
    // at 9 trips the assertion, one at 10 does not.
    CHECK(aborts([] {
        EventQueue<Tag> queue;
        queue.schedule(10, 0, {"a"});
        queue.pop();
        queue.schedule(9, 0, {"too early"});
    }));
    CHECK_FALSE(aborts([] {
        EventQueue<Tag> queue;
        queue.schedule(10, 0, {"a"});
        queue.pop();
        queue.schedule(10, 0, {"at the clock"});
    }));
    CHECK(aborts([] {
        EventQueue<Tag> queue;
        queue.start_at(100);
        queue.schedule(99, 0, {"before the start"});
    }));
}
