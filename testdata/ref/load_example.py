#!/usr/bin/env python3
"""Hand-worked load audit for assess/load_test.go.

Two-stage sampling, bales of unequal mass drawn with equal probability,
pulls within them (Cochran, Sampling Techniques, 3rd ed., Wiley 1977,
ch. 10 and 11, the ratio-to-size estimator):

  per bale i (ratio estimator, ch. 6 eq. 6.9):
    r_i   = sum(c) / sum(w)
    v_i   = (1 - f2_i) / (m_i * wbar_i**2) * sum((c - r_i*w)**2) / (m_i - 1)
    f2_i  = sum(w) / M_i
  load:
    y_R   = sum(M_i * r_i) / sum(M_i)
    v     = (1 - f1) / (n * Mbar**2) * sum(M_i**2 * (r_i - y_R)**2) / (n - 1)
          + f1 / (n**2 * Mbar**2) * sum(M_i**2 * v_i)
    f1 = n / N, Mbar = sum(M_i) / n
  90 % interval: y_R +- t(0.95; n - 1) * sqrt(v), t(0.95; 2) = 2.920 from
  the NIST/SEMATECH e-Handbook table (section 1.3.6.7.2).

A second case gives bale C a single pull: its v_i then uses the pooled
per-pull variance of the other bales, s2 = sum((m_k - 1) * s_k**2) /
sum(m_k - 1), v_C = (1 - f2_C) * s2 / m_C.
Plain Python, every step printable. Run: python3 testdata/ref/load_example.py
"""
import math

N = 24  # bales in the load
# bale: (mass kg, [(pull kg, pvc kg), ...]); the rest of each pull is clear PET
bales = {
    "A": (540.0, [(20.0, 0.10), (22.0, 0.05), (19.0, 0.12)]),
    "B": (512.0, [(21.0, 0.30), (20.0, 0.22)]),
    "C": (575.0, [(23.0, 0.02), (18.0, 0.04), (20.0, 0.00)]),
}


def bale_stats(mass, pulls):
    w = [p[0] for p in pulls]
    c = [p[1] for p in pulls]
    m = len(w)
    r = sum(c) / sum(w)
    f2 = sum(w) / mass
    wbar = sum(w) / m
    s2 = sum((ci - r * wi) ** 2 for ci, wi in zip(c, w)) / (m - 1) / wbar ** 2 if m > 1 else None
    v = (1 - f2) * s2 / m if m > 1 else None
    return r, v, s2, m, f2


def load(bales, pooled_for=None):
    stats = {k: bale_stats(*b) for k, b in bales.items()}
    if pooled_for:
        num = sum((s[3] - 1) * s[2] for k, s in stats.items() if k != pooled_for)
        den = sum(s[3] - 1 for k, s in stats.items() if k != pooled_for)
        r, _, _, m, f2 = stats[pooled_for]
        stats[pooled_for] = (r, (1 - f2) * (num / den) / m, None, m, f2)
    n = len(bales)
    M = {k: b[0] for k, b in bales.items()}
    Mbar = sum(M.values()) / n
    f1 = n / N
    yR = sum(M[k] * stats[k][0] for k in bales) / sum(M.values())
    between = (1 - f1) / (n * Mbar ** 2) * sum(M[k] ** 2 * (stats[k][0] - yR) ** 2 for k in bales) / (n - 1)
    within = f1 / (n ** 2 * Mbar ** 2) * sum(M[k] ** 2 * stats[k][1] for k in bales)
    return yR, math.sqrt(between + within), between, within


yR, se, b, w = load(bales)
print(f"pvc share  = {yR:.17g}")
print(f"se         = {se:.17g}   (between {b:.6g}, within {w:.6g})")
print(f"90 % half  = {2.920 * se:.6g}  (t = 2.920)")

one = dict(bales)
one["C"] = (575.0, [(23.0, 0.02)])
yR1, se1, b1, w1 = load(one, pooled_for="C")
print(f"C with one pull: pvc share = {yR1:.17g}, se = {se1:.17g}")
