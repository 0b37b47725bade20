#!/usr/bin/env python3
"""
Worked values for the unit tests' hand checks, computed independently of the TypeScript code with mpmath
(40 digits) from the CODATA 2018 constants (exact SI 2019 values; epsilon_0 the CODATA 2018 measured value).
Each entry names the expression it evaluates and the published work the expression comes from.

Run: python3 scripts/reference/worked_checks.py   (writes tests/fixtures/physics/worked-checks-mpmath.json)
"""
import json
import os

import mpmath as mp

mp.mp.dps = 40
H = mp.mpf('6.62607015e-34')       # J s, exact (SI 2019)
E = mp.mpf('1.602176634e-19')      # C, exact
KB = mp.mpf('1.380649e-23')        # J/K, exact
EPS0 = mp.mpf('8.8541878128e-12')  # F/m, CODATA 2018
HBAR_EV_S = H / (2 * mp.pi) / E
KB_EV_K = KB / E
# e^2 / (4 pi eps0) in eV * Angstrom
COUL_EV_A = E / (4 * mp.pi * EPS0) * mp.mpf('1e10')


def f(x):
    return float(mp.nstr(x, 17))


def main():
    out = {'source': 'mpmath ' + mp.__version__ + ', CODATA 2018 constants; scripts/reference/worked_checks.py', 'checks': {}}
    c = out['checks']
    T = mp.mpf('298.15')
    c['kT_eV_298'] = {'value': f(KB_EV_K * T), 'expression': 'k_B T / e at 298.15 K'}
    c['kT_over_h_298'] = {'value': f(KB * T / H), 'expression': 'k_B T / h at 298.15 K, s^-1'}
    c['coulomb_eV_A'] = {'value': f(COUL_EV_A), 'expression': 'e^2/(4 pi eps0), eV Angstrom'}
    # Rehm-Weller (Rehm & Weller, Isr. J. Chem. 8, 259 (1970)): dG = e[E_ox - E_red] - E00 - e^2/(4 pi eps0 eps_s R)
    eox, ered, e00, R, eps = mp.mpf('0.85'), mp.mpf('-0.55'), mp.mpf('2.10'), mp.mpf('10'), mp.mpf('35.94')
    coul = -COUL_EV_A / (eps * R)
    cs = (eox - ered) - e00 + coul
    c['rehm_weller'] = {
        'inputs': {'E_ox_V': 0.85, 'E_red_V': -0.55, 'E00_eV': 2.1, 'R_A': 10, 'eps_s': 35.94},
        'deltaG_eV': f(cs), 'coulomb_eV': f(coul),
        'expression': 'Rehm-Weller with the ion-pair term (Rehm & Weller 1970)'}
    c['charge_recombination'] = {'deltaG_eV': f(-(cs + e00)), 'expression': 'dG_CR = -(dG_CS + E00) for the inputs of rehm_weller'}
    # Born correction (Weller, Z. Phys. Chem. 133, 93 (1982)): (e^2/8 pi eps0)(1/rD + 1/rA)(1/eps_s - 1/eps_ref)
    rD = rA = mp.mpf('4')
    born = COUL_EV_A / 2 * (1 / rD + 1 / rA) * (1 / mp.mpf('2.38') - 1 / mp.mpf('35.94'))
    c['born_term'] = {'inputs': {'r_D_A': 4, 'r_A_A': 4, 'eps_s': 2.38, 'eps_ref': 35.94}, 'value_eV': f(born),
                      'expression': 'Weller 1982 solvent correction'}
    # two-sphere solvent reorganization (Marcus, J. Chem. Phys. 24, 966 (1956)):
    # lambda_s = e^2/(4 pi eps0) (1/(2 rD) + 1/(2 rA) - 1/R)(1/n^2 - 1/eps_s)
    n = mp.mpf('1.3442')
    lam = COUL_EV_A * (1 / (2 * rD) + 1 / (2 * rA) - 1 / R) * (1 / n ** 2 - 1 / eps)
    c['two_sphere_lambda_s'] = {'inputs': {'r_D_A': 4, 'r_A_A': 4, 'R_A': 10, 'n': 1.3442, 'eps_s': 35.94},
                                'value_eV': f(lam), 'expression': 'Marcus 1956 two-sphere model'}
    # lifetimes: k_ET = 1/tau - 1/tau_ref; yield = k_ET tau
    k = 1 / mp.mpf('0.5e-9') - 1 / mp.mpf('5e-9')
    c['rate_from_lifetimes'] = {'inputs': {'tau_s': 0.5e-9, 'tau_ref_s': 5e-9}, 'rate_per_s': f(k),
                                'yield': f(k * mp.mpf('0.5e-9')), 'expression': 'k = 1/tau - 1/tau_ref'}
    # classical Marcus peak (Marcus 1956; Hush 1958 form): k_max = (2 pi/hbar) V^2 (4 pi lambda k_B T)^(-1/2)
    V, L = mp.mpf('0.01'), mp.mpf('0.8')
    c['classical_peak'] = {'inputs': {'V_eV': 0.01, 'lambda_eV': 0.8, 'T_K': 298.15},
                           'rate_per_s': f(2 * mp.pi / HBAR_EV_S * V ** 2 / mp.sqrt(4 * mp.pi * L * KB_EV_K * T)),
                           'expression': 'k at dG = -lambda'}
    path = os.path.join(os.path.dirname(__file__), '..', '..', 'tests', 'fixtures', 'physics', 'worked-checks-mpmath.json')
    with open(path, 'w') as fh:
        json.dump(out, fh, indent=1)
        fh.write('\n')


if __name__ == '__main__':
    main()
