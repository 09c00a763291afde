// How should every rank get a replayed log: each rank reads the CSVs itself,
// or rank 0 reads them and broadcasts the population? Run under mpirun with
// the scenario of a replayed log; prints both times (the slowest rank's).
// The broadcast sends the scores and their offsets as raw bytes and the
// encounters as a compact string (no exclusion counts): a lower bound on what
// broadcasting the whole population costs. Built only with -DTOCSIN_MPI=ON.
//   mpirun -np 2 bench_mpi_log_to_ranks SCENARIO   (tocsin generate writes a large log)
#include <boost/mpi/collectives.hpp>
#include <boost/mpi/communicator.hpp>
#include <boost/mpi/environment.hpp>
#include <boost/serialization/string.hpp>
#include <boost/serialization/vector.hpp>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstring>
#include <string>
#include <vector>

#include "models/replay.hpp"
#include "sim/staff.hpp"
#include "study/scenario.hpp"

using namespace tocsin;
namespace mpi = boost::mpi;

namespace {

double seconds_since(std::chrono::steady_clock::time_point t0) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

template <typename T>
void broadcast_raw(const mpi::communicator& world, std::vector<T>& v) {
    std::uint64_t n = v.size();
    mpi::broadcast(world, n, 0);
    v.resize(n);
    // In pieces under 2 GiB: MPI counts are ints.
    constexpr std::size_t piece = std::size_t{1} << 30;
    char* bytes = reinterpret_cast<char*>(v.data());
    for (std::size_t at = 0; at < n * sizeof(T); at += piece)
        mpi::broadcast(world, bytes + at, static_cast<int>(std::min(piece, n * sizeof(T) - at)), 0);
}

// Rank 0's population to every rank: scores and offsets raw, encounters packed.
void broadcast_population(const mpi::communicator& world, Population& pop) {
    broadcast_raw(world, pop.scores);
    broadcast_raw(world, pop.score_start);
    std::vector<char> packed;
    if (world.rank() == 0)
        for (const Encounter& e : pop.encounters) {
            const std::int64_t fixed[4] = {e.unit, e.admitted, e.discharged, e.outcome_at.value_or(no_instant)};
            const std::uint64_t id = e.id.size();
            packed.insert(packed.end(), reinterpret_cast<const char*>(fixed), reinterpret_cast<const char*>(fixed + 4));
            packed.insert(packed.end(), reinterpret_cast<const char*>(&id), reinterpret_cast<const char*>(&id + 1));
            packed.insert(packed.end(), e.id.begin(), e.id.end());
        }
    broadcast_raw(world, packed);
    mpi::broadcast(world, pop.units, 0);
    if (world.rank() == 0) return;
    pop.encounters.clear();
    for (std::size_t at = 0; at < packed.size();) {
        std::int64_t fixed[4];
        std::uint64_t id = 0;
        std::memcpy(fixed, packed.data() + at, sizeof fixed);
        std::memcpy(&id, packed.data() + at + sizeof fixed, sizeof id);
        at += sizeof fixed + sizeof id;
        Encounter e;
        e.unit = static_cast<std::uint32_t>(fixed[0]), e.admitted = fixed[1], e.discharged = fixed[2];
        if (fixed[3] != no_instant) e.outcome_at = fixed[3];
        e.id.assign(packed.data() + at, id);
        at += id;
        pop.encounters.push_back(std::move(e));
    }
}

}  // namespace

int main(int argc, char** argv) {
    mpi::environment env(argc, argv);
    mpi::communicator world;
    if (argc < 2) {
        if (world.rank() == 0) std::fprintf(stderr, "usage: mpirun -np N bench_mpi_log_to_ranks SCENARIO\n");
        return 2;
    }
    const Scenario sc = load_scenario(argv[1]);
    world.barrier();
    auto t0 = std::chrono::steady_clock::now();
    const Population own = load_replay(sc.population.replay, sc.simulation.zone);
    double each_reads = seconds_since(t0);
    double slowest_read = 0;
    mpi::reduce(world, each_reads, slowest_read, mpi::maximum<double>(), 0);
    world.barrier();
    t0 = std::chrono::steady_clock::now();
    Population sent;
    if (world.rank() == 0) sent = load_replay(sc.population.replay, sc.simulation.zone);
    const double rank0_read = seconds_since(t0);
    broadcast_population(world, sent);
    double done = seconds_since(t0), slowest = 0;
    mpi::reduce(world, done, slowest, mpi::maximum<double>(), 0);
    const bool same = sent.scores.size() == own.scores.size() &&
                      std::memcmp(sent.scores.data(), own.scores.data(), own.scores.size() * sizeof(Score)) == 0;
    if (world.rank() == 0)
        std::printf("log to ranks: %d ranks, %zu encounters, %zu scores: each rank reads %.2f s; rank 0 reads %.2f s "
                    "and broadcasts, all have it after %.2f s%s\n",
                    world.size(), own.encounters.size(), own.scores.size(), slowest_read, rank0_read, slowest,
                    same ? "" : "  POPULATIONS DIFFER");
    return 0;
}
