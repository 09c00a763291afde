#include "report/basis.hpp"

namespace tocsin {

TableBases table_bases(const PopulationSetup& population, const PopulationSummary& first, std::uint64_t replications,
                       const TimeZone& zone) {
    const std::string zero = replication_zero_basis(population);
    const std::string whole = population.source == PopulationSource::generate ? "the whole generated period"
                                                                               : "the whole log";
    const std::string period = "the " + std::to_string(first.reporting_shifts) + " complete shifts from " +
                               format_local(first.from, zone) + " to " + format_local(first.until, zone);
    TableBases b;
    b.first = zero + "; counts over " + whole + ", per-shift figures over " + period;
    b.input = zero + "; everything read, before any figure";
    b.first_shifts = zero + "; " + period;
    b.first_scores = zero + "; every usable score and encounter of " + whole;
    b.replications = replications > 1
                         ? std::to_string(replications) + " replications (replication 0 included): mean and 95% CI; "
                               "each replication's counts over its whole period, per-shift figures over its complete shifts"
                         : zero + " (one replication: no interval)";
    b.every = replications > 1 ? "every replication, one row per event" : zero + ", one row per event";
    return b;
}

Table table_index(const std::vector<Table>& tables) {
    Table index = make_table("tables", "The tables written, with what each rests on",
                             {"table", "title", "basis", "rows"});
    for (const Table& t : tables)
        index.add_row({t.name, t.title, t.basis, static_cast<std::int64_t>(t.rows.size())});
    return index;
}

}  // namespace tocsin
