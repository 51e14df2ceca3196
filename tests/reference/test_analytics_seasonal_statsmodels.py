"""INDEXSEASONAL core (classical multiplicative factors) against statsmodels'
seasonal_decompose(model="multiplicative") and, for series with gaps (which statsmodels
refuses), against a direct pandas computation of the same documented steps.

Generated data: x_t = 100 exp(0.003 t + 0.04 sin(2 pi t / 90)) * s_{t mod p} * exp(N(0, 0.01^2)),
s = a fixed seasonal pattern (below), monthly 96 and 30 rows (p = 12) and
quarterly 40 rows (p = 4); seed 20260302.
"""
import numpy as np
import pandas as pd
from statsmodels.tsa.seasonal import seasonal_decompose

from refcommon import Checks, parse_args, run_refcli

args = parse_args()
checks = Checks("seasonal factors vs statsmodels / pandas")
rng = np.random.default_rng(20260302)


def series(n, p):
    pattern = {12: [0.95, 0.97, 1.01, 1.03, 1.05, 1.06, 1.04, 1.02, 0.99, 0.97, 0.96, 0.95],
               4: [0.96, 1.03, 1.04, 0.97]}[p]
    t = np.arange(n)
    return 100 * np.exp(0.003 * t + 0.04 * np.sin(2 * np.pi * t / 90)) * np.array(pattern)[t % p] * np.exp(
        rng.normal(0, 0.01, n))


for freq, p, n in (("M", 12, 96), ("Q", 4, 40), ("M", 12, 30)):
    x = series(n, p)
    got = run_refcli(args.refcli, "seasonal", pd.DataFrame({"index": x}), freq=freq)
    dec = seasonal_decompose(x, model="multiplicative", period=p)
    checks.close(f"{freq} {n} rows: factors", got.factor, dec.seasonal, rel=1e-12, source="statsmodels seasonal_decompose")
    checks.close(f"{freq} {n} rows: centred moving average", got.trend, dec.trend, rel=1e-12, source="statsmodels seasonal_decompose")
    checks.close(f"{freq} {n} rows: seasonally adjusted", got.adjusted, x / dec.seasonal, rel=1e-12,
                 source="x / statsmodels seasonal")


def pandas_seasonal(x, p):
    s = pd.Series(x).where(lambda v: v > 0)
    w = np.r_[0.5, np.ones(p - 1), 0.5] / p
    # A window with any missing value has no average: rolling().apply with raw arrays.
    trend = s.rolling(p + 1, center=True).apply(lambda a: np.dot(a, w) if np.isfinite(a).all() else np.nan, raw=True)
    ratio = s / trend
    avg = ratio.groupby(np.arange(len(s)) % p).mean()
    avg = avg / avg.mean()
    factor = avg.to_numpy()[np.arange(len(s)) % p]
    return factor, trend.to_numpy(), (s / factor).to_numpy()


x = series(96, 12)
x[[5, 6, 40, 77]] = np.nan
got = run_refcli(args.refcli, "seasonal", pd.DataFrame({"index": x}), freq="M")
factor, trend, adjusted = pandas_seasonal(x, 12)
checks.close("monthly with gaps: factors", got.factor, factor, rel=1e-12, source="pandas rolling + groupby mean")
checks.close("monthly with gaps: moving average", got.trend, trend, rel=1e-12, source="pandas rolling")
checks.close("monthly with gaps: adjusted", got.adjusted, adjusted, rel=1e-12, source="pandas")

# A value of 0 or less is refused, naming its row (issue 10; it used to be a silent gap).
bad = x.copy()
bad[60] = -1.0
try:
    run_refcli(args.refcli, "seasonal", pd.DataFrame({"index": bad}), freq="M")
    refused = ""
except RuntimeError as e:
    refused = str(e)
checks.true("monthly with -1 in row 61: refused by row",
            "seasonal factors need index values above 0: row 61 holds -1" in refused, refused)

checks.finish()
