#!/usr/bin/env bash
# tocsin's one entry point for set-up, build, demo, tests and benchmarks.
#   ./go demo    install what is missing, build, run the demo scenario
#   ./go test    install what is missing, build, run every test (then the sanitizer pass and a fuzz smoke)
#   ./go fuzz [SECONDS]  build the libFuzzer harnesses (clang) and run each for SECONDS (600)
#   ./go build   install build dependencies and build (Release, in build/)
#   ./go bench   build and run the benchmarks (figures, not pass/fail)
#   ./go keys    refresh the README's scenario key reference
# Installs only Debian packages that are not installed yet.
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")"
JOBS="${JOBS:-$(nproc)}"

BUILD_PACKAGES=(g++ cmake make pkgconf tzdata libboost-random-dev libboost-graph-dev libeigen3-dev
                libyaml-cpp-dev libcli11-dev doctest-dev)
# Outside references the test suite checks against, and the browser that renders the report
# (and, driven by chromium-driver through python3-selenium, the what-if page).
REFERENCE_PACKAGES=(python3 python3-sklearn python3-statsmodels python3-scipy r-base-core r-cran-proc chromium fonts-liberation zlib1g-dev
                    chromium-driver python3-selenium)

# Runs and sweeps across MPI ranks (-DTOCSIN_MPI=ON): Boost.MPI and Open MPI's mpirun.
MPI_PACKAGES=(libboost-mpi-dev openmpi-bin)

# libFuzzer comes with clang's runtime libraries.
FUZZ_PACKAGES=(clang libclang-rt-14-dev)

install_missing() {
    local missing=() p
    for p in "$@"; do
        dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
    done
    ((${#missing[@]})) || return 0
    local sudo=""
    [ "$(id -u)" -eq 0 ] || sudo="sudo"
    echo "go: installing ${missing[*]}" >&2
    $sudo apt-get update -qq
    DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >&2
}

build() {  # build DIR TARGET [cmake args...]
    local dir="$1" target="$2"; shift 2
    cmake -S . -B "$dir" -DCMAKE_BUILD_TYPE=Release "$@" > /dev/null
    cmake --build "$dir" -j "$JOBS" --target "$target"
}

build_fuzzers() {
    cmake -S . -B build-fuzz -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCMAKE_CXX_COMPILER=clang++ -DTOCSIN_FUZZ=ON \
          -DTOCSIN_TESTS=OFF -DTOCSIN_BENCH=OFF > /dev/null
    cmake --build build-fuzz -j "$JOBS" --target fuzzers
}

# Runs every harness for at most $1 seconds on its seed corpus (tests/fuzz/corpus/,
# read only) plus what earlier runs found (build-fuzz/corpus/, written); further
# arguments go to libFuzzer. A finding is saved in build-fuzz/findings/<harness>/,
# outside the repository. One summary line per harness; fails when any harness
# found something.
run_fuzzers() {
    local seconds="$1" failed=0 h name log rc runs rate
    shift
    for h in build-fuzz/tests/fuzz/fuzz_*; do
        name="$(basename "$h")"
        mkdir -p "build-fuzz/corpus/$name" "build-fuzz/findings/$name"
        log="build-fuzz/$name.log"
        rc=0
        "$h" "build-fuzz/corpus/$name" "tests/fuzz/corpus/$name" -max_total_time="$seconds" -timeout=30 \
             -rss_limit_mb=4096 -artifact_prefix="build-fuzz/findings/$name/" -print_final_stats=1 "$@" > "$log" 2>&1 || rc=$?
        runs="$(sed -n 's/^stat::number_of_executed_units: *//p' "$log")"
        rate="$(sed -n 's/^stat::average_exec_per_sec: *//p' "$log")"
        if [ "$rc" -eq 0 ]; then
            echo "fuzz: $name: ${runs:-?} executions, ${rate:-?} exec/s, 0 findings"
        else
            failed=1
            echo "fuzz: $name: ${runs:-?} executions, ${rate:-?} exec/s, 1 finding (stopped; exit $rc; log $log)"
            grep -m1 -E 'PROPERTY BROKEN|ERROR: (AddressSanitizer|LeakSanitizer|libFuzzer)|runtime error' "$log" | cut -c1-400 || true
            sed -n 's/^.*Test unit written to /  input: /p' "$log"
        fi
    done
    return "$failed"
}

case "${1:-}" in
    demo)
        install_missing "${BUILD_PACKAGES[@]}"
        build build tocsin
        ./build/tocsin run scenarios/demo.yaml --out out/demo
        ;;
    test)
        install_missing "${BUILD_PACKAGES[@]}" "${REFERENCE_PACKAGES[@]}" "${MPI_PACKAGES[@]}"
        build build all -DTOCSIN_TESTS=ON -DTOCSIN_BENCH=ON -DTOCSIN_MPI=ON
        (cd build && ctest -j "$JOBS" --output-on-failure --timeout 600)
        # Second pass: the same tests under AddressSanitizer + UndefinedBehaviorSanitizer.
        cmake -S . -B build-sanitize -DCMAKE_BUILD_TYPE=RelWithDebInfo -DTOCSIN_SANITIZE=ON -DTOCSIN_TESTS=ON -DTOCSIN_BENCH=OFF > /dev/null
        cmake --build build-sanitize -j "$JOBS"
        (cd build-sanitize && ASAN_OPTIONS=detect_leaks=1 ctest -j "$JOBS" --output-on-failure --timeout 900 -LE reference)
        # Third: a short run of each fuzz harness; a broken property fails the test.
        # A fixed seed and count make it the same run every time (a finding in
        # CI then reproduces); ./go fuzz explores with fresh seeds.
        install_missing "${FUZZ_PACKAGES[@]}"
        build_fuzzers
        run_fuzzers 60 -seed=1 -runs=40000
        ;;
    fuzz)
        install_missing "${BUILD_PACKAGES[@]}" "${FUZZ_PACKAGES[@]}"
        build_fuzzers
        run_fuzzers "${2:-600}"
        ;;
    build)
        install_missing "${BUILD_PACKAGES[@]}"
        build build all -DTOCSIN_TESTS=ON -DTOCSIN_BENCH=ON
        ;;
    bench)
        install_missing "${BUILD_PACKAGES[@]}" "${MPI_PACKAGES[@]}"
        build build all -DTOCSIN_TESTS=ON -DTOCSIN_BENCH=ON -DTOCSIN_MPI=ON
        for b in build/bench/bench_*; do
            case "$b" in */bench_mpi_*) continue ;; esac  # run under mpirun with arguments (DEVELOPERS.md)
            [ -x "$b" ] && "$b"
        done
        ;;
    keys)  # refresh the README's scenario key reference from the built tool
        build build tocsin
        python3 - <<'PY'
import subprocess
readme = open("README.md").read()
keys = subprocess.run(["build/tocsin", "keys"], check=True, capture_output=True, text=True).stdout
begin, end = "<!-- keys:begin -->\n", "<!-- keys:end -->"
a, b = readme.index(begin) + len(begin), readme.index(end)
open("README.md", "w").write(readme[:a] + keys + readme[b:])
PY
        ;;
    *)
        sed -n '2,9p' "$0"
        exit 2
        ;;
esac
