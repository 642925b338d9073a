#!/usr/bin/env python3
"""Upper bounds for a category found in no pull, for assess/nonefound_test.go.

Plain Python (exact integers), independent of the Go code:
  piece-equivalents n = floor(W / m), N = floor(M / m) for a bale of M kg;
  binomial (bale mass unknown):  p = 1 - (alpha/2) ** (1/n)
    (the exact bound for 0 of n; its one-sided 95 % form is the
    "rule of three", Hanley & Lippman-Hand, JAMA 249 (1983) 1743);
  hypergeometric (bale mass known): the largest D with
    C(N - D, n) / C(N, n) > alpha/2, found by counting D up one by one
    with exact integer arithmetic; p = D / N.
alpha = 1 - 0.90, so alpha/2 = 0.05 (the upper end of a two-sided 90 %
interval). Run: python3 testdata/ref/nonefound_bound.py
"""
import math
from fractions import Fraction

TAIL = Fraction(1, 20)  # alpha/2 at 90 %


def binomial(w, m):
    n = math.floor(w / m + 1e-9)
    return n, 1 - 0.05 ** (1 / n)


def hypergeometric(w, bale, m):
    n = math.floor(w / m + 1e-9)
    N = math.floor(bale / m + 1e-9)
    total = math.comb(N, n)
    D = 0
    while D + 1 <= N - n and Fraction(math.comb(N - D - 1, n), total) > TAIL:
        D += 1
    return n, N, D, D / N


cases = [
    ("pvc, 2 pulls, 43 kg, bale unknown", 43.0, 0.0, 0.035),
    ("pvc, 2 pulls, 43 kg, bale 548 kg", 43.0, 548.0, 0.035),
    ("glass, 43 kg, bale 548 kg", 43.0, 548.0, 0.25),
    ("glass, 400 kg, bale 548 kg", 400.0, 548.0, 0.25),
]
for name, w, bale, m in cases:
    if bale == 0:
        n, p = binomial(w, m)
        print(f"{name}: n = {n}, upper = {p:.17g}")
    else:
        n, N, D, p = hypergeometric(w, bale, m)
        print(f"{name}: n = {n}, N = {N}, D = {D}, upper = {p:.17g}")
