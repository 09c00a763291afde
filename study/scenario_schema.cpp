// Every scenario key, declared once: its kind, unit, typed default, range and
// one line of help. The loader (study/scenario_load_*.cpp) reads defaults and
// ranges from here through `Section`; `tocsin keys` and README print them.
#include "study/scenario_keys.hpp"

namespace tocsin {

namespace {

SectionSpec top_level_keys() {
    return {"top level",
            "The scenario file.",
            {
                integer_key("scenario_schema", {.required = true, .range = {1, 1}, .help = "Schema version of this file; must be 1."}),
                text_key("name", {.required = true, .help = "Short name shown on every report."}),
                text_key("description", {.help = "The question the scenario answers, in plain words."}),
                text_key("time_zone", {.required = true, .help = "IANA zone of the hospital's wall clock, e.g. Europe/Berlin; naive timestamps and all local-time rules use it."}),
                integer_key("seed", {.fallback = 1, .range = {0, 9.2e18}, .help = "Seed of every random stream; same seed, same results."}),
                integer_key("replications", {.fallback = 1, .range = {1, 100000}, .help = "How many replications of every plan to run (more than 1 needs a resampled or generated population)."}),
                text_key("score_label", {.fallback = "score", .help = "What the score is called in reports, e.g. 'ward risk score'."}),
                text_key("score_name", {.fallback = "score", .help = "What plans call the first score (plans[].score) when population.other_scores declares others, e.g. candidate."}),
                list_key("shifts", {.required = true, .help = "The daily shifts, one item each (see shifts[])."}),
                section_key("outcome", {.required = true, .help = "What counts as catching a case (see outcome)."}),
                section_key("population", {.required = true, .help = "Where encounters and scores come from (see population)."}),
                section_key("reporting", {.help = "Optional reporting period (see reporting)."}),
                list_key("plans", {.required = true, .help = "The candidate workflows to compare (see plans[])."}),
                list_key("roles", {.absent = "none", .help = "Staff who answer notices, with rosters and minutes per task (see roles[]); without roles every notice counts as evaluated at once."}),
                list_key("escalation", {.absent = "none", .help = "Where a task goes when nobody takes it up in time (see escalation[]); acyclic, one edge out of a role at most."}),
                section_key("sweep", {.help = "Parameters `tocsin sweep` varies when none are given on the command line (see sweep)."}),
                section_key("chart_openings", {.help = "When clinicians open charts, for chart-interruption plans (see chart_openings)."}),
            }};
}

SectionSpec shifts_keys() {
    return {"shifts[]",
            "One daily shift, named by its local start time; it ends when the next shift starts.",
            {
                text_key("name", {.required = true, .help = "e.g. day, night."}),
                clock_key("starts", {.unit = "local time", .required = true, .help = "Local start time \"HH:MM\"."}),
                flag_key("night", {.fallback = false, .help = "Counts towards 'per night' figures."}),
            }};
}

SectionSpec outcome_keys() {
    return {"outcome",
            "A case is caught when its first qualifying action starts within [time zero - window, time zero - min_lead].",
            {
                real_key("window_hours", {.unit = "hours", .fallback = 24, .range = {0.0166, 24 * 365}, .help = "How long before time zero an action can still count as a catch."}),
                real_key("min_lead_minutes", {.unit = "minutes", .fallback = 0, .range = {0, 60 * 24 * 30}, .help = "How long before time zero an action must start to count."}),
                section_key("averted", {.absent = "none", .help = "An assumed effect of an evaluation on the outcome, by lead (see outcome.averted); none: no outcomes-averted figures."}),
            }};
}

SectionSpec outcome_averted_keys() {
    return {"outcome.averted",
            "An ASSUMPTION, not an estimate: the chance that a case's first catching evaluation prevents the outcome, by how long before time zero it starts. Every figure built on it is this assumption applied to simulated catches.",
            {
                text_key("shape", {.fallback = "linear", .help = "linear: probability from full_lead_hours on, falling linearly to 0 at the minimum lead; step: probability from full_lead_hours on, 0 before; table: by lead (see outcome.averted.table[])."}),
                real_key("probability", {.unit = "probability", .range = {0, 1}, .help = "linear, step: chance of averting the outcome when the evaluation starts at least full_lead_hours ahead."}),
                real_key("full_lead_hours", {.unit = "hours", .range = {0, 24 * 365}, .help = "linear, step: the lead from which the full probability applies (linear: above the minimum lead)."}),
                list_key("table", {.help = "table: rows by ascending lead (see outcome.averted.table[]); a catch takes the last row whose lead it reaches, 0 before the first."}),
            }};
}

SectionSpec outcome_averted_table_keys() {
    return {"outcome.averted.table[]",
            "One row of a table effect.",
            {
                real_key("lead_hours", {.unit = "hours", .required = true, .range = {0, 24 * 365}, .help = "From this lead on (until the next row's) ..."}),
                real_key("probability", {.unit = "probability", .required = true, .range = {0, 1}, .help = "... the chance of averting the outcome."}),
            }};
}

SectionSpec population_keys() {
    return {"population",
            "Where the encounters and their scores come from.",
            {
                section_key("replay", {.help = "Replay a silent-mode log (see population.replay); give replay or generate."}),
                section_key("generate", {.help = "Generate invented patients and scores (see population.generate); give replay or generate."}),
                section_key("bootstrap", {.help = "With replay: how replications 1, 2, ... resample the log (see population.bootstrap)."}),
                section_key("shift", {.help = "A stress test: change the population from a given instant on (see population.shift)."}),
                list_key("other_scores", {.absent = "none", .help = "Further scores of the same patients, e.g. the score in use today beside a candidate: each evaluated beside the first, compared with it on the same stays, and usable by plans (see population.other_scores[])."}),
                list_key("groups", {.absent = "none", .help = "Patient-group columns, such as age band or language spoken; every benefit and burden figure is then also given by group (see population.groups[])."}),
            }};
}

SectionSpec population_other_scores_keys() {
    return {"population.other_scores[]",
            "A further score of the same encounters. In a replayed log, a column of the scores file (an empty field there is \"not recorded in this row\" for that score, counted) or a file of its own with the scores file's columns.",
            {
                text_key("name", {.required = true, .help = "What plans call it (plans[].score) and tables show, e.g. bedside."}),
                text_key("label", {.absent = "the name", .help = "What it is called in reports, e.g. 'bedside vital-sign score (in use today)'."}),
                text_key("column", {.fallback = "score", .help = "replay: the column holding its values."}),
                text_key("file", {.unit = "path", .absent = "population.replay.scores", .help = "replay: a file of its own with columns encounter,scored_at,available_at and `column`."}),
                real_list_key("score_range", {.unit = "score", .fallback = {0, 100}, .help = "replay: [low, high]; its values outside it are bad rows."}),
                section_key("generate", {.help = "generate: how the generator makes this score (see population.other_scores[].generate); required for a generated population, refused for a replayed log."}),
            }};
}

SectionSpec population_other_scores_generate_keys() {
    return {"population.other_scores[].generate",
            "A further generated score: scored at the first score's instants (the same rows missing, the same delays), its case rise starting when the first score's does, with a latent level of its own: baseline + patient offset + noise + (cases) a rise before time zero.",
            {
                text_key("scale", {.fallback = "points", .help = "points (0-100, latent in points) or probability (latent on the logit scale)."}),
                real_key("correlation", {.fallback = 0, .range = {0, 1}, .help = "Share of the patient's own level in common with the first score: offset = between_patient_sd x (correlation x z1 + sqrt(1 - correlation^2) x z), z1 the first score's standardised patient offset."}),
                real_key("baseline", {.unit = "latent", .fallback = 20, .range = {-1e6, 1e6}, .help = "Average level for everyone."}),
                real_key("between_patient_sd", {.unit = "latent", .fallback = 6, .range = {0, 1e6}, .help = "Spread of patients' own levels."}),
                real_key("within_patient_sd", {.unit = "latent", .fallback = 6, .range = {0, 1e6}, .help = "Score-to-score noise, drawn apart from the first score's."}),
                real_key("noise_carryover", {.fallback = 0, .range = {0, 0.99}, .help = "Correlation of its score-to-score noise one hour apart."}),
                real_key("drift_size", {.unit = "latent", .fallback = 20, .range = {-1e6, 1e6}, .help = "Cases: rise reached at time zero (ignored when target_auc is given)."}),
                real_key("drift_size_sd", {.unit = "latent", .fallback = 0, .range = {0, 1e6}, .help = "Cases: spread of each patient's own rise around drift_size (normal)."}),
                real_key("target_auc", {.absent = "none", .range = {0.01, 0.999}, .help = "Find drift_size so that this score's encounter-level AUC is this (reported with the rank correlation of the two scores' stay maxima reached; refused when out of reach)."}),
            }};
}

SectionSpec population_groups_keys() {
    return {"population.groups[]",
            "A patient-group column. A replayed log's encounters file must have it; an empty field (or a `missing` marker) is the group \"not recorded\", counted like any other, never dropped.",
            {
                text_key("name", {.required = true, .help = "Column name in the encounters file, and the group's name in reports, e.g. age_band."}),
                list_key("values", {.required = true, .help = "The values the column may take, in the order reports list them; any other value is a bad row."}),
                list_key("missing", {.absent = "none", .help = "What the log writes for a missing value, e.g. [NA, unknown]; counted as not recorded."}),
                real_list_key("shares", {.unit = "share", .range = {0, 1}, .help = "generate: share of encounters with each value, in the order of values; what is left over is not recorded. Default: equal shares, none left over."}),
                real_list_key("score_shift", {.unit = "points or logits", .range = {-1e6, 1e6}, .help = "generate: added to the latent level of every score of a value's patients, one per value then one for not recorded (points; logits on a probability scale): what a score that runs low for one group does."}),
            }};
}

SectionSpec population_generate_keys() {
    return {"population.generate",
            "Invented patients: arrivals per unit by hour of week (capped by beds), stays, outcomes and score trajectories.",
            {
                text_key("start", {.unit = "timestamp", .required = true, .help = "Start of the generated period (timestamp)."}),
                text_key("end", {.unit = "timestamp", .required = true, .help = "End of the generated period (timestamp, exclusive)."}),
                real_key("warmup_days", {.unit = "days", .fallback = 14, .range = {0, 365}, .help = "Arrivals start this long before `start`, so the census at the start is realistic."}),
                list_key("units", {.required = true, .help = "The units, one item each (see population.generate.units[])."}),
                section_key("stay", {.help = "Length of stay (see population.generate.stay)."}),
                section_key("outcome", {.help = "How often and when time zero happens (see population.generate.outcome)."}),
                section_key("scores", {.help = "Score scale, cadence, delays and trajectories (see population.generate.scores)."}),
                text_key("fit_check", {.absent = "none", .help = "Written by `tocsin fit --check` when the fitted population does not reproduce its log's benefit or burden figures, saying which; `tocsin run` repeats it as a warning."}),
            }};
}

SectionSpec population_generate_units_keys() {
    return {"population.generate.units[]",
            "One unit. An arrival that finds every bed taken is turned away and counted.",
            {
                text_key("name", {.required = true, .help = "Unit name shown in every table."}),
                integer_key("beds", {.unit = "beds", .required = true, .range = {1, 100000}, .help = "Beds; arrivals beyond them are turned away."}),
                real_list_key("arrivals_per_hour", {.unit = "admissions per hour", .required = true, .range = {0, 1e6}, .help = "Mean admissions per hour by local hour of week: 1 number (every hour), 24 (every day alike), 168, or 7 rows of 24 (Monday first)."}),
            }};
}

SectionSpec population_generate_stay_keys() {
    return {"population.generate.stay",
            "Length of stay, from admission to discharge (cases may leave at time zero).",
            {
                text_key("distribution", {.fallback = "lognormal", .help = "lognormal (median_hours, log_sd) or gamma (mean_hours, sd_hours)."}),
                real_key("median_hours", {.unit = "hours", .fallback = 72, .range = {0.01, 1e5}, .help = "Lognormal: median stay."}),
                real_key("log_sd", {.fallback = 0.7, .range = {0, 5}, .help = "Lognormal: standard deviation of log(stay)."}),
                real_key("mean_hours", {.unit = "hours", .fallback = 80, .range = {0.01, 1e5}, .help = "Gamma: mean stay."}),
                real_key("sd_hours", {.unit = "hours", .fallback = 60, .range = {0.01, 1e5}, .help = "Gamma: standard deviation of the stay."}),
            }};
}

SectionSpec population_generate_outcome_keys() {
    return {"population.generate.outcome",
            "Time zero: whether and when an encounter reaches the outcome.",
            {
                real_key("probability", {.fallback = 0.05, .range = {0, 1}, .help = "Share of admitted encounters that reach the outcome."}),
                real_key("earliest_fraction", {.fallback = 0.1, .range = {0, 1}, .help = "Time zero falls uniformly between this fraction of the drawn stay ..."}),
                real_key("latest_fraction", {.fallback = 1, .range = {0, 1}, .help = "... and this one."}),
                flag_key("ends_stay", {.fallback = true, .help = "The stay on the unit ends at time zero (e.g. ICU transfer)."}),
            }};
}

SectionSpec population_generate_scores_keys() {
    return {"population.generate.scores",
            "Scores: latent level = baseline + patient offset + noise + (cases) a rise before time zero.",
            {
                text_key("scale", {.fallback = "points", .help = "points (0-100, latent in points) or probability (latent on the logit scale)."}),
                real_key("cadence_minutes", {.unit = "minutes", .fallback = 60, .range = {1, 60 * 24 * 7}, .help = "Time between scheduled scores."}),
                real_key("jitter_minutes", {.unit = "minutes", .fallback = 10, .range = {0, 60 * 24 * 7}, .help = "Each gap varies uniformly by up to this much (below the cadence)."}),
                real_key("missing_probability", {.fallback = 0, .range = {0, 0.99}, .help = "Chance that a scheduled score is never recorded."}),
                real_key("latency_median_minutes", {.unit = "minutes", .fallback = 0, .range = {0, 60 * 24}, .help = "Median delay from scored_at to available_at (lognormal; 0 = none)."}),
                real_key("latency_log_sd", {.fallback = 0, .range = {0, 5}, .help = "Standard deviation of log(delay)."}),
                real_key("baseline", {.unit = "latent", .fallback = 20, .range = {-1e6, 1e6}, .help = "Average level for everyone."}),
                real_key("between_patient_sd", {.unit = "latent", .fallback = 6, .range = {0, 1e6}, .help = "Spread of patients' own levels."}),
                real_key("within_patient_sd", {.unit = "latent", .fallback = 6, .range = {0, 1e6}, .help = "Score-to-score noise."}),
                real_key("noise_carryover", {.fallback = 0, .range = {0, 0.99}, .help = "Correlation of the score-to-score noise one hour apart (0 = drawn afresh at each score)."}),
                real_key("drift_size", {.unit = "latent", .fallback = 20, .range = {-1e6, 1e6}, .help = "Cases: rise reached at time zero (ignored when target_auc is given)."}),
                real_key("drift_size_sd", {.unit = "latent", .fallback = 0, .range = {0, 1e6}, .help = "Cases: spread of each patient's own rise around drift_size (normal; 0 = every case rises alike)."}),
                real_key("drift_onset_min_hours", {.unit = "hours", .fallback = 6, .range = {0, 24 * 60}, .help = "Cases: the rise starts a uniform number of hours before time zero, from ..."}),
                real_key("drift_onset_max_hours", {.unit = "hours", .fallback = 48, .range = {0, 24 * 60}, .help = "... to this."}),
                real_key("target_auc", {.absent = "none", .range = {0.01, 0.999}, .help = "Find drift_size so that the encounter-level AUC is this (reported; refused when out of reach)."}),
            }};
}

SectionSpec population_bootstrap_keys() {
    return {"population.bootstrap",
            "Replications from the log: whole days (or weeks) per unit with their stays and scores. See README, 'Replications from a log'.",
            {
                integer_key("block_days", {.unit = "days", .fallback = 1, .range = {1, 28}, .help = "Length of a resampled block: 1 = days, 7 = weeks."}),
                text_key("scheme", {.fallback = "stationary", .help = "stationary (random run lengths) or moving_block (fixed run lengths)."}),
                real_key("mean_run_blocks", {.unit = "blocks", .fallback = 7, .range = {1, 1000}, .help = "Mean (stationary) or exact (moving_block) number of consecutive blocks kept together."}),
                flag_key("same_weekday", {.fallback = true, .help = "Day blocks: a jump lands on the same weekday, keeping the weekly pattern."}),
                integer_key("warm_up_days", {.unit = "days", .absent = "auto", .range = {0, 3650}, .help = "First days of the log not drawn from, its census still filling; with a warm-up each replication starts with an eligible day's census. auto: found from the log."}),
                integer_key("tail_days", {.unit = "days", .absent = "auto", .range = {0, 3650}, .help = "Last days of the log not drawn from, its stays cut off by its end. auto: found from the log."}),
            }};
}

SectionSpec population_shift_keys() {
    return {"population.shift",
            "A stress test applied from `from` on; everything before it is unchanged.",
            {
                text_key("from", {.unit = "timestamp", .required = true, .help = "When the shift starts (timestamp)."}),
                list_key("units", {.absent = "all", .help = "Units the outcome, score and cadence changes apply to."}),
                real_key("outcome_rate_multiplier", {.fallback = 1, .range = {0, 100}, .help = "Share of cases among later admissions is multiplied by this."}),
                text_key("scale", {.fallback = "points", .help = "How scores map to the latent level for score_scale/score_offset (generated populations use their own scale)."}),
                real_key("score_scale", {.fallback = 1, .range = {-1e6, 1e6}, .help = "Later scores: latent x score_scale + score_offset."}),
                real_key("score_offset", {.unit = "latent", .fallback = 0, .range = {-1e6, 1e6}, .help = "Added to the latent level of later scores."}),
                real_key("cadence_minutes", {.unit = "minutes", .absent = "none", .range = {1, 60 * 24 * 7}, .help = "Later scores: at most one per encounter in each such window (thins only)."}),
                text_key("outage_start", {.unit = "timestamp", .absent = "from", .help = "Start of a feed outage (timestamp, not before `from`)."}),
                real_key("outage_hours", {.unit = "hours", .fallback = 0, .range = {0, 24 * 365}, .help = "No score becomes available for this long; lost scores are counted."}),
                list_key("census", {.help = "Raise a unit's census (see population.shift.census[])."}),
            }};
}

SectionSpec population_shift_census_keys() {
    return {"population.shift.census[]",
            "Extra admissions on one unit after the shift starts (beds are not enforced).",
            {
                text_key("unit", {.required = true, .help = "Unit name."}),
                real_key("multiplier", {.required = true, .range = {1, 100}, .help = "Admissions after the shift are multiplied by about this."}),
            }};
}

SectionSpec population_replay_keys() {
    return {"population.replay",
            "Two CSV files (RFC 4180). Paths are relative to the scenario file.",
            {
                text_key("encounters", {.unit = "path", .required = true, .help = "CSV with columns encounter,unit,admitted,discharged,outcome_at."}),
                text_key("scores", {.unit = "path", .required = true, .help = "CSV with columns encounter,scored_at,available_at,score."}),
                real_key("latency_minutes", {.unit = "minutes", .fallback = 0, .range = {0, 60 * 24}, .help = "Delay added to scored_at when available_at is empty."}),
                real_key("max_stay_days", {.unit = "days", .fallback = 365, .range = {1, 36500}, .help = "A longer stay is a bad row (a mistyped year stretches the reporting period)."}),
                real_key("far_out_fence_iqr", {.unit = "interquartile ranges", .fallback = 3, .range = {0, 1000}, .help = "An admission or discharge more than this many interquartile ranges (at least this many times 30 days) outside the middle half of all of them is a bad row; 0 turns the check off."}),
                real_list_key("score_range", {.unit = "score", .fallback = {0, 100}, .help = "[low, high]: scores outside it are bad rows; e.g. [0, 1] for a probability."}),
                text_key("bad_rows", {.fallback = "stop", .help = "stop: a bad row stops the run at its file:line; skip: bad rows (here and in chart_openings.replay) are skipped and counted by reason with their first line numbers."}),
            }};
}

SectionSpec reporting_keys() {
    return {"reporting",
            "Limits per-shift figures to complete shifts inside a period (default: complete shifts between the first admission and the last discharge).",
            {
                text_key("from", {.unit = "timestamp", .help = "Start of the reporting period (timestamp)."}),
                text_key("until", {.unit = "timestamp", .help = "End of the reporting period (timestamp, exclusive)."}),
                integer_key("smallest_group", {.unit = "encounters", .fallback = 11, .range = {1, 1000000}, .help = "A patient group with fewer encounters than this has its counts and figures suppressed in every output, as small-number disclosure rules usually require."}),
            }};
}

SectionSpec chart_openings_keys() {
    return {"chart_openings",
            "When clinicians open a patient's chart: replayed from a log, or generated per patient by role and local hour of day (non-homogeneous Poisson process, thinning; Lewis & Shedler 1979). Every plan of a replication sees the same openings.",
            {
                text_key("replay", {.unit = "path", .absent = "none", .help = "CSV with columns encounter,opened_at,role (relative to the scenario file); none: generate from the roles' rates."}),
                list_key("roles", {.required = true, .help = "The roles that open charts, one item each (see chart_openings.roles[])."}),
            }};
}

SectionSpec chart_openings_roles_keys() {
    return {"chart_openings.roles[]",
            "One role that opens charts.",
            {
                text_key("name", {.required = true, .help = "e.g. ward nurse; replayed rows name it in their role column."}),
                real_key("clinicians_per_unit", {.unit = "clinicians", .fallback = 1, .range = {0.001, 1000}, .help = "Headcount of the role on one unit in one shift, for 'interruptions per clinician per shift'."}),
                real_list_key("openings_per_hour", {.unit = "openings per patient per hour", .range = {0, 1000}, .help = "Rate by local hour: a list of one number (all day, e.g. [1.5]) or of 24 (hour 00 first); needed when openings are generated."}),
            }};
}

SectionSpec plans_keys() {
    return {"plans[]",
            "One candidate workflow: a rule, a channel and who answers.",
            {
                text_key("name", {.required = true, .help = "Unique plan name shown in every table."}),
                text_key("description", {.help = "One line on what the plan is for."}),
                text_key("score", {.absent = "the first score", .help = "Which score the plan's rule reads: score_name or one of population.other_scores[].name."}),
                text_key("channel", {.fallback = "page", .help = "How a firing is delivered: page, chart_interruption, handoff_list, ranked_review or score_lookup (nothing pushed: the score is looked up at chart openings)."}),
                text_key("role", {.fallback = "responder", .help = "Who answers the notice; when roles are declared, one of them. For a chart interruption, only openings by this chart-opening role are interrupted (default: every role)."}),
                text_key("queue", {.fallback = "fifo", .help = "Order in which waiting tasks are taken up: fifo (first come) or priority (highest score first)."}),
                text_key("at_shift_end", {.fallback = "hand_over", .help = "An evaluation still in progress when its nurse's shift ends: hand_over (an incoming colleague continues it) or drop (abandoned and counted)."}),
                list_key("escalation", {.absent = "the scenario's", .help = "This plan's own escalation edges, items as in escalation[]; they replace the scenario's escalation[] for this plan's tasks only. [] = this plan's tasks never escalate."}),
                section_key("roster", {.unit = "people", .absent = "the role's", .help = "This plan's own headcount per shift for the role it pages, e.g. {day: 1, night: 1}; replaces that role's roster and roster_by_weekday for this plan's tasks only."}),
                section_key("rule", {.help = "When the plan fires (see plans[].rule); required except for a ranked review without a floor."}),
                section_key("chart", {.help = "Chart interruption settings (see plans[].chart); required for that channel."}),
                section_key("handoff", {.help = "Handoff list settings (see plans[].handoff); required for that channel."}),
                section_key("review", {.help = "Ranked review settings (see plans[].review); required for that channel."}),
                section_key("fatigue", {.absent = "none", .help = "Page or chart interruption: the chance that a notice leads to an evaluation falls with the notices before it (see plans[].fatigue); none: it does not."}),
                section_key("lookup", {.help = "Look-up settings (see plans[].lookup); required for channel score_lookup."}),
            }};
}

SectionSpec plans_rule_keys() {
    return {"plans[].rule",
            "When a plan fires for an encounter. Only `threshold` is required.",
            {
                real_key("threshold", {.unit = "score", .help = "A score qualifies when >= threshold. Required, except for a ranked review, where it is the optional floor."}),
                integer_key("persistence", {.unit = "scores", .fallback = 1, .range = {1, 1000}, .help = "Fire only when the last k available scores all qualify."}),
                real_key("snooze_minutes", {.unit = "minutes", .absent = "none", .range = {0, 60 * 24 * 60}, .help = "After a firing, no ordinary firing for this long."}),
                real_key("rise", {.unit = "score", .absent = "none", .range = {.min = 1e-9}, .help = "A score at least this much above the last firing's score fires at once, despite snooze and re-arm."}),
                real_key("rearm_below", {.unit = "score", .absent = "none", .help = "After a firing, stay silent until a score below this is seen (must be <= threshold)."}),
                integer_key("max_per_shift", {.unit = "firings", .absent = "none", .range = {1, 1000}, .help = "At most this many firings per encounter per shift, rises included."}),
                clock_key("quiet_from", {.unit = "local time", .absent = "none", .help = "Start of daily quiet hours \"HH:MM\" (nothing fires)."}),
                clock_key("quiet_until", {.unit = "local time", .absent = "none", .help = "End of daily quiet hours \"HH:MM\" (exclusive; may wrap midnight)."}),
            }};
}

SectionSpec sweep_keys() {
    return {"sweep",
            "What `tocsin sweep` varies by default. Paths as for --vary: plan.rule.threshold is relative to the swept plan.",
            {
                text_key("plan", {.absent = "first plan", .help = "Name of the plan to vary."}),
                list_key("vary", {.required = true, .help = "One item per parameter (see sweep.vary[]); several make a grid."}),
            }};
}

SectionSpec sweep_vary_keys() {
    return {"sweep.vary[]",
            "One swept parameter: a list of values, or a range from..to by step (inclusive).",
            {
                text_key("key", {.unit = "path", .required = true, .help = "Dotted path, e.g. plan.rule.threshold or plan.review.times."}),
                list_key("values", {.help = "The values to try: numbers, or text for a text key (a list key's items joined by '+', e.g. \"08:00+20:00\")."}),
                real_key("from", {.help = "Start of a range."}),
                real_key("to", {.help = "End of a range (inclusive)."}),
                real_key("step", {.range = {.min = 1e-12}, .help = "Step of a range."}),
            }};
}

SectionSpec roles_keys() {
    return {"roles[]",
            "One role that answers notices: a team on each unit or one for the hospital, its roster and its minutes per task.",
            {
                text_key("name", {.required = true, .help = "e.g. rapid response nurse; plans and escalation edges name it."}),
                text_key("team", {.fallback = "hospital", .help = "hospital (one team for all units) or each_unit (a team of this roster on every unit)."}),
                section_key("roster", {.unit = "people", .required = true, .help = "Headcount on duty per shift, by shift name, e.g. {day: 2, night: 1}; every shift must be given."}),
                section_key("roster_by_weekday", {.unit = "people", .absent = "none", .help = "Overrides for some weekdays, e.g. {saturday: {day: 1, night: 1}}; days not listed use roster."}),
                section_key("minutes", {.required = true, .help = "Minutes one evaluation takes (see roles[].minutes)."}),
                list_key("other_work", {.absent = "none", .help = "Work no score raised that competes for the same staff, one item per class (see roles[].other_work[])."}),
            }};
}

SectionSpec roles_other_work_keys() {
    return {"roles[].other_work[]",
            "One class of other work: tasks arriving at every team of the role as a Poisson process by local hour of day, with their own minutes and a priority against alert tasks. They never escalate and catch nobody.",
            {
                text_key("name", {.required = true, .help = "e.g. ward calls; unique within the role; with the role's name and the unit it keys the draws."}),
                real_list_key("per_hour", {.unit = "tasks per team per hour", .required = true, .range = {0, 1000}, .help = "Rate by local hour: a list of one number (all day, e.g. [0.5]) or of 24 (hour 00 first)."}),
                section_key("minutes", {.required = true, .help = "Minutes one such task takes (as roles[].minutes)."}),
                text_key("priority", {.fallback = "equal", .help = "Against waiting alert tasks: above (taken up first), equal (one queue, the plan's order) or below (only when no alert task waits). Nothing interrupts work begun."}),
            }};
}

SectionSpec roles_minutes_keys() {
    return {"roles[].minutes",
            "Minutes per task, drawn per task from a seeded stream. Give distribution and only the keys it uses.",
            {
                text_key("distribution", {.required = true, .help = "fixed (minutes), exponential (mean), gamma (mean, sd), lognormal (median, spread) or empirical (values)."}),
                real_key("minutes", {.unit = "minutes", .range = {0.001, 60 * 24}, .help = "fixed: every task takes this long."}),
                real_key("mean", {.unit = "minutes", .range = {0.001, 60 * 24}, .help = "exponential, gamma: mean minutes per task."}),
                real_key("sd", {.unit = "minutes", .range = {0.001, 60 * 24}, .help = "gamma: standard deviation of minutes per task."}),
                real_key("median", {.unit = "minutes", .range = {0.001, 60 * 24}, .help = "lognormal: median minutes per task."}),
                real_key("spread", {.unit = "ratio", .range = {1, 100}, .help = "lognormal: geometric sd; about 2 tasks in 3 take between median/spread and median*spread."}),
                real_list_key("values", {.unit = "minutes", .help = "empirical: observed minutes, each equally likely, e.g. [5, 8, 12, 30]."}),
            }};
}

SectionSpec escalation_keys() {
    return {"escalation[]",
            "One edge of the escalation graph: a task not taken up at `from` within the timeout moves to `to`.",
            {
                text_key("from", {.required = true, .help = "Role the task waits at."}),
                text_key("to", {.required = true, .help = "Role it moves to."}),
                real_key("after_minutes", {.unit = "minutes", .required = true, .range = {0.001, 60 * 24 * 7}, .help = "Acknowledgement timeout at `from`."}),
            }};
}

SectionSpec plans_chart_keys() {
    return {"plans[].chart",
            "A chart interruption: the rule is asked each time a clinician opens the chart, on the latest score available then.",
            {
                real_key("interruption_minutes", {.unit = "minutes", .required = true, .range = {0, 600}, .help = "The opener's time taken by one interruption."}),
                real_key("acceptance_probability", {.unit = "probability", .fallback = 1, .range = {0, 1}, .help = "Share of interruptions that lead to a bedside evaluation (the same draw per opening in every plan)."}),
            }};
}

SectionSpec plans_fatigue_keys() {
    return {"plans[].fatigue",
            "Response that falls with load (an assumption): the odds that a notice leads to an evaluation are multiplied by a factor per earlier notice about the same patient in this plan and per notice the same team received in the window before it.",
            {
                real_key("base_response", {.unit = "probability", .range = {0, 1}, .help = "Page only (required there): probability that a page leads to an evaluation when nothing came before it; a page not followed is acknowledged without an evaluation. A chart interruption starts from chart.acceptance_probability."}),
                real_key("repeat_odds_ratio", {.unit = "odds ratio", .fallback = 1, .range = {1e-6, 1e6}, .help = "Odds multiplied by this for each earlier notice about the same patient in this plan (1: no effect)."}),
                real_key("recent_odds_ratio", {.unit = "odds ratio", .fallback = 1, .range = {1e-6, 1e6}, .help = "Odds multiplied by this for each notice the same team received within window_hours before (1: no effect)."}),
                real_key("window_hours", {.unit = "hours", .fallback = 8, .range = {0.001, 24 * 14}, .help = "How far back the team's notices count."}),
            }};
}

SectionSpec plans_lookup_keys() {
    return {"plans[].lookup",
            "A look-up (nothing pushed): at a chart opening the clinician looks the score up with the given probability, and acts (an evaluation) when the rule fires on the latest score then. Every look-up costs its minutes; nothing interrupts anyone.",
            {
                real_key("minutes_per_lookup", {.unit = "minutes", .required = true, .range = {0, 600}, .help = "The clinician's time taken by one look-up."}),
                real_list_key("probability", {.unit = "probability", .required = true, .range = {0, 1}, .help = "Chance that an opening leads to a look-up, by local hour: one number (all day) or 24 (hour 00 first). The same draw per opening in every look-up plan."}),
            }};
}

SectionSpec plans_handoff_keys() {
    return {"plans[].handoff",
            "A handoff list: at each handoff every current inpatient whose rule fires is flagged. Quiet hours and max_per_shift do not apply.",
            {
                list_key("times", {.unit = "local times", .absent = "shift starts", .help = "Local handoff times \"HH:MM\"; default: each shift's start."}),
                real_key("minutes_per_flag", {.unit = "minutes", .required = true, .range = {0, 600}, .help = "Handoff time spent on each flagged patient."}),
                real_key("follow_up_probability", {.unit = "probability", .fallback = 1, .range = {0, 1}, .help = "Share of flags that lead to a bedside evaluation (the same draw per patient and handoff in every plan)."}),
            }};
}

SectionSpec plans_review_keys() {
    return {"plans[].review",
            "A ranked review: at each review time a team reviews the top N current inpatients by latest score. The rule's threshold is the floor; snooze_minutes, quiet hours and max_per_shift do not apply.",
            {
                list_key("times", {.unit = "local times", .required = true, .help = "Local review times \"HH:MM\", e.g. [\"08:00\"]."}),
                integer_key("top_n", {.unit = "patients", .required = true, .range = {1, 100000}, .help = "How many patients the list holds (per unit or hospital-wide)."}),
                text_key("scope", {.fallback = "unit", .help = "unit: one list per unit; hospital: one list for the whole hospital."}),
                real_key("skip_reviewed_hours", {.unit = "hours", .absent = "none", .range = {0, 24 * 60}, .help = "Skip patients reviewed within this many hours (a rise still brings them back)."}),
                real_key("minutes_per_review", {.unit = "minutes", .required = true, .range = {0, 600}, .help = "Team time per patient reviewed: the one cost of a review (the roles' task minutes do not apply to reviews)."}),
                integer_key("max_reviews_per_round", {.unit = "reviews", .absent = "none", .range = {0, 100000}, .help = "The team's capacity per round; listed patients beyond it are not reviewed."}),
                integer_key("team_size", {.unit = "clinicians", .absent = "none", .range = {1, 1000}, .help = "Capacity from staffing: team_size x team_minutes_per_round / minutes_per_review reviews (rounded down)."}),
                real_key("team_minutes_per_round", {.unit = "minutes", .absent = "none", .range = {0, 24 * 60}, .help = "Minutes each team member has for one round (with team_size)."}),
            }};
}

}  // namespace

const std::vector<SectionSpec>& scenario_sections() {
    static const std::vector<SectionSpec> sections = {
        top_level_keys(),
        shifts_keys(),
        outcome_keys(),
        outcome_averted_keys(),
        outcome_averted_table_keys(),
        population_keys(),
        population_generate_keys(),
        population_generate_units_keys(),
        population_generate_stay_keys(),
        population_generate_outcome_keys(),
        population_generate_scores_keys(),
        population_bootstrap_keys(),
        population_shift_keys(),
        population_shift_census_keys(),
        population_replay_keys(),
        population_groups_keys(),
        population_other_scores_keys(),
        population_other_scores_generate_keys(),
        reporting_keys(),
        chart_openings_keys(),
        chart_openings_roles_keys(),
        plans_keys(),
        plans_rule_keys(),
        sweep_keys(),
        sweep_vary_keys(),
        roles_keys(),
        roles_minutes_keys(),
        roles_other_work_keys(),
        escalation_keys(),
        plans_chart_keys(),
        plans_fatigue_keys(),
        plans_handoff_keys(),
        plans_lookup_keys(),
        plans_review_keys(),
    };
    return sections;
}

}  // namespace tocsin
