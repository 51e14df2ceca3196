"""INDEXBACKTEST's core (native/core/backtest.hpp) recomputed independently: the folds (the
documented hash: splitmix64(fnv1a64(trimmed id) xor splitmix64(seed)) mod k), the held-out
pairs (CHAINRS's rules written out with pandas), every fold's index (pandas medians, means and
the stratified median; statsmodels OLS for the hedonic time-dummy fit and Bailey-Muth-Nourse;
statsmodels OLS -> OLS -> WLS for Case-Shiller), the predictions P2_hat = P1 I(t2)/I(t1), the
error figures, the revisions (last 1..R periods removed, rebased at the first common period),
the volatility and the missing share.

Sources of the reference computations: FNV-1a 64-bit (Fowler, Noll & Vo; offset basis
14695981039346656037, prime 1099511628211), splitmix64 (Steele, Lea & Flood 2014, constants
from Vigna's public-domain code); the methods as in docs/methods/*.md (hedonic: Eurostat RPPI
Handbook 2013 ch. 5; BMN 1963; Case & Shiller 1987/1989 with our documented floor of 5 % of
the mean squared stage-1 residual; stratified median: Handbook ch. 4).

Generating model (test data, seed 20261014): 420 properties "Q001".. (ids written with a
leading or trailing blank for every 7th), type "house" (60 %) or "flat", floor area
exp(N(ln 90, 0.25^2)) m2; each property sells 1 + Poisson(1.2) times on days uniform over
2021-01-01 .. 2023-06-30 (30 months); ln p = 11.5 + 0.008 month + 0.25 [house]
+ 0.7 ln(area / 90) + u (N(0, 0.10^2) per property) + N(0, 0.07^2); 3 % of sales flagged
changed (u rises by 0.1), 2 % excluded by include, 3 sales with a blank id.
"""
import numpy as np
import pandas as pd
import statsmodels.api as sm

from refcommon import Checks, parse_args, run_refcli, serial_from_timestamp

args = parse_args()
checks = Checks("backtest vs pandas + statsmodels")
rng = np.random.default_rng(20261014)

# ---------------------------------------------------------------- data
start = pd.Timestamp("2021-01-01")
span = (pd.Timestamp("2023-06-30") - start).days + 1
rows = []
for j in range(420):
    pid = f"Q{j + 1:03d}"
    if j % 7 == 3:
        pid = " " + pid if j % 2 else pid + " "
    house = rng.random() < 0.6
    area = float(np.round(np.exp(rng.normal(np.log(90), 0.25))))
    u = rng.normal(0, 0.10)
    for d in np.sort(rng.choice(span, 1 + rng.poisson(1.2), replace=False)):
        date = start + pd.Timedelta(days=int(d))
        month = (date.year - 2021) * 12 + date.month - 1
        changed = int(rng.random() < 0.03)
        u += 0.1 * changed
        lp = 11.5 + 0.008 * month + 0.25 * house + 0.7 * np.log(area / 90) + u + rng.normal(0, 0.07)
        rows.append((pid, float(serial_from_timestamp(date)) + 0.5, float(np.exp(lp)), changed,
                     area, "house" if house else "flat"))
frame = pd.DataFrame(rows, columns=["id", "date", "price", "changed", "c_area", "c_type"])
frame = frame.sample(frac=1, random_state=7).reset_index(drop=True)  # rows in no order
n = len(frame)
frame["include"] = (rng.random(n) > 0.02).astype(int)
frame.loc[rng.choice(n, 3, replace=False), "id"] = ""
frame["s_type"] = frame.c_type

FOLDS, SEED, REVISIONS, MINHOLD, MAXRATE = 10, 5, 6, 6, 1.0
METHODS = ["median", "mean", "mix", "hedonic log=1", "repeat method=bmn", "repeat"]
opts = dict(folds=FOLDS, seed=SEED, revisions=REVISIONS, methods="|".join(METHODS))

# ---------------------------------------------------------------- folds
M64 = (1 << 64) - 1


def splitmix64(x):
    z = (x + 0x9E3779B97F4A7C15) & M64
    z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & M64
    z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & M64
    return z ^ (z >> 31)


def fnv1a64(text):
    h = 14695981039346656037
    for b in text.encode("utf-8"):
        h = ((h ^ b) * 1099511628211) & M64
    return h


def fold_of(pid):
    t = pid.strip()
    return -1 if not t else splitmix64(fnv1a64(t) ^ splitmix64(SEED)) % FOLDS


checks.close("splitmix64 test vector (state 0: first output 0xE220A8397B1DCDAF, Vigna's code)",
             float(splitmix64(0) == 0xE220A8397B1DCDAF), 1.0, rel=0)
checks.close("FNV-1a 64 test vector (\"a\" -> 0xAF63DC4C8601EC8C, FNV reference)",
             float(fnv1a64("a") == 0xAF63DC4C8601EC8C), 1.0, rel=0)

frame["fold"] = frame.id.map(fold_of)
frame["row"] = np.arange(n)
ts = pd.Timestamp("1899-12-30") + pd.to_timedelta(np.floor(frame.date), unit="D")
frame["key"] = pd.PeriodIndex(ts, freq="M").asi8
usable = np.isfinite(frame.price) & (frame.price > 0) & (frame.include == 1)
KMIN, KMAX = frame.key[usable].min(), frame.key[usable].max()

# ---------------------------------------------------------------- held-out pairs (CHAINRS rules)
seq = frame[frame.id.str.strip() != ""].copy()
seq["pid"] = seq.id.str.strip()
seq["day"] = np.floor(seq.date)
seq = seq.sort_values(["pid", "day", "row"])
prev = seq.groupby("pid").shift(1)
has = prev.row.notna()
P = pd.DataFrame({"first_row": prev.row[has].astype(int).values, "second_row": seq.row[has].values,
                  "pid": seq.pid[has].values})
a = frame.set_index("row").loc[P.first_row]
b = frame.set_index("row").loc[P.second_row]
t1 = pd.Timestamp("1899-12-30") + pd.to_timedelta(np.floor(a.date.values), unit="D")
t2 = pd.Timestamp("1899-12-30") + pd.to_timedelta(np.floor(b.date.values), unit="D")
months = 12 * (t2.year - t1.year) + (t2.month - t1.month) - (t2.day < t1.day).astype(int)
rate = np.log(b.price.values / a.price.values) * 365.25 / (np.floor(b.date.values) - np.floor(a.date.values))
rules = {"excluded sale": (a.include.values == 1) & (b.include.values == 1),
         "changed": b.changed.values == 0, "same period": a.key.values != b.key.values,
         "short hold": np.asarray(months) >= MINHOLD, "extreme return": np.abs(rate) <= MAXRATE}
ok = np.logical_and.reduce(list(rules.values()))
P = P[ok].reset_index(drop=True)
P["k1"] = frame.key.values[P.first_row]
P["k2"] = frame.key.values[P.second_row]
P["y"] = np.log(frame.price.values[P.second_row] / frame.price.values[P.first_row])
P["fold"] = P.pid.map(fold_of)

core_pairs = run_refcli(args.refcli, "backtest_pairs", frame, **opts)
core_pairs = core_pairs.sort_values(["first_row", "second_row"]).reset_index(drop=True)
P = P.sort_values(["first_row", "second_row"]).reset_index(drop=True)
checks.true("same held-out pairs (rows of both sales)",
            len(P) == len(core_pairs) and (P[["first_row", "second_row"]].values
                                            == core_pairs[["first_row", "second_row"]].values).all(),
            f"pandas {len(P)}, core {len(core_pairs)}")
checks.close("fold of every pair (the documented hash)", core_pairs.fold, P.fold, rel=0)
checks.close("ln(P2/P1)", core_pairs.log_change, P.y, rel=1e-13)
checks.true("test data: every fold holds resales", set(P.fold) == set(range(FOLDS)))
for rule in ["excluded sale", "changed", "same period", "short hold"]:
    checks.true(f"test data: the rule '{rule}' drops a pair", (~rules[rule]).any(), f"{(~rules[rule]).sum()} pairs")


# ---------------------------------------------------------------- the index methods
def by_key(d, values):
    """Series of log index values indexed by period key."""
    return pd.Series(values, index=d).sort_index()


def log_median(d):
    return np.log(d.groupby("key").price.median())


def log_mean(d):
    return np.log(d.groupby("key").price.mean())


def log_mix(d):
    g = d.groupby(["s_type", "key"]).price
    med = g.median().unstack("key")
    cnt = g.size().unstack("key").fillna(0)
    keys = sorted(d.key.unique())
    base = keys[0]  # the first period with a value: any stratum priced
    w = cnt[base].where(med[base].notna(), 0)
    rel = med.div(med[base], axis=0)
    out = {}
    for k in med.columns:
        m = rel[k].notna() & (w > 0)
        if m.any():
            out[k] = np.log((w[m] * rel[k][m]).sum() / w[m].sum())
    return pd.Series(out).sort_index()


def log_hedonic(d):
    keys = sorted(d.key.unique())
    D = pd.get_dummies(d.key).reindex(columns=keys).astype(float).values  # one dummy per period
    X = np.column_stack([D, np.log(d.c_area.values), (d.c_type.values == "house").astype(float)])
    fit = sm.OLS(np.log(d.price.values), X).fit()
    return pd.Series(fit.params[:len(keys)], index=keys)


def repeat_pairs(d):
    """CHAINRS's used pairs among the rows in d (consecutive sales within the rows given,
    dropped rows breaking the chain as in the core: here the rows of d are all usable, and a
    removed sale removes the pairs touching it)."""
    keep = set(d.row)
    return P_all[P_all.first_row.isin(keep) & P_all.second_row.isin(keep)]


def log_repeat(d, cs):
    pr = repeat_pairs(d)
    keys = sorted(set(pr.k1) | set(pr.k2))
    col = {k: i for i, k in enumerate(keys)}
    X = np.zeros((len(pr), len(keys)))
    X[np.arange(len(pr)), pr.k2.map(col).values] += 1
    X[np.arange(len(pr)), pr.k1.map(col).values] -= 1
    X = X[:, 1:]  # the first period is the reference
    y = pr.y.values
    fit = sm.OLS(y, X).fit()
    if cs:
        e = fit.resid
        years = (pr.k2 - pr.k1).values / 12.0
        Z = np.column_stack([np.ones_like(years), years])
        fitted = sm.OLS(e ** 2, Z).fit().fittedvalues
        w = 1.0 / np.maximum(fitted, 0.05 * np.mean(e ** 2))
        fit = sm.WLS(y, X, weights=w).fit()
    return pd.Series(np.concatenate([[0.0], fit.params]), index=keys)


# All pairs of consecutive usable sales (any length) for the repeat fits: the same rules as the
# held-out pairs (a changed flag, short hold or extreme return drops the pair from the fit too).
P_all = P.copy()

ESTIMATORS = [log_median, log_mean, log_mix, log_hedonic,
              lambda d: log_repeat(d, cs=False), lambda d: log_repeat(d, cs=True)]
SOURCES = ["pandas median", "pandas mean", "pandas stratified median (base-period weights)",
           "statsmodels OLS, log price on period dummies, ln area, type",
           "statsmodels OLS on +1/-1 dummies (BMN)", "statsmodels OLS -> OLS(e^2 ~ 1 + years) -> WLS"]

U = frame[usable].copy()
pred = np.full((len(METHODS), len(P)), np.nan)
for f in range(FOLDS):
    est = U[U.fold != f]
    idx = np.where(P.fold == f)[0]
    for m, fn in enumerate(ESTIMATORS):
        li = fn(est)
        v1 = P.k1.values[idx]
        v2 = P.k2.values[idx]
        have = np.isin(v1, li.index) & np.isin(v2, li.index)
        pred[m, idx[have]] = li.reindex(v2[have]).values - li.reindex(v1[have]).values

summary = run_refcli(args.refcli, "backtest_summary", frame, **opts)
for m, name in enumerate(METHODS):
    checks.close(f"{name}: predicted ln(I(t2)/I(t1)) of every held-out pair", core_pairs[f"pred_{m + 1}"],
                 pred[m], rel=1e-8, abs_=1e-10, source=SOURCES[m])
    e = pred[m] - P.y.values
    e = e[np.isfinite(e)]
    checks.close(f"{name}: pairs predicted", summary.pairs[m], len(e), rel=0)
    checks.close(f"{name}: median abs error %", summary.mdae[m], 100 * np.median(np.abs(e)), rel=1e-8,
                 source="numpy median")
    checks.close(f"{name}: rms error %", summary.rmse[m], 100 * np.sqrt(np.mean(e ** 2)), rel=1e-8)

# ---------------------------------------------------------------- revisions, volatility, missing
core_rev = run_refcli(args.refcli, "backtest_revisions", frame, **opts)
for m, (name, fn) in enumerate(zip(METHODS, ESTIMATORS)):
    full = fn(U)
    want = []
    for r in range(1, REVISIONS + 1):
        cut = fn(U[U.key <= KMAX - r])
        common = [k for k in range(KMIN, KMAX - r + 1) if k in full.index and k in cut.index]
        b0 = common[0]
        for k in common[1:]:
            want.append((r, k, 100 * (np.exp((cut[k] - cut[b0]) - (full[k] - full[b0])) - 1)))
    got = core_rev[core_rev.method == m + 1]
    checks.true(f"{name}: revisions compared (count)", len(got) == len(want), f"core {len(got)}, pandas {len(want)}")
    if len(got) == len(want):
        checks.close(f"{name}: revision % of every (removed, period)", got.percent.values,
                     np.array([w[2] for w in want]), rel=1e-6, abs_=1e-9, source=SOURCES[m])
        checks.close(f"{name}: mean abs revision %", summary.mean_rev[m], np.mean(np.abs([w[2] for w in want])),
                     rel=1e-6, abs_=1e-9)
        checks.close(f"{name}: largest abs revision %", summary.max_rev[m], np.max(np.abs([w[2] for w in want])),
                     rel=1e-6, abs_=1e-9)
    series = full.reindex(range(KMIN, KMAX + 1))
    changes = 100 * series.diff().dropna()
    checks.close(f"{name}: volatility (sd of 100 ln changes, n - 1)", summary.volatility[m],
                 np.std(changes, ddof=1), rel=1e-8, source="numpy std ddof=1")
    checks.close(f"{name}: missing share", summary.missing[m], series.isna().mean(), rel=0)

revised = {name: summary.mean_rev[m] for m, name in enumerate(METHODS)}
checks.true("test data: medians and base-weighted mix never revise, pooled fits do",
            revised["median"] == 0 and revised["mix"] == 0 and revised["hedonic log=1"] > 0
            and revised["repeat"] > 0, str(revised))
checks.true("exactly one method is recommended, ranks 1..6", summary.recommended.sum() == 1
            and sorted(summary["rank"].astype(int)) == list(range(1, 7)), str(summary["rank"].tolist()))
checks.finish()
