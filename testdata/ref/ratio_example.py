#!/usr/bin/env python3
"""Hand-worked ratio-estimator example for assess/estimate_test.go.

Cochran, Sampling Techniques, 3rd ed. (Wiley 1977), ch. 6, eq. 6.9:
  r = sum(c) / sum(w)
  Var(r) = (1 - f) / (n * wbar**2) * sum((c - r*w)**2) / (n - 1)
and the mean of per-pull fractions of ASTM D5231 for comparison.
Plain Python, no libraries, so every step can be followed by hand.
Run: python3 testdata/ref/ratio_example.py
"""
import math

# Four pulls: PVC kg and pull kg.
w = [100.0, 120.0, 80.0, 110.0]
c = [0.50, 0.90, 0.20, 0.60]
bale_kg = 820.0  # sampled 410 kg, f = 0.5

n = len(w)
f = sum(w) / bale_kg
r = sum(c) / sum(w)
wbar = sum(w) / n
ss = sum((ci - r * wi) ** 2 for ci, wi in zip(c, w))
var = (1 - f) / (n * wbar ** 2) * ss / (n - 1)
print(f"f        = {f:.17g}")
print(f"r        = {r:.17g}")
print(f"se_ratio = {math.sqrt(var):.17g}")

p = [ci / wi for ci, wi in zip(c, w)]
mean = sum(p) / n
s = math.sqrt(sum((pi - mean) ** 2 for pi in p) / (n - 1))
print(f"mean     = {mean:.17g}")
print(f"se_mean  = {s * math.sqrt((1 - f) / n):.17g}")
