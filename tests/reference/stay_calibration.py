#!/usr/bin/python3
"""Reference figures for tocsin's stay-level calibration, from statsmodels.

Usage: stay_calibration.py SCORES.csv INTERCEPT SLOPE
SCORES.csv has a header and the columns encounter,available_hours,score,outcome_hours
(outcome_hours empty for a stay without the outcome), one row per recorded
score. The probability of a score is 1 / (1 + exp(-(INTERCEPT + SLOPE * score))).

Done independently of tocsin: a score counts when it is available before time
zero (cases); each stay's highest probability is compared with whether the
stay had the outcome. Prints one "key value..." line per figure.
"""
import csv
import math
import sys

import numpy as np
import statsmodels.api as sm


def show(key, *values):
    print(key, " ".join(repr(float(v)) for v in values))


def main():
    a, b = float(sys.argv[2]), float(sys.argv[3])
    highest, case = {}, {}
    with open(sys.argv[1], newline="") as f:
        for row in csv.DictReader(f):
            e = row["encounter"]
            outcome = row["outcome_hours"]
            case[e] = outcome != ""
            if outcome != "" and float(row["available_hours"]) >= float(outcome):
                continue
            p = 1.0 / (1.0 + math.exp(-(a + b * float(row["score"]))))
            highest[e] = max(highest.get(e, 0.0), p)
    stays = sorted(highest)
    p = np.array([highest[e] for e in stays])
    y = np.array([1.0 if case[e] else 0.0 for e in stays])
    show("oe", len(stays), y.sum(), p.sum())

    lp = np.log(p / (1.0 - p))
    # Cox (1958): logit P(y) = a + b logit(p).
    fit = sm.GLM(y, sm.add_constant(lp), family=sm.families.Binomial()).fit(tol=1e-13)
    show("recalibration", fit.params[0], fit.params[1], fit.bse[0], fit.bse[1])
    # Calibration-in-the-large: the intercept alone, logit(p) as offset.
    citl = sm.GLM(y, np.ones_like(y), family=sm.families.Binomial(), offset=lp).fit(tol=1e-13)
    show("calibration_in_the_large", citl.params[0], citl.bse[0])


if __name__ == "__main__":
    main()
