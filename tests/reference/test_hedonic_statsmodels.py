"""INDEXHEDONIC / HEDONICCOEFS / REFHOMEVALUE core against statsmodels OLS
(python3-statsmodels) fitted with explicit period-dummy columns, on generated data.

Generating model (test data, not the demo): 24 months 2020-01 .. 2021-12; month m has
U{70..130} sales, except 2020-07 (none), 2021-05 .. 2021-07 (none: a three-month gap) and
2021-03 (3 sales: a thin month for minsales). Per sale:
  sqft ~ exp(N(7.3, 0.3^2));  bedrooms = clip(round(sqft / 500 + N(0, 0.7^2)), 1, 5);
  district ~ {A .35, B .25, C .2, D .12, E .08};  age ~ U{0..80};
  ln price = 11 + 0.006 m + 0.03 sin(m / 2) + 0.55 ln sqft + beta_bed[bedrooms]
             + beta_district[district] - 0.0025 age + e,   e ~ N(0, (0.1 + 0.003 age)^2)
  (heteroskedastic on purpose, for HC1), beta_bed = {1: -.1, 2: -.03, 3: 0, 4: .05, 5: .08},
  beta_district = {A: 0, B: .1, C: -.15, D: .25, E: .05}.
Plus 6 rows with a blank district, 4 with a blank age and 3 with sqft = 0 (log of a
non-positive value): dropped with their reasons.
The core runs with log=1 (sqft), categorical=2 (bedrooms); district is a text column.
The reference is statsmodels OLS on [const, one dummy per period with sales except the
reference, ln sqft, bedroom and district dummies (most frequent level left out), age].
"""
import numpy as np
import pandas as pd
import statsmodels.api as sm
from scipy import stats as sps

from refcommon import Checks, parse_args, run_refcli, serial_from_timestamp

args = parse_args()
checks = Checks("hedonic vs statsmodels")
rng = np.random.default_rng(20261202)

# ---- data -------------------------------------------------------------------------------
rows = []
beta_bed = {1: -0.1, 2: -0.03, 3: 0.0, 4: 0.05, 5: 0.08}
beta_dist = {"A": 0.0, "B": 0.1, "C": -0.15, "D": 0.25, "E": 0.05}
for m in range(24):
    if m in (6, 16, 17, 18):
        continue
    k = 3 if m == 14 else int(rng.integers(70, 131))
    year, month = 2020 + m // 12, m % 12 + 1
    day = rng.integers(1, 29, k)
    sqft = np.exp(rng.normal(7.3, 0.3, k))
    bed = np.clip(np.round(sqft / 500 + rng.normal(0, 0.7, k)), 1, 5).astype(int)
    dist = rng.choice(list("ABCDE"), k, p=[0.35, 0.25, 0.2, 0.12, 0.08])
    age = rng.integers(0, 81, k)
    e = rng.normal(0, 1, k) * (0.1 + 0.003 * age)
    lnp = (11 + 0.006 * m + 0.03 * np.sin(m / 2) + 0.55 * np.log(sqft)
           + np.array([beta_bed[b] for b in bed]) + np.array([beta_dist[d] for d in dist])
           - 0.0025 * age + e)
    for i in range(k):
        rows.append((pd.Timestamp(year=year, month=month, day=int(day[i])), np.exp(lnp[i]),
                     sqft[i], bed[i], dist[i], float(age[i]), m))
frame = pd.DataFrame(rows, columns=["ts", "price", "sqft", "bedrooms", "district", "age", "m"])
frame["district"] = frame["district"].astype(object)
bad = rng.choice(len(frame), 13, replace=False)
frame.loc[bad[:6], "district"] = ""
frame.loc[bad[6:10], "age"] = np.nan
frame.loc[bad[10:], "sqft"] = 0.0
frame.insert(0, "date", serial_from_timestamp(frame.ts) + 0.25)
core_in = frame[["date", "price", "sqft", "bedrooms", "district", "age"]]

use = frame[(frame.district != "") & frame.age.notna() & (frame.sqft > 0)].copy()
month_start = {m: float(serial_from_timestamp(pd.Timestamp(year=2020 + m // 12, month=m % 12 + 1, day=1)))
               for m in range(24)}


def most_frequent(s):
    c = s.value_counts()
    return sorted(c[c == c.max()].index)[0]


ref_bed = most_frequent(use.bedrooms)
ref_dist = most_frequent(use.district)


def design(sub, ref_period):
    """statsmodels design: const, period dummies (ref left out), characteristics."""
    cols = {"const": np.ones(len(sub))}
    for m in sorted(sub.m.unique()):
        if m != ref_period:
            cols[f"P{m}"] = (sub.m == m).astype(float).values
    cols["log(sqft)"] = np.log(sub.sqft.values)
    for b in sorted(use.bedrooms.unique()):
        if b != ref_bed:
            cols[f"bedrooms={b}"] = (sub.bedrooms == b).astype(float).values
    for d in sorted(use.district.unique()):
        if d != ref_dist:
            cols[f"district={d}"] = (sub.district == d).astype(float).values
    cols["age"] = sub.age.values
    X = pd.DataFrame(cols, index=sub.index)
    return X, np.log(sub.price.values)


def sm_fit(sub, ref_period, cov="nonrobust"):
    X, y = design(sub, ref_period)
    checks_ok = bool((X.abs().sum(axis=0) > 0).all())
    res = sm.OLS(y, X).fit(cov_type=cov, use_t=True)
    return res, checks_ok


def period_levels(res, periods, ref_period):
    """d_p - d_ref and the covariance of those contrasts over `periods`."""
    names = [f"P{p}" for p in periods]
    V = res.cov_params()
    d = np.array([0.0 if p == ref_period else res.params[f"P{p}"] for p in periods])
    C = np.zeros((len(periods), len(periods)))
    for i, a in enumerate(names):
        for j, b in enumerate(names):
            if periods[i] != ref_period and periods[j] != ref_period:
                C[i, j] = V.loc[a, b]
    return d, C


LEVEL = 0.95
all_months = np.arange(24)
counts = use.groupby("m").size().reindex(all_months, fill_value=0).values

# ---- pooled index, classical and HC1 ----------------------------------------------------
for cov, se_opt in [("nonrobust", "classical"), ("HC1", "hc1")]:
    res, _ = sm_fit(use, 0, cov)
    got = run_refcli(args.refcli, "hedonic_index", core_in, log=1, categorical=2, se=se_opt)
    present = [m for m in all_months if counts[m] > 0]
    d, C = period_levels(res, present, 0)
    want = np.full(24, np.nan)
    lo = np.full(24, np.nan)
    hi = np.full(24, np.nan)
    q = sps.t.ppf(0.5 + LEVEL / 2, res.df_resid)
    for i, m in enumerate(present):
        want[m] = 100 * np.exp(d[i])
        lo[m] = 100 * np.exp(d[i] - q * np.sqrt(C[i, i]))
        hi[m] = 100 * np.exp(d[i] + q * np.sqrt(C[i, i]))
    src = f"statsmodels OLS cov_type={cov}"
    checks.close(f"pooled {se_opt}: period starts", got.period, [month_start[m] for m in all_months], rel=0)
    checks.close(f"pooled {se_opt}: sales", got.sales, counts, rel=0, source="pandas groupby().size()")
    checks.close(f"pooled {se_opt}: index 100 exp(d_t - d_base)", got["index"], want, source=src)
    checks.close(f"pooled {se_opt}: lower band", got.lower, lo, source=src + " conf_int")
    checks.close(f"pooled {se_opt}: upper band", got.upper, hi, source=src + " conf_int")
    ci = np.exp(res.conf_int(alpha=1 - LEVEL).loc[[f"P{m}" for m in present[1:]]].values) * 100
    checks.close(f"pooled {se_opt}: bands = statsmodels conf_int", np.c_[got.lower, got.upper][present[1:]],
                 ci, source=src + " conf_int()")

    # The coefficient table, term by term.
    coefs = run_refcli(args.refcli, "hedonic_coefs", core_in, log=1, categorical=2, se=se_opt)
    terms = coefs[coefs.kind.isin(["intercept", "characteristic", "period"])]
    name_map = {"(Intercept)": "const"}
    for m in present[1:]:
        p = pd.Period(year=2020 + m // 12, month=m % 12 + 1, freq="M")
        name_map[f"period {p.strftime('%Y-%m')}"] = f"P{m}"
    sm_names = [name_map.get(t, t) for t in terms.term]
    checks.true(f"coefs {se_opt}: same terms as the statsmodels design",
                sorted(sm_names) == sorted(res.params.index), f"{len(sm_names)} terms")
    checks.close(f"coefs {se_opt}: coefficients", terms.coefficient, res.params[sm_names], source=src + " params")
    checks.close(f"coefs {se_opt}: std errors", terms.std_error, res.bse[sm_names], source=src + " bse")
    checks.close(f"coefs {se_opt}: t", terms.t, res.tvalues[sm_names], source=src + " tvalues")
    stat = coefs[coefs.kind == "stat"].set_index("term").coefficient
    checks.close(f"coefs {se_opt}: R^2, adj R^2, s, df",
                 [stat.r_squared, stat.adj_r_squared, stat.residual_se, stat.df_residual],
                 [res.rsquared, res.rsquared_adj, np.sqrt(res.scale), res.df_resid], source="statsmodels OLS")
    checks.close(f"coefs {se_opt}: observations and rows dropped", [stat.observations, stat.dropped],
                 [len(use), len(frame) - len(use)], rel=0)
    reasons = coefs[coefs.kind == "reason"].set_index("term").coefficient
    checks.close(f"coefs {se_opt}: drop reasons (blank/invalid, log of non-positive)",
                 [reasons.get("blank or invalid characteristic", 0), reasons.get("log of a non-positive characteristic", 0)],
                 [10, 3], rel=0, source="rows blanked by the generator")

# ---- Kennedy correction against its formula 100 exp(d - var(d)/2) ----------------------
res, _ = sm_fit(use, 0)
got = run_refcli(args.refcli, "hedonic_index", core_in, log=1, categorical=2, bias="kennedy")
present = [m for m in all_months if counts[m] > 0]
d, C = period_levels(res, present, 0)
want = np.full(24, np.nan)
want[present] = 100 * np.exp(d - np.diag(C) / 2)
checks.close("Kennedy 100 exp(d - var(d)/2)", got["index"], want,
             source="Kennedy 1981 formula with statsmodels d and bse")

# ---- base in the middle, minsales, level ----------------------------------------------
base_m = 13
res, _ = sm_fit(use, base_m)
got = run_refcli(args.refcli, "hedonic_index", core_in, log=1, categorical=2, minsales=5, level=0.9,
                 base=month_start[base_m] + 10)
d, C = period_levels(res, present, base_m)
want = np.full(24, np.nan)
lo = np.full(24, np.nan)
hi = np.full(24, np.nan)
q = sps.t.ppf(0.95, res.df_resid)
for i, m in enumerate(present):
    if counts[m] >= 5:
        want[m] = 100 * np.exp(d[i])
        lo[m] = 100 * np.exp(d[i] - q * np.sqrt(C[i, i]))
        hi[m] = 100 * np.exp(d[i] + q * np.sqrt(C[i, i]))
checks.true("thin month (3 sales < minsales 5) has no value but stays in the fit",
            np.isnan(got["index"][14]) and got.sales[14] == 3)
checks.close("base 2021-02, minsales 5, level 0.9: index", got["index"], want, source="statsmodels OLS, base dummy left out")
checks.close("base 2021-02, level 0.9: bands", np.c_[got.lower, got.upper], np.c_[lo, hi],
             source="statsmodels OLS, t quantile 0.95")

# ---- reference home: typical and given -------------------------------------------------
for home, retransform in [("", "smearing"), ("1500|4|D|30", "lognormal")]:
    got = run_refcli(args.refcli, "hedonic_home", core_in, log=1, categorical=2, home=home,
                     retransform=retransform)
    res, _ = sm_fit(use, 0)
    base = use[use.m == 0]
    if home:
        h = dict(sqft=1500.0, bedrooms=4, district="D", age=30.0)
    else:
        h = dict(sqft=base.sqft.median(), bedrooms=most_frequent(base.bedrooms),
                 district=most_frequent(base.district), age=base.age.median())
    factor = np.mean(np.exp(res.resid)) if retransform == "smearing" else np.exp(res.scale / 2)
    want = np.full((24, 3), np.nan)
    q = sps.t.ppf(0.975, res.df_resid)
    for m in present:
        row = pd.DataFrame([dict(sqft=h["sqft"], bedrooms=h["bedrooms"], district=h["district"], age=h["age"], m=m,
                                 price=1.0)])
        X, _ = design(row, 0)
        X = X.reindex(columns=res.params.index, fill_value=0.0)
        p = res.get_prediction(X)
        mu, se = float(p.predicted_mean[0]), float(p.se_mean[0])
        want[m] = factor * np.exp([mu, mu - q * se, mu + q * se])
    src = f"statsmodels get_prediction, {'Duan smearing mean(exp(resid))' if retransform == 'smearing' else 'exp(scale/2)'}"
    checks.close(f"home {home or 'typical'}: value", got.value, want[:, 0], source=src)
    checks.close(f"home {home or 'typical'}: band", np.c_[got.lower, got.upper], want[:, 1:], source=src)

# ---- rolling windows (k = 3 and adjacent-period k = 2), across the gaps ------------------


def contrast_weights(res, sub, e, s, cov):
    """Weights r_i c_i on the window's sales of the estimate d_e - d_s, with c = X (X'X)^-1 l
    from the statsmodels design, r_i = s (classical) or sqrt(n/df) e_i (HC1): the sum of
    squares of the weights is the (classical or HC1) variance of d_e - d_s."""
    X, _ = design(sub, sorted(sub.m.unique())[0])
    lam = pd.Series(0.0, index=X.columns)
    if f"P{e}" in lam.index:
        lam[f"P{e}"] += 1
    if f"P{s}" in lam.index:
        lam[f"P{s}"] -= 1
    c = X.values @ (res.normalized_cov_params.values @ lam.values)
    if cov == "HC1":
        c = c * np.sqrt(res.nobs / res.df_resid) * res.resid
    else:
        c = c * np.sqrt(res.scale)
    return pd.Series(c, index=sub.index).reindex(use.index, fill_value=0.0).values


def rolling_reference(k, cov="nonrobust", base_m=0):
    """The documented chain, each window fitted by statsmodels: the first window (periods
    0..k-1) gives its periods; each later period e with sales links to the latest earlier
    period s with a value by the window e-k+1..e, stretched back to s when s < e-k+1.
    Bands: ln I_t - ln I_b is a linear combination of the log prices collecting the weights
    of every window estimate it uses; its variance is the sum of squares of the scaled
    weights (contrast_weights); t quantile with the smallest residual df of the windows
    involved."""
    L, anchor, parent, linkdf, u = {}, {}, {}, {}, {}
    all_ok = True
    root_res = None
    for e in range(k - 1, 24):
        if e == k - 1:
            sub = use[use.m <= e]
            pres = sorted(sub.m.unique())
            root_res, ok = sm_fit(sub, pres[0], cov)
            all_ok &= ok
            d, _ = period_levels(root_res, pres, pres[0])
            rstar = pres[-1]
            for i, p in enumerate(pres):
                L[p], anchor[p], parent[p], linkdf[p] = d[i], p, None, np.inf
                u[p] = contrast_weights(root_res, sub, p, rstar, cov)
            continue
        if counts[e] == 0:
            continue
        s = max(p for p in L if p < e)
        lo_m = min(e - k + 1, s)
        sub = use[(use.m >= lo_m) & (use.m <= e)]
        pres = sorted(sub.m.unique())
        r, ok = sm_fit(sub, pres[0], cov)
        all_ok &= ok
        d, _ = period_levels(r, pres, pres[0])
        i, j = pres.index(e), pres.index(s)
        L[e] = L[s] + d[i] - d[j]
        u[e] = u[s] + contrast_weights(r, sub, e, s, cov)
        anchor[e], parent[e], linkdf[e] = anchor[s], s, r.df_resid

    def links_df(frm, to):
        m = np.inf
        while frm is not None and frm != to:
            m = min(m, linkdf[frm])
            frm = parent[frm]
        return m

    out = np.full((24, 3), np.nan)
    b = base_m
    for t in L:
        delta = L[t] - L[b]
        v = float(np.sum((u[t] - u[b]) ** 2))
        if t == b:
            df = np.inf
        elif anchor[t] != anchor[b]:
            df = min(root_res.df_resid, links_df(t, anchor[t]), links_df(b, anchor[b]))
        else:
            df = links_df(max(t, b), min(t, b))
        q = 0.0 if np.isinf(df) else sps.t.ppf(0.975, df)
        out[t] = 100 * np.exp([delta, delta - q * np.sqrt(v), delta + q * np.sqrt(v)])
    return out, all_ok


for k, cov, se_opt, base_m in [(3, "nonrobust", "classical", 0), (2, "nonrobust", "classical", 0),
                               (3, "HC1", "hc1", 1), (4, "nonrobust", "classical", 20)]:
    want, ok = rolling_reference(k, cov, base_m)
    checks.true(f"rolling k={k}: every term varies in every window (reference valid)", ok)
    opts = dict(log=1, categorical=2, window=k, se=se_opt)
    if base_m:
        opts["base"] = month_start[base_m]
    got = run_refcli(args.refcli, "hedonic_index", core_in, **opts)
    src = f"chained statsmodels OLS window fits ({cov})"
    checks.close(f"rolling k={k} {se_opt} base m{base_m}: index", got["index"], want[:, 0], source=src)
    checks.close(f"rolling k={k} {se_opt} base m{base_m}: bands", np.c_[got.lower, got.upper], want[:, 1:],
                 source=src)
    checks.true(f"rolling k={k}: values after the gaps (2020-08, 2021-08) exist",
                np.isfinite(got["index"][7]) and np.isfinite(got["index"][19]))

# Rolling reference home: each period is valued with the window that published it (the
# root window for the first k periods), retransformed with that window's smearing factor.
k = 3
got = run_refcli(args.refcli, "hedonic_home", core_in, log=1, categorical=2, window=k, home="1500|4|D|30")
want = np.full((24, 3), np.nan)
h = dict(sqft=1500.0, bedrooms=4, district="D", age=30.0)
published = []
for e in range(24):
    if counts[e] == 0:
        continue
    if e <= k - 1:
        lo_m = 0
        hi_m = k - 1
    else:
        s = max(p for p in published if p < e)
        lo_m, hi_m = min(e - k + 1, s), e
    published.append(e)
    sub = use[(use.m >= lo_m) & (use.m <= hi_m)]
    pres = sorted(sub.m.unique())
    r, _ = sm_fit(sub, pres[0])
    row = pd.DataFrame([dict(h, m=e, price=1.0)])
    X, _ = design(row, pres[0])
    X = X.reindex(columns=r.params.index, fill_value=0.0)
    p = r.get_prediction(X)
    mu, se = float(p.predicted_mean[0]), float(p.se_mean[0])
    q = sps.t.ppf(0.975, r.df_resid)
    want[e] = np.mean(np.exp(r.resid)) * np.exp([mu, mu - q * se, mu + q * se])
checks.close("rolling k=3 home 1500|4|D|30: value, lower, upper", got[["value", "lower", "upper"]].values, want,
             source="statsmodels get_prediction on each publishing window x Duan smearing")

# Rolling: the published values do not revise when later months arrive.
early = core_in[frame.m <= 12]
full = run_refcli(args.refcli, "hedonic_index", core_in, log=1, categorical=2, window=3)
part = run_refcli(args.refcli, "hedonic_index", early, log=1, categorical=2, window=3)
checks.close("rolling k=3: no revision when a year of later sales is added", full["index"][:13], part["index"],
             rel=1e-12, source="definition: links fixed once published")

# Rolling: the coefficient table is the latest window's fit (2021-10 .. 2021-12).
coefs = run_refcli(args.refcli, "hedonic_coefs", core_in, log=1, categorical=2, window=3)
res, _ = sm_fit(use[use.m >= 21], 21)
terms = coefs[coefs.kind == "characteristic"]
checks.close("rolling k=3 coefs: latest window's characteristic terms", terms.coefficient,
             res.params[terms.term], source="statsmodels OLS on 2021-10 .. 2021-12")
checks.close("rolling k=3 coefs: std errors", terms.std_error, res.bse[terms.term], source="statsmodels OLS bse")

checks.finish()
