#include "models/population_source.hpp"

#include <memory>
#include <sstream>
#include <stdexcept>

#include "models/bootstrap.hpp"
#include "models/errors.hpp"
#include "models/replay.hpp"
#include "models/stress.hpp"

namespace tocsin {

PreparedPopulation prepare_population(const PopulationSetup& sc, Population log) {
    PreparedPopulation p;
    p.log = std::make_shared<const Population>(std::move(log));
    if (sc.shift) {
        try {
            validate(*sc.shift, *p.log);
        } catch (const std::invalid_argument& e) {
            throw InputError(sc.file, sc.shift_at.line, sc.shift_at.column, "population.shift", e.what());
        }
    }
    if (sc.bootstrap) {
        try {
            p.bootstrap_days = find_eligible_days(*p.log, *sc.bootstrap);
        } catch (const std::invalid_argument& e) {
            throw InputError(sc.file, sc.bootstrap_at.line, sc.bootstrap_at.column, "population.bootstrap", e.what());
        }
    }
    return p;
}

PreparedPopulation prepare_population(const PopulationSetup& sc) {
    if (sc.source == PopulationSource::replay) return prepare_population(sc, load_replay(sc.replay, sc.zone));
    PreparedPopulation p;
    p.generator = sc.generator;
    if (sc.target_auc) {
        try {
            p.calibration = calibrate_to_auc(sc.generator, *sc.target_auc, sc.generator.outcome.probability, sc.seed);
        } catch (const std::invalid_argument& e) {
            throw InputError(sc.file, sc.target_auc_at.line, sc.target_auc_at.column,
                             "population.generate.scores.target_auc", e.what());
        }
        p.generator = p.calibration->config;
    }
    if (!p.generator.other_scores.empty()) {
        try {
            p.other_scores = calibrate_other_scores(p.generator, sc.seed);
        } catch (const std::invalid_argument& e) {
            throw InputError(sc.file, sc.other_scores_at.line, sc.other_scores_at.column, "population.other_scores",
                             e.what());
        }
        p.generator = p.other_scores->config;
    }
    return p;
}

Population population_for(const PopulationSetup& sc, const PreparedPopulation& prepared, std::uint64_t replication) {
    Population pop;
    if (sc.source == PopulationSource::replay) {
        if (!sc.bootstrap || replication == 0) pop = *prepared.log;
        else if (prepared.bootstrap_days)
            pop = bootstrap_population(*prepared.log, *sc.bootstrap, *prepared.bootstrap_days, sc.seed, replication);
        else
            pop = bootstrap_population(*prepared.log, *sc.bootstrap, sc.seed, replication);
    } else {
        pop = generate_population(prepared.generator, sc.seed, replication);
    }
    if (sc.shift) pop = apply_shift(pop, *sc.shift, sc.seed, replication);
    return pop;
}

bool replication_zero_is_the_log(const PopulationSetup& sc) {
    return sc.source == PopulationSource::replay && !sc.shift;
}

std::string replication_zero_basis(const PopulationSetup& sc) {
    const bool several = sc.source == PopulationSource::generate || sc.bootstrap;
    std::string what = sc.source == PopulationSource::generate ? "one generated population" : "the log as replayed";
    if (sc.shift) what += " under the stress test";
    return several ? "replication 0 (" + what + ")" : what;
}

std::vector<std::string> other_scores_reached(const PreparedPopulation& p) {
    std::vector<std::string> lines;
    if (!p.other_scores) return lines;
    const OtherScoresCalibration& c = *p.other_scores;
    const GeneratorConfig& g = p.generator;
    for (const OtherScoreReached& r : c.reached) {
        std::ostringstream o;
        o.setf(std::ios::fixed);
        o.precision(3);
        o << "Other score '" << r.name << "': encounter-level AUC " << r.achieved_auc;
        if (r.target_auc) o << " (target " << *r.target_auc << ", drift_size " << r.drift_size << ")";
        o << "; rank correlation (Spearman) of the stays' highest " << g.score_name << " and highest " << r.name
          << " " << r.maxima_rank_correlation << " over " << r.stays << " stays with both, on a calibration population of "
          << (c.calibration_period_end - g.period_start) / 86400 << " days.";
        lines.push_back(o.str());
    }
    return lines;
}

std::string describe_prepared(const PopulationSetup& sc, const PreparedPopulation& p) {
    std::ostringstream o;
    if (p.calibration) {
        o.setf(std::ios::fixed);
        o.precision(3);
        o << "Calibration: drift_size " << p.calibration->drift_size << " gives an encounter-level AUC of "
          << p.calibration->achieved_auc << " (target " << *sc.target_auc << ") on a calibration population of "
          << (p.calibration->calibration_period_end - p.generator.period_start) / 86400 << " days with "
          << p.calibration->cases << " cases and " << p.calibration->controls << " controls.\n";
    }
    for (const std::string& line : other_scores_reached(p)) o << line << "\n";
    if (p.log && sc.bootstrap && p.bootstrap_days) o << describe_eligible_days(*p.bootstrap_days, *p.log, *sc.bootstrap, sc.zone);
    return o.str();
}

PopulationFactory population_factory(const PopulationSetup& scenario) {
    return population_factory(scenario, prepare_population(scenario));
}

PopulationFactory population_factory(const PopulationSetup& scenario, const PreparedPopulation& prepared) {
    auto shared_scenario = std::make_shared<const PopulationSetup>(scenario);
    auto shared_prepared = std::make_shared<const PreparedPopulation>(prepared);
    return [shared_scenario, shared_prepared](std::uint64_t replication) -> std::shared_ptr<const Population> {
        const PopulationSetup& setup = *shared_scenario;
        if (setup.source == PopulationSource::replay && !setup.shift && (!setup.bootstrap || replication == 0))
            return shared_prepared->log;
        return std::make_shared<const Population>(population_for(setup, *shared_prepared, replication));
    };
}

}  // namespace tocsin
