#include <algorithm>
#include <cmath>
#include <limits>

#include "models/text.hpp"
#include "study/scenario_load.hpp"

// population: a replayed log or a generated one, its bootstrap and a stress test.

namespace tocsin::scenario_load {

namespace {

// 1 number (every hour), 24 (every day alike), 168, or 7 rows of 24.
WeeklyRate weekly_rate(const Section& s, std::string_view key) {
    const YAML::Node list = s.child(key);
    std::vector<double> flat;
    bool rows = list.size() == 7;
    for (const auto& item : list) rows = rows && item.IsSequence() && item.size() == 24;
    auto number = [&](const YAML::Node& item) {
        double d = 0;
        if (!item.IsScalar() || !YAML::convert<double>::decode(item, d) || d < 0)
            throw s.error(item, key, "expected a number of admissions per hour >= 0");
        if (!std::isfinite(d))
            throw s.error(item, key, "'" + item.Scalar() + "' is not a finite number (expected admissions per hour >= 0)");
        if (std::string problem = number_problem(s.spec(key), d, item.Scalar()); !problem.empty())
            throw s.error(item, key, problem);  // above the declared range
        return d;
    };
    for (const auto& item : list) {
        if (rows) {
            for (const auto& cell : item) flat.push_back(number(cell));
        } else {
            flat.push_back(number(item));
        }
    }
    WeeklyRate rate{};
    if (flat.size() == 1) {
        rate.fill(flat[0]);
    } else if (flat.size() == 24) {
        for (int h = 0; h < hours_per_week; ++h) rate[static_cast<std::size_t>(h)] = flat[static_cast<std::size_t>(h % 24)];
    } else if (flat.size() == static_cast<std::size_t>(hours_per_week)) {
        std::copy(flat.begin(), flat.end(), rate.begin());
    } else {
        s.fail(key, "expected 1, 24 or 168 numbers, or 7 rows of 24; found " + std::to_string(flat.size()) + " numbers");
    }
    return rate;
}

ScoreScale score_scale(const Section& s, std::string_view key) {
    const std::string v = s.text(key);
    if (v == "points") return ScoreScale::points;
    if (v == "probability") return ScoreScale::probability;
    s.fail(key, "unknown scale '" + v + "' (expected: points or probability)");
}

std::vector<UnitConfig> parse_units(const Section& g) {
    std::vector<UnitConfig> units;
    std::size_t i = 0;
    for (const auto& node : g.child("units")) {
        Section u(node, "population.generate.units[]", g.file(), "population.generate.units[" + std::to_string(i++) + "]");
        UnitConfig unit;
        unit.name = u.text("name");
        if (unit.name.empty()) u.fail("name", "unit name is empty");
        for (const UnitConfig& other : units)
            if (other.name == unit.name) u.fail("name", "two units are named '" + unit.name + "'");
        unit.beds = static_cast<int>(u.integer("beds"));
        unit.arrivals_per_hour = weekly_rate(u, "arrivals_per_hour");
        units.push_back(std::move(unit));
    }
    if (units.empty()) g.fail("units", "at least one unit is needed");
    return units;
}

StayConfig parse_stay(const Section& s) {
    StayConfig stay;
    const std::string d = s.text("distribution");
    if (d == "lognormal") stay.distribution = StayDistribution::lognormal;
    else if (d == "gamma") stay.distribution = StayDistribution::gamma;
    else s.fail("distribution", "unknown distribution '" + d + "' (expected: lognormal or gamma)");
    stay.median_hours = s.real("median_hours");
    stay.log_sd = s.real("log_sd");
    stay.mean_hours = s.real("mean_hours");
    stay.sd_hours = s.real("sd_hours");
    return stay;
}

OutcomeConfig parse_outcome(const Section& s) {
    OutcomeConfig outcome;
    outcome.probability = s.real("probability");
    outcome.earliest_fraction = s.real("earliest_fraction");
    outcome.latest_fraction = s.real("latest_fraction");
    outcome.ends_stay = s.flag("ends_stay");
    if (outcome.latest_fraction < outcome.earliest_fraction) s.fail("latest_fraction", "must be at or above earliest_fraction");
    return outcome;
}

ScoreConfig parse_scores(const Section& s) {
    ScoreConfig k;
    k.scale = score_scale(s, "scale");
    k.cadence_minutes = s.real("cadence_minutes");
    k.jitter_minutes = s.real("jitter_minutes");
    if (k.jitter_minutes >= k.cadence_minutes) s.fail("jitter_minutes", "must be below cadence_minutes");
    k.missing_probability = s.real("missing_probability");
    k.latency_median_minutes = s.real("latency_median_minutes");
    k.latency_log_sd = s.real("latency_log_sd");
    k.baseline = s.real("baseline");
    k.between_patient_sd = s.real("between_patient_sd");
    k.within_patient_sd = s.real("within_patient_sd");
    k.noise_carryover = s.real("noise_carryover");
    k.drift_size = s.real("drift_size");
    k.drift_size_sd = s.real("drift_size_sd");
    k.drift_onset_min_hours = s.real("drift_onset_min_hours");
    k.drift_onset_max_hours = s.real("drift_onset_max_hours");
    if (k.drift_onset_max_hours < k.drift_onset_min_hours)
        s.fail("drift_onset_max_hours", "must be at or above drift_onset_min_hours");
    return k;
}

void parse_generator(const Section& g, Scenario& sc) {
    GeneratorConfig& c = sc.population.generator;
    c.zone = sc.simulation.zone;
    c.period_start = timestamp(g, "start", sc.simulation.zone);
    c.period_end = timestamp(g, "end", sc.simulation.zone);
    if (c.period_end <= c.period_start) g.fail("end", "the generated period ends before it starts");
    c.warmup_days = g.real("warmup_days");
    sc.population.fit_check = g.text("fit_check");
    c.units = parse_units(g);
    const std::string& file = g.file();
    c.stay = parse_stay(Section(section_or_empty(g, "stay"), "population.generate.stay", file, "population.generate.stay"));
    c.outcome = parse_outcome(
        Section(section_or_empty(g, "outcome"), "population.generate.outcome", file, "population.generate.outcome"));
    const YAML::Node scores = section_or_empty(g, "scores");
    const Section s(scores, "population.generate.scores", file, "population.generate.scores");
    c.scores = parse_scores(s);
    sc.population.target_auc = s.optional_real("target_auc");
    if (sc.population.target_auc) {
        const YAML::Node at = scores["target_auc"];
        sc.population.target_auc_at = {at.Mark().line + 1, at.Mark().column + 1};
    }
    try {
        validate(c);
    } catch (const std::invalid_argument& e) {
        g.fail("units", e.what());
    }
}

BootstrapConfig parse_bootstrap(const Section& s) {
    BootstrapConfig b;
    b.block_days = static_cast<int>(s.integer("block_days"));
    const std::string scheme = s.text("scheme");
    if (scheme == "stationary") b.scheme = BlockScheme::stationary;
    else if (scheme == "moving_block") b.scheme = BlockScheme::moving_block;
    else s.fail("scheme", "unknown scheme '" + scheme + "' (expected: stationary or moving_block)");
    b.mean_run_blocks = s.real("mean_run_blocks");
    b.same_weekday = s.flag("same_weekday");
    // A number of days, or "auto" (also when left out): found from the log.
    auto days_or_auto = [&](std::string_view key) -> std::optional<int> {
        const YAML::Node v = s.child(key);
        if (v.IsScalar() && v.Scalar() == "auto") return std::nullopt;
        if (auto n = s.optional_integer(key)) return static_cast<int>(*n);
        return std::nullopt;
    };
    b.warm_up_days = days_or_auto("warm_up_days");
    b.tail_days = days_or_auto("tail_days");
    return b;
}

ShiftStress parse_shift(const Section& s, const Scenario& sc) {
    ShiftStress x;
    x.from = timestamp(s, "from", sc.simulation.zone);
    x.units = s.text_list("units");
    x.outcome_rate_multiplier = s.real("outcome_rate_multiplier");
    const bool generated = sc.population.source == PopulationSource::generate;
    x.scale = generated ? sc.population.generator.scores.scale : score_scale(s, "scale");
    if (generated && s.has("scale") && score_scale(s, "scale") != x.scale)
        s.fail("scale", "differs from population.generate.scores.scale; leave it out for generated populations");
    x.score_scale = s.real("score_scale");
    x.score_offset = s.real("score_offset");
    x.cadence_minutes = s.optional_real("cadence_minutes").value_or(0);  // 0: no limit (the key's "none")
    x.outage_hours = s.real("outage_hours");
    x.outage_start = s.has("outage_start") ? timestamp(s, "outage_start", sc.simulation.zone) : x.from;
    if (x.outage_start < x.from) s.fail("outage_start", "must not be before `from` (patients before the shift stay unchanged)");
    std::size_t i = 0;
    for (const auto& node : s.child("census")) {
        Section c(node, "population.shift.census[]", s.file(), "population.shift.census[" + std::to_string(i++) + "]");
        const std::string unit = c.text("unit");
        if (x.census_multiplier.count(unit)) c.fail("unit", "unit '" + unit + "' is listed twice");
        x.census_multiplier[unit] = c.real("multiplier");
    }
    if (sc.population.source == PopulationSource::generate) {
        std::vector<std::string> known;
        for (const UnitConfig& u : sc.population.generator.units) known.push_back(u.name);
        auto check_unit = [&](const std::string& name, std::string_view key) {
            if (std::find(known.begin(), known.end(), name) == known.end()) {
                std::string list;
                for (const std::string& k : known) list += (list.empty() ? "" : ", ") + k;
                s.fail(key, "unknown unit '" + name + "' (units: " + list + ")");
            }
        };
        for (const std::string& u : x.units) check_unit(u, "units");
        for (const auto& [u, m] : x.census_multiplier) check_unit(u, "census");
    }
    return x;
}

void parse_replay(const Section& s, const std::string& directory, ReplaySource& replay) {
    replay.encounters_path = resolve(directory, s.text("encounters"));
    replay.scores_path = resolve(directory, s.text("scores"));
    replay.latency_when_missing = seconds_from_minutes(s.real("latency_minutes"));
    replay.max_stay_days = s.real("max_stay_days");
    replay.far_out_fence_iqr = s.real("far_out_fence_iqr");
    const std::vector<double> range = s.real_list("score_range");
    if (range.size() != 2 || !std::isfinite(range[0]) || !std::isfinite(range[1]) || !(range[0] < range[1]))
        s.fail("score_range", "expected [low, high] with two finite numbers, low below high");
    replay.score_low = range[0];
    replay.score_high = range[1];
    const std::string bad_rows = s.text("bad_rows");
    if (bad_rows == "skip") replay.bad_rows = BadRows::skip;
    else if (bad_rows != "stop") s.fail("bad_rows", "unknown value '" + bad_rows + "' (expected stop or skip)");
}

// A group's value list: present, printable, distinct. `what` names the list in messages.
void check_group_values(const Section& g, std::string_view key, const std::vector<std::string>& values) {
    for (std::size_t v = 0; v < values.size(); ++v) {
        if (values[v].empty()) g.fail(key, "an empty value: an empty field already means not recorded");
        if (std::string problem = text_problem(values[v]); !problem.empty())
            g.fail(key, "'" + values[v] + "' is not printable text: " + problem);
        if (std::find(values.begin(), values.begin() + static_cast<std::ptrdiff_t>(v), values[v]) !=
            values.begin() + static_cast<std::ptrdiff_t>(v))
            g.fail(key, "'" + values[v] + "' is listed twice");
        if (values[v] == GroupColumn::not_recorded)
            g.fail(key, "'" + values[v] + "' is what tocsin calls a missing value; list the log's marker under missing");
    }
}

// One population.groups[] item: the column, and for a generated population its shares and score shifts.
GeneratedGroup parse_group(const Section& g, bool generated, const std::vector<GeneratedGroup>& earlier) {
    GeneratedGroup x;
    x.column.name = g.text("name");
    static const std::vector<std::string> taken = {"encounter", "unit", "admitted", "discharged", "outcome_at"};
    if (x.column.name.empty()) g.fail("name", "a group needs a name (its column in the encounters file)");
    if (std::string problem = text_problem(x.column.name); !problem.empty())
        g.fail("name", "not printable text: " + problem);
    if (std::find(taken.begin(), taken.end(), x.column.name) != taken.end())
        g.fail("name", "'" + x.column.name + "' is one of the encounters file's own columns; name the group's column otherwise");
    for (const GeneratedGroup& e : earlier)
        if (e.column.name == x.column.name) g.fail("name", "group '" + x.column.name + "' is declared twice");
    x.column.values = g.text_list("values");
    if (x.column.values.empty()) g.fail("values", "list the values the column may take");
    if (x.column.values.size() > 1000) g.fail("values", "more than 1,000 values: a group, not an identifier");
    check_group_values(g, "values", x.column.values);
    x.column.recorded_as_missing = g.text_list("missing");
    check_group_values(g, "missing", x.column.recorded_as_missing);
    for (const std::string& m : x.column.recorded_as_missing)
        if (std::find(x.column.values.begin(), x.column.values.end(), m) != x.column.values.end())
            g.fail("missing", "'" + m + "' is also one of the values");
    if (!generated) {
        for (std::string_view key : {"shares", "score_shift"})
            if (g.has(key))
                g.fail(key, "only a generated population takes " + std::string(key) +
                                "; a replayed log's groups are read from its encounters file");
        return x;
    }
    const std::size_t n = x.column.values.size();
    x.shares = g.has("shares") ? g.real_list("shares") : std::vector<double>(n, 1.0 / static_cast<double>(n));
    if (x.shares.size() != n) g.fail("shares", "give one share per value (" + std::to_string(n) + ")");
    double total = 0;
    for (double share : x.shares) {
        if (share < 0 || share > 1) g.fail("shares", "each share must lie in [0, 1]");
        total += share;
    }
    if (total > 1 + 1e-9) g.fail("shares", "the shares add up to more than 1 (the rest is not recorded)");
    x.score_shift = g.real_list("score_shift");
    if (!x.score_shift.empty() && x.score_shift.size() != n + 1)
        g.fail("score_shift", "give one shift per value and one for not recorded (" + std::to_string(n + 1) + ")");
    return x;
}

// population.other_scores[].generate: a further generated score's own latent level.
GeneratedOtherScore parse_other_generated(const Section& o, const std::string& name) {
    const Section g(o.child("generate"), "population.other_scores[].generate", o.file(),
                    o.where() + ".generate");
    GeneratedOtherScore x;
    x.name = name;
    x.level.scale = score_scale(g, "scale");
    x.correlation = g.real("correlation");
    x.level.baseline = g.real("baseline");
    x.level.between_patient_sd = g.real("between_patient_sd");
    x.level.within_patient_sd = g.real("within_patient_sd");
    x.level.noise_carryover = g.real("noise_carryover");
    x.level.drift_size = g.real("drift_size");
    x.level.drift_size_sd = g.real("drift_size_sd");
    x.target_auc = g.optional_real("target_auc");
    return x;
}

// population.other_scores[]: each further score's name and label, and for a
// replayed log where its values are read.
void load_other_scores(const Section& pop, Scenario& sc) {
    if (!pop.has("other_scores")) return;
    const bool replayed = sc.population.source == PopulationSource::replay;
    std::size_t i = 0;
    for (const auto& node : pop.child("other_scores")) {
        const Section o(node, "population.other_scores[]", pop.file(),
                        "population.other_scores[" + std::to_string(i++) + "]");
        ScoreLabel named{o.text("name"), o.has("label") ? o.text("label") : o.text("name")};
        if (named.name.empty()) o.fail("name", "a score needs a name (what plans[].score calls it)");
        if (std::string problem = text_problem(named.name); !problem.empty())
            o.fail("name", "not printable text: " + problem);
        if (named.name == sc.score_name)
            o.fail("name", "'" + named.name + "' is the first score's name (score_name); give each score its own");
        for (const ScoreLabel& e : sc.other_scores)
            if (e.name == named.name) o.fail("name", "score '" + named.name + "' is declared twice");
        if (!replayed) {
            for (std::string_view key : {"column", "file", "score_range"})
                if (o.has(key))
                    o.fail(key, "only a replayed log reads " + std::string(key) + "; a generated population makes its scores");
            if (!o.has("generate"))
                o.fail("name", "a generated population makes every score: give this one a generate section "
                               "(see population.other_scores[].generate)");
            sc.population.generator.other_scores.push_back(parse_other_generated(o, named.name));
            sc.other_scores.push_back(std::move(named));
            continue;
        }
        if (o.has("generate"))
            o.fail("generate", "only a generated population makes its scores; a replayed log's are read from its files");
        OtherScoreSource src{.name = named.name,
                             .path = o.has("file") ? resolve(sc.directory, o.text("file")) : sc.population.replay.scores_path,
                             .column = o.text("column")};
        const std::vector<double> range = o.real_list("score_range");
        if (range.size() != 2 || !std::isfinite(range[0]) || !std::isfinite(range[1]) || !(range[0] < range[1]))
            o.fail("score_range", "expected [low, high] with two finite numbers, low below high");
        src.score_low = range[0];
        src.score_high = range[1];
        if (src.column.empty()) o.fail("column", "give the column that holds this score's values");
        for (const OtherScoreSource& e : sc.population.replay.other_scores)
            if (e.path == src.path && e.column == src.column)
                o.fail("column", "score '" + e.name + "' already reads column '" + src.column + "' of this file");
        if (src.path == sc.population.replay.scores_path && src.column == "score")
            o.fail("column", "column 'score' of the scores file is the first score's; name this score's own column");
        sc.population.replay.other_scores.push_back(std::move(src));
        sc.other_scores.push_back(std::move(named));
    }
    sc.population.replay.score_name = sc.score_name;
    sc.population.generator.score_name = sc.score_name;
    if (!sc.other_scores.empty()) {
        const YAML::Node at = pop.child("other_scores");
        sc.population.other_scores_at = {at.Mark().line + 1, at.Mark().column + 1};
    }
}

void load_groups(const Section& pop, Scenario& sc) {
    if (!pop.has("groups")) return;
    const bool generated = sc.population.source == PopulationSource::generate;
    std::vector<GeneratedGroup> groups;
    std::size_t i = 0;
    for (const auto& node : pop.child("groups"))
        groups.push_back(parse_group(
            Section(node, "population.groups[]", pop.file(), "population.groups[" + std::to_string(i++) + "]"),
            generated, groups));
    for (GeneratedGroup& g : groups) {
        if (generated) sc.population.generator.groups.push_back(g);
        else sc.population.replay.groups.push_back(std::move(g.column));
    }
}

}  // namespace

void load_population(const Section& top, Scenario& sc) {
    const std::string& file = top.file();
    Section pop(top.child("population"), "population", file, "population");
    if (pop.has("replay") == pop.has("generate"))
        pop.fail(pop.has("replay") ? "generate" : "replay",
                 "give exactly one population source: replay (a log) or generate (invented patients)");
    if (pop.has("replay")) {
        parse_replay(Section(pop.child("replay"), "population.replay", file, "population.replay"), sc.directory,
                     sc.population.replay);
    } else {
        sc.population.source = PopulationSource::generate;
        parse_generator(Section(pop.child("generate"), "population.generate", file, "population.generate"), sc);
    }
    load_groups(pop, sc);
    load_other_scores(pop, sc);
    if (pop.has("bootstrap")) {
        if (sc.population.source != PopulationSource::replay)
            pop.fail("bootstrap", "bootstrap resamples a replayed log; a generated population makes every "
                                  "replication afresh, so leave bootstrap out");
        const YAML::Node node = pop.child("bootstrap");
        sc.population.bootstrap = parse_bootstrap(Section(node, "population.bootstrap", file, "population.bootstrap"));
        sc.population.bootstrap_at = {node.Mark().line + 1, node.Mark().column + 1};
    }
    if (pop.has("shift")) {
        const YAML::Node node = pop.child("shift");
        sc.population.shift = parse_shift(Section(node, "population.shift", file, "population.shift"), sc);
        if (!sc.other_scores.empty())
            pop.fail("shift", "a stress test changes the first score only for now, so with other_scores it would "
                              "compare a shifted score with an unshifted one; leave out the shift or other_scores");
        sc.population.shift_at = {node.Mark().line + 1, node.Mark().column + 1};
    }
    if (std::string problem = replications_problem(sc, sc.replications); !problem.empty())
        top.fail("replications", problem);
}

}  // namespace tocsin::scenario_load
