#!/usr/bin/env python3
"""
Reference tables for the science-core tests, computed independently of the TypeScript code.

- rates-mpmath.json: log10 k of the classical and semi-classical (Marcus-Levich-Jortner) expressions
  with mpmath at 40 significant digits (source: the mpmath arbitrary-precision library), the vibronic
  sum taken term by term far past its peak: normal and deep inverted regions, 77 K, S up to 30 and
  every bound of the model inputs.
- fits-scipy.json: hard fitting problems and their reference minima of chi^2 found by bounded least
  squares (source: scipy.optimize.least_squares, method 'trf', from many starting points), with the
  same bounds as the app's fitter.

Run: python3 scripts/reference/physics_references.py   (writes tests/fixtures/physics/*.json)
The constants are the CODATA 2018 / SI 2019 defining values, as in shared/physics/constants.ts.
"""
import json
import math
import os
import sys

import mpmath as mp
import numpy as np
from scipy.optimize import least_squares
from scipy.special import gammaln, logsumexp

OUT = os.path.join(os.path.dirname(__file__), '..', '..', 'tests', 'fixtures', 'physics')

# CODATA 2018 / SI 2019 defining constants (exact)
H_J_S = mp.mpf('6.62607015e-34')
E_C = mp.mpf('1.602176634e-19')
KB_J_K = mp.mpf('1.380649e-23')

mp.mp.dps = 40
HBAR_EV_S = H_J_S / (2 * mp.pi) / E_C
KB_EV_K = KB_J_K / E_C


def mp_log10_classical(dg, lam, V, T):
    kT = KB_EV_K * mp.mpf(T)
    dg, lam, V = mp.mpf(dg), mp.mpf(lam), mp.mpf(V)
    ln = mp.log(2 * mp.pi / HBAR_EV_S) + 2 * mp.log(V) - mp.log(4 * mp.pi * lam * kT) / 2 - (dg + lam) ** 2 / (4 * lam * kT)
    return ln / mp.log(10)


def mp_log10_mlj(dg, ls, li, hw, V, T):
    kT = KB_EV_K * mp.mpf(T)
    dg, ls, li, hw, V = mp.mpf(dg), mp.mpf(ls), mp.mpf(li), mp.mpf(hw), mp.mpf(V)
    if li == 0:
        return mp_log10_classical(dg, ls, V, T)
    S = li / hw
    a = 4 * ls * kT
    # ln of each term; the peak index of the product is near the larger of S and -(dg+ls)/hw
    jpeak = max(float(S), float(-(dg + ls) / hw), 0.0)
    jmax = int(jpeak + 60 * math.sqrt(jpeak + 1) + 400)
    terms = []
    lnS = mp.log(S)
    for j in range(jmax + 1):
        terms.append(-S + j * lnS - mp.loggamma(j + 1) - (dg + ls + j * hw) ** 2 / a)
    m = max(terms)
    lse = m + mp.log(mp.fsum(mp.exp(t - m) for t in terms))
    # the last term must be negligible: the sum was taken far enough
    assert terms[-1] - lse < -120, 'reference sum too short'
    ln = mp.log(2 * mp.pi / HBAR_EV_S) + 2 * mp.log(V) - mp.log(4 * mp.pi * ls * kT) / 2 + lse
    return ln / mp.log(10)


def rate_tables():
    base = dict(ls=0.6, li=0.36, hw=0.18, V=0.005, T=298.15)
    grid = [-3.5, -2.5, -1.6, -1.2, -0.9, -0.6, -0.3, 0.0, 0.4]
    sets = [
        ('room temperature, S = 2', base, grid),
        ('77 K glass', dict(base, T=77, ls=0.15, li=0.05, hw=0.06), grid),
        ('S = 8', dict(base, li=8 * 0.18), grid),
        ('S = 30', dict(base, li=30 * 0.15, hw=0.15), grid),
        ('deep inverted region, small lambda_s', dict(base, ls=0.1), [-10.0, -8.0, -6.0, -4.0]),
        ('bound: T = 1 K', dict(base, T=1, ls=0.3), [-2.0, -0.9, -0.3, 0.0]),
        ('bound: T = 2000 K', dict(base, T=2000), [-10.0, -1.0, 0.0, 10.0]),
        ('bound: lambda_s = 0.005 eV', dict(base, ls=0.005), [-1.0, -0.5, -0.18]),
        ('bound: lambda_s = 5 eV', dict(base, ls=5), [-10.0, -5.0, 0.0, 10.0]),
        ('bound: hbar omega = 0.005 eV, S = 200', dict(base, hw=0.005, li=1.0), [-10.0, -3.0, -1.0, 0.0]),
        ('bound: hbar omega = 1 eV', dict(base, hw=1.0, li=0.5), [-4.0, -2.0, -1.0, 0.0]),
        ('bound: lambda_i = 5 eV, S = 200', dict(base, li=5.0, hw=0.025), [-10.0, -6.0, -2.0, 0.0]),
        ('bound: V = 1e-9 eV', dict(base, V=1e-9), [-1.0, 0.0]),
        ('bound: V = 1 eV', dict(base, V=1.0), [-1.0, 0.0]),
        ('bound: |dG| = 10 eV', base, [-10.0, 10.0]),
    ]
    out = []
    for name, p, dgs in sets:
        out.append({
            'name': name, 'model': 'semiclassical',
            'params': {'lambdaSolvent': p['ls'], 'lambdaInternal': p['li'], 'vibrationEnergy': p['hw'], 'coupling': p['V'], 'temperatureK': p['T']},
            'points': [{'deltaG': d, 'log10Rate': mp.nstr(mp_log10_mlj(d, p['ls'], p['li'], p['hw'], p['V'], p['T']), 25)} for d in dgs]
        })
    for name, lam, V, T, dgs in [
        ('classical, room temperature', 0.8, 0.01, 298.15, grid),
        ('classical, 77 K deep inverted', 0.1, 0.005, 77, [-3.5, -1.0, -0.1]),
        ('classical at every bound', 0.005, 1.0, 1, [-10.0, -0.005, 10.0]),
        ('classical, lambda = 5 eV, 2000 K', 5.0, 1e-9, 2000, [-10.0, -5.0, 10.0]),
    ]:
        out.append({'name': name, 'model': 'classical', 'params': {'lambdaTotal': lam, 'coupling': V, 'temperatureK': T},
                    'points': [{'deltaG': d, 'log10Rate': mp.nstr(mp_log10_classical(d, lam, V, T), 25)} for d in dgs]})
    return out


# ---------------------------------------------------------------- fits (float64, scipy)
KB = float(KB_EV_K)
LNPRE = math.log(2 * math.pi / float(HBAR_EV_S))
LN10 = math.log(10)
BOUNDS = {'lambdaTotal': (0.005, 5), 'lambdaSolvent': (0.005, 5), 'lambdaInternal': (0, 5), 'vibrationEnergy': (0.005, 1), 'coupling': (-9, 0)}
PARAMS = {'classical': ['lambdaTotal', 'coupling'], 'semiclassical': ['lambdaSolvent', 'lambdaInternal', 'vibrationEnergy', 'coupling']}


def np_log10(model, p, dg, T):
    dg = np.asarray(dg, float); T = np.asarray(T, float)
    kT = KB * T
    V = 10 ** p['coupling']
    if model == 'classical':
        lam = p['lambdaTotal']
        return (LNPRE + 2 * math.log(V) - 0.5 * np.log(4 * math.pi * lam * kT) - (dg + lam) ** 2 / (4 * lam * kT)) / LN10
    ls, li, hw = p['lambdaSolvent'], p['lambdaInternal'], p['vibrationEnergy']
    if li <= 0:
        return (LNPRE + 2 * math.log(V) - 0.5 * np.log(4 * math.pi * ls * kT) - (dg + ls) ** 2 / (4 * ls * kT)) / LN10
    S = li / hw
    jpeak = max(S, float(np.max(-(dg + ls) / hw)), 0.0)
    J = np.arange(int(jpeak + 40 * math.sqrt(jpeak + 1) + 200))[None, :]
    lnw = -S + J * math.log(S) - gammaln(J + 1)
    terms = lnw - (dg[:, None] + ls + J * hw) ** 2 / (4 * ls * kT[:, None])
    return (LNPRE + 2 * math.log(V) - 0.5 * np.log(4 * math.pi * ls * kT) + logsumexp(terms, axis=1)) / LN10


def box(model, fixed):
    free = [k for k in PARAMS[model] if k not in fixed]
    lo = [BOUNDS[k][0] for k in free]; hi = [BOUNDS[k][1] for k in free]
    if model == 'semiclassical':
        li_max = 5 if 'lambdaInternal' in free else fixed['lambdaInternal']
        if 'vibrationEnergy' in free:
            i = free.index('vibrationEnergy'); lo[i] = max(lo[i], li_max / 200)
        elif 'lambdaInternal' in free:
            i = free.index('lambdaInternal'); hi[i] = min(hi[i], 200 * fixed['vibrationEnergy'])
    return free, np.array(lo), np.array(hi)


def ref_fit(case, rng):
    model, fixed = case['model'], case.get('fixed', {})
    pts = case['points']
    dg = np.array([p['deltaG'] for p in pts]); y = np.array([p['log10Rate'] for p in pts])
    T = np.array([p.get('temperatureK', case.get('temperatureK')) for p in pts], float)
    w = np.array([1 / p['log10RateUncertainty'] if 'log10RateUncertainty' in p else 1.0 for p in pts])
    free, lo, hi = box(model, fixed)
    fx = {k: (math.log10(v) if k == 'coupling' else v) for k, v in fixed.items()}

    def resid(v):
        p = dict(fx); p.update(dict(zip(free, v)))
        return (y - np_log10(model, p, dg, T)) * w
    best = None
    starts = [lo + (hi - lo) * rng.random(len(free)) for _ in range(60)]
    for s in starts:
        try:
            r = least_squares(resid, s, bounds=(lo, hi), method='trf', x_scale='jac', xtol=1e-14, ftol=1e-14, gtol=1e-14, max_nfev=4000)
        except Exception:
            continue
        chi = float(np.sum(r.fun ** 2))
        if np.isfinite(chi) and (best is None or chi < best[0]):
            best = (chi, r.x)
    chi, x = best
    return chi, {k: (10 ** v if k == 'coupling' else float(v)) for k, v in zip(free, x)}


def mk_points(rng, model, truth, dgs, T, noise, sigma=None, outliers=0):
    p = {k: (math.log10(v) if k == 'coupling' else v) for k, v in truth.items()}
    Ts = T if isinstance(T, list) else [T] * len(dgs)
    y = np_log10(model, p, dgs, Ts) + noise * rng.standard_normal(len(dgs))
    if outliers:
        idx = rng.choice(len(dgs), outliers, replace=False); y[idx] += rng.choice([-2.5, 2.5], outliers)
    pts = []
    for i, d in enumerate(dgs):
        q = {'deltaG': round(float(d), 6), 'log10Rate': round(float(y[i]), 6)}
        if isinstance(T, list): q['temperatureK'] = Ts[i]
        if sigma is not None: q['log10RateUncertainty'] = float(sigma[i] if hasattr(sigma, '__len__') else sigma)
        pts.append(q)
    return pts


def fit_cases():
    rng = np.random.default_rng(20261203)
    lin = lambda a, b, n: list(np.linspace(a, b, n))
    sc = {'lambdaSolvent': 0.7, 'lambdaInternal': 0.4, 'vibrationEnergy': 0.186, 'coupling': 0.004}
    cl = {'lambdaTotal': 1.1, 'coupling': 0.002}
    C = []
    add = lambda name, model, pts, T=None, **kw: C.append(dict(name=name, model=model, points=pts, **({'temperatureK': T} if T else {}), **kw))
    add('classical, well posed, noisy', 'classical', mk_points(rng, 'classical', cl, lin(-2.2, 0.2, 28), 295, 0.15), 295)
    add('classical, short normal-region flank (lambda and V trade off)', 'classical', mk_points(rng, 'classical', cl, lin(-0.3, -0.2, 6), 295, 0.03), 295)
    add('classical, inverted region only', 'classical', mk_points(rng, 'classical', cl, lin(-2.8, -1.6, 10), 295, 0.1), 295)
    add('classical, data that want V at its upper bound', 'classical', mk_points(rng, 'classical', {'lambdaTotal': 0.3, 'coupling': 1.0}, lin(-0.6, 0.0, 8), 295, 0.02) , 295)
    add('classical, data that want lambda at its lower bound', 'classical', [{'deltaG': d, 'log10Rate': round(9 - 40 * abs(d), 4)} for d in lin(-0.05, 0.05, 9)], 295)
    add('classical, temperature per point 200-350 K', 'classical', mk_points(rng, 'classical', cl, lin(-1.5, -0.2, 16), [200, 225, 250, 275, 300, 325, 350, 298] * 2, 0.05, sigma=0.05))
    add('classical, outliers', 'classical', mk_points(rng, 'classical', cl, lin(-2.2, 0.2, 20), 295, 0.1, outliers=3), 295)
    add('classical, two clusters only', 'classical', mk_points(rng, 'classical', cl, [-1.0] * 6 + [-0.4] * 6, 295, 0.1), 295)
    add('classical, as many points as parameters', 'classical', mk_points(rng, 'classical', cl, [-1.3, -0.5], 295, 0.0), 295)
    add('classical, far-off start', 'classical', mk_points(rng, 'classical', cl, lin(-2.2, 0.2, 14), 295, 0.1), 295, initial={'lambdaTotal': 4.8, 'coupling': 1e-8})
    add('semi-classical, classical-looking data with lambda_i free (lambda_i -> 0)', 'semiclassical',
        mk_points(rng, 'classical', {'lambdaTotal': 0.9, 'coupling': 0.003}, lin(-1.6, -0.1, 14), 298.15, 0.05), 298.15, fixed={'vibrationEnergy': 0.18})
    add('semi-classical, lambda_i fixed at 0 with hbar omega free (flat direction)', 'semiclassical',
        mk_points(rng, 'classical', {'lambdaTotal': 0.9, 'coupling': 0.003}, lin(-1.6, -0.1, 14), 298.15, 0.05), 298.15, fixed={'lambdaInternal': 0})
    add('semi-classical, three free (lambda_s, lambda_i, V)', 'semiclassical', mk_points(rng, 'semiclassical', sc, lin(-2.2, 0.2, 28), 295, 0.1, sigma=0.1), 295, fixed={'vibrationEnergy': 0.186})
    add('semi-classical, three free from a bad start', 'semiclassical', mk_points(rng, 'semiclassical', sc, lin(-2.2, 0.2, 28), 295, 0.1, sigma=0.1), 295, fixed={'vibrationEnergy': 0.186}, initial={'lambdaSolvent': 4.5, 'lambdaInternal': 4.5, 'coupling': 1e-8})
    add('semi-classical, all four free', 'semiclassical', mk_points(rng, 'semiclassical', sc, lin(-2.4, 0.3, 30), 295, 0.08), 295)
    add('semi-classical, all four free, noise-free', 'semiclassical', mk_points(rng, 'semiclassical', sc, lin(-2.4, 0.3, 24), 295, 0.0), 295)
    add('semi-classical, all four free on a short flank', 'semiclassical', mk_points(rng, 'semiclassical', sc, lin(-0.3, -0.05, 6), 295, 0.05), 295)
    add('semi-classical, temperature series 255-315 K', 'semiclassical', mk_points(rng, 'semiclassical', sc, lin(-1.8, -0.2, 18), [255, 265, 275, 285, 295, 305, 315, 298, 290] * 2, 0.08, sigma=0.08), fixed={'vibrationEnergy': 0.186})
    add('semi-classical, 77 K glass', 'semiclassical', mk_points(rng, 'semiclassical', {'lambdaSolvent': 0.2, 'lambdaInternal': 0.25, 'vibrationEnergy': 0.17, 'coupling': 0.002}, lin(-2.0, -0.1, 16), 77, 0.1), 77, fixed={'vibrationEnergy': 0.17})
    add('semi-classical, large Huang-Rhys factor (S = 15)', 'semiclassical', mk_points(rng, 'semiclassical', {'lambdaSolvent': 0.4, 'lambdaInternal': 1.5, 'vibrationEnergy': 0.1, 'coupling': 0.01}, lin(-3.0, -0.5, 20), 298.15, 0.1), 298.15, fixed={'vibrationEnergy': 0.1})
    add('semi-classical, weights spanning three decades', 'semiclassical', mk_points(rng, 'semiclassical', sc, lin(-2.2, 0.2, 20), 295, 0.05, sigma=list(10 ** np.linspace(-2, 1, 20))), 295, fixed={'vibrationEnergy': 0.186, 'lambdaInternal': 0.4})
    add('semi-classical, soft mode wanted (hbar omega toward its lower bound)', 'semiclassical', mk_points(rng, 'classical', {'lambdaTotal': 1.4, 'coupling': 0.003}, lin(-2.5, -0.2, 16), 298.15, 0.03), 298.15, fixed={'lambdaInternal': 0.7})
    add('semi-classical, deep inverted rates', 'semiclassical', mk_points(rng, 'semiclassical', {'lambdaSolvent': 0.25, 'lambdaInternal': 0.3, 'vibrationEnergy': 0.18, 'coupling': 0.001}, lin(-3.5, -2.0, 12), 298.15, 0.1), 298.15, fixed={'vibrationEnergy': 0.18})
    out = []
    for c in C:
        chi, params = ref_fit(c, rng)
        out.append(dict(c, reference={'chiSquared': chi, 'parameters': params}))
        print(f"{c['name']}: chi2 = {chi:.6g}", file=sys.stderr)
    return out


def main():
    os.makedirs(OUT, exist_ok=True)
    meta = {'source': 'mpmath ' + mp.__version__ + ' at 40 digits', 'generator': 'scripts/reference/physics_references.py'}
    with open(os.path.join(OUT, 'rates-mpmath.json'), 'w') as f:
        json.dump({**meta, 'cases': rate_tables()}, f, indent=1)
    import scipy
    meta = {'source': 'scipy ' + scipy.__version__ + ' optimize.least_squares (trf, bounded), best of 60 random starts', 'generator': 'scripts/reference/physics_references.py'}
    with open(os.path.join(OUT, 'fits-scipy.json'), 'w') as f:
        json.dump({**meta, 'cases': fit_cases()}, f, indent=1)


if __name__ == '__main__':
    main()
