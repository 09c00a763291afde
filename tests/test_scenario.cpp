// The scenario loader is strict: unknown keys, wrong types and out-of-range
// values are errors at file:line:column naming the key (and the nearest valid
// key for a typo). Every declared key is documented in the README.
#include <doctest/doctest.h>

#include <algorithm>
#include <variant>

#include "models/errors.hpp"
#include "models/generator.hpp"
#include "study/describe.hpp"
#include "study/scenario.hpp"
#include "study/scenario_keys.hpp"
#include "test_support.hpp"

using namespace tocsin;

namespace {

// A minimal valid scenario; `rule` is spliced in at line 16.
std::string scenario_text(const std::string& rule = "{threshold: 60}", const std::string& extra = "") {
    return "scenario_schema: 1\n"                             // 1
           "name: test\n"                                     // 2
           "time_zone: UTC\n"                                 // 3
           "shifts:\n"                                        // 4
           "  - {name: day, starts: \"07:00\"}\n"             // 5
           "  - {name: night, starts: \"19:00\", night: true}\n"  // 6
           "outcome:\n"                                       // 7
           "  window_hours: 12\n"                             // 8
           "population:\n"                                    // 9
           "  replay:\n"                                      // 10
           "    encounters: e.csv\n"                          // 11
           "    scores: s.csv\n"                              // 12
           "plans:\n"                                         // 13
           "  - name: p\n"                                    // 14
           "    channel: page\n"                              // 15
           "    rule: " + rule + "\n" + extra;                // 16
}

InputError parse_error(const std::string& text) { return tocsin::testing::scenario_error(text); }

}  // namespace

TEST_CASE("scenario.valid_minimal") {
    Scenario sc = parse_scenario(scenario_text("{threshold: 60, snooze_minutes: 90, quiet_from: \"23:00\", quiet_until: \"06:00\"}"),
                                 "s.yaml", "/data");
    CHECK(sc.simulation.plans.size() == 1);
    CHECK(sc.simulation.plans[0].rule.snooze == minutes(90));
    CHECK(sc.simulation.plans[0].rule.quiet_start_minute == 23 * 60);
    CHECK(sc.analysis.window == hours(12));
    CHECK(sc.population.replay.encounters_path == "/data/e.csv");
    CHECK(sc.simulation.shifts.is_night == std::vector<bool>{false, true});
}

TEST_CASE("scenario.unknown_key_names_nearest") {
    const InputError e = parse_error(scenario_text("{threshold: 60, snoze_minutes: 90}"));
    CHECK(e.file == "s.yaml");
    CHECK(e.line == 16);
    CHECK(e.column > 10);
    CHECK(std::string(e.what()).find("unknown key 'snoze_minutes'") != std::string::npos);
    CHECK(std::string(e.what()).find("did you mean 'snooze_minutes'") != std::string::npos);

    const InputError top = parse_error(scenario_text() + "seeds: 4\n");
    CHECK(top.line == 17);
    CHECK(std::string(top.what()).find("did you mean 'seed'") != std::string::npos);
}

TEST_CASE("scenario.wrong_type_and_range") {
    const InputError t = parse_error(scenario_text("{threshold: high}"));
    CHECK(t.line == 16);
    CHECK(t.field == "plans[0].rule.threshold");
    CHECK(std::string(t.what()).find("expected a number") != std::string::npos);

    const InputError r = parse_error(scenario_text("{threshold: 60, persistence: 0}"));
    CHECK(std::string(r.what()).find("out of range") != std::string::npos);

    const InputError i = parse_error(scenario_text("{threshold: 60, persistence: 2.5}"));
    CHECK(std::string(i.what()).find("whole number") != std::string::npos);

    const InputError c = parse_error(scenario_text("{threshold: 60, quiet_from: \"25:00\", quiet_until: \"06:00\"}"));
    CHECK(std::string(c.what()).find("HH:MM") != std::string::npos);
}

TEST_CASE("scenario.cross_field_rules") {
    CHECK(std::string(parse_error(scenario_text("{threshold: 60, rearm_below: 70}")).what()).find("re-arm level") != std::string::npos);
    CHECK(std::string(parse_error(scenario_text("{threshold: 60, quiet_from: \"23:00\"}")).what()).find("both") != std::string::npos);
    CHECK(std::string(parse_error(scenario_text("{threshold: 60}", "  - name: p\n    rule: {threshold: 1}\n")).what())
              .find("two plans are named 'p'") != std::string::npos);
    std::string zone = scenario_text();
    zone.replace(zone.find("UTC"), 3, "Atlantis/Central");
    CHECK(parse_error(zone).line == 3);
    std::string missing = scenario_text();
    missing.replace(missing.find("name: test\n"), 11, "");
    CHECK(std::string(parse_error(missing).what()).find("required key 'name'") != std::string::npos);
    CHECK(parse_error("plans: [\n").line >= 1);  // not YAML at all
}

bool says(const InputError& e, const std::string& words) { return std::string(e.what()).find(words) != std::string::npos; }

TEST_CASE("scenario.repeated_key_names_both_places") {
    // Block map at the top level: the second `seed` is on line 18.
    const InputError top = parse_error(scenario_text() + "seed: 7\nseed: 8\n");
    CHECK(top.file == "s.yaml");
    CHECK(top.line == 18);
    CHECK(top.column == 1);
    CHECK(says(top, "line 17, column 1"));
    CHECK(says(top, "line 18, column 1"));

    // Flow map: both `threshold`s are on line 16; their columns from the text.
    const std::string rule = "{threshold: 70, snooze_minutes: 240, threshold: 90}";
    const std::string line16 = "    rule: " + rule;
    const std::size_t first = line16.find("threshold") + 1, second = line16.rfind("threshold") + 1;
    const InputError flow = parse_error(scenario_text(rule));
    CHECK(flow.file == "s.yaml");
    CHECK(flow.line == 16);
    CHECK(flow.column == static_cast<long>(second));
    CHECK(says(flow, "line 16, column " + std::to_string(first) + " "));
    CHECK(says(flow, "line 16, column " + std::to_string(second) + ";"));

    // Deeper, in a block map inside a list item.
    const InputError deep = parse_error(scenario_text("{threshold: 60}", "    description: a\n    description: b\n"));
    CHECK(deep.line == 18);
    CHECK(says(deep, "line 17, column 5"));
}

TEST_CASE("scenario.key_must_be_a_plain_name") {
    for (const std::string& key : {std::string("[a]: 1\n"), std::string("{a: 1}: 2\n"), std::string("? [a]\n: 1\n")}) {
        CAPTURE(key);
        const InputError e = parse_error(scenario_text() + key);
        CHECK(e.file == "s.yaml");
        CHECK(e.line == 17);
        CHECK(says(e, "a key must be a plain name"));
    }
    const InputError nested = parse_error(scenario_text("{[x]: 1, threshold: 60}"));
    CHECK(nested.line == 16);
    CHECK(says(nested, "a key must be a plain name"));
}

TEST_CASE("scenario.yaml_errors_name_the_file") {
    for (const std::string& text : {std::string("plans: [\n"), std::string("name: \"open\n"), std::string("a: *nowhere\n"),
                                     std::string("a: 1\n\tb: 2\n"), std::string("- a\nb: 1\n")}) {
        CAPTURE(text);
        const InputError e = parse_error(text);
        CHECK(e.file == "s.yaml");
        CHECK(e.line >= 1);
    }
    // Walking every mapping for repeated keys must not follow aliases for
    // ever: forty doublings name one mapping 2^40 times.
    std::string bomb = "a0: &a0 {k: 1}\n";
    for (int i = 1; i < 40; ++i)
        bomb += "a" + std::to_string(i) + ": &a" + std::to_string(i) + " {x: *a" + std::to_string(i - 1) + ", y: *a" +
                std::to_string(i - 1) + "}\n";
    const InputError aliases = parse_error(bomb);
    CHECK(aliases.file == "s.yaml");
    CHECK(says(aliases, "repeats itself through aliases"));
}

TEST_CASE("scenario.numbers_are_finite_and_the_range_is_stated") {
    for (const std::string& v : {std::string(".inf"), std::string("-.inf"), std::string(".nan")}) {
        CAPTURE(v);
        const InputError e = parse_error(scenario_text("{threshold: " + v + "}"));
        CHECK(e.line == 16);
        CHECK(e.field == "plans[0].rule.threshold");
        CHECK(says(e, "'" + v + "' is not a finite number"));
        CHECK_FALSE(says(e, "expected  "));  // no empty range
    }
    const InputError window = parse_error(scenario_text().replace(scenario_text().find("window_hours: 12"), 16,
                                                                  "window_hours: 1e10"));
    CHECK(window.line == 8);
    CHECK(says(window, "'1e10' is out of range (expected 0.0166 to 8760 hours)"));
    const InputError snooze = parse_error(scenario_text("{threshold: 60, snooze_minutes: .nan}"));
    CHECK(says(snooze, "'.nan' is not a finite number (expected 0 to 86400 minutes)"));
    const InputError rise = parse_error(scenario_text("{threshold: 60, rise: -1}"));
    CHECK(says(rise, "'-1' is out of range (expected >= 0 score)"));
    // Whole-number keys too: a non-finite or huge number is named as such, with the range.
    const InputError persistence = parse_error(scenario_text("{threshold: 60, persistence: .inf}"));
    CHECK(says(persistence, "'.inf' is not a finite number (expected 1 to 1000 scores)"));
    const InputError replications = parse_error(scenario_text() + "replications: 1e30\n");
    CHECK(replications.line == 17);
    CHECK(says(replications, "'1e30' is out of range (expected 1 to 100000)"));
}

TEST_CASE("scenario.every_key_documented_in_readme") {
    const std::string readme = tocsin::testing::read_file(std::string(TOCSIN_SOURCE_DIR) + "/README.md");
    REQUIRE_FALSE(readme.empty());
    const std::string begin = "<!-- keys:begin -->\n", end = "<!-- keys:end -->";
    const std::size_t a = readme.find(begin), b = readme.find(end);
    REQUIRE(a != std::string::npos);
    REQUIRE(b != std::string::npos);
    CHECK_MESSAGE(readme.substr(a + begin.size(), b - a - begin.size()) == keys_reference_markdown(),
                  "README's key reference is stale: regenerate it from `tocsin keys` (see DEVELOPERS.md)");
    // And every key declared is in it (guards against an empty reference).
    for (const SectionSpec& section : scenario_sections())
        for (const KeySpec& key : section.keys) CHECK(readme.find("| `" + std::string(key.name) + "` |") != std::string::npos);
}

TEST_CASE("scenario.replay_input_keys") {
    std::string text = scenario_text();
    text.replace(text.find("    scores: s.csv\n"), 18,
                 "    scores: s.csv\n    max_stay_days: 90\n    far_out_fence_iqr: 5\n    score_range: [0, 1]\n    bad_rows: skip\n");
    const Scenario sc = parse_scenario(text, "s.yaml", "");
    CHECK(sc.population.replay.max_stay_days == 90);
    CHECK(sc.population.replay.far_out_fence_iqr == 5);
    CHECK(sc.population.replay.score_low == 0);
    CHECK(sc.population.replay.score_high == 1);
    CHECK(sc.population.replay.bad_rows == BadRows::skip);
    // Defaults: stop at a bad row, a year of stay, the points scale.
    const Scenario plain = parse_scenario(scenario_text(), "s.yaml", "");
    CHECK(plain.population.replay.bad_rows == BadRows::stop);
    CHECK(plain.population.replay.max_stay_days == 365);
    CHECK(plain.population.replay.score_high == 100);

    auto with = [&](const std::string& line) {
        std::string t = scenario_text();
        t.replace(t.find("    scores: s.csv\n"), 18, "    scores: s.csv\n" + line + "\n");
        return parse_error(t);
    };
    const InputError bad_mode = with("    bad_rows: maybe");
    CHECK(bad_mode.line == 13);
    CHECK(std::string(bad_mode.what()).find("stop or skip") != std::string::npos);
    CHECK(std::string(with("    score_range: [5]").what()).find("[low, high]") != std::string::npos);
    CHECK(std::string(with("    score_range: [10, 1]").what()).find("low below high") != std::string::npos);
    CHECK(std::string(with("    score_range: [0, .inf]").what()).find("finite") != std::string::npos);
    CHECK(std::string(with("    max_stay_days: 0").what()).find("out of range") != std::string::npos);
}

TEST_CASE("scenario.defaults_come_from_the_declarations") {
    // The loader reads every default from the key's declaration; the models'
    // own structs carry theirs for callers without a scenario file. They agree,
    // and a sub-section left out reads as if it were given empty.
    auto real_default = [](std::string_view section, std::string_view key) {
        return std::get<double>(key_spec(section, key).fallback);
    };
    const StayConfig stay;
    CHECK(real_default("population.generate.stay", "median_hours") == stay.median_hours);
    CHECK(real_default("population.generate.stay", "log_sd") == stay.log_sd);
    CHECK(real_default("population.generate.stay", "mean_hours") == stay.mean_hours);
    CHECK(real_default("population.generate.stay", "sd_hours") == stay.sd_hours);
    const OutcomeConfig outcome;
    CHECK(real_default("population.generate.outcome", "probability") == outcome.probability);
    CHECK(real_default("population.generate.outcome", "earliest_fraction") == outcome.earliest_fraction);
    CHECK(real_default("population.generate.outcome", "latest_fraction") == outcome.latest_fraction);
    CHECK(std::get<bool>(key_spec("population.generate.outcome", "ends_stay").fallback) == outcome.ends_stay);
    const ScoreConfig scores;
    for (auto [key, value] : {std::pair{"cadence_minutes", scores.cadence_minutes}, {"jitter_minutes", scores.jitter_minutes},
                              {"missing_probability", scores.missing_probability},
                              {"latency_median_minutes", scores.latency_median_minutes},
                              {"latency_log_sd", scores.latency_log_sd}, {"baseline", scores.baseline},
                              {"between_patient_sd", scores.between_patient_sd},
                              {"within_patient_sd", scores.within_patient_sd}, {"drift_size", scores.drift_size},
                              {"drift_onset_min_hours", scores.drift_onset_min_hours},
                              {"drift_onset_max_hours", scores.drift_onset_max_hours}})
        CHECK_MESSAGE(real_default("population.generate.scores", key) == value, key);
    CHECK(real_default("population.generate", "warmup_days") == GeneratorConfig{}.warmup_days);
    const ReplaySource replay;
    CHECK(real_default("population.replay", "max_stay_days") == replay.max_stay_days);
    CHECK(real_default("population.replay", "far_out_fence_iqr") == replay.far_out_fence_iqr);
    CHECK(std::get<std::vector<double>>(key_spec("population.replay", "score_range").fallback) ==
          std::vector<double>{replay.score_low, replay.score_high});

    const Scenario sc = parse_scenario(scenario_text(), "s.yaml", "");
    CHECK(sc.simulation.plans[0].rule.persistence == std::get<std::int64_t>(key_spec("plans[].rule", "persistence").fallback));
    CHECK(sc.simulation.seed == static_cast<std::uint64_t>(std::get<std::int64_t>(key_spec("top level", "seed").fallback)));
    CHECK(sc.score_label == std::get<std::string_view>(key_spec("top level", "score_label").fallback));
    CHECK(sc.analysis.min_lead == 0);
    CHECK(default_text(key_spec("plans[].rule", "snooze_minutes")) == "none");
    CHECK(default_text(key_spec("top level", "name")) == "required");
    CHECK(default_text(key_spec("population.replay", "score_range")) == "[0, 100]");
}

TEST_CASE("scenario.description_is_items") {
    const Scenario sc = parse_scenario(scenario_text("{threshold: 60, persistence: 2}") + "description: why\n", "s.yaml", "");
    const ScenarioDescription d = scenario_description(sc);
    CHECK(d.name == "test");
    CHECK(d.question == "why");
    const auto plans = std::find_if(d.items.begin(), d.items.end(), [](const DescriptionItem& i) { return i.entry_label == "Plan"; });
    REQUIRE(plans != d.items.end());
    CHECK(plans->text == "Plans (1)");
    REQUIRE(plans->items.size() == 1);
    CHECK(plans->items[0].text == "p: page to responder when score >= 60 on 2 scores in a row");
    CHECK(to_text(d) == describe_scenario(sc));
    CHECK(describe_scenario(sc).find("Plans (1):\n  - p: page to responder when score >= 60 on 2 scores in a row\n") !=
          std::string::npos);
}
