#!/usr/bin/python3
"""Reference figures for tocsin's evaluation tests, from scikit-learn and statsmodels.

Usage: auc_check.py DATA.csv THRESHOLD...
DATA.csv has a header and the columns score,label,probability.
Prints one "key value..." line per figure, with 17 significant digits.
"""
import sys

import numpy as np
import statsmodels.api as sm
from sklearn.metrics import roc_auc_score
from statsmodels.stats.proportion import proportion_confint


def show(key, *values):
    print(key, " ".join(repr(float(v)) for v in values))


def main():
    data = np.genfromtxt(sys.argv[1], delimiter=",", names=True)
    score = data["score"]
    label = data["label"].astype(int)
    probability = data["probability"]

    show("auc", roc_auc_score(label, score))

    for text in sys.argv[2:]:
        t = float(text)
        flagged = score >= t
        tp = int(np.sum(flagged & (label == 1)))
        fp = int(np.sum(flagged & (label == 0)))
        fn = int(np.sum(~flagged & (label == 1)))
        tn = int(np.sum(~flagged & (label == 0)))
        show("counts " + text, tp, fp, fn, tn)
        for name, k, n in (("sensitivity", tp, tp + fn), ("specificity", tn, tn + fp), ("ppv", tp, tp + fp),
                           ("npv", tn, tn + fn), ("share_flagged", tp + fp, len(score))):
            if n > 0:
                lower, upper = proportion_confint(k, n, alpha=0.05, method="wilson")
                show("wilson " + name + " " + text, lower, upper)

    x = np.log(probability / (1.0 - probability))
    fit = sm.GLM(label, sm.add_constant(x), family=sm.families.Binomial()).fit(tol=1e-13, maxiter=200)
    show("recalibration", fit.params[0], fit.params[1], fit.bse[0], fit.bse[1])
    offset = sm.GLM(label, np.ones((len(x), 1)), family=sm.families.Binomial(), offset=x).fit(tol=1e-13, maxiter=200)
    show("calibration_in_the_large", offset.params[0], offset.bse[0])


if __name__ == "__main__":
    main()
