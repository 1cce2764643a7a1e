#!/usr/bin/python3
"""Two-sided standard normal quantiles z with P(|Z| <= z) = c, from Python's
standard library (statistics.NormalDist.inv_cdf, Wichura's AS 241 algorithm).
The check values of test/engine/normal-quantile.test.ts; run it to see them:

    /usr/bin/python3 test/reference/normal-quantiles.py
"""
from statistics import NormalDist

for confidence in (0.68, 0.8, 0.9, 0.95):
    print(confidence, repr(NormalDist().inv_cdf((1 + confidence) / 2)))
