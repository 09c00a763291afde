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

void group_scores_by_encounter(Population& pop, std::vector<Score>& scores, std::vector<std::uint32_t>& owner) {
    const std::size_t n_enc = pop.encounters.size();
    pop.score_start.assign(n_enc + 1, 0);
    for (std::uint32_t e : owner) ++pop.score_start[e + 1];
    std::partial_sum(pop.score_start.begin(), pop.score_start.end(), pop.score_start.begin());
    bool already_grouped = std::is_sorted(owner.begin(), owner.end());
    if (already_grouped) {
        pop.scores = std::move(scores);
    } else {
        // Stable counting sort: source order survives inside each encounter.
        pop.scores.resize(scores.size());
        std::vector<std::size_t> next(pop.score_start.begin(), pop.score_start.end() - 1);
        for (std::size_t i = 0; i < scores.size(); ++i) pop.scores[next[owner[i]]++] = scores[i];
        std::vector<Score>().swap(scores);
    }
    std::vector<std::uint32_t>().swap(owner);
    auto before = [](const Score& a, const Score& b) {
        return a.available_at != b.available_at ? a.available_at < b.available_at : a.scored_at < b.scored_at;
    };
    for (std::size_t e = 0; e < n_enc; ++e) {
        auto first = pop.scores.begin() + static_cast<std::ptrdiff_t>(pop.score_start[e]);
        auto last = pop.scores.begin() + static_cast<std::ptrdiff_t>(pop.score_start[e + 1]);
        if (!std::is_sorted(first, last, before)) std::stable_sort(first, last, before);
    }
}

void apply_score_exclusions(Population& pop) {
    std::size_t out = 0;
    std::int64_t before_admission = 0, after_discharge = 0, at_or_after_outcome = 0;
    std::vector<std::size_t> start(pop.encounters.size() + 1, 0);
    for (std::size_t e = 0; e < pop.encounters.size(); ++e) {
        const Encounter& enc = pop.encounters[e];
        start[e] = out;
        for (std::size_t i = pop.score_start[e]; i < pop.score_start[e + 1]; ++i) {
            const Score& s = pop.scores[i];
            if (s.available_at < enc.admitted) { ++before_admission; continue; }
            if (enc.outcome_at && s.available_at >= *enc.outcome_at) { ++at_or_after_outcome; continue; }
            if (s.available_at >= enc.discharged) { ++after_discharge; continue; }
            pop.scores[out++] = s;
        }
    }
    start[pop.encounters.size()] = out;
    pop.scores.resize(out);
    pop.score_start = std::move(start);
    auto add = [&](const char* reason, std::int64_t n) {
        if (n) pop.excluded.scores_by_reason[reason] += n;
    };
    add("available before admission", before_admission);
    add("available at or after the outcome (time zero)", at_or_after_outcome);
    add("available at or after discharge", after_discharge);
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

ScoreSample observed_scores(const Population& pop) {
    ScoreSample sample;
    sample.ascending.reserve(pop.scores.size());
    for (const Score& s : pop.scores) sample.ascending.push_back(s.value);
    std::sort(sample.ascending.begin(), sample.ascending.end());
    return sample;
}

}  // namespace tocsin
