#!/usr/bin/python3
"""Reference values for Tidegauge's decomposition library, from outside the project.

Run with Debian's Python (python3-statsmodels 0.13, python3-scipy 1.10, python3-numpy 1.24):

    /usr/bin/python3 scripts/make_references.py

Writes tests/fixtures/references.json. Every entry names the function that produced it.
The data: datasets/reference/us-macrodata-1959q1-2009q3.csv (statsmodels' macrodata, public domain).
"""
import csv
import json
import math
import os
import sys
from fractions import Fraction

import numpy as np
import scipy
import statsmodels
from scipy.linalg import solveh_banded, eigvalsh
from scipy.optimize import lsq_linear
from statsmodels.tsa.filters.bk_filter import bkfilter
from statsmodels.tsa.filters.cf_filter import cffilter
from statsmodels.tsa.filters.hp_filter import hpfilter

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def load():
    with open(os.path.join(ROOT, 'datasets/reference/us-macrodata-1959q1-2009q3.csv')) as f:
        rows = list(csv.DictReader(f))
    cols = {k: np.array([float(r[k]) for r in rows]) for k in rows[0].keys()}
    periods = [f"{int(float(r['year']))}-Q{int(float(r['quarter']))}" for r in rows]
    return cols, periods


def second_difference(n):
    D = np.zeros((n - 2, n))
    for i in range(n - 2):
        D[i, i:i + 3] = [1, -2, 1]
    return D


def arr(a):
    return [None if (isinstance(v, float) and math.isnan(v)) else float(v) for v in np.asarray(a, dtype=float)]


def main():
    cols, periods = load()
    log_gdp = np.log(cols['realgdp'])
    log100_gdp = 100 * log_gdp
    out = {
        'generator': {
            'script': 'scripts/make_references.py',
            'python': sys.version.split()[0],
            'statsmodels': statsmodels.__version__,
            'scipy': scipy.__version__,
            'numpy': np.__version__,
            'data': 'datasets/reference/us-macrodata-1959q1-2009q3.csv',
        },
        'periods': periods,
        'series': {
            'realgdp': arr(cols['realgdp']),
            'realcons': arr(cols['realcons']),
            'unemp': arr(cols['unemp']),
            'infl': arr(cols['infl']),
        },
    }

    # Hodrick–Prescott: statsmodels.tsa.filters.hp_filter.hpfilter (sparse direct solve).
    hp = []
    for name, y, lam in [
        ('log realgdp', log_gdp, 1600.0),
        ('log realgdp', log_gdp, 400000.0),
        ('log realcons', np.log(cols['realcons']), 1600.0),
        ('unemp', cols['unemp'], 1600.0),
        ('infl', cols['infl'], 129600.0),
    ]:
        cycle, trend = hpfilter(y, lam)
        hp.append({'source': 'statsmodels hpfilter', 'input': name, 'lambda': lam, 'y': arr(y), 'trend': arr(trend), 'cycle': arr(cycle)})
    out['hp'] = hp

    # One-sided HP: the end point of hpfilter on each expanding sample y[:t+1], t >= 2.
    one = []
    for lam in (1600.0, 400000.0):
        ends = [float('nan'), float('nan')]
        for t in range(2, len(log100_gdp)):
            _, tr = hpfilter(log100_gdp[:t + 1], lam)
            ends.append(tr[-1])
        one.append({'source': 'statsmodels hpfilter on expanding samples (end points)', 'input': '100 log realgdp', 'lambda': lam, 'y': arr(log100_gdp), 'trend': arr(ends)})
    out['hpOneSided'] = one

    # Baxter–King: statsmodels bkfilter (cycle of length n − 2K).
    bk = []
    for name, y, low, high, K in [('log realgdp', log_gdp, 6, 32, 12), ('infl', cols['infl'], 6, 32, 12), ('unemp', cols['unemp'], 2, 8, 3)]:
        c = bkfilter(y, low, high, K)
        full = [float('nan')] * K + list(c) + [float('nan')] * K
        bk.append({'source': 'statsmodels bkfilter', 'input': name, 'low': low, 'high': high, 'k': K, 'y': arr(y), 'cycle': arr(full)})
    out['baxterKing'] = bk

    # Christiano–Fitzgerald: statsmodels cffilter.
    cf = []
    for name, y, low, high, drift in [('log realgdp', log_gdp, 6, 32, True), ('unemp', cols['unemp'], 6, 32, False), ('infl', cols['infl'], 2, 8, True)]:
        c, _ = cffilter(y, low, high, drift)
        cf.append({'source': 'statsmodels cffilter', 'input': name, 'low': low, 'high': high, 'drift': drift, 'y': arr(y), 'cycle': arr(c)})
    out['christianoFitzgerald'] = cf

    # Hamilton (2018): numpy.linalg.lstsq of y[t+h] on 1, y[t], ..., y[t-p+1].
    ham = []
    for name, y, h, p in [('100 log realgdp', log100_gdp, 8, 4), ('unemp', cols['unemp'], 8, 4), ('100 log realcons', 100 * np.log(cols['realcons']), 4, 2)]:
        n = len(y)
        rows = range(p - 1, n - h)
        X = np.array([[1.0] + [y[t - j] for j in range(p)] for t in rows])
        Y = np.array([y[t + h] for t in rows])
        beta, *_ = np.linalg.lstsq(X, Y, rcond=None)
        trend = [float('nan')] * n
        cycle = [float('nan')] * n
        for t in rows:
            fit = X[t - (p - 1)] @ beta
            trend[t + h] = fit
            cycle[t + h] = y[t + h] - fit
        ham.append({'source': 'numpy.linalg.lstsq', 'input': name, 'h': h, 'p': p, 'y': arr(y), 'trend': arr(trend), 'cycle': arr(cycle), 'coefficients': arr(beta)})
    out['hamilton'] = ham

    # Boosted HP (Phillips and Shi 2021): iterate hpfilter on the cycle; IC with dense matrices.
    boosted = []
    for name, y, lam in [('100 log realgdp', log100_gdp, 1600.0), ('unemp', cols['unemp'], 1600.0)]:
        n = len(y)
        D = second_difference(n)
        S = np.linalg.inv(np.eye(n) + lam * D.T @ D)
        IS = np.eye(n) - S
        tr_IS = np.trace(IS)
        c1 = None
        c = y.copy()
        ics = []
        cycles = []
        power = np.eye(n)
        stop = None
        for m in range(1, 101):
            c, _ = hpfilter(c, lam)
            power = IS @ power
            if m == 1:
                c1 = c.copy()
            B = np.eye(n) - power
            ic = (c @ c) / (c1 @ c1) + math.log(n) * np.trace(B) / tr_IS
            ics.append(float(ic))
            cycles.append(c.copy())
            if m >= 2 and ics[-1] > ics[-2]:
                stop = m - 1
                break
        if stop is None:
            stop = 100
        fixed3 = y.copy()
        for _ in range(3):
            fixed3, _ = hpfilter(fixed3, lam)
        boosted.append({'source': 'statsmodels hpfilter iterated; IC with dense numpy matrices', 'input': name, 'lambda': lam, 'y': arr(y),
                        'iterationsUsed': stop, 'criterion': ics, 'cycle': arr(cycles[stop - 1]), 'cycleFixed3': arr(fixed3)})
    out['boostedHp'] = boosted

    # ℓ1 trend filtering, small case: the dual as a bounded least-squares problem,
    # min ||Dᵀν − y||² s.t. −λ ≤ ν ≤ λ, by scipy.optimize.lsq_linear (BVLS); x = y − Dᵀν.
    l1 = []
    y_small = log100_gdp[:60]
    for lam in (2.0, 20.0):
        n = len(y_small)
        D = second_difference(n)
        res = lsq_linear(D.T, y_small, bounds=(-lam, lam), method='bvls', tol=1e-15, lsmr_tol='auto', max_iter=10000)
        x = y_small - D.T @ res.x
        obj = 0.5 * np.sum((y_small - x) ** 2) + lam * np.sum(np.abs(D @ x))
        l1.append({'source': 'scipy.optimize.lsq_linear (bvls) on the dual', 'input': '100 log realgdp, first 60 quarters', 'lambda': lam, 'y': arr(y_small), 'trend': arr(x), 'objective': float(obj)})
    out['l1Trend'] = l1

    # Banded solves: scipy.linalg.solveh_banded (LAPACK pbsv) on random SPD banded matrices.
    rng = np.random.default_rng(20261201)
    banded = []
    for n, b in [(40, 1), (60, 2), (50, 3), (7, 2)]:
        A = np.zeros((n, n))
        for k in range(1, b + 1):
            off = rng.uniform(-1, 1, n - k)
            A += np.diag(off, k) + np.diag(off, -k)
        A += np.diag(rng.uniform(0.5, 1.5, n) + 2 * b)
        r = rng.normal(size=n)
        ab = np.zeros((b + 1, n))
        for k in range(b + 1):
            ab[b - k, k:] = np.diag(A, k)
        x = solveh_banded(ab, r)
        bands = [arr(np.diag(A, k)) for k in range(b + 1)]
        banded.append({'source': 'scipy.linalg.solveh_banded', 'n': n, 'b': b, 'diagonals': bands, 'rhs': arr(r), 'x': arr(x)})
    out['banded'] = banded

    # Eigenvalues of D·Dᵀ (Toeplitz 6, −4, 1): scipy.linalg.eigvalsh on the dense matrix.
    eig = []
    for n in (12, 50, 203):
        D = second_difference(n)
        eig.append({'source': 'scipy.linalg.eigvalsh', 'n': n, 'eigenvalues': arr(np.sort(eigvalsh(D @ D.T)))})
    out['eigen'] = eig

    # Exact HP trends in rational arithmetic (fractions.Fraction), for extreme λ where floating
    # references lose digits: Gaussian elimination on (I + λDᵀD)τ = y with exact numbers.
    exact = []
    y_ex = [Fraction(v).limit_denominator(10**6) for v in log100_gdp[:30]]
    for lam in (Fraction(1, 10**6), Fraction(1600), Fraction(10**12)):
        tau = exact_hp(y_ex, lam)
        exact.append({'source': 'exact rational Gaussian elimination (fractions)', 'lambda': float(lam), 'y': [float(v) for v in y_ex],
                      'trend': [float(v) for v in tau], 'cycle': [float(a - b) for a, b in zip(y_ex, tau)]})
    # With gaps (weight zero at missing values), exactly: (W + λDᵀD)τ = Wy.
    gaps = []
    for lam in (Fraction(1600), Fraction(10**12)):
        w = [0 if i in (7, 8, 19) else 1 for i in range(len(y_ex))]
        tau = exact_hp(y_ex, lam, w)
        gaps.append({'source': 'exact rational Gaussian elimination (fractions), weights 0 at the gaps', 'lambda': float(lam),
                     'y': [None if w[i] == 0 else float(v) for i, v in enumerate(y_ex)], 'trend': [float(v) for v in tau]})
    out['exactHpGaps'] = gaps
    # The small worked example of the documentation.
    exact.append({'source': 'exact rational Gaussian elimination (fractions)', 'lambda': 1.0, 'y': [1.0, 2.0, 4.0, 7.0, 11.0],
                  'trend': [float(v) for v in exact_hp([Fraction(v) for v in (1, 2, 4, 7, 11)], Fraction(1))],
                  'trendFractions': [str(v) for v in exact_hp([Fraction(v) for v in (1, 2, 4, 7, 11)], Fraction(1))]})
    out['exactHp'] = exact

    path = os.path.join(ROOT, 'tests/fixtures/references.json')
    with open(path, 'w') as f:
        json.dump(out, f, separators=(',', ':'), allow_nan=True)
        f.write('\n')
    print('wrote', path)


def exact_hp(y, lam, w=None):
    n = len(y)
    w = w or [1] * n
    A = [[Fraction(0)] * n for _ in range(n)]
    for i in range(n):
        A[i][i] = Fraction(w[i])
    for r in range(n - 2):
        s = [1, -2, 1]
        for a in range(3):
            for b in range(3):
                A[r + a][r + b] += lam * s[a] * s[b]
    rhs = [y[i] * w[i] for i in range(n)]
    for col in range(n):
        piv = A[col][col]
        for row in range(col + 1, min(n, col + 3)):
            f = A[row][col] / piv
            if f == 0:
                continue
            for k in range(col, min(n, col + 3)):
                A[row][k] -= f * A[col][k]
            rhs[row] -= f * rhs[col]
    x = [Fraction(0)] * n
    for i in range(n - 1, -1, -1):
        s = rhs[i] - sum(A[i][k] * x[k] for k in range(i + 1, min(n, i + 3)))
        x[i] = s / A[i][i]
    return x


if __name__ == '__main__':
    main()
