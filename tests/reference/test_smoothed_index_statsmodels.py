"""Smoothed INDEXHEDONIC and CHAINRS (native/core/smoothed_index.hpp) against statsmodels and
a dense generalised-least-squares solution (densegls.py).

The period effects the smoother takes are checked against statsmodels' own fits, and the
smoothed index against the dense GLS on statsmodels' effects with their FULL covariance, at
the disturbance variances the core estimated by maximum likelihood (its maximum likelihood is
checked against statsmodels' UnobservedComponents in test_smoothing_statsmodels.py).

Generated market (seed 20260501): 60 months from 2019-01; each month U{60..90} sales; per
sale district A (p .2), B (.4), C (.4); size = exp(N(4.5, 0.25^2)) m^2; rooms =
clip(round(1 + 2 (ln size - 3.9)), 1, 6); type flat / terrace / house (p .5 / .3 / .2); age
U(0, 80);
  ln price = 12 + truth_t + 0.9 (ln size - 4.5) + 0.04 rooms + {flat 0, terrace .1, house .25}
             + {A .1, B 0, C -.1} - 0.002 age + N(0, 0.2^2),
  truth_t = 0.004 t + 0.03 sin(2 pi t / 40) + 0.015 cos(2 pi t / 12).
The segment is district A (10-20 sales a month); its sales of month 17 are removed (a month
without sales).

Checks:
 1. hedonic effects (classical): d*_t = d_t + zbar'b from statsmodels OLS (all period dummies,
    no intercept; zbar = mean of the characteristic terms), and their full covariance
    C V C' (statsmodels cov_params) = diag(variance) + X Sigma X' from the core's loadings;
    HC1: the core's variances = diag of C V_HC1 C'.
 2. the smoothed segment index (smooth=trend; trend + seasonal; level with se=hc1) = dense GLS
    on statsmodels' d* with that covariance (HC1: its diagonal, what the core uses).
 3. borrow=1: the whole range (district a further characteristic) and the segment in one
    model = dense GLS with both fits' full covariances and the documented cross-covariance
    min(h^m_t, 0.99 sqrt(h^m_t h^s_t)) between the two series' independent parts.
 4. realtime=1: the first vintage's values = the smoothed index of the sales up to it; at a
    vintage that re-estimates the variances the movement since t0 = that of the smoothed index
    of its sales; at a vintage in between = the dense GLS on statsmodels' effects of its sales
    at the last estimated variances; bands: the two vintages' variances added.
 5. repeat sales (method=bmn, minhold=0, maxrate=0): statsmodels OLS on the +1/-1 dummies
    (period 0 dropped); effects b_t with the reference period an observation 0 of variance v0
    (mean off-diagonal covariance) and V_tt - v0 for the others (floored at 5 % of V_tt); the
    smoothed index = dense GLS on those (independent) effects.
"""
import numpy as np
import pandas as pd
import statsmodels.api as sm

from densegls import Z975, gls, structure
from refcommon import Checks, parse_args, run_refcli, serial_from_timestamp

args = parse_args()
checks = Checks("smoothed INDEXHEDONIC / CHAINRS vs statsmodels and dense GLS")
R = args.refcli
N = 60
TYPE = {"flat": 0.0, "terrace": 0.1, "house": 0.25}
DIST = {"A": 0.1, "B": 0.0, "C": -0.1}


def truth(t):
    return 0.004 * t + 0.03 * np.sin(2 * np.pi * t / 40) + 0.015 * np.cos(2 * np.pi * t / 12)


rng = np.random.default_rng(20260501)
rows = []
for t in range(N):
    for _ in range(rng.integers(60, 91)):
        dist = rng.choice(["A", "B", "C"], p=[0.2, 0.4, 0.4])
        la = rng.normal(4.5, 0.25)
        rooms = int(np.clip(round(1 + 2 * (la - 3.9)), 1, 6))
        typ = rng.choice(list(TYPE), p=[0.5, 0.3, 0.2])
        age = rng.uniform(0, 80)
        lp = (12 + truth(t) + 0.9 * (la - 4.5) + 0.04 * rooms + TYPE[typ] + DIST[dist] - 0.002 * age
              + rng.normal(0, 0.2))
        day = int(rng.integers(1, 29))
        date = float(serial_from_timestamp(pd.Timestamp(year=2019 + t // 12, month=t % 12 + 1, day=day)))
        rows.append((t, date, np.exp(lp), np.exp(la), rooms, typ, age, dist))
market = pd.DataFrame(rows, columns=["t", "date", "price", "size", "rooms", "type", "age", "district"])
market = market[~((market.district == "A") & (market.t == 17))].reset_index(drop=True)
segA = (market.district == "A").to_numpy()
segment = market[segA].reset_index(drop=True)


def most_frequent(s):
    c = s.value_counts()
    return sorted(c[c == c.max()].index)[0]


def hedonic_sm(df, n_periods, with_district=False, cov="nonrobust"):
    """d*_t and Cov(d*) from statsmodels OLS; NaN rows / columns for periods without sales."""
    months = sorted(df.t.unique())
    cols = {f"P{m}": (df.t == m).astype(float).to_numpy() for m in months}
    chars = {"la": np.log(df["size"].to_numpy()), "rooms": df.rooms.to_numpy(float)}
    for col in (["type", "district"] if with_district else ["type"]):
        ref = most_frequent(df[col])
        for lv in sorted(df[col].unique()):
            if lv != ref:
                chars[f"{col}={lv}"] = (df[col] == lv).astype(float).to_numpy()
    chars["age"] = df.age.to_numpy()
    X = pd.DataFrame({**cols, **chars})
    fit = sm.OLS(np.log(df.price.to_numpy()), X).fit(cov_type=cov)
    zmean = pd.DataFrame(chars).mean().to_numpy()
    C = np.zeros((len(months), X.shape[1]))
    C[np.arange(len(months)), np.arange(len(months))] = 1
    C[:, len(months):] = zmean
    d = C @ fit.params.to_numpy()
    V = C @ fit.cov_params().to_numpy() @ C.T
    dd = np.full(n_periods, np.nan)
    VV = np.full((n_periods, n_periods), np.nan)
    dd[months] = d
    VV[np.ix_(months, months)] = V
    counts = df.groupby("t").size().reindex(range(n_periods), fill_value=0).to_numpy()
    return dd, VV, counts, fit.scale


def frame(df, with_district=False, include=None):
    out = pd.DataFrame({"date": df.date, "price": df.price, "size": df["size"], "rooms": df.rooms,
                        "type": df.type, "age": df.age})
    if with_district:
        out["district"] = df.district
    if include is not None:
        out.insert(2, "include", include.astype(int))
    return out


def observed_cov(V, obs):
    return V[np.ix_(obs, obs)]


def compare_index(name, got, ref, source):
    L, Vl, idx, lo, hi = ref
    checks.close(f"{name}: index", got["index"], idx, rel=1e-8, source=source)
    checks.close(f"{name}: band", np.r_[got.lower, got.upper], np.r_[lo, hi], rel=1e-7, source=source)
    checks.close(f"{name}: log index", got.log, L - L[0], rel=1e-8, abs_=1e-11, source=source)


# ---------------------------------------------------------------- 1. hedonic effects
d, V, counts, s2 = hedonic_sm(segment, N)
eff = run_refcli(R, "hedonic_effects", frame(segment), log=1)
checks.close("effects: d* = d_t + zbar'b", eff.value, d, rel=1e-9, abs_=1e-12,
             source="statsmodels OLS params")
checks.close("effects: sales per period", eff["count"], counts, rel=0, source="pandas groupby size")
k = sum(c.startswith("x") for c in eff.columns)
Xl = eff[[f"x{j + 1}" for j in range(k)]].to_numpy()
Sig = eff[[f"c{j + 1}" for j in range(k)]].to_numpy()[:k]
full = np.diag(eff.variance.to_numpy()) + Xl @ Sig @ Xl.T
obs = np.isfinite(d)
checks.close("effects: Cov(d*) = diag(s^2/n_t) + (Zbar_t - zbar)' s^2 A^-1 (Zbar_s - zbar)",
             full[np.ix_(obs, obs)], V[np.ix_(obs, obs)], rel=1e-7, abs_=1e-13,
             source="statsmodels OLS cov_params, C V C'")
checks.close("effects: month 17 has no effect", eff.value[17], np.nan, source="no sales")
dh, Vh, _, _ = hedonic_sm(segment, N, cov="HC1")
effh = run_refcli(R, "hedonic_effects", frame(segment), log=1, se="hc1")
checks.close("effects HC1: value", effh.value, dh, rel=1e-9, abs_=1e-12, source="statsmodels OLS params")
checks.close("effects HC1: variance = diag of C V_HC1 C'", effh.variance, np.diag(Vh), rel=1e-7,
             source="statsmodels OLS cov_type=HC1")

# ---------------------------------------------------------------- 2. smoothed segment index
for label, opts, trend, seasonal in (("smooth=trend", dict(smooth="trend"), True, False),
                                     ("smooth=trend seasonal=1", dict(smooth="trend", seasonal=1), True, True)):
    got = run_refcli(R, "hedonic_smooth", frame(segment), log=1, **opts)
    T_, Z_, comps = structure(trend, seasonal)
    variances = [got.v_level[0]] + ([got.v_slope[0]] if trend else []) + ([got.v_seasonal[0]] if seasonal else [])
    compare_index(f"segment {label}", got,
                  gls(T_, Z_, comps, variances, d[:, None], observed_cov(V, obs), Z_[0], 0),
                  "dense GLS on statsmodels d* with C V C', the core's ML variances")
    # The band is that of the change from the base, growing with the distance: the gap shows
    # against the mean of its two neighbours.
    checks.true(f"segment {label}: month 17 (no sales) has a value with a wider band",
                got.se[17] > (got.se[16] + got.se[18]) / 2 and np.isfinite(got["index"][17]),
                f"se {got.se[16]:.5f} {got.se[17]:.5f} {got.se[18]:.5f}")
got = run_refcli(R, "hedonic_smooth", frame(segment), log=1, smooth="level", se="hc1")
T_, Z_, comps = structure(False, False)
compare_index("segment smooth=level se=hc1", got,
              gls(T_, Z_, comps, [got.v_level[0]], dh[:, None], np.diag(np.diag(Vh)[obs]), Z_[0], 0),
              "dense GLS on statsmodels HC1 d* with its marginal variances")

# ---------------------------------------------------------------- 3. borrow
dm, Vm, _, s2m = hedonic_sm(market, N, with_district=True)
got = run_refcli(R, "hedonic_smooth", frame(market, True, segA), log=1, smooth="trend", borrow=1)
checks.close("borrow: whole range rows", got.market_rows[0], len(market), rel=0, source="rows of the range")
checks.close("borrow: segment sales per period", got["count"], counts, rel=0, source="pandas groupby size")
nm = market.groupby("t").size().reindex(range(N), fill_value=0).to_numpy()
hm, hs = s2m / nm, s2 / np.maximum(counts, 1)
Y = np.column_stack([dm, d])
order = [(t, i) for t in range(N) for i in range(2) if np.isfinite(Y[t, i])]
Sb = np.zeros((len(order), len(order)))
for a, (t, i) in enumerate(order):
    for b, (u, j) in enumerate(order):
        if i == j:
            Sb[a, b] = (Vm if i == 0 else V)[t, u]
        elif t == u:
            Sb[a, b] = min(hm[t], 0.99 * np.sqrt(hm[t] * hs[t]))
T_, Z_, comps = structure(True, False, borrow=True)
compare_index("borrow (segment index)", got,
              gls(T_, Z_, comps, [got.v_level[0], got.v_slope[0], got.v_deviation[0]], Y, Sb, Z_[1], 0),
              "dense GLS, both statsmodels fits' full covariances and the cross-covariance h^m")

# ---------------------------------------------------------------- 4. real time
rt = run_refcli(R, "hedonic_smooth", frame(segment), log=1, smooth="trend", realtime=1)
t0 = int(rt.t0[0])
checks.close("real time: first vintage at the end of two years", t0, 23, rel=0, source="the documented rule")
first = run_refcli(R, "hedonic_smooth", frame(segment[segment.t <= t0]), log=1, smooth="trend")
checks.close("real time: first two years = the smoothed index of their sales", rt["index"][:t0 + 1],
             first["index"], rel=1e-12, source="refcli smooth on the sales up to t0")
checks.close("real time: their bands", np.r_[rt.lower[:t0 + 1], rt.upper[:t0 + 1]],
             np.r_[first.lower, first.upper], rel=1e-12, source="refcli smooth on the sales up to t0")
var_t0 = first.se.to_numpy() ** 2  # Var(L_t0 - L_0) at t0: its se there
for v in (t0 + 12, t0 + 17):
    sub = segment[segment.t <= v]
    est = t0 + 12 * ((v - t0) // 12)
    vin = run_refcli(R, "hedonic_smooth", frame(segment[segment.t <= est]), log=1, smooth="trend")
    dv, Vv, _, _ = hedonic_sm(sub, v + 1)
    ov = np.isfinite(dv)
    T_, Z_, comps = structure(True, False)
    L, Vl, _, _, _ = gls(T_, Z_, comps, [vin.v_level[0], vin.v_slope[0]], dv[:, None], Vv[np.ix_(ov, ov)], Z_[0], 0)
    move = L[v] - L[t0]
    checks.close(f"real time: movement t0 -> {v} = that of vintage {v}", rt.log[v] - rt.log[t0], move, rel=1e-8,
                 source=f"dense GLS on statsmodels effects of the sales up to month {v}, variances of vintage {est}")
    var_move = Vl[v, v] + Vl[t0, t0] - 2 * Vl[v, t0]
    checks.close(f"real time: band variance at {v} = Var(L_t0 - L_0) + Var(L_v - L_t0)", rt.se[v] ** 2,
                 var_t0[t0] + var_move, rel=1e-7, source="the two vintages, dense GLS")

# ---------------------------------------------------------------- 5. repeat sales
rng = np.random.default_rng(20260502)
sales = []
for p in range(700):
    when = np.sort(rng.choice(N, size=rng.integers(2, 5), replace=False))
    q = rng.normal(0, 0.3)
    for t in when:
        date = float(serial_from_timestamp(pd.Timestamp(year=2019 + t // 12, month=t % 12 + 1, day=int(rng.integers(1, 29)))))
        sales.append((f"h{p}", date, float(np.exp(12 + truth(t) + q + rng.normal(0, 0.08))), t))
rs = pd.DataFrame(sales, columns=["id", "date", "price", "t"]).sort_values(["date", "id"]).reset_index(drop=True)
pairs = []
for _, g in rs.sort_values(["id", "date"]).groupby("id", sort=False):
    g = g.to_numpy()
    for a, b in zip(g[:-1], g[1:]):
        pairs.append((a[3], b[3], np.log(b[2] / a[2])))
pairs = np.array(pairs, dtype=float)
Xr = np.zeros((len(pairs), N))
Xr[np.arange(len(pairs)), pairs[:, 1].astype(int)] += 1
Xr[np.arange(len(pairs)), pairs[:, 0].astype(int)] -= 1
fit = sm.OLS(pairs[:, 2], Xr[:, 1:]).fit()
b = np.r_[0.0, fit.params]
Vr = fit.cov_params()
v0 = np.mean(Vr[~np.eye(N - 1, dtype=bool)])
want_var = np.r_[v0, np.maximum(np.diag(Vr) - v0, 0.05 * np.diag(Vr))]
opts = dict(method="bmn", minhold=0, maxrate=0)
rfr = rs[["id", "date", "price"]]
effr = run_refcli(R, "repeat_sales_effects", rfr, **opts)
checks.close("repeat sales effects: b_t (reference 0)", effr.value, b, rel=1e-9, abs_=1e-12,
             source="statsmodels OLS on +1/-1 dummies")
checks.close("repeat sales effects: v0 and V_tt - v0", effr.variance, want_var, rel=1e-8,
             source="statsmodels OLS cov_params")
got = run_refcli(R, "repeat_sales_smooth", rfr, smooth="trend", **opts)
T_, Z_, comps = structure(True, False)
compare_index("repeat sales smooth=trend", got,
              gls(T_, Z_, comps, [got.v_level[0], got.v_slope[0]], b[:, None], np.diag(want_var), Z_[0], 0),
              "dense GLS on statsmodels b with the independent reading")
plain = run_refcli(R, "repeat_sales_index", rfr, **opts)
err_plain = np.sqrt(np.mean((np.log(plain["index"] / 100) - (truth(np.arange(N)) - truth(0))) ** 2))
err_smooth = np.sqrt(np.mean((got.log - (truth(np.arange(N)) - truth(0))) ** 2))
print(f"    repeat sales: RMSE of the log index vs the generator's truth: plain {err_plain:.4f}, smoothed {err_smooth:.4f}")

checks.finish()
