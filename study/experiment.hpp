#pragma once
// Many replications of every plan, in parallel over a pool of threads. Each
// replication is a pure function of (scenario, seed, replication index), so
// the results do not depend on the number of threads or on which thread ran
// which replication; the observer receives each replication with its index
// and stores what it needs in a slot of its own.
#include <cstdint>
#include <functional>

#include "models/population.hpp"
#include "models/population_source.hpp"
#include "study/scenario.hpp"
#include "sim/shifts.hpp"
#include "sim/simulate.hpp"

namespace tocsin {

using ReplicationObserver = std::function<void(std::uint64_t replication, const Population& population,
                                               const ShiftCalendar& calendar, const ReplicationRecord& record)>;
using ProgressReport = std::function<void(std::uint64_t done, std::uint64_t total)>;

struct ExperimentOptions {
    std::uint64_t replications = 1;
    unsigned threads = 1;
    ProgressReport progress;  // called from worker threads, serialised; may be empty
    // Chart openings replayed from a log; they belong to the replayed log
    // itself, so only a plain replay (one replication) may use them.
    const ChartOpeningLog* replayed_openings = nullptr;
    PhaseLog* phases = nullptr;  // times prepare (each replication's population), simulate, staff; may be null
};

// Runs replications 0 .. replications-1. If any replication throws, the error
// of the lowest-numbered failing replication is rethrown after all stop.
void run_experiment(const Scenario& scenario, const PopulationFactory& make_population,
                    const ExperimentOptions& options, const ReplicationObserver& observe);

}  // namespace tocsin
