// A sweep of 1,000 plans (40 thresholds x 25 snoozes) x 20 replications over
// a generated 200-bed quarter (8 wards of 25 beds, 90 days, hourly scores),
// run by `mpirun -np N tocsin sweep` on 1 and on 2 ranks (one thread each):
// wall time, speed-up and each rank's busy time, and whether the two wrote
// the same files. Needs a build with -DTOCSIN_MPI=ON and mpirun.
//   bench_ranks [--replications R] [--ranks-max N] [--keep DIR]
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <unistd.h>

namespace {

const char* scenario_text = R"(scenario_schema: 1
name: bench ranks - 200 beds, one quarter (invented)
time_zone: UTC
seed: 20261205
replications: 20
shifts:
  - {name: day, starts: "07:00"}
  - {name: night, starts: "19:00", night: true}
outcome: {window_hours: 24, min_lead_minutes: 60}
population:
  generate:
    start: "2026-01-05 07:00:00"
    end: "2026-04-05 07:00:00"
    units:
      - {name: unit 1, beds: 25, arrivals_per_hour: [0.27]}
      - {name: unit 2, beds: 25, arrivals_per_hour: [0.27]}
      - {name: unit 3, beds: 25, arrivals_per_hour: [0.27]}
      - {name: unit 4, beds: 25, arrivals_per_hour: [0.27]}
      - {name: unit 5, beds: 25, arrivals_per_hour: [0.27]}
      - {name: unit 6, beds: 25, arrivals_per_hour: [0.27]}
      - {name: unit 7, beds: 25, arrivals_per_hour: [0.27]}
      - {name: unit 8, beds: 25, arrivals_per_hour: [0.27]}
    stay: {distribution: lognormal, median_hours: 72, log_sd: 0.6}
    outcome: {probability: 0.06}
    scores: {scale: points, cadence_minutes: 60, baseline: 25, drift_size: 30}
plans:
  - name: page
    channel: page
    rule: {threshold: 60, snooze_minutes: 240, rise: 12}
)";

std::string slurp(const std::filesystem::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::stringstream s;
    s << in.rdbuf();
    return s.str();
}

// Every output file, run_record.json without its "seconds" and "threads" lines.
std::string outputs(const std::filesystem::path& dir) {
    std::string all;
    for (const auto& e : std::filesystem::directory_iterator(dir)) {
        std::string content = slurp(e.path());
        if (e.path().filename() == "run_record.json") {
            std::istringstream lines(content);
            content.clear();
            for (std::string l; std::getline(lines, l);)
                if (l.find("\"seconds\"") == std::string::npos && l.find("\"threads\"") == std::string::npos) content += l + "\n";
        }
        all += e.path().filename().string() + "\n" + content;
    }
    return all;
}

}  // namespace

int main(int argc, char** argv) {
    std::string replications = "20", keep;
    int ranks_max = 2;
    for (int i = 1; i < argc; ++i) {
        const std::string a = argv[i];
        if (a == "--replications" && i + 1 < argc) replications = argv[++i];
        else if (a == "--ranks-max" && i + 1 < argc) ranks_max = std::stoi(argv[++i]);
        else if (a == "--keep" && i + 1 < argc) keep = argv[++i];
    }
    if (!TOCSIN_MPI_BUILD) {
        std::printf("ranks: this build has no MPI; configure with -DTOCSIN_MPI=ON (./go bench does)\n");
        return 0;
    }
    if (std::system("mpirun --version > /dev/null 2>&1") != 0) {
        std::printf("ranks: mpirun not found; install openmpi-bin and build with -DTOCSIN_MPI=ON\n");
        return 0;
    }
    const std::filesystem::path dir = keep.empty() ? std::filesystem::temp_directory_path() / "tocsin-bench-ranks" : std::filesystem::path(keep);
    std::filesystem::create_directories(dir);
    std::ofstream(dir / "quarter.yaml") << scenario_text;
    const std::string as_root = geteuid() == 0 ? " --allow-run-as-root" : "";
    std::string first;
    double one_rank = 0;
    for (int ranks = 1; ranks <= ranks_max; ranks *= 2) {
        const std::filesystem::path out = dir / ("out-" + std::to_string(ranks));
        std::filesystem::remove_all(out);
        const std::string log = (dir / ("ranks-" + std::to_string(ranks) + ".txt")).string();
        const std::string command = "OMPI_MCA_btl=self,vader mpirun" + as_root + " --oversubscribe -np " + std::to_string(ranks) +
                                    " " TOCSIN_BINARY " sweep " + (dir / "quarter.yaml").string() +
                                    " --vary plan.rule.threshold=40:79:1 --vary plan.rule.snooze_minutes=30:750:30 -r " +
                                    replications + " -j 1 --out " + out.string() + " > /dev/null 2> " + log;
        const auto t0 = std::chrono::steady_clock::now();
        const int rc = std::system(command.c_str());
        const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
        if (rc != 0) {
            std::printf("ranks: the sweep on %d rank(s) failed (%s):\n%s", ranks, command.c_str(), slurp(log).c_str());
            return 1;
        }
        const std::string files = outputs(out);
        if (ranks == 1) first = files, one_rank = s;
        std::printf("ranks: 1,000 plans x %s replications, 200 beds x 90 days, %d rank%s x 1 thread: %.1f s wall "
                    "(speed-up %.2fx)%s\n%s",
                    replications.c_str(), ranks, ranks == 1 ? "" : "s", s, one_rank / s,
                    files == first ? ", same files as on 1 rank" : "  FILES DIFFER", slurp(log).c_str());
    }
    if (keep.empty()) std::filesystem::remove_all(dir);
    return 0;
}
