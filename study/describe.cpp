// The plain-words description of a scenario, as items (study/describe.hpp).
#include "study/describe.hpp"

#include <filesystem>
#include <algorithm>
#include <cmath>
#include <sstream>

#include "analysis/averted.hpp"
#include "study/scenario.hpp"
#include "study/scenario_load.hpp"

namespace tocsin {

using scenario_load::weekday_names;

namespace {

std::string num(double v) {
    std::ostringstream o;
    o << v;
    return o.str();
}

std::string duration_words(Seconds s) {
    if (s % 3600 == 0) return num(static_cast<double>(s) / 3600) + " h";
    return num(static_cast<double>(s) / 60) + " min";
}

std::string clock_times(const std::vector<int>& minutes, const char* separator) {
    std::string out;
    for (std::size_t k = 0; k < minutes.size(); ++k) out += (k ? separator : "") + format_clock_minutes(minutes[k]);
    return out;
}

DescriptionItem statement(std::string text) { return {.text = std::move(text), .entry_label = {}, .items = {}}; }

std::string setting_line(const Scenario& sc) {
    return "Time zone: " + sc.time_zone_name + "; seed " + std::to_string(sc.simulation.seed) + "; " +
           std::to_string(sc.replications) + (sc.replications == 1 ? " replication" : " replications");
}

std::string shifts_line(const ShiftPattern& shifts) {
    std::string out = "Shifts:";
    for (std::size_t i = 0; i < shifts.names.size(); ++i)
        out += " " + shifts.names[i] + " from " + format_clock_minutes(shifts.start_minutes[i]) +
               (shifts.is_night[i] ? " (night)" : "") + (i + 1 < shifts.names.size() ? "," : "");
    return out;
}

std::string replay_line(const PopulationSetup& pop) {
    const ReplaySource& r = pop.replay;
    std::string out = "Population: replay of " + r.encounters_path + " and " + r.scores_path;
    if (r.latency_when_missing)
        out += " (latency " + duration_words(r.latency_when_missing) + " when available_at is empty)";
    if (r.bad_rows == BadRows::skip) out += "; bad rows are skipped and counted (bad_rows: skip)";
    return out;
}

std::string bootstrap_line(const BootstrapConfig& b) {
    const bool stationary = b.scheme == BlockScheme::stationary;
    return std::string("Replications 1, 2, ...: ") + (stationary ? "stationary" : "moving-block") + " bootstrap of " +
           std::to_string(b.block_days) + "-day blocks per unit, runs of " + num(b.mean_run_blocks) + " blocks" +
           (b.mean_run_blocks > 1 && stationary ? " on average" : "");
}

std::string generated_line(const PopulationSetup& pop, const TimeZone& zone) {
    const GeneratorConfig& g = pop.generator;
    // Each ward by name with its beds: a committee reads its own wards, not a total.
    std::string wards;
    for (std::size_t i = 0; i < g.units.size(); ++i)
        wards += (i ? "; " : "") + g.units[i].name + ", " + std::to_string(g.units[i].beds) + " beds";
    std::string out = "Population: generated, " + std::to_string(g.units.size()) +
                      (g.units.size() == 1 ? " unit (" : " units (") + wards + "), " + format_local(g.period_start, zone) + " to " + format_local(g.period_end, zone) +
                      "; outcome in " + num(100 * g.outcome.probability) + " % of stays; scores every " +
                      num(g.scores.cadence_minutes) + " min";
    if (pop.target_auc) out += "; rise before time zero calibrated to an encounter-level AUC of " + num(*pop.target_auc);
    for (const GeneratedOtherScore& o : g.other_scores) {
        out += "; other score " + o.name + " at the same instants, patient level correlation " + num(o.correlation) +
               " with " + g.score_name;
        if (o.target_auc) out += ", calibrated to an encounter-level AUC of " + num(*o.target_auc);
    }
    return out;
}

std::string stress_line(const ShiftStress& x, const TimeZone& zone) {
    std::vector<std::string> parts;
    if (x.outcome_rate_multiplier != 1) parts.push_back("outcome rate x " + num(x.outcome_rate_multiplier));
    if (x.score_scale != 1 || x.score_offset != 0)
        parts.push_back("scores x " + num(x.score_scale) + " + " + num(x.score_offset));
    if (x.cadence_minutes > 0) parts.push_back("at most one score per " + num(x.cadence_minutes) + " min");
    if (x.outage_hours > 0)
        parts.push_back("feed outage of " + num(x.outage_hours) + " h from " + format_local(x.outage_start, zone));
    for (const auto& [unit, m] : x.census_multiplier) parts.push_back(unit + " admissions x " + num(m));
    std::string out = "Stress test from " + format_local(x.from, zone) + ":";
    for (std::size_t k = 0; k < parts.size(); ++k) out += (k ? "; " : " ") + parts[k];
    return out;
}

// The declared patient groups: what every figure is also broken down by.
std::optional<std::string> groups_line(const Scenario& sc) {
    const PopulationSetup& pop = sc.population;
    std::vector<std::string> parts;
    for (const GroupColumn& c : pop.replay.groups) parts.push_back(c.name + " (" + c.values_text() + ")");
    for (const GeneratedGroup& g : pop.generator.groups) {
        std::string part = g.column.name + " (";
        for (std::size_t v = 0; v < g.column.values.size(); ++v)
            part += (v ? ", " : "") + g.column.values[v] + " " + num(g.shares[v]);
        bool shifted = false;
        for (double shift : g.score_shift) shifted |= shift != 0;
        if (shifted) {
            part += "; scores shifted by";
            for (std::size_t l = 0; l < g.score_shift.size(); ++l)
                part += (l ? ", " : " ") + g.column.level_name(l) + " " + num(g.score_shift[l]);
        }
        parts.push_back(part + ")");
    }
    if (parts.empty()) return std::nullopt;
    std::string out = "Patient groups:";
    for (std::size_t k = 0; k < parts.size(); ++k) out += (k ? "; " : " ") + parts[k];
    return out + "; a missing value is its own group, not recorded; groups of fewer than " +
           std::to_string(sc.analysis.smallest_group) + " encounters are suppressed";
}

// Every score, when there are several: what plans call each and where it is read.
std::optional<std::string> scores_line(const Scenario& sc) {
    if (sc.other_scores.empty()) return std::nullopt;
    std::string out = "Scores of the same stays: " + sc.score_name + " (" + sc.score_label + ", the first)";
    const auto& sources = sc.population.replay.other_scores;
    for (std::size_t k = 0; k < sc.other_scores.size(); ++k) {
        out += "; " + sc.other_scores[k].name + " (" + sc.other_scores[k].label;
        if (k < sources.size())
            out += ", column " + sources[k].column + " of " + std::filesystem::path(sources[k].path).filename().string() +
                   ", range " + num(sources[k].score_low) + " to " + num(sources[k].score_high);
        out += ")";
    }
    return out + "; each is compared with the first on the stays that have both";
}

void add_population(std::vector<DescriptionItem>& items, const Scenario& sc) {
    const PopulationSetup& pop = sc.population;
    if (pop.source == PopulationSource::replay) {
        items.push_back(statement(replay_line(pop)));
        if (pop.bootstrap) items.push_back(statement(bootstrap_line(*pop.bootstrap)));
    } else {
        items.push_back(statement(generated_line(pop, sc.simulation.zone)));
    }
    if (pop.shift) items.push_back(statement(stress_line(*pop.shift, sc.simulation.zone)));
    if (auto groups = groups_line(sc)) items.push_back(statement(*groups));
    if (auto scores = scores_line(sc)) items.push_back(statement(*scores));
}

// What the plan's channel does, when it is more than a page.
std::optional<std::string> channel_line(const Plan& p, const ShiftPattern& shifts) {
    if (p.channel == Channel::chart_interruption)
        return "at each chart opening; " + num(p.chart.interruption_minutes) + " min per interruption; " +
               num(p.chart.acceptance_probability) + " of interruptions lead to an evaluation";
    if (p.channel == Channel::score_lookup) {
        const auto [low, high] = std::minmax_element(p.chart.lookup_probability.begin(), p.chart.lookup_probability.end());
        return "nothing pushed: at each chart opening the score is looked up with probability " +
               (*low == *high ? num(*low) : num(*low) + " to " + num(*high) + " by hour") + "; " +
               num(p.chart.interruption_minutes) + " min per look-up; an evaluation when the rule fires on the score seen";
    }
    if (p.channel == Channel::handoff_list) {
        const auto& times = p.handoff.times_minutes.empty() ? shifts.start_minutes : p.handoff.times_minutes;
        return "flagged at each handoff (" + clock_times(times, ", ") + "); " + num(p.handoff.minutes_per_flag) +
               " min per flag; " + num(p.handoff.follow_up_probability) + " of flags lead to an evaluation";
    }
    if (p.channel == Channel::ranked_review) {
        std::string out = "top " + std::to_string(p.review.top_n) +
                          (p.review.scope == ReviewScope::unit ? " per unit" : " hospital-wide") + " at " +
                          clock_times(p.review.times_minutes, " ") + "; " + num(p.review.minutes_per_review) +
                          " min per review";
        if (p.review.skip_reviewed) out += "; skips patients reviewed in the last " + duration_words(*p.review.skip_reviewed);
        if (p.review.max_reviews_per_round)
            out += "; at most " + std::to_string(*p.review.max_reviews_per_round) + " reviews per round";
        return out;
    }
    return std::nullopt;
}

// The declared fatigue effect, when the plan declares one (sim/fatigue.hpp).
std::optional<std::string> fatigue_line(const Plan& p) {
    if (!p.fatigue) return std::nullopt;
    const FatigueEffect& f = *p.fatigue;
    const std::string base = p.channel == Channel::page ? num(f.base_response) + " of pages with nothing before them"
                                                        : "the acceptance probability";
    return "assumed fatigue: from " + base + ", the odds of an evaluation x" + num(f.repeat_odds_ratio) +
           " per earlier notice about the same patient and x" + num(f.recent_odds_ratio) +
           " per notice the team received in the last " + duration_words(f.window) +
           (p.channel == Channel::page ? "; a page not followed is acknowledged without an evaluation" : "");
}

std::string headcounts(const ShiftPattern& shifts, const std::vector<int>& row, const char* first) {
    std::string out;
    for (std::size_t k = 0; k < shifts.names.size(); ++k)
        out += (k ? ", " : first) + shifts.names[k] + " " + std::to_string(row[k]);
    return out;
}

DescriptionItem plan_entry(const Plan& p, const Scenario& sc) {
    DescriptionItem entry = statement(p.name + ": " + std::string(to_string(p.channel)) + " to " + p.role + " when " +
                                      describe_rule(p.rule, p.score == 0 ? sc.score_label : sc.other_scores.at(p.score - 1).label));
    if (auto line = channel_line(p, sc.simulation.shifts)) entry.items.push_back(statement(*line));
    if (auto line = fatigue_line(p)) entry.items.push_back(statement(*line));
    if (!p.description.empty()) entry.items.push_back(statement(p.description));
    if (sc.simulation.has_staff() && p.channel == Channel::ranked_review) {
        // One capacity model: the review team does the reviews (sim/simulate.cpp).
        entry.items.push_back(statement("reviews are done by the review team within the review's own capacity; "
                                        "the roles' queues, task minutes and escalation do not apply"));
    } else if (sc.simulation.has_staff()) {
        const EscalationGraph& g = p.escalation ? *p.escalation : sc.simulation.escalation;
        entry.items.push_back(statement(std::string(p.escalation ? "own escalation: " : "escalation: ") +
                                        describe(g, escalation_path(g, p.staffing.first_role))));
        if (p.roster)
            entry.items.push_back(statement("own roster of " + p.role + ": " +
                                            headcounts(sc.simulation.shifts, p.roster->by_shift, "")));
        entry.items.push_back(statement(
            std::string("queue ") +
            (p.staffing.discipline == QueueDiscipline::fifo ? "first come first served" : "highest score first") +
            "; at shift end " + (p.staffing.at_shift_end == ShiftEndPolicy::hand_over ? "hand over" : "drop")));
    }
    return entry;
}

DescriptionItem role_entry(const Role& r, const ShiftPattern& shifts) {
    std::string text = r.name + (r.per_unit ? " (a team on each unit)" : " (one team for the hospital)") + ": " +
                       headcounts(shifts, r.roster.by_shift, "");
    if (!r.roster.by_weekday.empty())
        for (std::size_t d = 0; d < 7; ++d)
            if (r.roster.by_weekday[d] != r.roster.by_shift)
                text += "; " + std::string(weekday_names[d]) + headcounts(shifts, r.roster.by_weekday[d], " ");
    text += "; " + describe(r.minutes_per_task) + " per task";
    for (const OtherWorkClass& w : r.other_work) {
        const auto [low, high] = std::minmax_element(w.per_hour.begin(), w.per_hour.end());
        text += "; other work '" + w.name + "': " +
                (*low == *high ? num(*low) : num(*low) + " to " + num(*high)) + " an hour " +
                (r.per_unit ? "on each unit" : "for the hospital") + ", " + describe(w.minutes) + ", taken up " +
                (w.priority == OtherWorkPriority::above_alerts   ? "before waiting alert tasks"
                 : w.priority == OtherWorkPriority::below_alerts ? "after waiting alert tasks"
                                                                 : "in one queue with alert tasks");
    }
    return statement(text);
}

void add_staff(std::vector<DescriptionItem>& items, const SimulationSetup& setup) {
    if (!setup.has_staff()) {
        items.push_back(statement("Staff: none declared; every notice counts as evaluated at once."));
        return;
    }
    DescriptionItem staff{.text = "Staff (" + std::to_string(setup.roles.size()) + " roles)", .entry_label = "Role", .items = {}};
    for (const Role& r : setup.roles) staff.items.push_back(role_entry(r, setup.shifts));
    items.push_back(std::move(staff));
}

std::string chart_openings_line(const ChartOpeningSource& c) {
    std::string out = "Chart openings: " + (c.replay_path.empty() ? std::string("generated") : "replayed from " + c.replay_path) +
                      "; roles:";
    for (const auto& r : c.roles) out += " " + r.name + " (" + num(r.clinicians_per_unit) + " per unit)";
    return out;
}

}  // namespace

std::string describe_rule(const Rule& r, const std::string& label) {
    std::string out = std::isinf(r.threshold) ? "any " + label : label + " >= " + num(r.threshold);
    if (r.persistence > 1) out += " on " + std::to_string(r.persistence) + " scores in a row";
    if (r.snooze) out += "; snooze " + duration_words(*r.snooze);
    if (r.rise) out += "; a rise of " + num(*r.rise) + " fires through snooze";
    if (r.rearm_below) out += "; re-arms below " + num(*r.rearm_below);
    if (r.max_per_shift) out += "; at most " + std::to_string(*r.max_per_shift) + " per patient per shift";
    if (r.quiet_start_minute)
        out += "; quiet " + format_clock_minutes(*r.quiet_start_minute) + "-" + format_clock_minutes(*r.quiet_end_minute);
    return out;
}

// The declared averted effect, said as the assumption it is.
std::string averted_line(const AvertedEffect& e, Seconds min_lead) {
    std::string how;
    if (e.shape == AvertedShape::table) {
        for (const AvertedStep& row : e.table)
            how += (how.empty() ? "" : "; ") + num(row.probability) + " from " + duration_words(row.lead) + " ahead";
    } else {
        how = num(e.probability) + " when it starts at least " + duration_words(e.full_lead) + " ahead" +
              (e.shape == AvertedShape::linear ? ", falling linearly to 0 at " + duration_words(min_lead) : ", 0 below");
    }
    return "Assumed effect (not an estimate from data): a case's first catching evaluation averts the outcome with "
           "probability " + how + "; outcomes averted are this assumption applied to simulated catches";
}

ScenarioDescription scenario_description(const Scenario& sc) {
    ScenarioDescription d{.name = sc.name, .question = sc.description, .items = {}};
    d.items.push_back(statement(setting_line(sc)));
    d.items.push_back(statement(shifts_line(sc.simulation.shifts)));
    d.items.push_back(statement("Catch: an action starting between " + duration_words(sc.analysis.window) + " and " +
                                duration_words(sc.analysis.min_lead) + " before time zero"));
    if (sc.analysis.averted) d.items.push_back(statement(averted_line(*sc.analysis.averted, sc.analysis.min_lead)));
    add_population(d.items, sc);
    DescriptionItem plans{.text = "Plans (" + std::to_string(sc.simulation.plans.size()) + ")", .entry_label = "Plan", .items = {}};
    for (const Plan& p : sc.simulation.plans) plans.items.push_back(plan_entry(p, sc));
    d.items.push_back(std::move(plans));
    add_staff(d.items, sc.simulation);
    if (sc.simulation.chart_openings) d.items.push_back(statement(chart_openings_line(*sc.simulation.chart_openings)));
    return d;
}

std::string to_text(const ScenarioDescription& d) {
    std::string out = "Scenario: " + d.name + "\n";
    if (!d.question.empty()) out += "  " + d.question + "\n";
    for (const DescriptionItem& item : d.items) {
        if (item.items.empty()) {
            out += item.text + "\n";
            continue;
        }
        out += item.text + ":\n";
        for (const DescriptionItem& entry : item.items) {
            out += "  - " + entry.text + "\n";
            for (const DescriptionItem& line : entry.items) out += "      " + line.text + "\n";
        }
    }
    return out;
}

std::string describe_scenario(const Scenario& sc) { return to_text(scenario_description(sc)); }

}  // namespace tocsin
