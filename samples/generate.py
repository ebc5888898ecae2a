#!/usr/bin/python3
"""Generates the INVENTED demonstration study in samples/.

Everything written here is invented: the Quorvane field, well QV-14 and its
plugs do not exist, and the "measurements" are synthetic values from the
crack-closure model K(P) = K_inf - (K_inf - K_0) exp(-P / P_close) (and the
same form for the shear modulus of the dynamic plugs) plus seeded Gaussian
noise. Parameters sit in typical laboratory ranges (dry sandstone K_inf
5-30 GPa, P* 3-30 MPa; from memory) and the noise levels follow typical
laboratory uncertainties (static K 3-10 %, Vp 0.5-1 %, Vs 1-2 %; from memory).

Run from anywhere with:  /usr/bin/python3 samples/generate.py [OUTPUT_DIR]
Outputs (overwritten): samples/invented-field-study.yaml, samples/data/*.csv,
samples/data/QV-14-density.las
(or the same names under OUTPUT_DIR).
Same seed, same files: the outputs are committed and must not be edited by hand.
"""
import os
import sys

import numpy as np

SEED = 20261201
# Output folder: this script's folder, or the folder given as the only
# argument (used by the test that checks the committed files are reproducible).
HERE = os.path.abspath(sys.argv[1]) if len(sys.argv) > 1 else os.path.dirname(os.path.abspath(__file__))
DATA = os.path.join(HERE, "data")
PSI = 6894.757293168361e-6  # MPa per psi (computed: 1 lbf = 4.4482216152605 N, 1 in = 0.0254 m, both exact)
FT = 0.3048                 # m per ft

rng = np.random.default_rng(SEED)


def closure(p, k_inf, k_0, p_close):
    """K(P) in GPa for P in MPa (exponential crack-closure form)."""
    p = np.asarray(p, dtype=float)
    return k_inf - (k_inf - k_0) * np.exp(-p / p_close)


def noisy(values, rel):
    return values * (1.0 + rel * rng.standard_normal(len(values)))


def velocities(k_gpa, mu_gpa, rho_gcc):
    """Vp, Vs in km/s from K, mu in GPa and rho in g/cc (g/cc x (km/s)^2 = GPa)."""
    vs = np.sqrt(mu_gpa / rho_gcc)
    vp = np.sqrt((k_gpa + 4.0 / 3.0 * mu_gpa) / rho_gcc)
    return vp, vs


def fmt(x, digits):
    return f"{x:.{digits}f}"


def write_csv(name, header, rows, comment):
    os.makedirs(DATA, exist_ok=True)
    with open(os.path.join(DATA, name), "w", newline="\n") as f:
        for line in comment:
            f.write(f"# {line}\n")
        f.write(",".join(header) + "\n")
        for r in rows:
            f.write(",".join(r) + "\n")


def inline_rows(rows, indent=8):
    pad = " " * indent
    return "".join(f"{pad}- [{', '.join(r)}]\n" for r in rows)


# ---------------------------------------------------------------- plug 2231V
# Clean sandstone, static, first loading: CSV in MPa with a constant 5 MPa
# pore pressure, 4 % noise and exactly one outlier (a gauge slip at step 6,
# 35 % low). The plug is fitted with a Cauchy loss to down-weight that point.
p_2231 = np.array([2, 4, 6, 8, 10, 13, 16, 20, 25, 30, 40, 50, 60], dtype=float)
k_2231 = noisy(closure(p_2231, 17.5, 6.0, 9.0), 0.04)
OUTLIER_INDEX = 5
k_2231[OUTLIER_INDEX] *= 0.65
write_csv(
    "QV14-2231V-loading.csv",
    ["P_c", "P_p", "K"],
    [[fmt(p + 5.0, 1), "5.0", fmt(k, 3)] for p, k in zip(p_2231, k_2231)],
    ["INVENTED DATA (samples/generate.py) - Quorvane field, well QV-14, plug QV14-2231V",
     "static drained test, first loading; P_c and P_p in MPa, K (tangent) in GPa",
     f"row {OUTLIER_INDEX + 1} is a deliberate outlier (strain-gauge slip)"],
)

# Same plug, unloading from 60 MPa: stiffer than loading at equal P
# (stress-release cracks stay partly closed). Inline rows in descending
# pressure order, with an absolute sigma_K column (3 % of the value).
p_2231u = np.array([60, 50, 40, 30, 24, 18, 13, 9, 6, 3], dtype=float)
k_2231u_true = closure(p_2231u, 18.5, 11.0, 7.0)
k_2231u = noisy(k_2231u_true, 0.03)
rows_2231u = [[fmt(p + 5.0, 1), "5.0", fmt(k, 3), fmt(0.03 * kt, 3)]
              for p, k, kt in zip(p_2231u, k_2231u, k_2231u_true)]

# Same plug, ultrasonic (dry), loading: differential pressure column,
# velocities in km/s, 0.8 % Vp and 1.5 % Vs noise.
p_2231d = np.array([2, 4, 6, 8, 11, 15, 20, 27, 35, 45, 60], dtype=float)
vp_2231d, vs_2231d = velocities(closure(p_2231d, 22.0, 9.0, 8.0), closure(p_2231d, 16.0, 8.0, 8.0), 2.09)
vp_2231d, vs_2231d = noisy(vp_2231d, 0.008), noisy(vs_2231d, 0.015)
rows_2231d = [[fmt(p, 0), fmt(a, 3), fmt(b, 3)] for p, a, b in zip(p_2231d, vp_2231d, vs_2231d)]

# ---------------------------------------------------------------- plug 2318H
# Shaly sandstone, horizontal plug, static; the lab sheet is in field units:
# P_c and P_p in psi (P_p held at 1000 psi), K in ksi. 5 % noise.
p_2318 = np.array([2, 4, 7, 10, 14, 19, 25, 32, 40, 50], dtype=float)
k_2318 = noisy(closure(p_2318, 13.0, 4.5, 16.0), 0.05)
rows_2318 = []
for p, k in zip(p_2318, k_2318):
    pc_psi = (p + 1000 * PSI) / PSI
    rows_2318.append([fmt(pc_psi, 0), "1000", fmt(k * 1e3 / (PSI * 1e3), 1)])  # GPa -> ksi
write_csv(
    "QV14-2318H.csv",
    ['"P_c [psi]"', '"P_p [psi]"', '"K [ksi]"'],
    rows_2318,
    ["INVENTED DATA (samples/generate.py) - Quorvane field, well QV-14, plug QV14-2318H",
     "static drained test, first loading; field units as logged by the lab sheet"],
)

# ---------------------------------------------------------------- plug 2409V
# Limestone, static, pressures in bar, K in GPa, no stated uncertainties
# (unweighted fit). 3 % noise.
p_2409 = np.array([20, 50, 80, 120, 160, 220, 300, 420, 600], dtype=float)  # bar
k_2409 = noisy(closure(p_2409 / 10.0, 32.0, 22.0, 12.0), 0.03)
rows_2409 = [[fmt(p, 0), fmt(k, 2)] for p, k in zip(p_2409, k_2409)]

# ---------------------------------------------------------------- plug 2544V
# Shale, static, slow drainage (long hold per step); differential pressure in
# MPa with a relative sigma column. 4 % noise.
p_2544 = np.array([5, 8, 12, 17, 24, 32, 45, 60], dtype=float)
k_2544 = noisy(closure(p_2544, 11.0, 6.5, 22.0), 0.04)
write_csv(
    "QV14-2544V.csv",
    ["P", "K", "sigma_K"],
    [[fmt(p, 0), fmt(k, 3), "4"] for p, k in zip(p_2544, k_2544)],
    ["INVENTED DATA (samples/generate.py) - Quorvane field, well QV-14, plug QV14-2544V",
     "shale, static drained test, 24 h hold per step; P in MPa, K in GPa, sigma_K in % of K"],
)

# ---------------------------------------------------------------- plug 2320H
# Shaly sandstone, horizontal, ultrasonic (humidity-controlled dry), P_c and
# P_p in MPa with an effective-pressure coefficient n = 0.85 for velocities,
# velocities in ft/s, density per step in kg/m3. 1 % Vp, 2 % Vs noise.
p_2320 = np.array([3, 5, 8, 11, 15, 20, 26, 33, 42, 55], dtype=float)  # differential, MPa
pp_2320 = 8.0
n_2320 = 0.85
vp_2320, vs_2320 = velocities(closure(p_2320, 18.0, 7.0, 14.0), closure(p_2320, 11.0, 5.5, 12.0), 2.26)
vp_2320, vs_2320 = noisy(vp_2320, 0.01), noisy(vs_2320, 0.02)
rho_2320 = 2260.0 + 4.0 * p_2320 / 55.0  # slight compaction over the test
write_csv(
    "QV14-2320H-ultrasonic.csv",
    ["P_c", "P_p", "Vp", "Vs", "rho"],
    [[fmt(p + n_2320 * pp_2320, 2), fmt(pp_2320, 1), fmt(a * 1e3 / FT, 0), fmt(b * 1e3 / FT, 0), fmt(r, 1)]
     for p, a, b, r in zip(p_2320, vp_2320, vs_2320, rho_2320)],
    ["INVENTED DATA (samples/generate.py) - Quorvane field, well QV-14, plug QV14-2320H",
     "ultrasonic, humidity-controlled dry, loading; P_c, P_p in MPa, Vp and Vs in ft/s, rho in kg/m3"],
)

# ---------------------------------------------------------------- plug 2551H
# Shale, horizontal, dry ultrasonic; confining pressure only, with a constant
# pore pressure of 2 MPa declared in the study; Vp and Vs in km/s.
# 0.6 % Vp and 1.2 % Vs noise.
p_2551 = np.array([3, 6, 10, 15, 21, 28, 36, 46, 58], dtype=float)  # differential, MPa
vp_2551, vs_2551 = velocities(closure(p_2551, 16.0, 9.0, 20.0), closure(p_2551, 7.0, 4.5, 18.0), 2.52)
vp_2551, vs_2551 = noisy(vp_2551, 0.006), noisy(vs_2551, 0.012)
rows_2551 = [[fmt(p + 2.0, 0), fmt(a, 3), fmt(b, 3)] for p, a, b in zip(p_2551, vp_2551, vs_2551)]

# ------------------------------------------------ grain moduli and VTI (invented)
# QV14-2318H (horizontal shaly sandstone): drained static VTI stiffnesses at
# three differential pressures, invented to be consistent with its K curve
# (isotropic-equivalent K = (2 C11 + C33 + 2 C12 + 4 C13)/9 close to the fit).
vti_2318 = [  # P MPa, C11, C12, C13, C33 GPa
    [10, 19.0, 5.2, 4.6, 14.8],
    [25, 22.4, 6.1, 5.5, 18.2],
    [40, 23.6, 6.5, 5.9, 19.6],
]
vti_rows_2318 = "".join(
    f"        - [{p}, {a:.1f}, {b:.1f}, {c:.1f}, {d:.1f}]\n" for p, a, b, c, d in vti_2318)

# ---------------------------------------------------------------- the study
study = f"""# =====================================================================
#  INVENTED DEMONSTRATION STUDY - NOT REAL DATA
#  The Quorvane field, well QV-14 and every plug below are invented. All
#  values were generated by samples/generate.py (seed {SEED}) from
#  crack-closure curves plus Gaussian noise; regenerate with
#      /usr/bin/python3 samples/generate.py
#  and do not edit this file by hand.
# =====================================================================
version: 1
# Declares the data invented: every output carries the invented-data notice.
invented: true
name: Quorvane field, well QV-14 - plug program (invented)
description: >-
  Invented demonstration: six plugs of well QV-14 across clean sandstone,
  shaly sandstone, limestone and shale; static drained and dry ultrasonic
  tests, loading and unloading branches. Static and dynamic data are kept
  as separate samples and never pooled.
defaults:
  fit:
    multistart: 8
    seed: {SEED}
  models: [exp-modulus, exp-compliance]
  # Bands of K and alpha = 1 - K/K_s: delta method by default, on 61 points
  # spanning the data (widened by 10 %, so the ends are flagged as extrapolated).
  bands:
    confidence: 0.95
    methods: [delta]
    seed: {SEED}
    grid: {{count: 61}}

# Model ranking: AICc weights per sample, nested F tests where the nesting is
# regular, a refit without the highest-pressure step of each model to see how
# it extrapolates, and win counts per lithology.
comparison:
  criterion: aicc
  group_by: [lithology]
  cross_validation: {{high_pressure_holdout: true, holdout_points: 1}}

# A model of the study's own (illustrative): a stretched-exponential closure
# law, fitted beside the built-ins to the limestone plug.
user_models:
  - id: stretched-exp
    name: stretched exponential closure (illustrative)
    formula: K = K_inf - (K_inf - K_0) * exp(-sqrt(P / P_close))
    closure_parameter: P_close
    parameters:
      K_inf: {{unit: GPa, start: 40, lower: 0}}
      K_0: {{unit: GPa, start: 20, lower: 0}}
      P_close: {{unit: MPa, start: 10, lower: 0.01, transform: log}}

# A mineral added to the built-in table (values for the demonstration).
minerals:
  dry_clay_aggregate:
    bulk: 9 GPa
    sigma_bulk: 3 GPa
    shear: 4 GPa
    sigma_shear: 2 GPa
    density: 2.60 g/cc
    clay: true
    source: >-
      bulk modulus: dry clay aggregates measure about 6-12 GPa (Vanorio,
      Prasad & Nur 2003, Elastic properties of dry clay mineral aggregates,
      suspensions and sandstones, Geophysical Journal International 155);
      shear modulus and density invented for this demonstration
    checked: from memory

# One grain modulus shared by the three samples of plug QV14-2231 (their alpha
# errors are correlated through it). Invented XRD weight fractions.
grain_moduli:
  qv14-2231:
    mineralogy:
      basis: weight
      fractions: {{quartz: 0.90, feldspar: 0.07, mixed_clay: 0.03}}

samples:
  # Clean sandstone, static, first loading. Row {OUTLIER_INDEX + 1} of the CSV is an
  # obvious outlier (gauge slip, 35 % low), so this plug uses a Cauchy loss.
  - id: QV14-2231V
    plug: QV14-2231V
    lithology: clean sandstone
    porosity: 21 %
    bulk_density: 2.09 g/cc
    orientation: vertical
    measurement: static
    branch: loading
    cycle: 1
    uncertainty:
      K: 4 %
      calibrated: false
    data:
      columns: [P_c MPa, P_p MPa, K GPa]
      file: data/QV14-2231V-loading.csv
    models:
      - exp-modulus
      - exp-compliance
      - id: linear-exp
        parameters:
          B: {{upper: 0.1 GPa/MPa}}
    fit:
      loss: cauchy
      loss_scale: 2
    grain_modulus: qv14-2231

  # The same plug unloading from 60 MPa: stiffer than loading at equal P.
  - id: QV14-2231V-unload
    plug: QV14-2231V
    lithology: clean sandstone
    porosity: 21 %
    bulk_density: 2.09 g/cc
    orientation: vertical
    measurement: static
    branch: unloading
    cycle: 1
    uncertainty:
      calibrated: true
    data:
      columns: [P_c MPa, P_p MPa, K GPa, sigma_K GPa]
      rows:
{inline_rows(rows_2231u)}    models: [exp-modulus, exp-compliance]
    grain_modulus: qv14-2231
    # Brine-saturated equivalent: M, K_u and Skempton B (brine modulus invented).
    fluid_modulus: {{K_f: 2.25 GPa, sigma: 0.05 GPa, source: "brine, invented for the demonstration"}}
    bands:
      methods: [delta, monte-carlo, bootstrap]
      monte_carlo_draws: 4000
      bootstrap_replicates: 1000
      bootstrap_kind: residual

  # The same plug, dry ultrasonic velocities on loading.
  - id: QV14-2231V-dyn
    plug: QV14-2231V
    lithology: clean sandstone
    porosity: 21 %
    bulk_density: 2.09 g/cc
    orientation: vertical
    measurement: dynamic
    branch: loading
    cycle: 1
    uncertainty:
      Vp: 0.8 %
      Vs: 1.5 %
      rho: 0.01 g/cc
      calibrated: true
    data:
      columns: [P MPa, Vp km/s, Vs km/s]
      rows:
{inline_rows(rows_2231d)}    models:
      - exp-modulus
      - exp-compliance
      - id: linear-exp
        parameters:
          B: {{upper: 0.1 GPa/MPa}}
    # Dynamic K: alpha from it is indicative only (the outputs say so).
    grain_modulus: qv14-2231

  # Shaly sandstone, horizontal plug; lab sheet in psi and ksi.
  - id: QV14-2318H
    lithology: shaly sandstone
    porosity: 0.16
    bulk_density: 2.26 g/cc
    orientation: horizontal
    measurement: static
    branch: loading
    cycle: 1
    uncertainty:
      K: 5 %
      calibrated: false
    data:
      columns: [P_c psi, P_p psi, K ksi]
      file: data/QV14-2318H.csv
    models: [exp-modulus, exp-compliance, linear]
    # 30 % clay by weight: the mineralogy K_s is visibly less certain.
    grain_modulus:
      mineralogy:
        basis: weight
        fractions: {{quartz: 0.62, feldspar: 0.08, gulf_clay: 0.30}}
    bands:
      methods: [delta, monte-carlo, bootstrap]
      monte_carlo_draws: 4000
      bootstrap_replicates: 1000
      bootstrap_kind: wild
    vti_stiffness:
      columns: [P MPa, C11 GPa, C12 GPa, C13 GPa, C33 GPa]
      rows:
{vti_rows_2318}
  # Limestone; pressures logged in bar; no stated uncertainties (unweighted).
  - id: QV14-2409V
    lithology: limestone
    porosity: 0.11
    bulk_density: 2430 kg/m3
    orientation: vertical
    measurement: static
    branch: loading
    cycle: 1
    data:
      columns: [P bar, K GPa]
      rows:
{inline_rows(rows_2409)}    models:
      - exp-modulus
      - linear
      - id: power-ref
        parameters:
          P_ref: {{fixed: 15 MPa}}
      - stretched-exp
    grain_modulus:
      measured:
        K_s: 71.5 GPa
        sigma: 1.8 GPa
        source: unjacketed test on a twin plug (invented for the demonstration)

  # Shale: slow drainage, long holds; relative sigma column.
  - id: QV14-2544V
    lithology: shale
    porosity: 7 %
    bulk_density: 2.52 g/cc
    orientation: vertical
    measurement: static
    branch: loading
    cycle: 1
    uncertainty:
      calibrated: false
    data:
      columns: [P MPa, K GPa, sigma_K %]
      file: data/QV14-2544V.csv
    models:
      - id: exp-modulus
        parameters:
          P_close: {{upper: 200 MPa}}
      - linear
      - power-offset
    # Clay-rich: the clay modulus is poorly known, so K_s is wide.
    grain_modulus:
      mineralogy:
        basis: weight
        fractions: {{quartz: 0.30, calcite: 0.12, dry_clay_aggregate: 0.55, pyrite: 0.03}}

  # Shaly sandstone, horizontal, dry ultrasonic; velocities in ft/s,
  # effective-pressure coefficient 0.85 for the velocities.
  - id: QV14-2320H-dyn
    lithology: shaly sandstone
    porosity: 0.15
    bulk_density: 2.26 g/cc
    orientation: horizontal
    measurement: dynamic
    branch: loading
    cycle: 1
    effective_pressure_coefficient: {n_2320}
    uncertainty:
      Vp: 1 %
      Vs: 2 %
      rho: 10 kg/m3
      calibrated: true
    data:
      columns: [P_c MPa, P_p MPa, Vp ft/s, Vs ft/s, rho kg/m3]
      file: data/QV14-2320H-ultrasonic.csv
    models: [exp-modulus, exp-compliance]
    grain_modulus: none   # no mineralogy for this plug yet: no alpha

  # Shale, horizontal, dry ultrasonic; confining pressure with a constant
  # 2 MPa pore pressure.
  - id: QV14-2551H-dyn
    lithology: shale
    porosity: 6 %
    bulk_density: 2.52 g/cc
    orientation: horizontal
    measurement: dynamic
    branch: loading
    cycle: 1
    pore_pressure: 2 MPa
    uncertainty:
      Vp: 0.6 %
      Vs: 1.2 %
      rho: 0.01 g/cc
      calibrated: true
    data:
      columns: [P_c MPa, Vp km/s, Vs km/s]
      rows:
{inline_rows(rows_2551)}    models: [exp-modulus, linear, power-offset]
    grain_modulus: none
"""
# ------------------------------------------------------- invented density log
# An invented LAS 2.0 density log of well QV-14 for the depth table: index is
# measured depth below the kelly bushing (KB 25 m above sea level, vertical
# hole, so TVD = MD), RHOB rising from 2.12 to 2.46 g/cc with 0.015 g/cc
# noise, a NULL run (2060-2080 m, a tool stop) and a washout (2490-2500 m)
# where DRHO exceeds 0.1 g/cc. A separate seeded generator, so the plug data
# above are unchanged.
log_rng = np.random.default_rng(SEED + 14)
las_rows = []
for i in range(int((3300 - 1400) / 2) + 1):
    md = 1400.0 + 2.0 * i
    rho = 2.12 + 0.34 * (md - 1400.0) / 1900.0 + log_rng.normal(0.0, 0.015)
    drho = log_rng.normal(0.0, 0.01)
    if 2490.0 <= md <= 2500.0:
        drho = 0.16 + abs(drho)  # washout: the correction curve flags bad hole
        rho -= 0.25
    if 2060.0 <= md <= 2080.0:
        rho, drho = -999.25, -999.25
    las_rows.append((md, rho, drho))
las = (
    "# INVENTED density log for the demonstration study - not real data\n"
    "# (samples/generate.py, seed " + str(SEED + 14) + ")\n"
    "~VERSION INFORMATION\n"
    " VERS.                 2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0\n"
    " WRAP.                  NO : ONE LINE PER DEPTH STEP\n"
    "~WELL INFORMATION\n"
    " STRT.M             1400.0 : START DEPTH\n"
    " STOP.M             3300.0 : STOP DEPTH\n"
    " STEP.M                2.0 : STEP\n"
    " NULL.             -999.25 : NULL VALUE\n"
    " COMP.   INVENTED OPERATOR : COMPANY\n"
    " WELL.        QV-14 (INVENTED) : WELL\n"
    " FLD .   QUORVANE (INVENTED) : FIELD\n"
    " LOC .               NONE : LOCATION\n"
    " CTRY.               NONE : COUNTRY\n"
    " SRVC.   INVENTED SERVICES : SERVICE COMPANY\n"
    " DATE.          2026-12-01 : LOG DATE\n"
    " UWI .               NONE : UNIQUE WELL ID\n"
    "~CURVE INFORMATION\n"
    " DEPT.M                    : MEASURED DEPTH BELOW KB\n"
    " RHOB.G/C3                 : BULK DENSITY\n"
    " DRHO.G/C3                 : DENSITY CORRECTION\n"
    "~PARAMETER INFORMATION\n"
    " EKB .M               25.0 : KELLY BUSHING ABOVE SEA LEVEL\n"
    "~A  DEPT      RHOB      DRHO\n"
)
for md, rho, drho in las_rows:
    las += f"{md:8.1f} {rho:9.4f} {drho:9.4f}\n"
with open(os.path.join(DATA, "QV-14-density.las"), "w", newline="\n") as f:
    f.write(las)

study += """
# Alpha against depth for well QV-14 (INVENTED scenario): offshore, 850 m of
# sea water, mean effective stress with the Biot law, the invented density
# log above (its NULL run bridged and its washout screened, both flagged; a
# stated fill trend from the mudline to the log top) and one depletion case.
# Every assumption below is the demonstration's choice, not a default.
depth_tables:
  - name: QV-14
    units: field
    datum: {reference: MSL, water_depth: 850 m, water_density: 1.03 g/cc}
    depths: {top: 1400 m, base: 3200 m, step: 10 m}
    overburden:
      log:
        file: data/QV-14-density.las
        curve: RHOB
        index_offset: -25 m            # log depths are below KB, 25 m above MSL
        correction_curve: DRHO
        correction_limit: 0.1 g/cc
        fill_above: [{depth: 850 m, density: 1.75 g/cc}, {depth: 1375 m, density: 2.10 g/cc}]
    pore_pressure: {hydrostatic: 10.1 kPa/m}   # normally pressured, from the sea surface
    stress:
      measure: mean
      law: biot
      horizontal: {ratio: 0.6}
    intervals:
      - {top: 1400 m, base: 2100 m, sample: QV14-2544V, model: exp-modulus}
      - {top: 2100 m, base: 2700 m, sample: QV14-2231V, model: exp-modulus}
      - {top: 2700 m, base: 3210 m, sample: QV14-2318H, model: exp-modulus}   # [top, base): past the last row
    bands: {level: 0.80, convention: non-exceedance}
    depletion: [{name: 10 MPa drawdown, drop: 10 MPa}]
"""

with open(os.path.join(HERE, "invented-field-study.yaml"), "w", newline="\n") as f:
    f.write(study)
print("wrote", os.path.join(HERE, "invented-field-study.yaml"))
