// Every scenario key, declared once. Keep in step with the loader in
// sim/scenario.cpp (a test checks every declared key is read and documented).
#include "sim/scenario_keys.hpp"

namespace tocsin {

const std::vector<SectionSpec>& scenario_sections() {
    static const std::vector<SectionSpec> sections = {
        {"top level",
         "The scenario file.",
         {
             {"scenario_schema", KeyKind::integer, "", "", true, 1, 1, "Schema version of this file; must be 1."},
             {"name", KeyKind::text, "", "", true, -1e300, 1e300, "Short name shown on every report."},
             {"description", KeyKind::text, "", "", false, -1e300, 1e300, "The question the scenario answers, in plain words."},
             {"time_zone", KeyKind::text, "", "", true, -1e300, 1e300, "IANA zone of the hospital's wall clock, e.g. Europe/Berlin; naive timestamps and all local-time rules use it."},
             {"seed", KeyKind::integer, "", "1", false, 0, 9.2e18, "Seed of every random stream; same seed, same results."},
             {"score_label", KeyKind::text, "", "score", false, -1e300, 1e300, "What the score is called in reports, e.g. 'deterioration index'."},
             {"shifts", KeyKind::list, "", "", true, -1e300, 1e300, "The daily shifts, one item each (see shifts[])."},
             {"outcome", KeyKind::section, "", "", true, -1e300, 1e300, "What counts as catching a case (see outcome)."},
             {"population", KeyKind::section, "", "", true, -1e300, 1e300, "Where encounters and scores come from (see population)."},
             {"reporting", KeyKind::section, "", "", false, -1e300, 1e300, "Optional reporting period (see reporting)."},
             {"plans", KeyKind::list, "", "", true, -1e300, 1e300, "The candidate workflows to compare (see plans[])."},
             {"roles", KeyKind::list, "", "none", false, -1e300, 1e300, "Staff who answer notices, with rosters and minutes per task (see roles[]); without roles every notice counts as evaluated at once."},
             {"escalation", KeyKind::list, "", "none", false, -1e300, 1e300, "Where a task goes when nobody takes it up in time (see escalation[]); acyclic, one edge out of a role at most."},
         }},
        {"shifts[]",
         "One daily shift, named by its local start time; it ends when the next shift starts.",
         {
             {"name", KeyKind::text, "", "", true, -1e300, 1e300, "e.g. day, night."},
             {"starts", KeyKind::clock, "local time", "", true, -1e300, 1e300, "Local start time \"HH:MM\"."},
             {"night", KeyKind::flag, "", "false", false, -1e300, 1e300, "Counts towards 'per night' figures."},
         }},
        {"outcome",
         "A case is caught when its first qualifying action starts within [time zero - window, time zero - min_lead].",
         {
             {"window_hours", KeyKind::real, "hours", "24", false, 0.0166, 24 * 365, "How long before time zero an action can still count as a catch."},
             {"min_lead_minutes", KeyKind::real, "minutes", "0", false, 0, 60 * 24 * 30, "How long before time zero an action must start to count."},
         }},
        {"population",
         "Where the encounters and their scores come from.",
         {
             {"replay", KeyKind::section, "", "", true, -1e300, 1e300, "Replay a silent-mode log (see population.replay)."},
         }},
        {"population.replay",
         "Two CSV files (RFC 4180). Paths are relative to the scenario file.",
         {
             {"encounters", KeyKind::text, "path", "", true, -1e300, 1e300, "CSV with columns encounter,unit,admitted,discharged,outcome_at."},
             {"scores", KeyKind::text, "path", "", true, -1e300, 1e300, "CSV with columns encounter,scored_at,available_at,score."},
             {"latency_minutes", KeyKind::real, "minutes", "0", false, 0, 60 * 24, "Delay added to scored_at when available_at is empty."},
         }},
        {"reporting",
         "Limits per-shift figures to complete shifts inside a period (default: complete shifts between the first admission and the last discharge).",
         {
             {"from", KeyKind::text, "timestamp", "", false, -1e300, 1e300, "Start of the reporting period (timestamp)."},
             {"until", KeyKind::text, "timestamp", "", false, -1e300, 1e300, "End of the reporting period (timestamp, exclusive)."},
         }},
        {"plans[]",
         "One candidate workflow: a rule, a channel and who answers.",
         {
             {"name", KeyKind::text, "", "", true, -1e300, 1e300, "Unique plan name shown in every table."},
             {"description", KeyKind::text, "", "", false, -1e300, 1e300, "One line on what the plan is for."},
             {"channel", KeyKind::text, "", "page", false, -1e300, 1e300, "How a firing is delivered: page."},
             {"role", KeyKind::text, "", "responder", false, -1e300, 1e300, "Who answers the notice; when roles are declared, one of them."},
             {"queue", KeyKind::text, "", "fifo", false, -1e300, 1e300, "Order in which waiting tasks are taken up: fifo (first come) or priority (highest score first)."},
             {"at_shift_end", KeyKind::text, "", "hand_over", false, -1e300, 1e300, "An evaluation still in progress when its nurse's shift ends: hand_over (an incoming colleague continues it) or drop (abandoned and counted)."},
             {"rule", KeyKind::section, "", "", true, -1e300, 1e300, "When the plan fires (see plans[].rule)."},
         }},
        {"plans[].rule",
         "When a plan fires for an encounter. Only `threshold` is required.",
         {
             {"threshold", KeyKind::real, "score", "", true, -1e300, 1e300, "A score qualifies when >= threshold."},
             {"persistence", KeyKind::integer, "scores", "1", false, 1, 1000, "Fire only when the last k available scores all qualify."},
             {"snooze_minutes", KeyKind::real, "minutes", "none", false, 0, 60 * 24 * 60, "After a firing, no ordinary firing for this long."},
             {"rise", KeyKind::real, "score", "none", false, 1e-9, 1e300, "A score at least this much above the last firing's score fires at once, despite snooze and re-arm."},
             {"rearm_below", KeyKind::real, "score", "none", false, -1e300, 1e300, "After a firing, stay silent until a score below this is seen (must be <= threshold)."},
             {"max_per_shift", KeyKind::integer, "firings", "none", false, 1, 1000, "At most this many firings per encounter per shift, rises included."},
             {"quiet_from", KeyKind::clock, "local time", "none", false, -1e300, 1e300, "Start of daily quiet hours \"HH:MM\" (nothing fires)."},
             {"quiet_until", KeyKind::clock, "local time", "none", false, -1e300, 1e300, "End of daily quiet hours \"HH:MM\" (exclusive; may wrap midnight)."},
         }},
        {"roles[]",
         "One role that answers notices: a team on each unit or one for the hospital, its roster and its minutes per task.",
         {
             {"name", KeyKind::text, "", "", true, -1e300, 1e300, "e.g. rapid response nurse; plans and escalation edges name it."},
             {"team", KeyKind::text, "", "hospital", false, -1e300, 1e300, "hospital (one team for all units) or each_unit (a team of this roster on every unit)."},
             {"roster", KeyKind::section, "people", "", true, -1e300, 1e300, "Headcount on duty per shift, by shift name, e.g. {day: 2, night: 1}; every shift must be given."},
             {"roster_by_weekday", KeyKind::section, "people", "none", false, -1e300, 1e300, "Overrides for some weekdays, e.g. {saturday: {day: 1, night: 1}}; days not listed use roster."},
             {"minutes", KeyKind::section, "", "", true, -1e300, 1e300, "Minutes one evaluation takes (see roles[].minutes)."},
         }},
        {"roles[].minutes",
         "Minutes per task, drawn per task from a seeded stream. Give distribution and only the keys it uses.",
         {
             {"distribution", KeyKind::text, "", "", true, -1e300, 1e300, "fixed (minutes), exponential (mean), gamma (mean, sd), lognormal (median, spread) or empirical (values)."},
             {"minutes", KeyKind::real, "minutes", "", false, 0.001, 60 * 24, "fixed: every task takes this long."},
             {"mean", KeyKind::real, "minutes", "", false, 0.001, 60 * 24, "exponential, gamma: mean minutes per task."},
             {"sd", KeyKind::real, "minutes", "", false, 0.001, 60 * 24, "gamma: standard deviation of minutes per task."},
             {"median", KeyKind::real, "minutes", "", false, 0.001, 60 * 24, "lognormal: median minutes per task."},
             {"spread", KeyKind::real, "ratio", "", false, 1, 100, "lognormal: geometric sd; about 2 tasks in 3 take between median/spread and median*spread."},
             {"values", KeyKind::list, "minutes", "", false, -1e300, 1e300, "empirical: observed minutes, each equally likely, e.g. [5, 8, 12, 30]."},
         }},
        {"escalation[]",
         "One edge of the escalation graph: a task not taken up at `from` within the timeout moves to `to`.",
         {
             {"from", KeyKind::text, "", "", true, -1e300, 1e300, "Role the task waits at."},
             {"to", KeyKind::text, "", "", true, -1e300, 1e300, "Role it moves to."},
             {"after_minutes", KeyKind::real, "minutes", "", true, 0.001, 60 * 24 * 7, "Acknowledgement timeout at `from`."},
         }},
    };
    return sections;
}

}  // namespace tocsin
