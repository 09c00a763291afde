#include "models/population.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

namespace tocsin {

const std::string& GroupColumn::level_name(std::size_t level) const {
    static const std::string missing = not_recorded;
    return level < values.size() ? values[level] : missing;
}

std::string GroupColumn::values_text() const {
    std::string out;
    for (const std::string& v : values) out += (out.empty() ? "" : ", ") + v;
    return out;
}

void SkippedRows::merge(const SkippedRows& later, long line_offset) {
    count += later.count;
    for (long line : later.first_lines)
        if (first_lines.size() < lines_kept) first_lines.push_back(line + line_offset);
}

std::string describe_lines(const SkippedRows& rows) {
    std::string out = rows.first_lines.size() == 1 ? "line " : "lines ";
    for (std::size_t i = 0; i < rows.first_lines.size(); ++i)
        out += (i ? ", " : "") + std::to_string(rows.first_lines[i]);
    const auto more = rows.count - static_cast<std::int64_t>(rows.first_lines.size());
    if (more > 0) out += " and " + std::to_string(more) + " more";
    return out;
}

std::int64_t Exclusions::total_scores() const {
    std::int64_t n = 0;
    for (const auto& [reason, count] : scores_by_reason) n += count;
    return n;
}

namespace {

// One score's values, offsets and exclusion counts, wherever they live.
struct ScoreArrays {
    std::vector<Score>& values;
    std::vector<std::size_t>& start;
    std::map<std::string, std::int64_t>& excluded;
};

ScoreArrays arrays_of(Population& pop, std::size_t score) {
    if (score == 0) return {pop.scores, pop.score_start, pop.excluded.scores_by_reason};
    OtherScore& o = pop.other_scores.at(score - 1);
    return {o.scores, o.score_start, o.excluded_by_reason};
}

void exclude_unusable(const std::vector<Encounter>& encounters, ScoreArrays a) {
    std::size_t out = 0;
    std::int64_t before_admission = 0, after_discharge = 0, at_or_after_outcome = 0;
    std::vector<std::size_t> start(encounters.size() + 1, 0);
    for (std::size_t e = 0; e < encounters.size(); ++e) {
        const Encounter& enc = encounters[e];
        start[e] = out;
        for (std::size_t i = a.start[e]; i < a.start[e + 1]; ++i) {
            const Score& s = a.values[i];
            if (s.available_at < enc.admitted) { ++before_admission; continue; }
            if (enc.outcome_at && s.available_at >= *enc.outcome_at) { ++at_or_after_outcome; continue; }
            if (s.available_at >= enc.discharged) { ++after_discharge; continue; }
            a.values[out++] = s;
        }
    }
    start[encounters.size()] = out;
    a.values.resize(out);
    a.start = std::move(start);
    auto add = [&](const char* reason, std::int64_t n) {
        if (n) a.excluded[reason] += n;
    };
    add("available before admission", before_admission);
    add("available at or after the outcome (time zero)", at_or_after_outcome);
    add("available at or after discharge", after_discharge);
}

}  // namespace

void group_scores_by_encounter(Population& pop, std::vector<Score>& scores, std::vector<std::uint32_t>& owner,
                               std::size_t score) {
    ScoreArrays a = arrays_of(pop, score);
    const std::size_t n_enc = pop.encounters.size();
    a.start.assign(n_enc + 1, 0);
    for (std::uint32_t e : owner) ++a.start[e + 1];
    std::partial_sum(a.start.begin(), a.start.end(), a.start.begin());
    bool already_grouped = std::is_sorted(owner.begin(), owner.end());
    if (already_grouped) {
        a.values = std::move(scores);
    } else {
        // Stable counting sort: source order survives inside each encounter.
        a.values.resize(scores.size());
        std::vector<std::size_t> next(a.start.begin(), a.start.end() - 1);
        for (std::size_t i = 0; i < scores.size(); ++i) a.values[next[owner[i]]++] = scores[i];
        std::vector<Score>().swap(scores);
    }
    std::vector<std::uint32_t>().swap(owner);
    auto before = [](const Score& x, const Score& y) {
        return x.available_at != y.available_at ? x.available_at < y.available_at : x.scored_at < y.scored_at;
    };
    for (std::size_t e = 0; e < n_enc; ++e) {
        auto first = a.values.begin() + static_cast<std::ptrdiff_t>(a.start[e]);
        auto last = a.values.begin() + static_cast<std::ptrdiff_t>(a.start[e + 1]);
        if (!std::is_sorted(first, last, before)) std::stable_sort(first, last, before);
    }
}

void apply_score_exclusions(Population& pop) {
    for (std::size_t k = 0; k < pop.score_count(); ++k) exclude_unusable(pop.encounters, arrays_of(pop, k));
}

void swap_first_score(Population& pop, std::size_t score) {
    if (score == 0) return;
    OtherScore& o = pop.other_scores.at(score - 1);
    std::swap(pop.score_name, o.name);
    std::swap(pop.scores, o.scores);
    std::swap(pop.score_start, o.score_start);
    std::swap(pop.excluded.scores_by_reason, o.excluded_by_reason);
}

Population with_only_score(const Population& pop, std::size_t score) {
    Population out;
    out.units = pop.units;
    out.groups = pop.groups;
    out.encounters = pop.encounters;
    out.excluded = pop.excluded;
    out.period_start = pop.period_start;
    out.period_end = pop.period_end;
    if (score == 0) {
        out.score_name = pop.score_name;
        out.scores = pop.scores;
        out.score_start = pop.score_start;
        return out;
    }
    const OtherScore& o = pop.other_scores.at(score - 1);
    out.score_name = o.name;
    out.scores = o.scores;
    out.score_start = o.score_start;
    out.excluded.scores_by_reason = o.excluded_by_reason;
    return out;
}

std::optional<std::size_t> score_index(const Population& pop, const std::string& name) {
    if (name.empty() || name == pop.score_name) return 0;
    for (std::size_t k = 0; k < pop.other_scores.size(); ++k)
        if (pop.other_scores[k].name == name) return k + 1;
    return std::nullopt;
}

void default_period(Population& pop) {
    if (pop.period_start != 0 || pop.period_end != 0 || pop.encounters.empty()) return;
    Instant lo = pop.encounters.front().admitted, hi = pop.encounters.front().discharged;
    for (const Encounter& e : pop.encounters) {
        lo = std::min(lo, e.admitted);
        hi = std::max(hi, e.discharged);
    }
    pop.period_start = lo;
    pop.period_end = hi;
}

ScoreRange observed_score_range(const Population& pop) {
    ScoreRange range;
    for (const Score& s : pop.scores) {
        range.lowest = range.scores == 0 ? s.value : std::min(range.lowest, s.value);
        range.highest = range.scores == 0 ? s.value : std::max(range.highest, s.value);
        ++range.scores;
    }
    return range;
}

ScoreRange ScoreSample::range() const {
    if (ascending.empty()) return {};
    return {static_cast<std::int64_t>(ascending.size()), ascending.front(), ascending.back()};
}

double ScoreSample::share_at_or_above(double threshold) const {
    if (ascending.empty()) return 0;
    const auto first = std::lower_bound(ascending.begin(), ascending.end(), threshold);
    return static_cast<double>(ascending.end() - first) / static_cast<double>(ascending.size());
}

double ScoreSample::percentile(double fraction) const {
    if (ascending.empty()) return 0;
    const double n = static_cast<double>(ascending.size());
    // The k-th smallest with k = ceil(n * fraction), at least 1.
    const auto k = static_cast<std::size_t>(std::max(1.0, std::ceil(n * fraction - 1e-9)));
    return ascending[std::min(k, ascending.size()) - 1];
}

ScoreSample observed_scores(const Population& pop, std::size_t score) {
    ScoreSample sample;
    const std::vector<Score>& values = score == 0 ? pop.scores : pop.other_scores.at(score - 1).scores;
    sample.ascending.reserve(values.size());
    for (const Score& s : values) sample.ascending.push_back(s.value);
    std::sort(sample.ascending.begin(), sample.ascending.end());
    return sample;
}

}  // namespace tocsin
