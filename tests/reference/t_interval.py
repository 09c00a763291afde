"""Prints the 95% Student t interval of the mean of each line of numbers
(scipy.stats.t.interval), for tests/test_reference_comparison.cpp."""
import sys

import numpy as np
from scipy import stats

for line in open(sys.argv[1]):
    x = np.array([float(v) for v in line.split(",")])
    low, high = stats.t.interval(0.95, len(x) - 1, loc=x.mean(), scale=stats.sem(x))
    print(f"{x.mean():.12g},{low:.12g},{high:.12g}")
