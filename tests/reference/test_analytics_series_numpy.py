"""INDEXVOLATILITY, INDEXLEADLAG, INDEXSNR and INDEXCOMPARE cores against numpy, pandas and
statsmodels.

Sources: pandas Series.diff/std (volatility), numpy.corrcoef on the complete pairs at each
lag (lead-lag), statsmodels.tsa.stattools.ccf for the sign convention, statsmodels hpfilter
for the signal-to-noise components.

Generated data (seed 20260303), monthly, 160 periods:
- market: ln M_t = cumulative sum of g_t, g_t = 0.002 + 0.9 (g_{t-1} - 0.002) + N(0, 0.003^2)
  (smooth momentum growth) plus 0.06 sin(2 pi t / 64);
- a = 100 exp(ln M_t + N(0, 0.004^2)),  b = 100 exp(ln M_{t-3} + N(0, 0.012^2)), so a leads b
  by 3 months; b's first 3 rows blank; a few rows of each blanked at random;
- for the SNR: x_sigma = 100 exp(S_t + sigma e_t), e_t iid N(0,1), sigma in
  {0.001, 0.003, 0.01, 0.03}, with S = ln M (ranking only: its growth wiggles month to month,
  which the SNR counts as noise) and S = 0.06 sin(2 pi t / 64) + 0.003 t (smooth: the estimate
  must also be near the same definition applied to the true components).
"""
import numpy as np
import pandas as pd
from statsmodels.tsa.filters.hp_filter import hpfilter
from statsmodels.tsa.stattools import ccf

from refcommon import Checks, parse_args, run_refcli

args = parse_args()
checks = Checks("series measures vs numpy / pandas / statsmodels")
rng = np.random.default_rng(20260303)

T = 160
g = np.zeros(T)
g[0] = 0.002
for t in range(1, T):
    g[t] = 0.002 + 0.9 * (g[t - 1] - 0.002) + rng.normal(0, 0.003)
t = np.arange(T)
lnM = np.cumsum(g) + 0.06 * np.sin(2 * np.pi * t / 64)
a = 100 * np.exp(lnM + rng.normal(0, 0.004, T))
b = np.full(T, np.nan)
b[3:] = 100 * np.exp(lnM[:-3] + rng.normal(0, 0.012, T - 3))
a[rng.choice(T, 4, replace=False)] = np.nan
b[rng.choice(np.arange(3, T), 5, replace=False)] = np.nan

# ---- volatility --------------------------------------------------------------------------
for lag, annual in ((1, 0), (3, 0), (12, 0), (1, 1)):
    got = run_refcli(args.refcli, "volatility", pd.DataFrame({"index": b}), lag=lag, annual=annual, freq="M")
    ch = 100 * np.log(pd.Series(b)).diff(lag)
    want = ch.std() * (np.sqrt(12 / lag) if annual else 1)
    checks.close(f"volatility lag {lag} annual {annual}", got.volatility, [want], rel=1e-12, source="pandas diff().std()")
    checks.close(f"volatility lag {lag} changes used", got.changes, [ch.count()], rel=0, source="pandas count()")

# ---- lead-lag ----------------------------------------------------------------------------
def numpy_ccf(a, b, k, maxlag):
    ca = 100 * np.log(pd.Series(a)).diff(k).to_numpy()
    cb = 100 * np.log(pd.Series(b)).diff(k).to_numpy()
    rows = []
    for L in range(-maxlag, maxlag + 1):
        if L >= 0:
            x, y = ca[:T - L], cb[L:]
        else:
            x, y = ca[-L:], cb[:T + L]
        ok = np.isfinite(x) & np.isfinite(y)
        r = np.corrcoef(x[ok], y[ok])[0, 1] if ok.sum() >= 3 else np.nan
        rows.append((L, r, ok.sum()))
    return np.array(rows)


for k, maxlag in ((12, 12), (1, 6), (3, 8)):
    got = run_refcli(args.refcli, "leadlag", pd.DataFrame({"a": a, "b": b}), lag=k, maxlag=maxlag)
    want = numpy_ccf(a, b, k, maxlag)
    checks.close(f"lead-lag change lag {k}: lags", got.lag, want[:, 0], rel=0)
    checks.close(f"lead-lag change lag {k}: correlations", got["corr"], want[:, 1], rel=1e-10, abs_=1e-12,
                 source="numpy.corrcoef on complete pairs (a_t, b_{t+L})")
    checks.close(f"lead-lag change lag {k}: pairs", got.pairs, want[:, 2], rel=0, source="numpy")
    best = int(want[np.nanargmax(want[:, 1]), 0])
    checks.true(f"lead-lag change lag {k}: best lag = argmax = {best}", int(got.lag[got.best == 1].iloc[0]) == best)
got = run_refcli(args.refcli, "leadlag", pd.DataFrame({"a": a, "b": b}))
checks.true("default (year-over-year, maxlag 12): a leads b by 3", int(got.lag[got.best == 1].iloc[0]) == 3
            and len(got) == 25, f"best {got.lag[got.best == 1].tolist()}")
# Sign convention against statsmodels: ccf(x, y)[k] = corr(x_{t+k}, y_t), so with x = b and
# y = a, ccf peaks at k = +3 too (b_{t+3} follows a_t). On gap-free data.
a2 = 100 * np.exp(lnM)
b2 = np.r_[np.full(3, np.nan), a2[:-3]]
ca, cb = np.diff(np.log(a2))[3:], np.diff(np.log(b2))[3:]
sm_best = int(np.argmax(ccf(cb, ca, adjusted=False)[:13]))
got = run_refcli(args.refcli, "leadlag", pd.DataFrame({"a": a2, "b": b2}), lag=1, maxlag=12)
checks.true("sign convention: our best lag = statsmodels ccf(b, a) argmax = +3",
            sm_best == 3 and int(got.lag[got.best == 1].iloc[0]) == 3, f"statsmodels {sm_best}")
got = run_refcli(args.refcli, "leadlag", pd.DataFrame({"a": b2, "b": a2}), lag=1, maxlag=12)
checks.true("swapped: b leads a by -3", int(got.lag[got.best == 1].iloc[0]) == -3)

# ---- signal-to-noise ---------------------------------------------------------------------
lam = 1 / (4 * (1 - np.cos(2 * np.pi / 24)) ** 2)


def snr_direct(x, lamb):
    y = 100 * np.log(x)
    cyc, tr = hpfilter(y, lamb)
    return np.mean(np.diff(tr) ** 2) / np.mean(np.diff(cyc) ** 2)


e = rng.normal(size=T)
smooth = 0.06 * np.sin(2 * np.pi * t / 64) + 0.003 * t
for name, signal in (("momentum market", lnM), ("smooth market", smooth)):
    estimates = []
    for sigma in (0.001, 0.003, 0.01, 0.03):
        x = 100 * np.exp(signal + sigma * e)
        got = run_refcli(args.refcli, "snr", pd.DataFrame({"index": x}), freq="M")
        want = snr_direct(x, lam)
        checks.close(f"{name}, sigma {sigma}: snr = definition via hpfilter(lambda 215.32)", got.snr, [want],
                     rel=1e-8, source="statsmodels hpfilter + numpy")
        estimates.append(float(got.snr.iloc[0]))
        if name == "smooth market":
            # A signal smooth at the two-year scale is split off cleanly: the estimate must be
            # near the ratio of the true components.
            truth = np.mean(np.diff(100 * signal) ** 2) / np.mean(np.diff(100 * sigma * e) ** 2)
            checks.true(f"{name}, sigma {sigma}: estimate {estimates[-1]:.4g} within 25 % of the truth {truth:.4g}",
                        abs(estimates[-1] / truth - 1) < 0.25)
    checks.true(f"{name}: snr ranks the four noise levels correctly", all(x > y for x, y in zip(estimates, estimates[1:])),
                str([round(v, 4) for v in estimates]))
got = run_refcli(args.refcli, "snr", pd.DataFrame({"index": a}), freq="M", **{"lambda": 50})
aa = pd.Series(100 * np.log(a))
# Gaps: our HP bridges them; pairs with a missing end are skipped. Direct: weighted HP by
# numpy on the span (rows with values), then the pair sums.
obs = np.isfinite(a)
f, l = np.argmax(obs), T - 1 - np.argmax(obs[::-1])
m = l - f + 1
K = np.zeros((m - 2, m))
for i in range(m - 2):
    K[i, i:i + 3] = [1, -2, 1]
ys = aa.to_numpy()[f:l + 1]
W = np.isfinite(ys).astype(float)
tau = np.linalg.solve(np.diag(W) + 50 * K.T @ K, np.where(W > 0, ys, 0))
n_ = ys - tau
ok = np.isfinite(ys[1:]) & np.isfinite(ys[:-1])
want = np.sum(np.diff(tau)[ok] ** 2) / np.sum(np.diff(n_)[ok] ** 2)
checks.close("snr with gaps and lambda 50", got.snr, [want], rel=1e-8, source="numpy weighted HP")
checks.close("snr with gaps: pairs", got.pairs, [ok.sum()], rel=0, source="numpy")

# ---- compare -----------------------------------------------------------------------------
frame = pd.DataFrame({"a": a, "b": b})
got = run_refcli(args.refcli, "compare", frame, freq="M")
for i, col in enumerate(["a", "b"]):
    s = frame[col]
    checks.close(f"compare {col}: volatility", got.volatility[i], 100 * np.log(s).diff().std(), rel=1e-12, source="pandas")
    checks.close(f"compare {col}: largest period change", got.maxchange[i], (100 * s.pct_change(fill_method=None)).abs().max(),
                 rel=1e-12, source="pandas pct_change")
    checks.close(f"compare {col}: missing", got.missing[i], s.isna().sum(), rel=0, source="pandas isna")
sm = run_refcli(args.refcli, "snr", pd.DataFrame({"index": b}), freq="M")
checks.close("compare b: snr = INDEXSNR", got.snr[1], sm.snr[0], rel=1e-14)
ll = numpy_ccf(b, a, 12, 12)  # b against the first column a: positive = b leads a
checks.close("compare b: lag vs the first column", got.lag[1], ll[np.nanargmax(ll[:, 1]), 0], rel=0, source="numpy")
checks.close("compare b: corr vs the first column", got["corr"][1], np.nanmax(ll[:, 1]), rel=1e-10, source="numpy")
checks.true("compare: b lags a by 3 (lag -3) and a is smoother (higher snr)", got.lag[1] == -3 and got.snr[0] > got.snr[1])

checks.finish()
