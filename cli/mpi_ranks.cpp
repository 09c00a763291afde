#include "cli/mpi_ranks.hpp"

#include <boost/mpi/collectives.hpp>
#include <boost/mpi/communicator.hpp>
#include <boost/mpi/environment.hpp>
#include <boost/serialization/string.hpp>
#include <boost/serialization/vector.hpp>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <mutex>
#include <new>
#include <optional>
#include <stdexcept>
#include <string>
#include <thread>

#include "models/errors.hpp"
#include "models/phase_log.hpp"
#include "models/replay.hpp"
#include "study/work_codec.hpp"

namespace tocsin {

namespace mpi = boost::mpi;

struct MpiRanks::Mpi {
    mpi::environment environment;
    mpi::communicator world;
    Mpi(int& argc, char**& argv) : environment(argc, argv, mpi::threading::funneled) {}
};

namespace {

enum Tag : int { item_tag = 1, stop_tag = 2, result_tag = 3, error_tag = 4, skipped_tag = 5 };

// The work done by one rank, reported on rank 0's terminal at the end.
// `cpu_seconds` is the whole process's (set-up included): on a shared
// machine a rank can be busy for long without getting a core.
struct Busy {
    double seconds = 0;
    std::uint64_t items = 0;
    double cpu_seconds = 0;
    template <typename Archive>
    void serialize(Archive& a, unsigned) {
        a & seconds & items & cpu_seconds;
    }
};

// A failure as it travels: the exit code it would have in one process (2 for
// bad input, 1 otherwise), where it happened, and the message.
struct Failure {
    int exit_code = 1;
    WorkItem item;  // replication 0 for a failure in set-up or in replication 0
    std::string message;
};

Failure failure_of(std::exception_ptr error, unsigned rank, unsigned size, const std::string& where, WorkItem item) {
    std::string what;
    int code = 1;
    try {
        std::rethrow_exception(error);
    } catch (const InputError& e) {
        what = e.what(), code = 2;
    } catch (const std::invalid_argument& e) {
        what = e.what(), code = 2;
    } catch (const std::bad_alloc&) {
        what = "out of memory (std::bad_alloc)";
    } catch (const std::exception& e) {
        what = e.what();
    } catch (...) {
        what = "an unknown error";
    }
    return {code, item, "rank " + std::to_string(rank) + " of " + std::to_string(size) + ", " + where + ": " + what};
}

std::string encode_failure(const Failure& f) { return std::to_string(f.exit_code) + "\n" + encode_work_item(f.item) + f.message; }

Failure decode_failure(const std::string& bytes) {
    const std::size_t nl = bytes.find('\n');
    const std::size_t item_bytes = encode_work_item(WorkItem{}).size();
    Failure f;
    f.exit_code = std::stoi(bytes.substr(0, nl));
    f.item = decode_work_item(bytes.substr(nl + 1, item_bytes));
    f.message = bytes.substr(nl + 1 + item_bytes);
    return f;
}

[[noreturn]] void throw_failure(const Failure& f) {
    if (f.exit_code == 2) throw std::invalid_argument(f.message);
    throw std::runtime_error(f.message);
}

std::string item_place(const WorkItem& item) {
    return "replication " + std::to_string(item.replication) + ", plans " + std::to_string(item.first_plan + 1) + " to " +
           std::to_string(item.first_plan + item.plan_count);
}

// A test-only hook, TOCSIN_TEST_RANK_FAILS=RANK:setup or RANK:work, makes one
// rank fail in its set-up (as bad input found late) or on its first work item
// (as running out of memory); the tests check that the whole run fails with
// that rank's error and writes nothing. It changes nothing else.
bool hook_fails(unsigned rank, const char* stage) {
    const char* hook = std::getenv("TOCSIN_TEST_RANK_FAILS");
    return hook && std::string(hook) == std::to_string(rank) + ":" + stage;
}

double seconds_since(std::chrono::steady_clock::time_point start) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

// Waits for a message without spinning a core (an MPI receive polls; the
// other ranks need the cores).
mpi::status wait_for_message(mpi::communicator& world, int source) {
    for (;;) {
        if (const auto status = world.iprobe(source, mpi::any_tag)) return *status;
        std::this_thread::sleep_for(std::chrono::microseconds(200));
    }
}

// Items not yet handed out; a rank is given the next plan block of the
// replication it last worked on when one is left, so it keeps that population.
class ItemQueue {
public:
    explicit ItemQueue(std::span<const WorkItem> items) : items_(items), taken_(items.size(), false) {}
    std::optional<WorkItem> take(std::optional<std::uint64_t>& last_replication) {
        const std::lock_guard<std::mutex> guard(lock_);
        std::optional<std::size_t> pick;
        for (std::size_t i = 0; i < items_.size() && !(pick && items_[*pick].replication == last_replication); ++i)
            if (!taken_[i] && (!pick || items_[i].replication == last_replication)) pick = i;
        if (!pick) return std::nullopt;
        taken_[*pick] = true;
        last_replication = items_[*pick].replication;
        return items_[*pick];
    }

private:
    std::span<const WorkItem> items_;
    std::vector<bool> taken_;
    std::mutex lock_;
};

// What rank 0 collects while its own thread computes beside the messages.
struct Collected {
    std::mutex lock;
    std::vector<WorkResult> results;
    std::optional<Failure> failure;  // the one of the lowest item
    void fail(Failure f) {
        const std::lock_guard<std::mutex> guard(lock);
        const auto key = [](const WorkItem& i) { return std::pair(i.replication, i.first_plan); };
        if (!failure || key(f.item) < key(failure->item)) failure = std::move(f);
    }
    bool failed() {
        const std::lock_guard<std::mutex> guard(lock);
        return failure.has_value();
    }
    void add(WorkResult r) {
        const std::lock_guard<std::mutex> guard(lock);
        results.push_back(std::move(r));
    }
};

}  // namespace

std::unique_ptr<MpiRanks> MpiRanks::join(int& argc, char**& argv) {
    if (!std::getenv("OMPI_COMM_WORLD_SIZE") && !std::getenv("PMI_SIZE") && !std::getenv("PMIX_RANK")) return nullptr;
    auto ranks = std::unique_ptr<MpiRanks>(new MpiRanks(std::make_unique<Mpi>(argc, argv)));
    return ranks;
}

MpiRanks::MpiRanks(std::unique_ptr<Mpi> mpi) : mpi_(std::move(mpi)) {
    rank_ = static_cast<unsigned>(mpi_->world.rank());
    size_ = static_cast<unsigned>(mpi_->world.size());
}

MpiRanks::~MpiRanks() {
    // Rank 0 failed between the set-up and the work: the workers still wait for it.
    if (rank_ == 0 && !released_ && setup_agreed_) {
        try {
            release_workers(0, 0, 0);
        } catch (...) {
        }
    }
}

bool MpiRanks::agree_on_setup(std::exception_ptr own_error) {
    if (!own_error && hook_fails(rank_, "setup"))
        own_error = std::make_exception_ptr(std::runtime_error("test hook TOCSIN_TEST_RANK_FAILS: bad input found late"));
    std::string own;
    if (own_error) own = encode_failure(failure_of(own_error, rank_, size_, "while setting up", {}));
    std::vector<std::string> all;
    mpi::all_gather(mpi_->world, own, all);
    for (unsigned r = 0; r < all.size(); ++r) {
        if (all[r].empty()) continue;
        if (rank_ != 0) return false;
        if (r == 0) std::rethrow_exception(own_error);
        throw_failure(decode_failure(all[r]));
    }
    setup_agreed_ = true;
    return true;
}

namespace {

// Broadcasts rank 0's bytes in pieces of 1 GiB (MPI counts are ints).
void broadcast_bytes(const mpi::communicator& world, std::string& bytes) {
    std::uint64_t size = bytes.size();
    mpi::broadcast(world, size, 0);
    bytes.resize(size);
    constexpr std::uint64_t piece = std::uint64_t{1} << 30;
    for (std::uint64_t at = 0; at < size; at += piece)
        mpi::broadcast(world, bytes.data() + at, static_cast<int>(std::min(piece, size - at)), 0);
}

}  // namespace

PreparedPopulation MpiRanks::prepare_shared_population(const PopulationSetup& setup) {
    std::exception_ptr read_error;
    std::string bytes;
    if (rank_ == 0) {
        try {
            bytes = encode_population(load_replay(setup.replay, setup.zone));
        } catch (...) {
            read_error = std::current_exception();
        }
    }
    bool read = !read_error;
    mpi::broadcast(mpi_->world, read, 0);
    if (read_error) std::rethrow_exception(read_error);
    if (!read) throw std::runtime_error("rank 0 could not read the log");  // rank 0 reports why
    broadcast_bytes(mpi_->world, bytes);
    Population log = decode_population(bytes);
    std::string().swap(bytes);  // the log is held once
    return prepare_population(setup, std::move(log));
}

void MpiRanks::serve(const std::function<WorkResult(const WorkItem&)>& compute) {
    Busy busy;
    bool failed = false;
    for (;;) {
        const mpi::status status = wait_for_message(mpi_->world, 0);
        if (status.tag() == stop_tag) {
            mpi_->world.recv(0, stop_tag);
            break;
        }
        std::string bytes;
        mpi_->world.recv(0, item_tag, bytes);
        const WorkItem item = decode_work_item(bytes);
        if (failed) {  // rank 0 stops the run; what is still queued here is not worth computing
            mpi_->world.send(0, skipped_tag, bytes);
            continue;
        }
        const auto start = std::chrono::steady_clock::now();
        try {
            if (hook_fails(rank_, "work")) throw std::bad_alloc();
            const std::string result = encode_work_result(compute(item));
            busy.seconds += seconds_since(start);
            ++busy.items;
            mpi_->world.send(0, result_tag, result);
        } catch (...) {
            failed = true;
            mpi_->world.send(0, error_tag, encode_failure(failure_of(std::current_exception(), rank_, size_, item_place(item), item)));
        }
    }
    busy.cpu_seconds = process_cpu_seconds();
    mpi::gather(mpi_->world, busy, 0);
}

void MpiRanks::release_workers(double own_seconds, std::uint64_t own_items, double wall_seconds) {
    released_ = true;
    for (unsigned w = 1; w < size_; ++w) mpi_->world.send(static_cast<int>(w), stop_tag);
    std::vector<Busy> busy;
    mpi::gather(mpi_->world, Busy{own_seconds, own_items, process_cpu_seconds()}, busy, 0);
    if (!(wall_seconds > 0)) return;
    // On stderr, so that what a run prints on stdout is the same on any number of ranks.
    std::fprintf(stderr, "Ranks: %u; wall %.2f s; busy time per rank (share of wall):\n", size_, wall_seconds);
    for (unsigned r = 0; r < busy.size(); ++r)
        std::fprintf(stderr, "  rank %u: %.2f s (%.0f%%), %llu work item%s%s; CPU %.2f s since it started\n", r,
                     busy[r].seconds, 100 * busy[r].seconds / wall_seconds, static_cast<unsigned long long>(busy[r].items),
                     busy[r].items == 1 ? "" : "s", r == 0 ? " and replication 0 whole" : "", busy[r].cpu_seconds);
}

std::vector<WorkResult> MpiRanks::distribute(std::span<const WorkItem> items, const std::function<void()>& first,
                                             const std::function<WorkResult(const WorkItem&)>& compute) {
    const auto started = std::chrono::steady_clock::now();
    ItemQueue queue(items);
    Collected collected;
    std::atomic<bool> local_done = false;
    Busy own;
    // Rank 0's own share, on a thread of its own: replication 0 whole, then
    // items like any rank. This thread makes no MPI call (threading::funneled).
    std::thread local([&] {
        std::optional<std::uint64_t> last;
        std::optional<WorkItem> item;
        const auto start = std::chrono::steady_clock::now();
        try {
            first();
            own.seconds += seconds_since(start);
            while (!collected.failed() && (item = queue.take(last))) {
                const auto t = std::chrono::steady_clock::now();
                collected.add(compute(*item));
                own.seconds += seconds_since(t);
                ++own.items;
            }
        } catch (...) {
            const WorkItem at = item.value_or(WorkItem{0, 0, 0});
            collected.fail(failure_of(std::current_exception(), 0, size_,
                                      item ? item_place(at) : std::string("replication 0"), at));
        }
        local_done = true;
    });
    std::vector<std::optional<std::uint64_t>> last(size_);
    std::uint64_t outstanding = 0;
    const auto hand_out = [&](unsigned w) {
        if (collected.failed()) return;
        if (const auto item = queue.take(last[w])) {
            mpi_->world.send(static_cast<int>(w), item_tag, encode_work_item(*item));
            ++outstanding;
        }
    };
    // Two items each, so that a worker has the next one while its result travels.
    for (int round = 0; round < 2; ++round)
        for (unsigned w = 1; w < size_; ++w) hand_out(w);
    while (outstanding > 0 || !local_done) {
        const auto status = mpi_->world.iprobe(mpi::any_source, mpi::any_tag);
        if (!status) {
            std::this_thread::sleep_for(std::chrono::microseconds(200));
            continue;
        }
        const unsigned w = static_cast<unsigned>(status->source());
        std::string bytes;
        mpi_->world.recv(status->source(), status->tag(), bytes);
        --outstanding;
        if (status->tag() == result_tag) {
            collected.add(decode_work_result(bytes));
            hand_out(w);
        } else if (status->tag() == error_tag) {
            collected.fail(decode_failure(bytes));
        }
    }
    local.join();
    release_workers(own.seconds, own.items, seconds_since(started));
    if (collected.failure) throw_failure(*collected.failure);
    return std::move(collected.results);
}

}  // namespace tocsin
