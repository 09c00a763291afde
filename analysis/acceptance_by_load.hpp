#pragma once
// Acceptance realised by load, for plans that declare fatigue
// (sim/fatigue.hpp): per plan, per kind of load and load band, how many
// notices met that load, how many led to an evaluation, and the probability
// the declared effect gave them on average, so the realised share can be read
// against the declared one.
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "analysis/reporting.hpp"
#include "sim/setup.hpp"
#include "sim/simulate.hpp"

namespace tocsin {

enum class LoadKind : std::uint8_t { earlier_for_patient, recent_for_team };
std::string_view to_string(LoadKind kind);

// Bands of a load count: 0, 1, 2, 3-4, 5-9, 10-19, 20-49, 50 and more (a
// hospital-wide team may hear dozens of notices in a window).
inline constexpr std::uint32_t load_band_floors[] = {0, 1, 2, 3, 5, 10, 20, 50};
inline constexpr std::size_t load_band_count = 8;
std::size_t load_band(std::uint32_t load);
std::string load_band_name(std::size_t band);

struct LoadBandRow {
    std::string plan;
    LoadKind load{};
    std::size_t band = 0;
    std::int64_t notices = 0;
    std::int64_t evaluations = 0;        // notices that asked for an evaluation
    std::optional<double> share;         // evaluations / notices
    std::optional<double> declared;      // mean probability the declared effect gave these notices
};

// Notices delivered in [from, until) of every plan that declares fatigue; bands
// without notices are left out.
std::vector<LoadBandRow> acceptance_by_load(const SimulationSetup& setup, const ReplicationRecord& record,
                                            Instant from, Instant until);

}  // namespace tocsin
