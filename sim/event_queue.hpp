#pragma once
// The event core: a clock and a priority queue of timed events. It knows
// nothing clinical. Events at the same instant run by priority (lower first),
// then in the order they were scheduled, so simultaneous events have a fixed,
// documented order and runs are reproducible.
#include <cassert>
#include <cstdint>
#include <queue>
#include <vector>

#include "models/time.hpp"

namespace tocsin {

template <class Payload>
class EventQueue {
public:
    struct Event {
        Instant at;
        int priority;
        std::uint64_t sequence;
        Payload payload;
    };

    void schedule(Instant at, int priority, Payload payload) {
        assert(at >= now_ && "an event cannot be scheduled in the past");
        heap_.push(Event{at, priority, next_sequence_++, std::move(payload)});
    }
    bool empty() const { return heap_.empty(); }
    std::size_t size() const { return heap_.size(); }
    Instant now() const { return now_; }
    // Instant of the next event; only valid when not empty.
    Instant next_at() const { return heap_.top().at; }
    int next_priority() const { return heap_.top().priority; }

    Event pop() {
        Event e = heap_.top();
        heap_.pop();
        assert(e.at >= now_ && "the clock never runs backwards");
        now_ = e.at;
        return e;
    }
    void start_at(Instant t) {
        assert(heap_.empty());
        now_ = t;
    }

private:
    struct Later {
        bool operator()(const Event& a, const Event& b) const {
            if (a.at != b.at) return a.at > b.at;
            if (a.priority != b.priority) return a.priority > b.priority;
            return a.sequence > b.sequence;
        }
    };
    std::priority_queue<Event, std::vector<Event>, Later> heap_;
    Instant now_ = INT64_MIN;
    std::uint64_t next_sequence_ = 0;
};

}  // namespace tocsin
