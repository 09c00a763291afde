#include "report/cautions.hpp"

namespace tocsin {

std::string cautions_text() {
    return "Cautions: these figures rest on the scenario's assumptions (population, rules, staffing, what counts "
           "as a catch) and change when they change. tocsin is not a medical device; it informs a committee's "
           "decision and decides nothing about any patient. Adopting an alerting workflow follows local "
           "governance, policy and licensed clinical judgement.";
}

}  // namespace tocsin
