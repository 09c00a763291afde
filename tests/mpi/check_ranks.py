#!/usr/bin/env python3
"""Runs and sweeps across MPI ranks against the same run in one process.

    check_ranks.py TOCSIN SOURCE_DIR WORK_DIR identical run|sweep|resampled RANKS THREADS
    check_ranks.py TOCSIN SOURCE_DIR WORK_DIR fails setup|work RANKS

`identical`: the run in one process (one thread) and under `mpirun -np RANKS`
(THREADS threads per rank) must write the same files, byte for byte. The one
exception is run_record.json's "seconds" and "threads" lines: how long the run
took and the -j it was given, which differ between any two runs.

`fails`: with TOCSIN_TEST_RANK_FAILS (a test-only hook in cli/mpi_ranks.cpp)
rank 1 fails in its set-up or on its first work item; the run must exit
non-zero, print that rank's error on rank 0's stderr, and write nothing.
"""
import os
import shutil
import subprocess
import sys

tocsin, source, work, mode, what, ranks = sys.argv[1:7]
scenario = os.path.join(source, "scenarios", "demo.yaml")
# Small and quick: four replications of the demo's plans with both
# patient-level logs (items are whole replications), a 5 x 2 grid of the
# first plan over five replications (items are blocks of grid points), or six
# replications resampled from the invented log.
args = {
    "run": ["run", scenario, "-r", "4", "--notice-log", "--task-log"],
    "sweep": ["sweep", scenario, "--vary", "plan.rule.threshold=50:70:5", "--vary",
              "plan.rule.snooze_minutes=60,240", "-r", "5", "--max-burden", "0.5"],
    # A replayed log, resampled by days: rank 0 reads it and broadcasts it.
    "resampled": ["run", os.path.join(source, "scenarios", "fernhollow-resampled.yaml"), "-r", "6"],
}
env = dict(os.environ, OMPI_MCA_btl="self,vader", OMPI_MCA_btl_vader_single_copy_mechanism="none")
mpirun = ["mpirun", "--oversubscribe", "-np", ranks]
if os.geteuid() == 0:
    mpirun.insert(1, "--allow-run-as-root")


def fresh(path):
    shutil.rmtree(path, ignore_errors=True)
    return path


def run(command, extra_env=None):
    return subprocess.run(command, env=dict(env, **(extra_env or {})), capture_output=True, text=True, timeout=300)


def comparable(name, data):
    if name != "run_record.json":
        return data
    return b"".join(l for l in data.splitlines(True) if not l.lstrip().startswith((b'"seconds"', b'"threads"')))


def files(path):
    out = {}
    for root, _, names in os.walk(path):
        for n in names:
            full = os.path.join(root, n)
            with open(full, "rb") as f:
                out[os.path.relpath(full, path)] = comparable(n, f.read())
    return out


os.makedirs(work, exist_ok=True)
if mode == "identical":
    threads = sys.argv[7]
    one, many = fresh(os.path.join(work, "one")), fresh(os.path.join(work, "many"))
    single = run([tocsin] + args[what] + ["-j", "1", "--out", one])
    if single.returncode != 0:
        sys.exit("the run in one process failed:\n" + single.stderr)
    spread = run(mpirun + [tocsin] + args[what] + ["-j", threads, "--out", many])
    if spread.returncode != 0:
        sys.exit("the run on %s ranks failed:\n%s" % (ranks, spread.stderr))
    if "busy time per rank" not in spread.stderr:
        sys.exit("no per-rank busy time on rank 0's stderr:\n" + spread.stderr)
    # Every other rank must have done work, or the comparison proves nothing.
    for r in range(1, int(ranks)):
        line = next((l for l in spread.stderr.splitlines() if l.strip().startswith("rank %d:" % r)), "")
        if " 0 work items" in line or "work item" not in line:
            sys.exit("rank %d did no work item:\n%s" % (r, spread.stderr))
    a, b = files(one), files(many)
    if sorted(a) != sorted(b):
        sys.exit("different files: %s vs %s" % (sorted(set(a) - set(b)), sorted(set(b) - set(a))))
    differ = [n for n in sorted(a) if a[n] != b[n]]
    if differ:
        sys.exit("files differ between 1 process and %s ranks: %s" % (ranks, differ))
    print("%d files identical on %s ranks x %s threads and in one process" % (len(a), ranks, threads))
elif mode == "fails":
    out = fresh(os.path.join(work, "failed"))
    failed = run(mpirun + [tocsin] + args["run"] + ["-j", "1", "--out", out], {"TOCSIN_TEST_RANK_FAILS": "1:" + what})
    said = {"setup": "rank 1 of %s, while setting up: test hook" % ranks,
            "work": "rank 1 of %s, replication" % ranks}[what]
    if failed.returncode == 0:
        sys.exit("the run succeeded although rank 1 failed")
    if "tocsin: error: " + said not in failed.stderr:
        sys.exit("rank 1's error is not on rank 0's stderr:\n" + failed.stderr)
    if what == "work" and "out of memory" not in failed.stderr:
        sys.exit("the error does not say what rank 1 met:\n" + failed.stderr)
    if os.path.exists(out):
        sys.exit("a failed run wrote " + out)
    print("the failure of rank 1 (%s) failed the run on rank 0 and nothing was written" % what)
else:
    sys.exit("unknown mode " + mode)
