#pragma once
// The fit check (study/fit_check.hpp) as terminal text: one row per figure,
// the log's value beside the fitted range, whether it lies inside, then a
// plain verdict and warnings when benefit or burden figures differ.
#include <string>

#include "study/fit_check.hpp"

namespace tocsin {

std::string fit_check_text(const FitCheck& check);

// What a fitted scenario carries (population.generate.fit_check) when benefit
// or burden figures differ: "benefit figures differ (...); burden figures
// differ (...)"; empty when neither does.
std::string fit_check_record(const FitCheck& check);

// The one-line verdict that ends the text (also for callers that print only it).
std::string fit_check_verdict(const FitCheck& check);

}  // namespace tocsin
