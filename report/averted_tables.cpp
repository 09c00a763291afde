#include "report/averted_tables.hpp"

#include "analysis/averted.hpp"
#include "report/cells.hpp"
#include "report/comparison_tables.hpp"

namespace tocsin {

namespace {

struct AvertedMetrics {
    std::size_t averted, per_averted;
};
std::optional<AvertedMetrics> averted_metrics(const ReplicatedFigures& f) {
    const AvertedMetrics m{metric_index(*find_metric("assumed_averted")),
                           metric_index(*find_metric("evaluations_per_assumed_averted"))};
    if (f.plans.empty() || !shown_metric(f, m.averted)) return std::nullopt;
    return m;
}

}  // namespace

std::optional<Table> outcomes_averted_table(const ReplicatedFigures& f, std::size_t ref) {
    const auto m = averted_metrics(f);
    if (!m) return std::nullopt;
    Table t;
    t.name = "outcomes_averted";
    t.title = "Outcomes averted under the declared effect (mean and 95% CI; " + std::string(averted_caution) + ")";
    t.columns = {"plan",     "assumed_averted", "ci_low",  "ci_high", "evaluations_per_assumed_averted",
                 "ci_low_per", "ci_high_per",   "versus",  "difference", "difference_ci_low",
                 "difference_ci_high", "replications", "assumption"};
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        const MeanInterval a = mean_interval(f.of(p, m->averted));
        const MeanInterval per = mean_interval(f.of(p, m->per_averted));
        const MeanInterval d = p == ref ? MeanInterval{} : paired_difference(f, p, ref, m->averted);
        const bool differs = p != ref;
        t.add_row({f.plans[p], finite_or_empty(a.mean), finite_or_empty(a.low), finite_or_empty(a.high),
                   finite_or_empty(per.mean), finite_or_empty(per.low), finite_or_empty(per.high),
                   differs ? Cell(f.plans[ref]) : Cell(), differs ? finite_or_empty(d.mean) : Cell(),
                   differs ? finite_or_empty(d.low) : Cell(), differs ? finite_or_empty(d.high) : Cell(),
                   static_cast<std::int64_t>(a.n), std::string(averted_caution)});
    }
    return t;
}

std::string outcomes_averted_text(const ReplicatedFigures& f, std::size_t ref) {
    const auto m = averted_metrics(f);
    if (!m) return "";
    std::string o = "Outcomes averted under the declared effect (" + std::string(averted_caution) +
                    "; mean and 95% CI over " + std::to_string(f.replications) + " replications):\n";
    for (std::size_t p = 0; p < f.plans.size(); ++p) {
        o += "  " + f.plans[p] + ": " + with_interval(mean_interval(f.of(p, m->averted)), 2) + " averted (assumed), " +
             with_interval(mean_interval(f.of(p, m->per_averted)), 1) + " evaluations per outcome averted (assumed)";
        if (p != ref && f.replications > 1)
            o += "; difference from " + f.plans[ref] + ": " +
                 with_interval(paired_difference(f, p, ref, m->averted), 2) + " averted (assumed, paired)";
        o += "\n";
    }
    return o;
}

}  // namespace tocsin
