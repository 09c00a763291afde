#pragma once
// Fills the what-if page's input (report/whatif.hpp) from a finished run or
// sweep: the plans' figures across replications, the frontier, the budget
// answer, and, for a sweep, each plan's place on the grid.
#include "report/report.hpp"
#include "report/whatif.hpp"
#include "study/run.hpp"
#include "study/sweep.hpp"

namespace tocsin {

// `report` is the report's input for the same run (its interval note and
// budget answer are the page's); `grid` is the sweep's grid, or nullptr for a
// run, whose page chooses among the plans as written.
WhatIfInput whatif_input_for_run(const Scenario& scenario, const RunOutput& output, const RunSettings& settings,
                                 const ReportInput& report, const SweepGrid* grid);

}  // namespace tocsin
