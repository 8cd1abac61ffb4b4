#!/usr/bin/python3
"""Times scipy.linalg.solveh_banded (with building its band array) and statsmodels hpfilter on
the same data as the JavaScript bench. Reads little-endian float64 from argv[1]; prints JSON."""
import json
import sys
import time

import numpy as np
import scipy
import statsmodels
from scipy.linalg import solveh_banded
from statsmodels.tsa.filters.hp_filter import hpfilter

y = np.fromfile(sys.argv[1], dtype='<f8')
lam = float(sys.argv[2])
reps = int(sys.argv[3])


def banded(y):
    n = len(y)
    ab = np.zeros((3, n))
    ab[2, :] = 1 + 6 * lam
    ab[2, 0] = ab[2, -1] = 1 + lam
    ab[2, 1] = ab[2, -2] = 1 + 5 * lam
    ab[1, 1:] = -4 * lam
    ab[1, 1] = ab[1, -1] = -2 * lam
    ab[0, 2:] = lam
    return solveh_banded(ab, y)


def median_ms(f, k):
    ts = []
    for _ in range(k):
        t = time.perf_counter()
        f()
        ts.append((time.perf_counter() - t) * 1000)
    ts.sort()
    return ts[len(ts) // 2]


out = {
    'scipy': scipy.__version__,
    'statsmodels': statsmodels.__version__,
    'solveh_banded_ms': median_ms(lambda: banded(y), reps),
    'hpfilter_ms': median_ms(lambda: hpfilter(y, lam), max(3, reps // 3)),
}
trend = banded(y)
out['trend_head'] = trend[:3].tolist()
print(json.dumps(out))
