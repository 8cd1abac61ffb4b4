#!/usr/bin/python3
"""Reference for the real-time revision analysis on a demo series, computed with numpy and
statsmodels outside the project (Debian python3-statsmodels 0.13, python3-numpy 1.24):

    /usr/bin/python3 scripts/make_realtime_reference.py

Reads datasets/demo/EST_GDP_REAL_v*.csv (the invented demo economy), applies statsmodels'
hpfilter (λ = 1600) to 100 × log of every vintage, and computes the statistics of Orphanides and
van Norden (2002) for the real-time end points and for the quasi-real-time estimates (the latest
vintage cut at each quarter from the 24th on) against the final estimate. Writes
tests/fixtures/realtime-demo.json.
"""
import csv
import glob
import json
import os
import re

import numpy as np
import statsmodels
from statsmodels.tsa.filters.hp_filter import hpfilter

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
LAMBDA = 1600.0
MINIMUM = 24  # max(5 years of quarters, 24), as the service uses


def read(path):
    with open(path) as f:
        rows = list(csv.DictReader(f))
    return [r['period'] for r in rows], np.array([float(r['value']) for r in rows])


def stats(rt, final):
    rt = np.asarray(rt, dtype=float)
    final = np.asarray(final, dtype=float)
    ok = ~(np.isnan(rt) | np.isnan(final))
    r, f = rt[ok], final[ok]
    rev = r - f
    opposite = np.sum((np.sign(r) != np.sign(f)) & (r != 0) & (f != 0))
    return {
        'n': int(len(r)),
        'correlation': float(np.corrcoef(r, f)[0, 1]),
        'noiseToSignal': float(np.std(rev, ddof=1) / np.std(f, ddof=1)),
        'oppositeSign': float(opposite / len(r)),
        'meanAbsoluteRevision': float(np.mean(np.abs(rev))),
        'meanRevision': float(np.mean(f - r)),
        'rmseToSd': float(np.sqrt(np.mean(rev ** 2)) / np.std(f, ddof=1)),
    }


def realtime_reference(vintages):
    """Real-time end points, quasi-real-time estimates and their statistics for `vintages`, a list
    of (periods, values) in release order: HP (λ = LAMBDA) on 100 × log of each vintage."""
    cycles = [hpfilter(100 * np.log(y), LAMBDA)[0] for _, y in vintages]
    final_periods, final_y = vintages[-1]
    final = dict(zip(final_periods, cycles[-1]))
    real_time = [{'period': p[-1], 'value': float(c[-1]), 'final': float(final[p[-1]])} for (p, _), c in zip(vintages, cycles)]
    y = 100 * np.log(final_y)
    quasi = []
    for t in range(MINIMUM, len(y) + 1):
        c, _ = hpfilter(y[:t], LAMBDA)
        quasi.append({'period': final_periods[t - 1], 'value': float(c[-1]), 'final': float(final[final_periods[t - 1]])})
    return {
        'realTime': real_time,
        'quasiRealTime': quasi,
        'statistics': {
            'realTime': stats([p['value'] for p in real_time], [p['final'] for p in real_time]),
            'quasiRealTime': stats([q['value'] for q in quasi], [q['final'] for q in quasi]),
        },
    }


def write_fixture(out, name):
    path = os.path.join(ROOT, 'tests/fixtures', name)
    with open(path, 'w') as f:
        json.dump(out, f, indent=1)
        f.write('\n')
    print('wrote', path)


def main():
    files = sorted(glob.glob(os.path.join(ROOT, 'datasets/demo/EST_GDP_REAL_v*.csv')), key=lambda p: int(re.search(r'_v(\d+)', p).group(1)))
    vintages = [read(p) for p in files]
    generator = {'script': 'scripts/make_realtime_reference.py', 'statsmodels': statsmodels.__version__, 'numpy': np.__version__, 'series': 'EST_GDP_REAL (invented demo data)', 'lambda': LAMBDA, 'transform': 'log100'}
    write_fixture({'generator': generator, **realtime_reference(vintages)}, 'realtime-demo.json')


if __name__ == '__main__':
    main()
