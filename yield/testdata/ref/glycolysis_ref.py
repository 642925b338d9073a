#!/usr/bin/env python3
"""Independent reference values for the glycolysis tests of package yield.

Computes, from standard atomic weights and KOH = 56.106 g/mol, the
hydroxyl values of PET:DEG charges by OH conservation, Flory's
most-probable distribution for PET:DEG 1:1 w/w, the equilibrium monomer
share for PET:EG 1:3 w/w and the blend / isocyanate worked example.
Run: python3 yield/testdata/ref/glycolysis_ref.py
"""
C, H, N, O, Zn, Cl = 12.011, 1.008, 14.007, 15.999, 65.38, 35.45
KOH = 56.106 * 1000  # mg/mol

pet = 10 * C + 8 * H + 4 * O
eg = 2 * C + 6 * H + 2 * O
deg = 4 * C + 10 * H + 3 * O
tp = pet - eg  # C8H2O2, what one terephthalate unit adds

print(f"PET unit {pet:.3f}  EG {eg:.3f}  DEG {deg:.3f}")
for ratio in (0.5, 1.0, 2.0):
    n = ratio * 1000 / deg
    print(f"PET:DEG 1:{ratio}: OHV {KOH * 2 * n / (1000 * (1 + ratio)):.2f} mg KOH/g")

# Flory, PET:DEG 1:1 w/w
nt = 1000 / pet
ng = nt + 1000 / deg
p = nt / ng
print(f"PET:DEG 1:1: p = {p:.4f}; n0 {100*(1-p):.2f} %, n1 {100*(1-p)*p:.2f} %, n2 {100*(1-p)*p*p:.2f} %")
mg = (2000 - nt * tp) / ng  # mean glycol unit mass
mn = 2000 / (ng - nt)
w = [(1 - p) * p**k * (k * tp + (k + 1) * mg) / mn for k in range(400)]
print(f"  Mn {mn:.3f} g/mol; sum w_k {sum(w):.12f}; free glycol {100*w[0]:.2f} wt %, monomer {100*w[1]:.2f} wt %")

# PET:EG 1:3 w/w: share of terephthalate units in monomer = (1 - p)^2
p = nt / (nt + 3000 / eg)
print(f"PET:EG 1:3: p = {p:.4f}; monomer share of T units {(1-p)**2:.4f}")
p = nt / (nt + 10000 / eg)
print(f"PET:EG 1:10: p = {p:.4f}; T units in monomer+dimer {(1-p)**2 + 2*(1-p)**2*p:.4f}")

# Zinc acetate 0.5 wt % on 1 kg PET with DEG 1:1
zn_ac = Zn + 2 * (2 * C + 3 * H + 2 * O)
print(f"Zn in product: {5 * Zn / zn_ac / 2005 * 1e6:.1f} ppm")

# Isocyanate: TDI C9H6N2O2, MDI C15H10N2O2
nco = N + C + O
tdi = 9 * C + 6 * H + 2 * N + 2 * O
mdi = 15 * C + 10 * H + 2 * N + 2 * O
print(f"TDI {tdi:.2f} NCO {200*nco/tdi:.2f} %; MDI {mdi:.2f} NCO {200*nco/mdi:.2f} %")
# blend: 100 kg OHV 350 + 100 kg OHV 164, 2 kg water, MDI, index 110
oh = (100e3 * 350 + 100e3 * 164) / KOH
water = 2 * 2000 / (2 * H + O)
ew = 100 * nco / (200 * nco / mdi)
print(f"blend OHV {KOH*oh/200e3:.2f}; MDI kg at index 110: {1.10*(oh+water)*ew/1000:.3f}")
print(f"PVC: HCl per g PVC {(H+Cl)/(2*C+3*H+Cl):.4f}")

# ExampleMixBlend: glycolysate OHV 527.4, 20 kg, PET share 0.499, castor
# scaled to 12 % recycled PET, 1.5 kg water, TDI at index 105.
pet_kg = 20 * 0.499
castor = pet_kg / 0.12 - 20
oh = (20e3 * 527.4 + castor * 1e3 * 164) / KOH
iso = 1.05 * (oh + 2 * 1500 / (2 * H + O)) * tdi / 2 / 1000
print(f"castor {castor:.2f} kg; blend OHV {KOH*oh/((20+castor)*1e3):.1f}; TDI {iso:.2f} kg; "
      f"PET in foam {100*pet_kg/(20+castor+1.5+iso):.1f} %")
