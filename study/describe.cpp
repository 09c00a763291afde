// The plain-words description of a scenario, for `tocsin check`.
#include <cmath>
#include <sstream>

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

std::string describe_scenario(const Scenario& sc) {
    std::ostringstream o;
    o << "Scenario: " << sc.name << "\n";
    if (!sc.description.empty()) o << "  " << sc.description << "\n";
    o << "Time zone: " << sc.time_zone_name << "; seed " << sc.simulation.seed << "; " << sc.replications
      << (sc.replications == 1 ? " replication" : " replications") << "\n";
    o << "Shifts:";
    for (std::size_t i = 0; i < sc.simulation.shifts.names.size(); ++i)
        o << " " << sc.simulation.shifts.names[i] << " from " << format_clock_minutes(sc.simulation.shifts.start_minutes[i])
          << (sc.simulation.shifts.is_night[i] ? " (night)" : "") << (i + 1 < sc.simulation.shifts.names.size() ? "," : "");
    o << "\n";
    o << "Catch: an action starting between " << duration_words(sc.analysis.window) << " and " << duration_words(sc.analysis.min_lead)
      << " before time zero\n";
    if (sc.population.source == PopulationSource::replay) {
        o << "Population: replay of " << sc.population.replay.encounters_path << " and " << sc.population.replay.scores_path;
        if (sc.population.replay.latency_when_missing) o << " (latency " << duration_words(sc.population.replay.latency_when_missing) << " when available_at is empty)";
        if (sc.population.replay.bad_rows == BadRows::skip) o << "; bad rows are skipped and counted (bad_rows: skip)";
        if (sc.population.bootstrap)
            o << "\nReplications 1, 2, ...: " << (sc.population.bootstrap->scheme == BlockScheme::stationary ? "stationary" : "moving-block")
              << " bootstrap of " << sc.population.bootstrap->block_days << "-day blocks per unit, runs of " << num(sc.population.bootstrap->mean_run_blocks)
              << " blocks" << (sc.population.bootstrap->mean_run_blocks > 1 && sc.population.bootstrap->scheme == BlockScheme::stationary ? " on average" : "");
    } else {
        const GeneratorConfig& g = sc.population.generator;
        int beds = 0;
        for (const UnitConfig& u : g.units) beds += u.beds;
        o << "Population: generated, " << g.units.size() << " units with " << beds << " beds, " << format_local(g.period_start, sc.simulation.zone)
          << " to " << format_local(g.period_end, sc.simulation.zone) << "; outcome in " << num(100 * g.outcome.probability)
          << " % of stays; scores every " << num(g.scores.cadence_minutes) << " min";
        if (sc.population.target_auc) o << "; rise before time zero calibrated to an encounter-level AUC of " << num(*sc.population.target_auc);
    }
    if (sc.population.shift) {
        const ShiftStress& x = *sc.population.shift;
        std::vector<std::string> parts;
        auto part = [&](const std::string& text) { parts.push_back(text); };
        if (x.outcome_rate_multiplier != 1) part("outcome rate x " + num(x.outcome_rate_multiplier));
        if (x.score_scale != 1 || x.score_offset != 0) part("scores x " + num(x.score_scale) + " + " + num(x.score_offset));
        if (x.cadence_minutes > 0) part("at most one score per " + num(x.cadence_minutes) + " min");
        if (x.outage_hours > 0) part("feed outage of " + num(x.outage_hours) + " h from " + format_local(x.outage_start, sc.simulation.zone));
        for (const auto& [unit, m] : x.census_multiplier) part(unit + " admissions x " + num(m));
        o << "\nStress test from " << format_local(x.from, sc.simulation.zone) << ":";
        for (std::size_t k = 0; k < parts.size(); ++k) o << (k ? "; " : " ") << parts[k];
    }
    o << "\nPlans (" << sc.simulation.plans.size() << "):\n";
    for (const Plan& p : sc.simulation.plans) {
        o << "  - " << p.name << ": " << to_string(p.channel) << " to " << p.role << " when "
          << describe_rule(p.rule, sc.score_label) << "\n";
        if (p.channel == Channel::chart_interruption)
            o << "      at each chart opening; " << num(p.chart.interruption_minutes) << " min per interruption; "
              << num(p.chart.acceptance_probability) << " of interruptions lead to an evaluation\n";
        if (p.channel == Channel::handoff_list) {
            o << "      flagged at each handoff (";
            const auto& times = p.handoff.times_minutes.empty() ? sc.simulation.shifts.start_minutes : p.handoff.times_minutes;
            for (std::size_t k = 0; k < times.size(); ++k) o << (k ? ", " : "") << format_clock_minutes(times[k]);
            o << "); " << num(p.handoff.minutes_per_flag) << " min per flag; " << num(p.handoff.follow_up_probability)
              << " of flags lead to an evaluation\n";
        }
        if (p.channel == Channel::ranked_review) {
            o << "      top " << p.review.top_n << (p.review.scope == ReviewScope::unit ? " per unit" : " hospital-wide")
              << " at";
            for (int t : p.review.times_minutes) o << " " << format_clock_minutes(t);
            o << "; " << num(p.review.minutes_per_review) << " min per review";
            if (p.review.skip_reviewed) o << "; skips patients reviewed in the last " << duration_words(*p.review.skip_reviewed);
            if (p.review.max_reviews_per_round) o << "; at most " << *p.review.max_reviews_per_round << " reviews per round";
            o << "\n";
        }
        if (!p.description.empty()) o << "      " << p.description << "\n";
        if (sc.simulation.has_staff()) {
            o << "      escalation: " << describe(sc.simulation.escalation, escalation_path(sc.simulation.escalation, p.staffing.first_role))
              << "\n";
            o << "      queue " << (p.staffing.discipline == QueueDiscipline::fifo ? "first come first served" : "highest score first")
              << "; at shift end " << (p.staffing.at_shift_end == ShiftEndPolicy::hand_over ? "hand over" : "drop") << "\n";
        }
    }
    if (sc.simulation.has_staff()) {
        o << "Staff (" << sc.simulation.roles.size() << " roles):\n";
        for (const Role& r : sc.simulation.roles) {
            o << "  - " << r.name << (r.per_unit ? " (a team on each unit)" : " (one team for the hospital)") << ": ";
            for (std::size_t k = 0; k < sc.simulation.shifts.names.size(); ++k)
                o << (k ? ", " : "") << sc.simulation.shifts.names[k] << " " << r.roster.by_shift[k];
            if (!r.roster.by_weekday.empty())
                for (std::size_t d = 0; d < 7; ++d)
                    if (r.roster.by_weekday[d] != r.roster.by_shift) {
                        o << "; " << weekday_names[d];
                        for (std::size_t k = 0; k < sc.simulation.shifts.names.size(); ++k)
                            o << (k ? ", " : " ") << sc.simulation.shifts.names[k] << " " << r.roster.by_weekday[d][k];
                    }
            o << "; " << describe(r.minutes_per_task) << " per task\n";
        }
    } else {
        o << "Staff: none declared; every notice counts as evaluated at once.\n";
    }
    if (sc.simulation.chart_openings) {
        o << "Chart openings: " << (sc.simulation.chart_openings->replay_path.empty() ? "generated" : "replayed from " + sc.simulation.chart_openings->replay_path)
          << "; roles:";
        for (const auto& r : sc.simulation.chart_openings->roles) o << " " << r.name << " (" << num(r.clinicians_per_unit) << " per unit)";
        o << "\n";
    }
    return o.str();
}

}  // namespace tocsin
