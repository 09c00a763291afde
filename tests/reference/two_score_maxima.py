"""Each stay's highest usable value of two scores, read straight from a replay
log's CSV files with Python's csv and zoneinfo (nothing of tocsin's reader), for
the paired AUC test of tocsin's score comparison against R's pROC.

A value is usable when admitted <= available_at < min(discharged, outcome_at)
(tocsin's README, "Replaying a log"); naive local times take the earlier
instant in a repeated hour (fold 0). Only stays with a usable value of both
scores are written, as a,b,label (label 1 = the outcome happened).

Usage: two_score_maxima.py ZONE ENCOUNTERS.csv SCORES_A.csv COLUMN_A SCORES_B.csv COLUMN_B OUT.csv
"""
import csv
import sys
from datetime import datetime, timezone
from zoneinfo import ZoneInfo


def instant(text, zone):
    if text.endswith("Z"):
        return datetime.strptime(text, "%Y-%m-%dT%H:%M:%SZ").replace(tzinfo=timezone.utc).timestamp()
    return datetime.strptime(text, "%Y-%m-%d %H:%M:%S").replace(tzinfo=zone, fold=0).timestamp()


def maxima(path, column, stays, zone):
    best = {}
    with open(path, newline="") as f:
        for row in csv.DictReader(f):
            if row[column] == "" or row["encounter"] not in stays:
                continue
            admitted, usable_until, _ = stays[row["encounter"]]
            at = instant(row["available_at"], zone)
            if admitted <= at < usable_until:
                value = float(row[column])
                best[row["encounter"]] = max(value, best.get(row["encounter"], value))
    return best


def main():
    zone_name, encounters, path_a, column_a, path_b, column_b, out = sys.argv[1:8]
    zone = ZoneInfo(zone_name)
    stays = {}
    with open(encounters, newline="") as f:
        for row in csv.DictReader(f):
            admitted = instant(row["admitted"], zone)
            discharged = instant(row["discharged"], zone)
            outcome = instant(row["outcome_at"], zone) if row["outcome_at"] else None
            until = min(discharged, outcome) if outcome is not None else discharged
            stays[row["encounter"]] = (admitted, until, outcome is not None)
    a = maxima(path_a, column_a, stays, zone)
    b = maxima(path_b, column_b, stays, zone)
    with open(out, "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["a", "b", "label"])
        for stay in sorted(set(a) & set(b)):
            w.writerow([repr(a[stay]), repr(b[stay]), 1 if stays[stay][2] else 0])


main()
