"""
Reference fits for shared/physics/decay.ts by an independent library: SciPy's curve_fit (trust-region reflective
least squares, the library's own Jacobian and covariance) on synthetic decay traces made here with NumPy's
random generator (fixed seeds; invented numbers, no measurement). For each trace the file keeps the data, what
was simulated, and SciPy's parameters and standard errors:
  - Poisson or given weights: sigma as weights with absolute_sigma=True (the covariance is (J^T W J)^-1);
  - no weights: absolute_sigma=False (the covariance scaled by chi^2_red).
The Gaussian instrument response convolved with exp(-t/tau) is the closed form with scipy.special.erfcx
(exp(-u^2/2s^2) erfcx((s^2/tau - u)/(s sqrt 2)) / 2, and exp(s^2/2tau^2 - u/tau) erfc(...) / 2 where the erfcx
argument is negative). A measured response is taken as a histogram: each sample a box of its spacing's width holding
its share of the area, convolved exactly with the exponential. "convolution" lists the same curve from a numerical convolution (numpy.convolve on a
fine grid), so that the closed form is checked against a computation that does not use it.
Run: python3 scripts/reference/decay_scipy.py  (writes tests/fixtures/kinetics/decay-scipy.json)
"""
import json, math, os
import numpy as np
import scipy
from scipy.optimize import curve_fit
from scipy.special import erfc, erfcx

FWHM_PER_SIGMA = 2 * math.sqrt(2 * math.log(2))

def gexp(u, tau, sigma):
    """exp(-u/tau) H(u) convolved with a unit-area Gaussian of standard deviation sigma."""
    k = 1 / tau
    b = (k * sigma**2 - u) / (sigma * math.sqrt(2))
    out = np.empty_like(u)
    pos = b >= 0
    out[pos] = 0.5 * np.exp(-u[pos] ** 2 / (2 * sigma**2)) * erfcx(b[pos])
    neg = ~pos
    out[neg] = 0.5 * np.exp(k**2 * sigma**2 / 2 - k * u[neg]) * erfc(b[neg])
    return out

def widths(s):
    """Width of each sample's bin: the spacing to its neighbours (half the span of the two), the end ones their one spacing."""
    h = np.empty_like(s)
    h[1:-1] = (s[2:] - s[:-2]) / 2
    h[0] = s[1] - s[0]
    h[-1] = s[-1] - s[-2]
    return h

def plain(u, tau):
    return np.where(u >= 0, np.exp(-np.clip(u, 0, None) / tau), 0.0)

def model(kind, irf, t, p, t0_fixed=0.0, fwhm_fixed=None, irf_trace=None):
    """Parameter order as decay.ts: a1, tau1, [a2, tau2], offset, [t0], [fwhm]."""
    i = 0
    comps = []
    for _ in range(1 if kind == "mono" else 2):
        comps.append((p[i], p[i + 1])); i += 2
    offset = p[i]; i += 1
    t0 = t0_fixed
    if irf != "none":
        t0 = p[i]; i += 1
    fwhm = fwhm_fixed
    if irf == "gaussian" and fwhm_fixed is None:
        fwhm = p[i]; i += 1
    y = np.full_like(t, offset, dtype=float)
    for a, tau in comps:
        if irf == "gaussian":
            y += a * gexp(t - t0, tau, fwhm / FWHM_PER_SIGMA)
        elif irf == "measured":
            # each IRF sample is a box of its spacing's width holding its share of the area (histogram IRF)
            s, w = irf_trace[0], irf_trace[1]
            h = widths(s)
            u = t[:, None] - t0
            lo = np.clip(u - (s + h / 2)[None, :], 0, None)
            hi = np.clip(u - (s - h / 2)[None, :], 0, None)
            y += a * ((tau / h)[None, :] * (np.exp(-lo / tau) - np.exp(-hi / tau)) * w[None, :]).sum(axis=1)
        else:
            y += a * plain(t - t0, tau)
    return y

def names(kind, irf, fwhm_fixed):
    n = ["a1", "tau1"] + (["a2", "tau2"] if kind == "bi" else []) + ["offset"]
    if irf != "none": n.append("t0")
    if irf == "gaussian" and fwhm_fixed is None: n.append("irfFwhm")
    return n

CASES = []
def case(name, kind, irf, t, truth, weighting, seed, fwhm_fixed=None, noise=None, irf_trace=None, start=None):
    rng = np.random.default_rng(seed)
    clean = model(kind, irf, t, truth, fwhm_fixed=fwhm_fixed, irf_trace=irf_trace)
    if weighting == "poisson":
        y = rng.poisson(np.clip(clean, 0, None)).astype(float)
        sigma = np.sqrt(np.maximum(y, 1))
    else:
        y = clean + rng.normal(0, noise, t.size)
        sigma = np.full(t.size, noise)
    f = lambda tt, *p: model(kind, irf, tt, p, fwhm_fixed=fwhm_fixed, irf_trace=irf_trace)
    p0 = start if start is not None else truth
    if weighting == "none":
        popt, pcov = curve_fit(f, t, y, p0=p0, method="trf", x_scale="jac", max_nfev=20000, ftol=1e-14, xtol=1e-14, gtol=1e-14)
    else:
        popt, pcov = curve_fit(f, t, y, p0=p0, sigma=sigma, absolute_sigma=True, method="trf", x_scale="jac",
                               max_nfev=20000, ftol=1e-14, xtol=1e-14, gtol=1e-14)
    resid = (y - f(t, *popt)) / (sigma if weighting != "none" else 1)
    nm = names(kind, irf, fwhm_fixed)
    entry = {
        "name": name, "model": kind, "irf": irf, "weighting": weighting, "times": t.round(9).tolist(), "signal": y.tolist(),
        "truth": dict(zip(nm, truth)),
        "scipy": {k: {"value": float(v), "stderr": float(math.sqrt(c))} for k, v, c in zip(nm, popt, np.diag(pcov))},
        "chiSquared": float((resid**2).sum()),
    }
    if weighting == "given": entry["sigma"] = sigma.tolist()
    if fwhm_fixed is not None: entry["irfFwhm"] = fwhm_fixed
    if irf_trace is not None: entry["irfTrace"] = {"times": irf_trace[0].tolist(), "signal": irf_trace[2].tolist()}
    CASES.append(entry)

# 1 mono, no IRF, photon counts
t = np.linspace(0, 50, 500)
case("mono, counts, no IRF", "mono", "none", t, [5000.0, 8.0, 20.0], "poisson", 11)
# 2 bi, no IRF, transient absorption with a given sigma
t = np.linspace(0, 400, 800)
case("bi, absorption, no IRF", "bi", "none", t, [0.02, 3.0, 0.01, 80.0, 0.0005], "given", 12, noise=0.0004)
# 3 mono with a Gaussian IRF of fitted width
t = np.linspace(-2, 20, 1000)
case("mono, Gaussian IRF fitted", "mono", "gaussian", t, [8000.0, 2.5, 15.0, 0.5, 0.3], "poisson", 13)
# 4 bi with a Gaussian IRF, a lifetime near the IRF width
t = np.linspace(-1, 25, 1200)
case("bi, Gaussian IRF, tau near the IRF", "bi", "gaussian", t, [6000.0, 0.4, 3000.0, 4.0, 10.0, 0.2, 0.35], "poisson", 14)
# 5 mono shorter than the IRF width (width given)
t = np.linspace(-1, 4, 600)
case("mono, tau half the IRF width", "mono", "gaussian", t, [20000.0, 0.15, 5.0, 0.0], "poisson", 15, fwhm_fixed=0.3)
# 6 bi with a Gaussian IRF, 5000 points (the benchmark's size), unweighted absorption
t = np.linspace(-5, 200, 5000)
case("bi, Gaussian IRF, 5000 points, no weights", "bi", "gaussian", t, [0.03, 2.0, 0.015, 40.0, 0.0002, 0.0, 0.8], "none", 16,
     noise=0.0005, start=[0.025, 1.5, 0.02, 30.0, 0.0, 0.1, 1.0])
# 7 mono with a measured IRF (a sampled, slightly skewed pulse), numerical convolution
s = np.linspace(-0.6, 1.0, 81)
shape = np.exp(-0.5 * (s / 0.12) ** 2) + 0.25 * np.exp(-0.5 * ((s - 0.15) / 0.2) ** 2)
irf_y = np.round(shape / shape.max() * 4000)
w = irf_y * widths(s) / (irf_y * widths(s)).sum()
t = np.linspace(-1, 15, 640)
case("mono, measured IRF", "mono", "measured", t, [10000.0, 1.8, 12.0, 0.3], "poisson", 17, irf_trace=(s, w, irf_y))

# closed form against a numerical convolution on a fine grid
conv = []
for tau, fwhm in [(2.5, 0.3), (0.15, 0.3), (0.05, 0.4), (10.0, 0.1)]:
    sigma = fwhm / FWHM_PER_SIGMA
    dt = min(tau, sigma) / 400
    grid = np.arange(-10 * sigma, 10 * sigma + 40 * tau, dt)
    g = np.exp(-0.5 * (np.arange(-8 * sigma, 8 * sigma + dt / 2, dt) / sigma) ** 2)
    g /= g.sum()
    d = plain(grid, tau)
    full = np.convolve(d, g, mode="same")
    at = np.linspace(-3 * sigma, 5 * tau, 25)
    conv.append({"tau": tau, "fwhm": fwhm, "times": at.tolist(),
                 "numerical": np.interp(at, grid, full).tolist(), "closedForm": gexp(at, tau, sigma).tolist()})

out = os.path.join(os.path.dirname(__file__), "../../tests/fixtures/kinetics/decay-scipy.json")
with open(out, "w") as fh:
    json.dump({"source": f"scipy {scipy.__version__} curve_fit (trf), numpy {np.__version__}; scripts/reference/decay_scipy.py",
               "cases": CASES, "convolution": conv}, fh)
print("wrote", out, len(CASES), "fits")
for c in CASES:
    print(c["name"], {k: (round(v["value"], 5), round(v["stderr"], 6)) for k, v in c["scipy"].items()})
