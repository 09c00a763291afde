// Replay loading (models/replay.hpp). The input is an encounters file, a line
// "%%", then a scores file. Properties:
//  - read in parallel chunks (parallel_chunk_bytes = 1) the log gives the same
//    population, or the same error, as read whole;
//  - the only exception is InputError, naming one of the two files and a
//    line >= 1.
#include <cstdint>
#include <optional>
#include <string>

#include "fuzz_support.hpp"
#include "models/errors.hpp"
#include "models/replay.hpp"

using namespace tocsin;
using tocsin::fuzz::broken;

namespace {

struct Outcome {
    std::optional<Population> population;
    std::optional<InputError> error;
};

Outcome load(const ReplaySource& source, const TimeZone& zone) {
    Outcome o;
    try {
        o.population = load_replay(source, zone);
    } catch (const InputError& e) {
        if (e.file != source.encounters_path && e.file != source.scores_path)
            broken("replay error names '" + e.file + "', neither input file: " + e.what());
        if (e.line < 1) broken(std::string("replay error without a line: ") + e.what());
        o.error = e;
    } catch (const std::exception& e) {
        broken(std::string("replay loading threw something other than InputError: ") + e.what());
    }
    return o;
}

bool same_population(const Population& a, const Population& b) {
    if (a.units != b.units || a.encounters.size() != b.encounters.size() || a.scores.size() != b.scores.size() ||
        a.score_start != b.score_start || a.period_start != b.period_start || a.period_end != b.period_end ||
        a.excluded.scores_by_reason != b.excluded.scores_by_reason ||
        a.excluded.encounters_by_reason != b.excluded.encounters_by_reason || a.excluded.notes != b.excluded.notes)
        return false;
    for (std::size_t i = 0; i < a.encounters.size(); ++i) {
        const Encounter &x = a.encounters[i], &y = b.encounters[i];
        if (x.id != y.id || x.unit != y.unit || x.admitted != y.admitted || x.discharged != y.discharged ||
            x.outcome_at != y.outcome_at)
            return false;
    }
    for (std::size_t i = 0; i < a.scores.size(); ++i) {
        const Score &x = a.scores[i], &y = b.scores[i];
        // Bit-for-bit: both paths parse the same text with the same from_chars.
        if (x.available_at != y.available_at || x.scored_at != y.scored_at || !(x.value == y.value)) return false;
    }
    return true;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    static const TimeZone zone = TimeZone::load("America/Chicago");  // once per process, not per input
    const std::string input(reinterpret_cast<const char*>(data), size);
    const std::size_t sep = input.find("\n%%\n");
    const std::string encounters = sep == std::string::npos ? input : input.substr(0, sep + 1);
    const std::string scores = sep == std::string::npos ? std::string() : input.substr(sep + 4);
    const auto& scratch = tocsin::fuzz::scratch();
    ReplaySource source;
    source.encounters_path = scratch.write("encounters.csv", encounters);
    source.scores_path = scratch.write("scores.csv", scores);

    const Outcome whole = load(source, zone);
    source.parallel_chunk_bytes = 1;
    const Outcome chunked = load(source, zone);
    if (whole.error.has_value() != chunked.error.has_value())
        broken(std::string("whole and chunked reading disagree: ") + (whole.error ? whole.error->what() : "loaded") +
               " vs " + (chunked.error ? chunked.error->what() : "loaded"));
    if (whole.error && (whole.error->file != chunked.error->file || whole.error->line != chunked.error->line ||
                        whole.error->column != chunked.error->column || whole.error->detail != chunked.error->detail))
        broken(std::string("whole and chunked reading report different errors: ") + whole.error->what() + " vs " +
               chunked.error->what());
    if (whole.population && !same_population(*whole.population, *chunked.population))
        broken("whole and chunked reading give different populations");
    return 0;
}
