"""Spearman's rank correlation of the pairs in a CSV file (header x,y), by
scipy.stats.spearmanr (midranks for ties), for tocsin's own
spearman_rank_correlation (models/discrimination.cpp).

Usage: spearman_check.py PAIRS.csv   prints "spearman <rho>"
"""
import csv
import sys

from scipy.stats import spearmanr

with open(sys.argv[1], newline="") as f:
    rows = list(csv.DictReader(f))
x = [float(r["x"]) for r in rows]
y = [float(r["y"]) for r in rows]
print("spearman %.17g" % spearmanr(x, y).correlation)
