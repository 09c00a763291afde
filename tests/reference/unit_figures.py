"""Recomputes the per-ward figures of a run's output directory from its own
data tables, for tests/test_reference_unit_figures.cpp:

- from unit_shift_notices.csv (notices per unit per reporting shift), each
  plan's per-unit shift and night mean, 90th percentile and worst
  (numpy.percentile, linear interpolation = Hyndman & Fan 1996 type 7), against
  plan_unit_summary.csv; and the pooled and worst-ward night figures against
  plan_summary.csv;
- from notice_log.csv (every notice, whole run), the notices per plan and
  unit, against plan_unit_summary.csv, and their sums against plan_summary.csv.

Prints "ok: N checks" or the first mismatches, exit status 1."""
import csv
import sys
from collections import defaultdict

import numpy as np

out = sys.argv[1]


def rows(name):
    with open(f"{out}/{name}.csv", newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f, strict=True))


shifts = defaultdict(list)
nights = defaultdict(list)
pooled_nights = defaultdict(list)
for r in rows("unit_shift_notices"):
    key = (r["plan"], r["unit"])
    shifts[key].append(float(r["notices"]))
    if r["night"] == "1":
        nights[key].append(float(r["notices"]))
        pooled_nights[r["plan"]].append(float(r["notices"]))

logged = defaultdict(int)
for r in rows("notice_log"):
    logged[(r["plan"], r["unit"])] += 1

problems = []
checks = 0


def same(what, ours, reference):
    global checks
    checks += 1
    if abs(float(ours) - reference) > 1e-9 * max(1.0, abs(reference)):
        problems.append(f"{what}: ours {ours}, reference {reference}")


def spread(values):
    x = np.array(values)
    return x.mean(), np.percentile(x, 90), x.max()


worst = defaultdict(float)
unit_notices = defaultdict(int)
for r in rows("plan_unit_summary"):
    key = (r["plan"], r["unit"])
    for prefix, values in (("per_unit_shift", shifts[key]), ("per_unit_night", nights[key])):
        mean, p90, top = spread(values)
        same(f"{key} {prefix}_mean", r[prefix + "_mean"], mean)
        same(f"{key} {prefix}_p90", r[prefix + "_p90"], p90)
        same(f"{key} {prefix}_max", r[prefix + "_max"], top)
    worst[r["plan"]] = max(worst[r["plan"]], spread(nights[key])[1])
    same(f"{key} notices", r["notices"], logged[key])
    unit_notices[r["plan"]] += int(r["notices"])

for r in rows("plan_summary"):
    plan = r["plan"]
    mean, p90, top = spread(pooled_nights[plan])
    same(f"{plan} per_unit_night_p90", r["per_unit_night_p90"], p90)
    same(f"{plan} worst_unit_night_p90", r["worst_unit_night_p90"], worst[plan])
    same(f"{plan} notices over units", r["notices"], unit_notices[plan])

if problems or checks == 0:
    print("\n".join(problems[:20]) or "nothing checked")
    sys.exit(1)
print(f"ok: {checks} checks")
