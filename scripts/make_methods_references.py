#!/usr/bin/python3
"""Reference values for the methods bn-filter, uc, hp-forecast and hamilton-average, from outside
the project. Run with Debian's Python (python3-statsmodels 0.13.5, python3-scipy, python3-numpy):

    /usr/bin/python3 scripts/make_methods_references.py

Writes tests/fixtures/methods-references.json; every entry names what produced it. The data:
100 x log real GDP from datasets/reference/us-macrodata-1959q1-2009q3.csv (statsmodels' macro
data, public domain).
"""
import csv
import os
import sys
import warnings

import numpy as np
import scipy
import statsmodels
from scipy.optimize import minimize, rosen
from statsmodels.regression.linear_model import OLS

from make_realtime_reference import write_fixture
from statsmodels.tsa.ar_model import ar_select_order
from statsmodels.tsa.filters.hp_filter import hpfilter
from statsmodels.tsa.statespace.structural import UnobservedComponents

warnings.simplefilter('ignore')
ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def load():
    with open(os.path.join(ROOT, 'datasets/reference/us-macrodata-1959q1-2009q3.csv')) as f:
        rows = list(csv.DictReader(f))
    return 100 * np.log(np.array([float(r['realgdp']) for r in rows]))


def arr(a):
    return [None if np.isnan(v) else float(v) for v in np.asarray(a, dtype=float)]


def uc_model(y, trend):
    return UnobservedComponents(y, level=True, stochastic_level=True, trend=True,
                                stochastic_trend=(trend == 'local-linear'), irregular=False, autoregressive=2)


def uc_refs(y):
    out = []
    given = {'local-linear': [0.5, 0.01, 0.4, 1.3, -0.4], 'random-walk-drift': [0.45, 0.3, 1.5, -0.6]}
    for trend, params in given.items():
        m = uc_model(y, trend)
        at = m.smooth(np.array(params))
        fit = m.fit(disp=False)
        out.append({
            'source': 'statsmodels.tsa.statespace.structural.UnobservedComponents(level, stochastic_level, trend, '
                      'stochastic_trend=%s, irregular=False, autoregressive=2), default approximate diffuse start' % (trend == 'local-linear'),
            'trend': trend,
            'paramNames': m.param_names,
            'given': params,
            'loglike': float(at.llf),
            'level': arr(at.smoothed_state[0]),
            'cycle': arr(at.smoothed_state[2]),
            'cycleVariance': arr(at.smoothed_state_cov[2, 2]),
            'fit': {'params': [float(v) for v in fit.params], 'loglike': float(fit.llf), 'cycle': arr(fit.smoothed_state[2])},
        })
    return out


def hp_forecast_refs(y):
    dy = np.diff(y)
    out = []
    for order, horizon, lam in [(2, 12, 1600.0), (4, 8, 1600.0), (0, 12, 1600.0)]:
        X = np.column_stack([np.ones(len(dy) - order)] + [dy[order - j:len(dy) - j] for j in range(1, order + 1)])
        res = OLS(dy[order:], X).fit()
        hist = list(dy)
        for _ in range(horizon):
            hist.append(res.params[0] + sum(res.params[j] * hist[-j] for j in range(1, order + 1)))
        ext = np.concatenate([y, y[-1] + np.cumsum(hist[len(dy):])])
        cycle, trend = hpfilter(ext, lam)
        out.append({'source': 'statsmodels OLS on [1, lags of diff(y)], iterated forecasts, then statsmodels hpfilter',
                    'arOrder': order, 'horizon': horizon, 'lambda': lam,
                    'coefficients': [float(v) for v in res.params], 'extended': arr(ext), 'trend': arr(trend), 'cycle': arr(cycle[:len(y)])})
    sel = ar_select_order(dy, maxlag=8, ic='bic', trend='c')
    return {'cases': out, 'bicOrder': {'source': "statsmodels ar_select_order(diff(y), maxlag=8, ic='bic', trend='c')",
                                      'maxOrder': 8, 'order': int(len(sel.ar_lags or []))}}


def hamilton_average_refs(y):
    n = len(y)
    p = 4
    cycles = []
    for h in range(4, 13):
        rows = range(p - 1, n - h)
        X = np.array([[1.0] + [y[t - j] for j in range(p)] for t in rows])
        Y = np.array([y[t + h] for t in rows])
        beta = np.linalg.lstsq(X, Y, rcond=None)[0]
        c = np.full(n, np.nan)
        for t in rows:
            c[t + h] = Y[t - (p - 1)] - X[t - (p - 1)] @ beta
        cycles.append(c)
    return {'source': 'numpy.linalg.lstsq per horizon h = 4..12, p = 4; mean of the residual cycles',
            'hMin': 4, 'hMax': 12, 'p': 4, 'cycle': arr(np.mean(cycles, axis=0))}


def bn_refs(y):
    dy = np.diff(y)
    x = dy - dy.mean()
    phi = float(np.linalg.lstsq(x[:-1, None], x[1:], rcond=None)[0][0])
    ar1 = np.concatenate([[np.nan], -phi / (1 - phi) * x])
    # AR(12) with rho = 1 - 1/sqrt(delta) imposed, least squares on the Dickey-Fuller form, and the
    # BN cycle in its matrix form -e1' F (I - F)^{-1} X_t.
    p, delta = 12, 0.5
    rho = 1 - 1 / np.sqrt(delta)
    rows = range(p, len(x))
    Z = np.array([[x[t - j] - x[t - j - 1] for j in range(1, p)] for t in rows])
    Y = np.array([x[t] - rho * x[t - 1] for t in rows])
    star = np.linalg.lstsq(Z, Y, rcond=None)[0]
    phis = np.zeros(p)
    phis[0] = rho + star[0]
    phis[1:p - 1] = star[1:] - star[:-1]
    phis[p - 1] = -star[-1]
    F = np.zeros((p, p))
    F[0] = phis
    F[1:, :-1] = np.eye(p - 1)
    w = (F @ np.linalg.inv(np.eye(p) - F))[0]
    c = np.full(len(y), np.nan)
    for t in range(p, len(y)):
        c[t] = -w @ np.array([x[t - 1 - j] for j in range(p)])
    return {'ar1None': {'source': 'closed form -phi/(1-phi)*(dy - mean), phi by numpy least squares on demeaned growth',
                        'phi': phi, 'cycle': arr(ar1)},
            'imposed': {'source': 'numpy: restricted least squares, companion matrix, -e1 F (I-F)^-1 X',
                        'p': p, 'delta': delta, 'phi': [float(v) for v in phis], 'cycle': arr(c)}}


def range_refs():
    rng = np.random.default_rng(13)
    cycles = rng.normal(size=(7, 40))
    cycles[rng.random(size=(7, 40)) < 0.2] = np.nan
    cycles[:, 5] = np.nan
    return {'source': 'numpy.nanmedian, nanmin, nanmax over methods; numpy.quantile (linear) of the first row',
            'cycles': [arr(c) for c in cycles],
            'median': arr(np.nanmedian(cycles, axis=0)), 'min': arr(np.nanmin(cycles, axis=0)), 'max': arr(np.nanmax(cycles, axis=0)),
            'quantiles': {'q': [0.05, 0.5, 0.95], 'of': arr(cycles[1][~np.isnan(cycles[1])]),
                          'values': [float(np.quantile(cycles[1][~np.isnan(cycles[1])], q)) for q in (0.05, 0.5, 0.95)]}}


def main():
    y = load()
    r = minimize(rosen, [-1.2, 1.0], method='BFGS')
    out = {
        'generator': {'script': 'scripts/make_methods_references.py', 'python': sys.version.split()[0],
                      'statsmodels': statsmodels.__version__, 'scipy': scipy.__version__, 'numpy': np.__version__},
        'y': arr(y),
        'uc': uc_refs(y),
        'hpForecast': hp_forecast_refs(y),
        'hamiltonAverage': hamilton_average_refs(y),
        'bn': bn_refs(y),
        'range': range_refs(),
        'bfgs': {'source': "scipy.optimize.minimize(rosen, [-1.2, 1], method='BFGS')", 'x': [float(v) for v in r.x], 'fun': float(r.fun)},
    }
    write_fixture(out, 'methods-references.json')


if __name__ == '__main__':
    main()
