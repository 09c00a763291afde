#pragma once
// Runs and sweeps across MPI ranks (built with -DTOCSIN_MPI=ON; Boost.MPI).
// Every rank reads the scenario and builds the populations it needs; rank 0
// runs replication 0 whole (its record gives the per-plan tables), hands the
// other replications' plan blocks (study/work_items.hpp) out on request and
// gathers their figures as exact bytes (study/work_codec.hpp); it alone
// prints and writes. A rank that fails makes the run fail on rank 0 with that
// rank's error, before anything is written.
#include <exception>
#include <functional>
#include <memory>

#include "study/work_items.hpp"

namespace tocsin {

class MpiRanks : public WorkDistributor {
public:
    // MPI is started only when the process was launched by mpirun (its
    // environment says so); otherwise this returns nothing and the run stays
    // in one process, as in a build without MPI.
    static std::unique_ptr<MpiRanks> join(int& argc, char**& argv);
    ~MpiRanks() override;

    bool writes() const { return rank_ == 0; }  // rank 0 prints and writes
    unsigned ranks() const override { return size_; }

    // Every rank calls this once its set-up is done, with the error it met
    // (or none). When any rank failed: on rank 0, throws the error of the
    // lowest-numbered failing rank; on the others returns false (they say
    // nothing and stop). Returns true when all are ready.
    bool agree_on_setup(std::exception_ptr own_error);

    // A collective step of the set-up: rank 0 reads the replayed log and
    // broadcasts it (measured faster than every rank reading it: README,
    // "Across MPI ranks"); every rank then prepares the population from it.
    // Throws on every rank when rank 0 could not read it (rank 0's own error
    // there), so every rank reaches agree_on_setup.
    PreparedPopulation prepare_shared_population(const PopulationSetup& setup);

    // Rank 0: hands out the items and gathers their results (see WorkDistributor).
    std::vector<WorkResult> distribute(std::span<const WorkItem> items, const std::function<void()>& first,
                                       const std::function<WorkResult(const WorkItem&)>& compute) override;
    // The other ranks: compute the items rank 0 sends until it says stop.
    void serve(const std::function<WorkResult(const WorkItem&)>& compute);

private:
    struct Mpi;
    MpiRanks(std::unique_ptr<Mpi> mpi);
    // Stops every worker and gathers their busy time; prints it beside rank
    // 0's when `wall_seconds` is positive.
    void release_workers(double own_seconds, std::uint64_t own_items, double wall_seconds);
    std::unique_ptr<Mpi> mpi_;
    unsigned rank_ = 0, size_ = 1;
    bool released_ = false;
    bool setup_agreed_ = false;
};

}  // namespace tocsin
