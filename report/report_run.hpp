#pragma once
// Fills the report's input from a finished run, so `tocsin run --report FILE`
// is one call: write_file(FILE, render_report(report_input_for_run(...))).
// Leaves out threads and time taken, so the report is byte-identical whatever
// the thread count (run_record.json carries them).
#include "report/report.hpp"
#include "study/run.hpp"
#include "study/scenario.hpp"

namespace tocsin {

ReportInput report_input_for_run(const Scenario& scenario, const RunOutput& output, const RunSettings& settings);

}  // namespace tocsin
