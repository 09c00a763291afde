#pragma once
// Does a fitted population reproduce its log? Replications generated from the
// fitted knobs are run through the scenario's plans, and each of the log's own
// figures is set beside the range the replications give (the middle 95 % of
// their values: where a population of the log's size and period falls when
// the fitted knobs are right). A log figure outside that range is something
// the fit does not reproduce.
#include <cstdint>
#include <string>
#include <vector>

#include "models/generator.hpp"
#include "study/scenario.hpp"

namespace tocsin {

// What a row measures, so a reader can tell a benefit gap from a burden gap.
enum class FitCheckKind { population, discrimination, burden, benefit };

struct FitCheckRow {
    std::string figure;  // e.g. "admissions", "sensitivity"
    std::string of;      // the unit or plan; empty for the whole population
    FitCheckKind kind = FitCheckKind::population;
    double log_value = 0;                      // NaN when the log has none (no case caught, ...)
    double fitted_mean = 0, fitted_low = 0, fitted_high = 0;  // over replications with a value
    std::uint64_t replications_with_value = 0;
    bool inside = true;                        // log_value within [fitted_low, fitted_high]
};

struct FitCheck {
    std::vector<FitCheckRow> rows;
    std::uint64_t replications = 0;
    std::int64_t outside = 0;          // rows whose log figure lies outside
    std::vector<std::string> benefit_outside, burden_outside;  // "plan: figure"
};

// `log` is the population the knobs were fitted to; the scenario's plans,
// shifts, staff, catch window and reporting period are used for both, its
// population section for neither (the replications are generated from
// `fitted` with the scenario's seed, without stress test). The same inputs
// give the same check whatever the thread count.
FitCheck check_fit(const Scenario& scenario, const Population& log, const GeneratorConfig& fitted,
                   std::uint64_t replications, unsigned threads);

}  // namespace tocsin
