"""Repeat-sales core (CHAINRS / RSPAIRS) against pandas pair building and statsmodels OLS / WLS
(python3-pandas, python3-statsmodels, scipy.sparse.csgraph from python3-scipy).

Methods checked (sources as in native/core/repeat_sales.hpp):
- bmn: Bailey, Muth & Nourse (1963) OLS of ln(P2/P1) on +1/-1 period dummies, base dropped
  -> statsmodels OLS params / bse / conf_int;
- cs: Case & Shiller (1987, 1989) three stages: OLS; OLS of squared residuals on a constant and
  the interval in years; WLS with weights 1 / fitted variance (floored at 5 % of the mean
  squared stage-1 residual, our documented rule) -> statsmodels OLS then WLS;
- cs2: as cs with the squared interval in stage two (Calhoun 1996) -> statsmodels.
The pairs are built here independently with pandas from the raw sales, by the rules in
docs/methods/repeat_sales.md, and compared pair by pair with the core's audit.

Generating model (test data, not the demo): 1,400 properties with ids "P0001".., each sold
1 + Poisson(1.6) times on days uniform over 2015-01-01 .. 2020-12-31;
ln p = a_j + I(m) + H_j(m) + e, a_j ~ N(12, 0.4^2), I(m) = 0.004 m + 0.03 sin(m / 6) for month m,
H_j a Gaussian random walk with variance 0.0004 per month (Case-Shiller drift), e ~ N(0, 0.08^2).
Then: 1 % of prices times 5 (keying errors), 3 % of sales flagged changed, 2 % excluded, 1 % blank price, 0.5 % non-positive price,
0.5 % blank id, and 25 duplicate rows (same id and date, price times U(0.9, 1.1)) inserted at
random places.
"""
import numpy as np
import pandas as pd
import statsmodels.api as sm
from scipy import stats as sps
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from refcommon import Checks, parse_args, run_refcli, serial_from_timestamp

args = parse_args()
checks = Checks("repeat sales vs pandas + statsmodels")
rng = np.random.default_rng(20240611)

# ---------------------------------------------------------------- data
n_prop = 1400
first_day = pd.Timestamp("2015-01-01")
span = (pd.Timestamp("2020-12-31") - first_day).days + 1
rows = []
for j in range(n_prop):
    k = 1 + rng.poisson(1.6)
    days = np.sort(rng.integers(0, span, k))
    a = rng.normal(12, 0.4)
    dates = first_day + pd.to_timedelta(days, unit="D")
    months = (dates.year - 2015) * 12 + dates.month - 1
    walk = np.cumsum(rng.normal(0, np.sqrt(0.0004), 72))
    for d, m in zip(dates, months):
        lp = a + 0.004 * m + 0.03 * np.sin(m / 6) + walk[m] + rng.normal(0, 0.08)
        rows.append((f"P{j + 1:04d}", float(serial_from_timestamp(d)) + 0.25, np.exp(lp)))
frame = pd.DataFrame(rows, columns=["id", "date", "price"])
n = len(frame)
frame["changed"] = (rng.random(n) < 0.03).astype(int)
frame["include"] = (rng.random(n) > 0.02).astype(int)
typo = rng.choice(n, n // 100, replace=False)
frame.loc[typo, "price"] = frame.loc[typo, "price"] * 5  # keying errors
frame.loc[rng.choice(n, n // 100, replace=False), "price"] = np.nan
frame.loc[rng.choice(n, n // 200, replace=False), "price"] = -1.0
frame.loc[rng.choice(n, n // 200, replace=False), "id"] = ""
dups = frame.iloc[rng.choice(n, 25, replace=False)].copy()
dups["price"] = dups["price"] * rng.uniform(0.9, 1.1, len(dups))
dups["date"] = np.floor(dups["date"]) + 0.75  # same day, other time of day
for _, r in dups.iterrows():
    at = int(rng.integers(0, len(frame) + 1))
    frame = pd.concat([frame.iloc[:at], r.to_frame().T, frame.iloc[at:]], ignore_index=True)
frame = frame.astype({"date": float, "price": float, "changed": int, "include": int})
frame["id"] = frame["id"].astype(str)

MINHOLD, MAXRATE = 6, 1.0


# ---------------------------------------------------------------- pairs, independently
def period_key(serial, freq):
    ts = pd.Timestamp("1899-12-30") + pd.to_timedelta(np.floor(serial), unit="D")
    return pd.PeriodIndex(ts, freq=freq).asi8


def build_pairs(df, freq="M", minhold=MINHOLD, maxrate=MAXRATE):
    d = df.copy()
    d["row"] = np.arange(len(d))
    d["id"] = d["id"].str.strip()
    d["day"] = np.floor(d["date"])
    d["usable"] = np.isfinite(d.price) & (d.price > 0) & (d.include == 1)
    seq = d[(d.id != "") & np.isfinite(d.date)].copy()
    # Duplicates: per (id, day) keep the first usable row in input order, else the first row.
    seq["unusable"] = ~seq.usable
    seq = seq.sort_values(["id", "day", "unusable", "row"])
    seq["changed_any"] = seq.groupby(["id", "day"]).changed.transform("max")
    kept = seq.groupby(["id", "day"], sort=False).head(1)
    dup_rows = seq.drop(kept.index)
    kept = kept.sort_values(["id", "day"])
    prev = kept.groupby("id").shift(1)
    has_prev = prev.row.notna()
    p = pd.DataFrame({
        "id": kept.id[has_prev],
        "first_row": prev.row[has_prev].astype(int),
        "second_row": kept.row[has_prev].astype(int),
    })
    first = d.set_index("row").loc[p.first_row]
    second = d.set_index("row").loc[p.second_row]
    p["p1"] = first.price.values
    p["p2"] = second.price.values
    p["d1"] = first.day.values
    p["d2"] = second.day.values
    p["u1"] = first.usable.values
    p["u2"] = second.usable.values
    p["changed"] = kept.changed_any[has_prev].values == 1
    t1 = pd.Timestamp("1899-12-30") + pd.to_timedelta(p.d1, unit="D")
    t2 = pd.Timestamp("1899-12-30") + pd.to_timedelta(p.d2, unit="D")
    p["months"] = (12 * (t2.dt.year - t1.dt.year) + (t2.dt.month - t1.dt.month)
                   - (t2.dt.day < t1.dt.day).astype(int)).values
    with np.errstate(invalid="ignore", divide="ignore"):
        p["rate"] = np.log(p.p2 / p.p1) * 365.25 / (p.d2 - p.d1)
    p["k1"] = period_key(p.d1.values, freq)
    p["k2"] = period_key(p.d2.values, freq)
    status = np.zeros(len(p), dtype=int)
    cond = [~p.u1, ~p.u2, p.changed, p.k1 == p.k2,
            (minhold > 0) & (p.months < minhold),
            (maxrate > 0) & (np.abs(p.rate) > maxrate)]
    for code, c in reversed(list(zip([1, 2, 4, 5, 6, 7], cond))):
        status[np.asarray(c)] = code
    p["status"] = status
    dup = pd.DataFrame({"first_row": kept.set_index(["id", "day"]).loc[
        list(zip(dup_rows.id, dup_rows.day))].row.values.astype(int),
        "second_row": dup_rows.row.values.astype(int)})
    return p.reset_index(drop=True), dup


def design(pairs, base_key=None):
    """Dummy matrix (pairs x periods-1), y, years, with the base period dropped."""
    kmin = min(pairs.k1.min(), pairs.k2.min())
    kmax = max(pairs.k1.max(), pairs.k2.max())
    T = kmax - kmin + 1
    s = (pairs.k1 - kmin).values
    t = (pairs.k2 - kmin).values
    X = np.zeros((len(pairs), T))
    X[np.arange(len(pairs)), t] += 1
    X[np.arange(len(pairs)), s] -= 1
    base = 0 if base_key is None else base_key - kmin
    keep = [c for c in range(T) if c != base]
    return X[:, keep], np.log(pairs.p2 / pairs.p1).values, (t - s), keep, kmin, T


def cs_weights(X, y, years, terms):
    e = sm.OLS(y, X).fit().resid
    Z = np.column_stack([np.ones_like(years), years, years ** 2][:terms])
    fitted = sm.OLS(e ** 2, Z).fit().fittedvalues
    floor = 0.05 * np.mean(e ** 2)
    return 1.0 / np.maximum(fitted, floor)


# ---------------------------------------------------------------- audit
pairs, dup = build_pairs(frame)
audit = run_refcli(args.refcli, "repeat_sales_pairs", frame)
real = audit[audit.status != 3].reset_index(drop=True)
pseudo = audit[audit.status == 3]
key = ["first_row", "second_row"]
merged = real.merge(pairs, on=key, how="outer", indicator=True, suffixes=("", "_py"))
checks.true("same pairs formed (rows of both sales)", (merged._merge == "both").all() and len(real) == len(pairs),
            f"core {len(real)}, pandas {len(pairs)}")
checks.true("duplicate sales listed as pseudo pairs (kept row, dropped row)",
            sorted(map(tuple, pseudo[key].values.tolist())) == sorted(map(tuple, dup[key].values.tolist())),
            f"core {len(pseudo)}, pandas {len(dup)}")
cand = merged.status_py == 0
checks.close("filter status code per pair", merged.status.where(~cand, 0), merged.status_py, rel=0,
             source="pandas rules: unusable sale, changed, same period, minhold 6, maxrate 1")
checks.close("months held", merged.months, merged.months_py, rel=0, source="pandas dt.year/month/day")
checks.close("annualised log return", merged.rate[merged.u1 & merged.u2],
             merged.rate_py[merged.u1 & merged.u2], rel=1e-12, source="numpy log")
for code in range(1, 8):
    if code != 3:
        checks.true(f"reason code {code} occurs in the test data", (merged.status_py == code).any())

# Connectivity of the candidate pairs (scipy connected_components): every used pair in one part.
cp = pairs[pairs.status == 0]
kmin = cp[["k1", "k2"]].values.min()
T = cp[["k1", "k2"]].values.max() - kmin + 1
g = coo_matrix((np.ones(len(cp)), (cp.k1 - kmin, cp.k2 - kmin)), shape=(T, T))
ncomp, _ = connected_components(g, directed=False)
checks.true("test data: candidate pairs form one connected graph", ncomp == 1, f"{ncomp} part(s)")
checks.true("every candidate pair is used", (merged.used[cand] == 1).all() and (merged.used[~cand] == 0).all())

# ---------------------------------------------------------------- estimators
used = pairs[pairs.status == 0].reset_index(drop=True)
X, y, gaps, cols, kmin, T = design(used)
years = gaps / 12.0
ols = sm.OLS(y, X).fit()
for method, terms in [("bmn", 0), ("cs", 2), ("cs2", 3)]:
    got = run_refcli(args.refcli, "repeat_sales_index", frame, method=method)
    if method == "bmn":
        fit, w = ols, np.ones(len(y))
        src = "statsmodels OLS"
    else:
        w = cs_weights(X, y, years, terms)
        fit = sm.WLS(y, X, weights=w).fit()
        src = f"statsmodels OLS -> OLS(e^2 ~ {terms} terms) -> WLS"
    checks.close(f"{method}: log index b_t - b_base", got["log"].values[cols], fit.params, rel=1e-8, source=src)
    checks.close(f"{method}: standard errors", got.se.values[cols], fit.bse, rel=1e-8, source=src + " bse")
    ci = fit.conf_int(0.05)
    checks.close(f"{method}: lower band", got.lower.values[cols], 100 * np.exp(ci[:, 0]), rel=1e-8,
                 source=src + " conf_int (t)")
    checks.close(f"{method}: upper band", got.upper.values[cols], 100 * np.exp(ci[:, 1]), rel=1e-8,
                 source=src + " conf_int (t)")
    checks.close(f"{method}: index = 100 exp(b)", got["index"].values[cols], 100 * np.exp(fit.params), rel=1e-8)
    counts = np.bincount(used.k2 - kmin, minlength=T)
    checks.close(f"{method}: pairs ending in each period", got.pairs, counts, rel=0, source="pandas count")
    a = run_refcli(args.refcli, "repeat_sales_pairs", frame, method=method)
    a = a[a.used == 1].merge(used[key], on=key)
    order = used[key].merge(a, on=key)
    checks.close(f"{method}: final-stage weights (mean 1)", order.weight, w / w.mean(), rel=1e-8,
                 source="1 / fitted variance, normalised")

# Base in the middle (2017-07): statsmodels with that column dropped.
base_serial = float(serial_from_timestamp(pd.Timestamp("2017-07-10")))
base_key = int(period_key(np.array([base_serial]), "M")[0])
Xb, yb, gb, colsb, _, _ = design(used, base_key)
w = cs_weights(Xb, yb, gb / 12.0, 2)
fit = sm.WLS(yb, Xb, weights=w).fit()
got = run_refcli(args.refcli, "repeat_sales_index", frame, method="cs", base=base_serial)
checks.close("cs, base 2017-07: log index", got["log"].values[colsb], fit.params, rel=1e-8, source="statsmodels WLS")
checks.close("cs, base 2017-07: standard errors", got.se.values[colsb], fit.bse, rel=1e-8, source="statsmodels WLS bse")
checks.close("cs, base 2017-07: base period is 100", got["index"].values[base_key - kmin], 100.0, rel=0)

# Quarterly, 90 % bands, other filters.
pq, _ = build_pairs(frame, "Q", minhold=3, maxrate=0.5)
uq = pq[pq.status == 0].reset_index(drop=True)
Xq, yq, gq, colsq, _, _ = design(uq)
fit = sm.OLS(yq, Xq).fit()
got = run_refcli(args.refcli, "repeat_sales_index", frame, method="bmn", freq="Q", minhold=3, maxrate=0.5, level=0.9)
checks.close("bmn quarterly, minhold 3, maxrate 0.5: log index", got["log"].values[colsq], fit.params, rel=1e-8,
             source="statsmodels OLS")
ci = fit.conf_int(0.10)
checks.close("bmn quarterly: 90 % lower band", got.lower.values[colsq], 100 * np.exp(ci[:, 0]), rel=1e-8,
             source="statsmodels conf_int(0.10)")
w = cs_weights(Xq, yq, gq / 4.0, 3)
fit = sm.WLS(yq, Xq, weights=w).fit()
got = run_refcli(args.refcli, "repeat_sales_index", frame, method="cs2", freq="Q", minhold=3, maxrate=0.5)
checks.close("cs2 quarterly: log index", got["log"].values[colsq], fit.params, rel=1e-8, source="statsmodels WLS")
checks.close("cs2 quarterly: standard errors", got.se.values[colsq], fit.bse, rel=1e-8, source="statsmodels WLS bse")

# Filters off: only same-period pairs (and unusable / changed) dropped.
p0, _ = build_pairs(frame, "M", minhold=0, maxrate=0)
u0 = p0[p0.status == 0].reset_index(drop=True)
X0, y0, _, cols0, _, _ = design(u0)
got = run_refcli(args.refcli, "repeat_sales_index", frame, method="bmn", minhold=0, maxrate=0)
checks.close("bmn, minhold 0 and maxrate 0 (off): log index", got["log"].values[cols0], sm.OLS(y0, X0).fit().params,
             rel=1e-8, source="statsmodels OLS")

# Pairs given directly give the same index as the raw sales they came from.
direct = pd.DataFrame({"first_date": frame.date.values[used.first_row], "first_price": used.p1,
                       "second_date": frame.date.values[used.second_row], "second_price": used.p2})
got_d = run_refcli(args.refcli, "repeat_sales_from_pairs", direct, method="cs")
got_r = run_refcli(args.refcli, "repeat_sales_index", frame, method="cs")
checks.close("pairs given directly = raw sales", got_d["index"], got_r["index"], rel=1e-12)

# Ids as numbers: "17.0" read as the number 17 becomes the id "17" (propertyIdFromNumber).
num = frame.copy()
num["id"] = num["id"].map(lambda s: f"{int(s[1:])}.0" if s else "")
txt = frame.copy()
txt["id"] = txt["id"].map(lambda s: str(int(s[1:])) if s else "")
a_num = run_refcli(args.refcli, "repeat_sales_index", num, numericid=1)
a_txt = run_refcli(args.refcli, "repeat_sales_index", txt)
checks.close("ids as numbers = ids as text", a_num["index"], a_txt["index"], rel=0)
checks.close("ids as text: same index as P-prefixed ids", a_txt["index"], got_r["index"], rel=1e-12)
pn = run_refcli(args.refcli, "repeat_sales_pairs", num, numericid=1)
checks.true("numeric ids appear as canonical text in the audit",
            set(pn.id.astype(str)) <= set(txt.id[txt.id != ""]) and "17" in set(pn.id.astype(str)))

checks.finish()
