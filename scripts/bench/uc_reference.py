#!/usr/bin/python3
"""Times statsmodels' UnobservedComponents fit of the model the `uc` method estimates (local-linear
trend, no irregular, AR(2) cycle) on the series in argv[1] (little-endian float64); prints JSON with
the median time, the log-likelihood reached and the versions."""
import json
import sys
import time
import warnings

import numpy as np
import statsmodels
from statsmodels.tsa.statespace.structural import UnobservedComponents

warnings.simplefilter('ignore')
y = np.fromfile(sys.argv[1], dtype='<f8')
reps = int(sys.argv[2])
trend = sys.argv[3]


def fit():
    m = UnobservedComponents(y, level=True, stochastic_level=True, trend=True, stochastic_trend=(trend == 'local-linear'),
                             irregular=False, autoregressive=2)
    return m.fit(disp=False)


ts = []
res = None
for _ in range(reps):
    t = time.perf_counter()
    res = fit()
    ts.append((time.perf_counter() - t) * 1000)
ts.sort()
print(json.dumps({'statsmodels': statsmodels.__version__, 'fit_ms': ts[len(ts) // 2], 'loglike': float(res.llf)}))
