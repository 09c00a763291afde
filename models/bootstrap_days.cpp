// Which days of a log a bootstrap draws from: its warm-up and its tail left
// out (the rules and their reasons are in models/bootstrap.hpp).
#include <algorithm>
#include <cmath>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "models/bootstrap.hpp"
#include "models/text.hpp"

namespace tocsin {

namespace {

constexpr double stay_time_beyond = 0.05;  // stay rule: share of patient time allowed beyond x days (our choice)
constexpr double census_level = 0.90;      // census rule: share of the typical census (our choice)

// The smallest whole number of days x with sum of max(0, L - x) at most
// `share` of the sum of L over every stay L of the log.
int stay_rule_days(const Population& log) {
    std::vector<double> stays;
    stays.reserve(log.encounters.size());
    double total = 0;
    for (const Encounter& e : log.encounters) {
        const double days = static_cast<double>(std::max<Instant>(0, e.discharged - e.admitted)) / 86400.0;
        stays.push_back(days);
        total += days;
    }
    if (total <= 0) return 0;
    auto beyond = [&](int x) {
        double sum = 0;
        for (double l : stays) sum += std::max(0.0, l - x);
        return sum;
    };
    int lo = 0, hi = static_cast<int>(std::ceil(*std::max_element(stays.begin(), stays.end())));
    while (lo < hi) {  // beyond(x) falls as x grows, and beyond(hi) == 0
        const int mid = lo + (hi - lo) / 2;
        if (beyond(mid) <= stay_time_beyond * total) hi = mid;
        else lo = mid + 1;
    }
    return lo;
}

// Mean occupied beds over each day [start + k days, start + (k + 1) days) of
// the log (the last day cut at period_end), all units together.
std::vector<double> daily_census(const Population& log, int log_days) {
    std::vector<double> bed_seconds(static_cast<std::size_t>(log_days), 0.0);
    const Instant start = log.period_start, end = log.period_end;
    for (const Encounter& e : log.encounters) {
        const Instant from = std::max(e.admitted, start), to = std::min(e.discharged, end);
        for (Instant at = from; at < to;) {
            const Instant k = (at - start) / days(1);
            const Instant day_end = std::min(to, start + (k + 1) * days(1));
            bed_seconds[static_cast<std::size_t>(k)] += static_cast<double>(day_end - at);
            at = day_end;
        }
    }
    for (int k = 0; k < log_days; ++k) {
        const Instant length = std::min(end, start + days(k + 1)) - (start + days(k));
        bed_seconds[static_cast<std::size_t>(k)] /= static_cast<double>(length);
    }
    return bed_seconds;
}

// The census rule: days before the census first reaches census_level of its
// typical level, and days after it last does.
void census_rule(const Population& log, EligibleDays& d) {
    const std::vector<double> census = daily_census(log, d.log_days);
    std::vector<double> middle;
    for (int k = d.stay_days; k < d.log_days - d.stay_days; ++k) middle.push_back(census[static_cast<std::size_t>(k)]);
    if (middle.empty()) middle = census;
    std::nth_element(middle.begin(), middle.begin() + static_cast<std::ptrdiff_t>(middle.size() / 2), middle.end());
    d.typical_census = middle[middle.size() / 2];
    if (d.typical_census <= 0) return;
    int first = -1, last = -1;
    for (int k = 0; k < d.log_days; ++k)
        if (census[static_cast<std::size_t>(k)] >= census_level * d.typical_census) {
            if (first < 0) first = k;
            last = k;
        }
    // The median day itself reaches the level, so first and last are found.
    // The day of each crossing is left out too (part of it may be ramping).
    d.census_warm_up_days = first + 1;
    d.census_tail_days = d.log_days - last;
}

}  // namespace

EligibleDays find_eligible_days(const Population& log, const BootstrapConfig& config) {
    validate(config);
    const Instant start = log.period_start, end = log.period_end;
    if (end <= start) throw std::invalid_argument("bootstrap: the source population covers no period");
    const Seconds block = days(config.block_days);
    if ((end - start) / block < 1)
        throw std::invalid_argument("bootstrap: the log covers " + std::to_string((end - start) / 3600) +
                                    " hours, less than one block of " + std::to_string(config.block_days) + " days");
    EligibleDays d;
    d.log_days = static_cast<int>((end - start + days(1) - 1) / days(1));
    d.warm_up_found = !config.warm_up_days;
    d.tail_found = !config.tail_days;
    if (d.warm_up_found || d.tail_found) {
        d.stay_days = stay_rule_days(log);
        census_rule(log, d);
    }
    d.warm_up_days = config.warm_up_days.value_or(std::max(d.stay_days, d.census_warm_up_days));
    d.tail_days = config.tail_days.value_or(std::max(d.stay_days, d.census_tail_days));
    // Whole blocks inside [start + warm-up, end - tail).
    const Instant from = start + days(d.warm_up_days), until = end - days(d.tail_days);
    d.first_block = static_cast<int>((from - start + block - 1) / block);
    d.blocks = until > start ? static_cast<int>((until - start) / block) - d.first_block : 0;
    if (d.blocks < 1)
        throw std::invalid_argument(
            "bootstrap: no whole block of " + std::to_string(config.block_days) + (config.block_days == 1 ? " day" : " days") +
            " is left between the warm-up (" + std::to_string(d.warm_up_days) + " days" +
            (d.warm_up_found ? ", found from the log" : "") + ") and the tail (" + std::to_string(d.tail_days) +
            " days" + (d.tail_found ? ", found from the log" : "") + ") of a " + std::to_string(d.log_days) +
            "-day log; declare warm_up_days and tail_days (README, 'Replications from a log')");
    return d;
}

EligiblePeriod eligible_period(const EligibleDays& d, const Population& log, const BootstrapConfig& config) {
    const Seconds block = days(config.block_days);
    const Instant from = log.period_start + d.first_block * block;
    return {from, from + d.blocks * block};
}

std::string describe_eligible_days(const EligibleDays& d, const Population& log, const BootstrapConfig& config,
                                   const TimeZone& zone) {
    const auto [from, until] = eligible_period(d, log, config);
    const int first_day = d.first_block * config.block_days + 1, last_day = first_day - 1 + d.blocks * config.block_days;
    std::ostringstream o;
    o << "Bootstrap draws from days " << first_day << " to " << last_day << " of the " << d.log_days << "-day log ("
      << format_local(from, zone) << " until " << format_local(until, zone) << "; warm-up " << d.warm_up_days
      << " days, " << (d.warm_up_found ? "found from the log" : "declared") << "; tail " << d.tail_days << " days, "
      << (d.tail_found ? "found from the log" : "declared") << ").\n";
    if (d.warm_up_found || d.tail_found)
        o << "  Found from the log: " << std::lround(100 * (1 - stay_time_beyond)) << "% of patient time lies within "
          << d.stay_days << " days of admission; the census (typical " << format_real(d.typical_census, 1)
          << " beds) first reaches " << std::lround(100 * census_level) << "% of that on day "
          << d.census_warm_up_days << " and last on day " << d.log_days - d.census_tail_days + 1 << ".\n";
    o << "  Each replication starts with "
      << (d.warm_up_days > 0 ? "the census of an eligible day" : "the log's census at its start")
      << " and is built from eligible days to its end; compare it with the log over a reporting period inside "
         "these days.\n";
    return o.str();
}

}  // namespace tocsin
