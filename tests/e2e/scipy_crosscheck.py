#!/usr/bin/python3
"""Cross-check porofit's fits of the sample study against scipy.optimize.curve_fit.

Runs `porofit fit` on the study, reads results.json, and refits every
converged, non-robust fit of every plug with scipy (same model formula, same
data and sigma, absolute_sigma as porofit used, analytic Jacobian, tolerances
ftol = xtol = gtol = 1e-15, started from porofit's estimate perturbed by a few
per cent, fixed parameters held fixed). Estimates and standard errors must
agree to a log relative error (LRE, as in the NIST StRD scoring) of at least 6.

Fits with a free parameter on a bound are not compared (curve_fit's covariance
there is not defined the same way) and are listed. Exit 0 only if at least one
fit was compared and every comparison passed. A missing scipy is a failure.
"""
import argparse
import json
import math
import os
import shutil
import subprocess
import sys

try:
    import numpy as np
    from scipy.optimize import curve_fit
    import scipy
except ImportError as e:  # fail loudly: this check must not be skipped silently
    print(f"FAIL: scipy/numpy not importable by {sys.executable}: {e}", file=sys.stderr)
    print("install python3-scipy (Debian) for this interpreter", file=sys.stderr)
    sys.exit(1)

MIN_LRE = 6.0


# Model formulas in working units (P in MPa, K in GPa), parameter order as in
# porofit's catalogue (lib/models/src/*.cc), with analytic Jacobians.
def _linear(P, K0, b):
    return K0 + b * P


def _linear_jac(P, K0, b):
    return np.column_stack([np.ones_like(P), P])


def _expmod(P, Kinf, K0, Pc):
    return Kinf - (Kinf - K0) * np.exp(-P / Pc)


def _expmod_jac(P, Kinf, K0, Pc):
    e = np.exp(-P / Pc)
    return np.column_stack([1 - e, e, -(Kinf - K0) * P / Pc**2 * e])


def _expcomp(P, Cinf, C0, Pc):
    return 1.0 / (Cinf + (C0 - Cinf) * np.exp(-P / Pc))


def _expcomp_jac(P, Cinf, C0, Pc):
    e = np.exp(-P / Pc)
    c = Cinf + (C0 - Cinf) * e
    k2 = -1.0 / c**2
    return np.column_stack([k2 * (1 - e), k2 * e, k2 * (C0 - Cinf) * e * P / Pc**2])


def _linexp(P, A, B, C, D):
    return A + B * P - C * np.exp(-D * P)


def _linexp_jac(P, A, B, C, D):
    e = np.exp(-D * P)
    return np.column_stack([np.ones_like(P), P, -e, C * P * e])


def _powref(P, Kref, n, Pref):
    return Kref * (P / Pref) ** n


def _powref_jac(P, Kref, n, Pref):
    r = (P / Pref) ** n
    return np.column_stack([r, Kref * r * np.log(P / Pref), -Kref * r * n / Pref])


def _powoff(P, K0, n, Pr):
    return K0 * (1 + P / Pr) ** n


def _powoff_jac(P, K0, n, Pr):
    r = (1 + P / Pr) ** n
    K = K0 * r
    return np.column_stack([r, K * np.log1p(P / Pr), -K * n * P / (Pr * (Pr + P))])


def _grain(P, a):
    return a * np.cbrt(P)


def _grain_jac(P, a):
    return np.cbrt(P).reshape(-1, 1)


MODELS = {
    "linear": (("K_0", "b"), _linear, _linear_jac),
    "exp-modulus": (("K_inf", "K_0", "P_close"), _expmod, _expmod_jac),
    "exp-compliance": (("C_inf", "C_0", "P_close"), _expcomp, _expcomp_jac),
    "linear-exp": (("A", "B", "C", "D"), _linexp, _linexp_jac),
    "power-ref": (("K_ref", "n", "P_ref"), _powref, _powref_jac),
    "power-offset": (("K_0", "n", "P_r"), _powoff, _powoff_jac),
    "grain-contact": (("a",), _grain, _grain_jac),
}


def lre(value, reference):
    """Log relative error: number of agreeing significant digits (capped at 15)."""
    if value == reference:
        return 15.0
    if reference == 0:
        return -math.log10(abs(value)) if value != 0 else 15.0
    return min(15.0, -math.log10(abs(value - reference) / abs(reference)))


def refit(sample, fit):
    names, f, jac = MODELS[fit["model"]]
    params = fit["parameters"]
    got = [p["name"] for p in params]
    if tuple(got) != names:
        raise RuntimeError(f"parameter order {got} differs from the cross-check's {list(names)}")
    if fit["x"]["unit"] != "MPa" or fit["y"]["unit"] != "GPa":
        raise RuntimeError(f"unexpected working units {fit['x']['unit']}, {fit['y']['unit']}")
    P = np.array([d["pressure_MPa"] for d in sample["data"]], dtype=float)
    K = np.array([d["K_GPa"] for d in sample["data"]], dtype=float)
    sigma = None
    if sample["weighted"]:
        sigma = np.array([d["sigma_K_GPa"] for d in sample["data"]], dtype=float)
    absolute = not fit["covariance"]["scaled_by_residual_variance"]

    full = np.array([p["estimate"] for p in params], dtype=float)
    free = [i for i, p in enumerate(params) if not p["fixed"]]

    def f_free(x, *theta):
        t = full.copy()
        t[free] = theta
        return f(x, *t)

    def jac_free(x, *theta):
        t = full.copy()
        t[free] = theta
        return jac(x, *t)[:, free]

    # Start a few per cent away from porofit's answer, alternating in sign.
    p0 = np.array([full[i] * (1 + (0.04 if k % 2 == 0 else -0.03)) for k, i in enumerate(free)])
    common = dict(p0=p0, sigma=sigma, absolute_sigma=absolute, jac=jac_free,
                  ftol=1e-15, xtol=1e-15, gtol=1e-15)
    try:
        popt, pcov = curve_fit(f_free, P, K, method="lm", maxfev=100000, **common)
        method = "lm"
    except RuntimeError:
        # MINPACK reports "tolerance too small, no further reduction possible"
        # (info 6-8) as a failure although it has converged to rounding; the
        # trust-region solver states the same outcome as success.
        popt, pcov = curve_fit(f_free, P, K, method="trf", max_nfev=100000, **common)
        method = "trf"
    se = np.sqrt(np.diag(pcov))
    rows = []
    for k, i in enumerate(free):
        p = params[i]
        rows.append((p["name"], p["unit"], p["estimate"], popt[k], p["std_error"], se[k]))
    return method, rows


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--porofit", required=True, help="path of the porofit executable")
    ap.add_argument("--study", required=True, help="study file to fit")
    ap.add_argument("--work", required=True, help="scratch folder for porofit's output")
    ap.add_argument("--results", help="use this results.json instead of running porofit")
    args = ap.parse_args()

    if args.results:
        results_path = args.results
    else:
        os.makedirs(args.work, exist_ok=True)
        out = os.path.join(args.work, "out")
        # The test's own scratch folder: removed first, so that a folder left
        # by an older build (without the marker --overwrite requires) is no obstacle.
        shutil.rmtree(out, ignore_errors=True)
        cmd = [args.porofit, "fit", args.study, "--out", out, "--quiet"]
        proc = subprocess.run(cmd, capture_output=True, text=True)
        if proc.returncode != 0:
            print(f"FAIL: {' '.join(cmd)} exited {proc.returncode}\n{proc.stderr}", file=sys.stderr)
            return 1
        results_path = os.path.join(out, "results.json")
    with open(results_path) as fh:
        results = json.load(fh)

    print(f"scipy {scipy.__version__}, numpy {np.__version__}; porofit {results['provenance']['tool_version']}")
    compared = failed = 0
    skipped = []
    worst = 15.0
    for sample in results["samples"]:
        for fit in sample["fits"]:
            label = f"{sample['id']} / {fit['model']}"
            if fit["status"] != "converged":
                skipped.append(f"{label}: status {fit['status']}")
                continue
            if fit["model"] not in MODELS:  # a study's own formula model: this script has no independent copy of it
                skipped.append(f"{label}: user model (formula models are checked against NIST StRD in C++)")
                continue
            if sample["options"]["loss"] != "none":
                skipped.append(f"{label}: robust loss {sample['options']['loss']}")
                continue
            if any((p["at_lower"] or p["at_upper"]) and not p["fixed"] for p in fit["parameters"]):
                skipped.append(f"{label}: a parameter is on a bound")
                continue
            if not fit["covariance"]["available"]:
                skipped.append(f"{label}: no covariance")
                continue
            try:
                method, rows = refit(sample, fit)
            except Exception as e:  # noqa: BLE001 - any failure of the reference is a failure of the check
                print(f"FAIL {label}: scipy refit failed: {e}")
                failed += 1
                continue
            compared += 1
            for name, unit, est, ref_est, se, ref_se in rows:
                l_est, l_se = lre(est, ref_est), lre(se, ref_se)
                worst = min(worst, l_est, l_se)
                ok = l_est >= MIN_LRE and l_se >= MIN_LRE
                failed += 0 if ok else 1
                print(f"{'ok  ' if ok else 'FAIL'} {label:32s} {name:8s} [{unit}] "
                      f"estimate {est:.10g} vs {ref_est:.10g} (LRE {l_est:.1f}), "
                      f"SE {se:.6g} vs {ref_se:.6g} (LRE {l_se:.1f}) [{method}]")
    for s in skipped:
        print(f"not compared: {s}")
    print(f"{compared} fits compared, {len(skipped)} not compared, worst LRE {worst:.1f} (need >= {MIN_LRE})")
    passed = compared > 0 and failed == 0
    print(f"scipy cross-check: {'PASS' if passed else 'FAIL'}")
    if compared == 0:
        print("FAIL: no fit was compared", file=sys.stderr)
    return 0 if passed else 1


if __name__ == "__main__":
    sys.exit(main())
