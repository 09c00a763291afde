#!/usr/bin/env python3
"""Writes the invented silent-mode log of the demo scenario.

Fernhollow District Hospital and its wards are invented; every encounter and
score here is random. The log spans four weeks across the end of daylight
saving time in the scenario's zone, so the demo shows how a repeated local
hour is handled. Run from this folder: python3 make_demo_log.py
"""
import csv
import datetime as dt
import math
import random
from zoneinfo import ZoneInfo

ZONE = ZoneInfo("America/Chicago")
START = dt.datetime(2026, 10, 19, 7, 0, tzinfo=ZONE)
END = dt.datetime(2026, 11, 16, 7, 0, tzinfo=ZONE)
UNITS = {"4 North medicine": 26, "5 South surgery": 22, "6 East older adults": 20}
OUTCOME_RATE = 0.07  # share of stays ending in an unplanned ICU transfer (invented)

rng = random.Random(20261201)
encounters, scores = [], []
course = {}  # each stay's own level and the start of its rise, for the bedside score
serial = 0
for unit, beds in UNITS.items():
    bed_free = [START - dt.timedelta(hours=rng.uniform(0, 72)) for _ in range(beds)]
    for bed in range(beds):
        t = bed_free[bed]
        while t < END:
            serial += 1
            eid = f"FH-{serial:05d}"
            stay_h = min(24 * 21, max(6.0, rng.lognormvariate(math.log(80), 0.6)))
            admitted = t
            discharged = t + dt.timedelta(hours=stay_h)
            outcome = None
            if rng.random() < OUTCOME_RATE:
                outcome = admitted + dt.timedelta(hours=stay_h * rng.uniform(0.2, 1.0))
                discharged = outcome + dt.timedelta(hours=rng.uniform(0.5, 3))
            base = rng.gauss(28, 9)
            drift_start = outcome - dt.timedelta(hours=rng.uniform(4, 36)) if outcome else None
            s = admitted + dt.timedelta(minutes=rng.uniform(10, 60))
            while s < discharged:
                value = base + rng.gauss(0, 8)
                if outcome and s > drift_start:
                    hours_in = (s - drift_start).total_seconds() / 3600
                    span = (outcome - drift_start).total_seconds() / 3600
                    value += 42 * min(1.0, hours_in / max(span, 1))
                value = max(0, min(100, value))
                latency = dt.timedelta(minutes=rng.choice([2, 3, 5, 8, 15]))
                if rng.random() > 0.03:  # a few scores are never computed
                    scores.append((eid, s, s + latency, round(value, 1)))
                s += dt.timedelta(minutes=rng.gauss(60, 6))
            encounters.append((eid, unit, admitted, discharged, outcome))
            course[eid] = (base, drift_start)
            t = discharged + dt.timedelta(hours=rng.expovariate(1 / 10))


# Each stay's age band, from a stream of its own so the stays and scores above
# stay as they were. The older adults' ward takes older patients; the band of
# about 1 stay in 50 was never written down (an empty field: "not recorded").
AGE_BANDS = ["18-64", "65-79", "80+"]
AGE_SHARES = {"4 North medicine": [0.5, 0.32, 0.16], "5 South surgery": [0.62, 0.28, 0.08],
              "6 East older adults": [0.12, 0.42, 0.44]}
group_rng = random.Random(20261205)


def age_band(unit):
    u = group_rng.random()
    for band, share in zip(AGE_BANDS, AGE_SHARES[unit]):
        if u < share:
            return band
        u -= share
    return ""


# An invented bedside score already in use (0 to 20 points, charted at each
# observation round, about every 4 hours), from a stream of its own so the
# stays and the deterioration score above stay as they were. It shares each
# patient's own level with the deterioration score and climbs before an
# outcome too, but is coarser and noisier: the candidate should beat it, and
# the comparison shows by how much.
bedside_rng = random.Random(20261206)


def bedside_rows(eid, admitted, discharged, outcome):
    base, drift_start = course[eid]
    rows = []
    s = admitted + dt.timedelta(minutes=bedside_rng.uniform(20, 240))
    while s < discharged:
        value = 1.5 + 0.12 * (base - 28) + bedside_rng.gauss(0, 1.6)
        if outcome and s > drift_start:
            hours_in = (s - drift_start).total_seconds() / 3600
            span = (outcome - drift_start).total_seconds() / 3600
            value += 4.5 * min(1.0, hours_in / max(span, 1))
        if bedside_rng.random() > 0.05:  # a round now and then is not charted
            rows.append((eid, s, s + dt.timedelta(minutes=10), max(0, min(20, round(value)))))
        s += dt.timedelta(minutes=bedside_rng.gauss(240, 30))
    return rows


def naive_local(x):
    return x.astimezone(ZONE).strftime("%Y-%m-%d %H:%M:%S")


def utc(x):
    return x.astimezone(dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")


with open("encounters.csv", "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["encounter", "unit", "admitted", "discharged", "outcome_at", "age_band"])
    for eid, unit, a, d, o in sorted(encounters):
        w.writerow([eid, unit, naive_local(a), naive_local(d), naive_local(o) if o else "", age_band(unit)])
with open("scores.csv", "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["encounter", "scored_at", "available_at", "score"])
    for eid, s, a, v in sorted(scores):
        w.writerow([eid, utc(s), utc(a), v])
bedside = []
for eid, unit, a, d, o in sorted(encounters):
    bedside += bedside_rows(eid, a, d, o)
with open("bedside_scores.csv", "w", newline="") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["encounter", "scored_at", "available_at", "bedside"])
    for eid, s, a, v in bedside:
        w.writerow([eid, utc(s), utc(a), v])
print(len(encounters), "encounters,", len(scores), "scores,", len(bedside), "bedside scores")
