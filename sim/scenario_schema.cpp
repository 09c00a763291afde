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
             {"chart_openings", KeyKind::section, "", "", false, -1e300, 1e300, "When clinicians open charts, for chart-interruption plans (see chart_openings)."},
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
        {"chart_openings",
         "When clinicians open a patient's chart: replayed from a log, or generated per patient by role and local hour of day (non-homogeneous Poisson process, thinning; Lewis & Shedler 1979). Every plan of a replication sees the same openings.",
         {
             {"replay", KeyKind::text, "path", "none", false, -1e300, 1e300, "CSV with columns encounter,opened_at,role (relative to the scenario file); none: generate from the roles' rates."},
             {"roles", KeyKind::list, "", "", true, -1e300, 1e300, "The roles that open charts, one item each (see chart_openings.roles[])."},
         }},
        {"chart_openings.roles[]",
         "One role that opens charts.",
         {
             {"name", KeyKind::text, "", "", true, -1e300, 1e300, "e.g. ward nurse; replayed rows name it in their role column."},
             {"clinicians_per_unit", KeyKind::real, "clinicians", "1", false, 0.001, 1000, "Headcount of the role on one unit in one shift, for 'interruptions per clinician per shift'."},
             {"openings_per_hour", KeyKind::list, "openings per patient per hour", "", false, -1e300, 1e300, "Rate by local hour: a list of one number (all day, e.g. [1.5]) or of 24 (hour 00 first); needed when openings are generated."},
         }},
        {"plans[]",
         "One candidate workflow: a rule, a channel and who answers.",
         {
             {"name", KeyKind::text, "", "", true, -1e300, 1e300, "Unique plan name shown in every table."},
             {"description", KeyKind::text, "", "", false, -1e300, 1e300, "One line on what the plan is for."},
             {"channel", KeyKind::text, "", "page", false, -1e300, 1e300, "How a firing is delivered: page, chart_interruption, handoff_list or ranked_review."},
             {"role", KeyKind::text, "", "responder", false, -1e300, 1e300, "Who answers the notice; for a chart interruption, only openings by this chart-opening role are interrupted (default: every role)."},
             {"rule", KeyKind::section, "", "", false, -1e300, 1e300, "When the plan fires (see plans[].rule); required except for a ranked review without a floor."},
             {"chart", KeyKind::section, "", "", false, -1e300, 1e300, "Chart interruption settings (see plans[].chart); required for that channel."},
             {"handoff", KeyKind::section, "", "", false, -1e300, 1e300, "Handoff list settings (see plans[].handoff); required for that channel."},
             {"review", KeyKind::section, "", "", false, -1e300, 1e300, "Ranked review settings (see plans[].review); required for that channel."},
         }},
        {"plans[].rule",
         "When a plan fires for an encounter. Only `threshold` is required.",
         {
             {"threshold", KeyKind::real, "score", "", false, -1e300, 1e300, "A score qualifies when >= threshold. Required, except for a ranked review, where it is the optional floor."},
             {"persistence", KeyKind::integer, "scores", "1", false, 1, 1000, "Fire only when the last k available scores all qualify."},
             {"snooze_minutes", KeyKind::real, "minutes", "none", false, 0, 60 * 24 * 60, "After a firing, no ordinary firing for this long."},
             {"rise", KeyKind::real, "score", "none", false, 1e-9, 1e300, "A score at least this much above the last firing's score fires at once, despite snooze and re-arm."},
             {"rearm_below", KeyKind::real, "score", "none", false, -1e300, 1e300, "After a firing, stay silent until a score below this is seen (must be <= threshold)."},
             {"max_per_shift", KeyKind::integer, "firings", "none", false, 1, 1000, "At most this many firings per encounter per shift, rises included."},
             {"quiet_from", KeyKind::clock, "local time", "none", false, -1e300, 1e300, "Start of daily quiet hours \"HH:MM\" (nothing fires)."},
             {"quiet_until", KeyKind::clock, "local time", "none", false, -1e300, 1e300, "End of daily quiet hours \"HH:MM\" (exclusive; may wrap midnight)."},
         }},
        {"plans[].chart",
         "A chart interruption: the rule is asked each time a clinician opens the chart, on the latest score available then.",
         {
             {"interruption_minutes", KeyKind::real, "minutes", "", true, 0, 600, "The opener's time taken by one interruption."},
             {"acceptance_probability", KeyKind::real, "probability", "1", false, 0, 1, "Share of interruptions that lead to a bedside evaluation (the same draw per opening in every plan)."},
         }},
        {"plans[].handoff",
         "A handoff list: at each handoff every current inpatient whose rule fires is flagged. Quiet hours and max_per_shift do not apply.",
         {
             {"times", KeyKind::list, "local times", "shift starts", false, -1e300, 1e300, "Local handoff times \"HH:MM\"; default: each shift's start."},
             {"minutes_per_flag", KeyKind::real, "minutes", "", true, 0, 600, "Handoff time spent on each flagged patient."},
             {"follow_up_probability", KeyKind::real, "probability", "1", false, 0, 1, "Share of flags that lead to a bedside evaluation (the same draw per patient and handoff in every plan)."},
         }},
        {"plans[].review",
         "A ranked review: at each review time a team reviews the top N current inpatients by latest score. The rule's threshold is the floor; snooze_minutes, quiet hours and max_per_shift do not apply.",
         {
             {"times", KeyKind::list, "local times", "", true, -1e300, 1e300, "Local review times \"HH:MM\", e.g. [\"08:00\"]."},
             {"top_n", KeyKind::integer, "patients", "", true, 1, 100000, "How many patients the list holds (per unit or hospital-wide)."},
             {"scope", KeyKind::text, "", "unit", false, -1e300, 1e300, "unit: one list per unit; hospital: one list for the whole hospital."},
             {"skip_reviewed_hours", KeyKind::real, "hours", "none", false, 0, 24 * 60, "Skip patients reviewed within this many hours (a rise still brings them back)."},
             {"minutes_per_review", KeyKind::real, "minutes", "", true, 0, 600, "Team time per patient reviewed."},
             {"max_reviews_per_round", KeyKind::integer, "reviews", "none", false, 0, 100000, "The team's capacity per round; listed patients beyond it are not reviewed."},
             {"team_size", KeyKind::integer, "clinicians", "none", false, 1, 1000, "Capacity from staffing: team_size x team_minutes_per_round / minutes_per_review reviews (rounded down)."},
             {"team_minutes_per_round", KeyKind::real, "minutes", "none", false, 0, 24 * 60, "Minutes each team member has for one round (with team_size)."},
         }},
    };
    return sections;
}

}  // namespace tocsin
