/**
 * The Python program behind "Rerun as a script" (script.ts fills in the study). It fetches the
 * study's exact vintage through the API with a token from the environment, recomputes the
 * decomposition with statsmodels where statsmodels has the method (hpfilter, bkfilter, cffilter,
 * UnobservedComponents smoothed at the study's fitted parameters) and through POST /decompose
 * otherwise, compares the result with the numbers the study showed, and prints the largest
 * difference. Standard library, numpy and statsmodels only. Kept as text: it is never run here.
 */
export const SCRIPT_TEMPLATE = String.raw`#!/usr/bin/env python3
"""Rerun of Tidegauge study __STUDY_ID__, written by Tidegauge on __WRITTEN_AT__.

Fetches the study's vintage through the Tidegauge API, recomputes the decomposition and checks
it against the numbers the study showed. Needs Python 3 with numpy, and statsmodels for the
methods it has (Hodrick-Prescott, Baxter-King, Christiano-Fitzgerald, unobserved components).

    export TIDEGAUGE_TOKEN=...   # an API token (Profile page); it acts with your roles
    export TIDEGAUGE_URL=__ORIGIN__   # optional: where Tidegauge runs
    python3 __FILENAME__

Exit status: 0 when the numbers agree within the tolerance printed, 1 when they do not, 2 when
the data cannot be fetched. The token is read from the environment and never written here.
"""
import json
import math
import os
import sys
import urllib.error
import urllib.request

STUDY = json.loads(r'''__STUDY_JSON__''')
SHOWN = json.loads(r'''__SHOWN_JSON__''')


def api(method, path, body=None):
    token = os.environ.get("TIDEGAUGE_TOKEN")
    if not token:
        print("Set TIDEGAUGE_TOKEN to an API token (Profile page) before running this script.", file=sys.stderr)
        sys.exit(2)
    base = os.environ.get("TIDEGAUGE_URL", STUDY["origin"]).rstrip("/")
    data = json.dumps(body).encode("utf-8") if body is not None else None
    req = urllib.request.Request(base + path, data=data, method=method)
    req.add_header("Authorization", "Bearer " + token)
    req.add_header("Accept", "application/json")
    if data is not None:
        req.add_header("Content-Type", "application/json")
    try:
        with urllib.request.urlopen(req, timeout=120) as res:
            return json.loads(res.read().decode("utf-8"))
    except urllib.error.HTTPError as e:
        try:
            message = json.loads(e.read().decode("utf-8"))["error"]["message"]
        except Exception:
            message = e.reason
        print("%s %s answered %s: %s" % (method, path, e.code, message), file=sys.stderr)
        sys.exit(2)
    except urllib.error.URLError as e:
        print("Could not reach %s: %s" % (base, e.reason), file=sys.stderr)
        sys.exit(2)


def transformed(values):
    t = STUDY["transform"]
    out = []
    for v in values:
        if v is None:
            out.append(float("nan"))
        elif t == "none":
            out.append(float(v))
        elif v <= 0:
            print("A value of %r cannot be logged." % v, file=sys.stderr)
            sys.exit(2)
        else:
            out.append(math.log(v) * (100.0 if t == "log100" else 1.0))
    return out


def with_statsmodels(x):
    """The decomposition by statsmodels, or None when it has no such method or the data have gaps."""
    import numpy as np
    import statsmodels
    m, p = STUDY["method"], STUDY["params"]
    y = np.array(x, dtype=float)
    gaps = bool(np.isnan(y).any())
    version = "statsmodels " + statsmodels.__version__
    if m == "hp" and not gaps:
        from statsmodels.tsa.filters.hp_filter import hpfilter
        cycle, trend = hpfilter(y, lamb=p["lambda"])
        return "statsmodels.tsa.filters.hp_filter.hpfilter (%s)" % version, list(cycle), list(trend)
    if m == "baxter-king" and not gaps:
        from statsmodels.tsa.filters.bk_filter import bkfilter
        k = int(p["k"])
        inner = bkfilter(y, low=p["low"], high=p["high"], K=k)
        cycle = [float("nan")] * k + list(inner) + [float("nan")] * k
        return "statsmodels.tsa.filters.bk_filter.bkfilter (%s)" % version, cycle, [a - c for a, c in zip(y, cycle)]
    if m == "christiano-fitzgerald" and not gaps:
        from statsmodels.tsa.filters.cf_filter import cffilter
        cycle, trend = cffilter(y, low=p["low"], high=p["high"], drift=bool(p["drift"]))
        return "statsmodels.tsa.filters.cf_filter.cffilter (%s)" % version, list(cycle), list(trend)
    if m == "uc":
        from statsmodels.tsa.statespace.structural import UnobservedComponents
        fitted = STUDY["diagnostics"]["params"]
        local = p["trend"] == "local-linear"
        model = UnobservedComponents(y, level=True, stochastic_level=True, trend=True, stochastic_trend=local, irregular=False, autoregressive=2)
        names = ["sigma2Level", "sigma2Slope", "sigma2Cycle", "phi1", "phi2"] if local else ["sigma2Level", "sigma2Cycle", "phi1", "phi2"]
        res = model.smooth(np.array([fitted[n] for n in names]))
        cycle = [c if not math.isnan(v) else float("nan") for c, v in zip(res.smoothed_state[2], y)]
        return "statsmodels UnobservedComponents smoothed at the study's fitted parameters (%s)" % version, cycle, list(res.smoothed_state[0])
    return None


def with_api(values, why):
    body = {"frequency": STUDY["frequency"], "start": STUDY["start"], "values": values, "transform": STUDY["transform"], "method": STUDY["method"], "params": STUDY["params"]}
    r = api("POST", "/api/v1/decompose", body)
    nan = float("nan")
    return "Tidegauge POST /api/v1/decompose (%s)" % why, [nan if v is None else v for v in r["cycle"]], [nan if v is None else v for v in r["trend"]]


def largest(a, b, periods):
    worst, where, n = 0.0, None, 0
    for i, (x, y) in enumerate(zip(a[: len(periods)], b[: len(periods)])):
        if y is None or x is None or math.isnan(float(x)):
            continue
        n += 1
        d = float(abs(x - y))
        if d > worst or where is None:
            worst, where = max(worst, d), periods[i]
    return worst, where, n


def main():
    obs = api("GET", "/api/v1/series/%d/vintages/%d/observations" % (STUDY["seriesId"], STUDY["vintage"]))
    stored = dict(zip(obs["periods"], obs["values"]))
    periods = SHOWN["periods"][: STUDY["dataLength"]]
    values = [stored.get(p) for p in periods]
    done, why = None, "statsmodels has no such method"
    if STUDY["method"] in ("hp", "baxter-king", "christiano-fitzgerald") and None in values:
        why = "the data have gaps, which statsmodels' filters do not take"
    try:
        done = with_statsmodels(transformed(values))
    except ImportError as e:
        why = "statsmodels is not installed: %s" % e
    engine, cycle, trend = done if done else with_api(values, why)
    scale = max([abs(v) for v in SHOWN["cycle"][: len(periods)] if v is not None] or [1.0])
    d_cycle, at, n = largest(cycle, SHOWN["cycle"], periods)
    d_trend, at_trend, _ = largest(trend, SHOWN["trend"], periods)
    tolerance = STUDY["tolerance"] * max(scale, 1.0)
    ok = bool(n > 0 and d_cycle <= tolerance)
    print("Study %d: %s" % (STUDY["id"], STUDY["title"]))
    print("Series %s, vintage %d (data as of %s); %s" % (STUDY["seriesCode"], STUDY["vintage"], STUDY["asOf"], STUDY["methodLine"]))
    print("Recomputed with %s" % engine)
    print("Periods compared: %d" % n)
    print("Largest difference in the cycle: %.3g (at %s)" % (d_cycle, at))
    print("Largest difference in the trend: %.3g (at %s)" % (d_trend, at_trend))
    print(("Agrees with the study within %.3g." if ok else "DIFFERS from the study by more than %.3g.") % tolerance)
    print("RESULT " + json.dumps({"study": STUDY["id"], "engine": engine, "periods": n, "largestDifference": d_cycle, "trendDifference": d_trend, "tolerance": tolerance, "ok": ok}))
    sys.exit(0 if ok else 1)


if __name__ == "__main__":
    main()
`;
