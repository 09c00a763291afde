#include "report/fit_check_text.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "models/text.hpp"

namespace tocsin {

namespace {

std::string value_text(double x, int decimals) { return std::isnan(x) ? "none" : format_real(x, decimals); }

int decimals_for(const FitCheckRow& row) {
    if (row.figure == "admissions" || row.figure == "outcome cases") return 0;
    if (row.figure == "encounter-level AUC" || row.figure == "sensitivity") return 3;
    return 2;
}

std::string joined(const std::vector<std::string>& items) {
    std::string out;
    for (std::size_t i = 0; i < items.size(); ++i) out += (i ? "; " : "") + items[i];
    return out;
}

std::string padded(const std::string& s, std::size_t width) {
    return s.size() >= width ? s : s + std::string(width - s.size(), ' ');
}

}  // namespace

std::string fit_check_record(const FitCheck& check) {
    std::string out;
    if (!check.benefit_outside.empty()) out = "benefit figures differ (" + joined(check.benefit_outside) + ")";
    if (!check.burden_outside.empty())
        out += (out.empty() ? "" : "; ") + std::string("burden figures differ (") + joined(check.burden_outside) + ")";
    return out;
}

std::string fit_check_verdict(const FitCheck& check) {
    const std::size_t rows = check.rows.size();
    if (check.outside == 0)
        return "Verdict: the fitted population reproduces the log: all " + std::to_string(rows) +
               " figures lie inside the fitted range.";
    return "Verdict: the fitted population does not reproduce the log on " + std::to_string(check.outside) + " of " +
           std::to_string(rows) + " figures (about 1 in 20 may fall outside by chance alone).";
}

std::string fit_check_text(const FitCheck& check) {
    std::vector<std::vector<std::string>> cells = {{"figure", "of", "log", "fitted mean", "fitted 95% range", "log inside"}};
    for (const FitCheckRow& row : check.rows) {
        const int d = decimals_for(row);
        cells.push_back({row.figure, row.of.empty() ? "all" : row.of, value_text(row.log_value, d),
                         value_text(row.fitted_mean, d),
                         std::isnan(row.fitted_low) ? "none"
                                                    : value_text(row.fitted_low, d) + " to " + value_text(row.fitted_high, d),
                         row.inside ? "yes" : "NO"});
    }
    std::vector<std::size_t> width(cells.front().size(), 0);
    for (const auto& line : cells)
        for (std::size_t c = 0; c < line.size(); ++c) width[c] = std::max(width[c], line[c].size());
    std::ostringstream out;
    out << "Fit check: the log beside " << check.replications
        << " replications generated from the fitted knobs (fitted 95% range: the middle 95% of the replications' values)\n";
    for (const auto& line : cells) {
        std::string text;
        for (std::size_t c = 0; c < line.size(); ++c) text += (c ? "  " : "") + padded(line[c], c + 1 < line.size() ? width[c] : 0);
        out << text << "\n";
    }
    out << fit_check_verdict(check) << "\n";
    if (!check.benefit_outside.empty())
        out << "Warning: benefit figures differ between the log and the fitted population (" << joined(check.benefit_outside)
            << "); what the fitted population says a plan reaches is not what the log shows.\n";
    if (!check.burden_outside.empty())
        out << "Warning: burden figures differ between the log and the fitted population (" << joined(check.burden_outside)
            << "); the fitted population's notices per night are not the log's.\n";
    return out.str();
}

}  // namespace tocsin
