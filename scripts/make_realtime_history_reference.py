#!/usr/bin/python3
"""Reference for the real-time revision analysis on a long release history, computed with numpy
and statsmodels outside the project (Debian python3-statsmodels 0.13, python3-numpy 1.24):

    /usr/bin/python3 scripts/make_realtime_history_reference.py

Reads datasets/demo/EST_GDP_RT_history.csv (the invented demo history of real GDP: 84 quarterly
releases in one wide table, release dates in row 2, the header in row 3), takes each release's
column as one vintage (from its first to its last value), applies statsmodels' hpfilter
(λ = 1600) to 100 × log of every vintage, and computes the statistics of Orphanides and van
Norden (2002) for the real-time end points and for the quasi-real-time estimates (the latest
vintage cut at each quarter from the 24th on) against the final estimate, with the same
definitions as scripts/make_realtime_reference.py. Writes tests/fixtures/realtime-history.json.
"""
import csv
import os

import numpy as np
import statsmodels

from make_realtime_reference import LAMBDA, ROOT, realtime_reference, write_fixture

SOURCE = 'datasets/demo/EST_GDP_RT_history.csv'


def read_history(path):
    with open(path) as f:
        rows = list(csv.reader(f))
    dates, header, data = rows[1], rows[2], rows[3:]
    vintages = []
    for c in range(1, len(header)):
        cells = [(r[0], r[c]) for r in data if c < len(r) and r[c] != '']
        vintages.append({'asOf': dates[c], 'periods': [p for p, _ in cells], 'values': np.array([float(v) for _, v in cells])})
    return vintages


def main():
    vintages = read_history(os.path.join(ROOT, SOURCE))
    generator = {'script': 'scripts/make_realtime_history_reference.py', 'statsmodels': statsmodels.__version__, 'numpy': np.__version__, 'series': 'EST_GDP_RT (invented demo history, %d releases)' % len(vintages), 'source': SOURCE, 'lambda': LAMBDA, 'transform': 'log100'}
    write_fixture({'generator': generator, **realtime_reference([(v['periods'], v['values']) for v in vintages])}, 'realtime-history.json')


if __name__ == '__main__':
    main()
