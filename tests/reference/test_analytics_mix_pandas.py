"""INDEXMIX core (stratified / mix-adjusted index, Eurostat RPPI Handbook 2013 ch. 4)
against a direct pandas computation of the documented formula, P_t = sum_h w_h m_h^t / m_h^0,
with its weighting, empty-stratum and chain-linking rules written out independently below.

Generating model (test data, seed 20260304): 5,000 sales, dates uniform over 2019-01-01 ..
2023-12-31; strata = region (N, S, E, W) x type (flat, house, villa); the share of villas
rises from 5 % to 35 % over the period (shifting mix); region W is rare (5 % of sales), so
some of its stratum-months are empty;
ln p = 12 + region effect (0, 0.2, -0.1, 0.4) + type effect (0, 0.3, 0.8)
       + growth_type * months (0.002, 0.004, 0.006) + N(0, 0.25^2);
a few rows with blank strata, blank or negative prices, 5 % excluded by include.
For the signal-to-noise check: the raw monthly median of the same sales against a stand-in
for a modelled index, the true flat-index path times exp(N(0, 0.003^2)).
"""
import numpy as np
import pandas as pd

from refcommon import Checks, parse_args, run_refcli, serial_from_timestamp

args = parse_args()
checks = Checks("mix-adjusted index vs pandas")
rng = np.random.default_rng(20260304)

n = 5000
start = pd.Timestamp("2019-01-01")
days = rng.integers(0, (pd.Timestamp("2023-12-31") - start).days + 1, n)
dates = start + pd.to_timedelta(days, unit="D")
months = np.asarray((dates.year - 2019) * 12 + dates.month - 1)
region = rng.choice(["N", "S", "E", "W"], n, p=[0.35, 0.35, 0.25, 0.05])
villa_share = 0.05 + 0.30 * months / 59
u = rng.random(n)
ptype = np.where(u < villa_share, "villa", np.where(u < villa_share + 0.5 * (1 - villa_share), "flat", "house"))
reff = pd.Series(region).map({"N": 0, "S": 0.2, "E": -0.1, "W": 0.4}).to_numpy()
teff = pd.Series(ptype).map({"flat": 0, "house": 0.3, "villa": 0.8}).to_numpy()
growth = pd.Series(ptype).map({"flat": 0.002, "house": 0.004, "villa": 0.006}).to_numpy()
price = np.exp(12 + reff + teff + growth * months + rng.normal(0, 0.25, n))
region = region.astype(object)
region[rng.choice(n, 6, replace=False)] = ""
price[rng.choice(n, 5, replace=False)] = np.nan
price[rng.choice(n, 3, replace=False)] = -1
include = (rng.random(n) > 0.05).astype(int)
frame = pd.DataFrame({"date": serial_from_timestamp(dates) + 0.5, "price": price, "include": include,
                      "region": region, "type": ptype})


def pandas_mix(freq, stat="median", weights="sales", chain=False, empty="reweight", minsales=1, base=None):
    d = frame[np.isfinite(frame.price) & (frame.price > 0) & (frame.include == 1) & (frame.region != "")].copy()
    ts = pd.Timestamp("1899-12-30") + pd.to_timedelta(d.date.values, unit="D")
    d["period"] = pd.PeriodIndex(ts, freq=freq)
    d["stratum"] = d.region + "|" + d.type
    full = pd.period_range(d.period.min(), d.period.max(), freq=freq)
    g = d.groupby(["stratum", "period"]).price
    cnt = g.size().unstack("period").reindex(columns=full).fillna(0)
    val = g.sum().unstack("period").reindex(columns=full).fillna(0)
    m = (g.median() if stat == "median" else g.mean()).unstack("period").reindex(columns=full)
    m = m.where(cnt >= minsales)
    level = pd.Series(np.nan, index=full)
    used = pd.Series(0.0, index=full)

    def link(ref, cols, w):
        w = w[m[ref].notna() & (w > 0)]
        w = w / w.sum()
        rel = m.loc[w.index].div(m.loc[w.index, ref], axis=0)
        present = rel.notna()
        if empty == "carry":
            after = rel.loc[:, rel.columns >= ref].ffill(axis=1)
            before = rel.loc[:, rel.columns <= ref].bfill(axis=1)
            filled = pd.concat([before.loc[:, before.columns < ref], after], axis=1)
            num = filled.mul(w, axis=0).sum()
            den = filled.notna().mul(w, axis=0).sum()
        else:
            num = rel.mul(w, axis=0).sum()
            den = present.mul(w, axis=0).sum()
        out = (num / den).where(present.any())
        n_used = cnt.loc[w.index].where(present).sum()
        return out[cols], n_used[cols]

    if not chain:
        b = full[0] if base is None else pd.Period(base, freq=freq)
        if base is None:
            b = m.notna().any().idxmax()
        w = cnt[b] if weights == "sales" else val[b] if weights == "value" else cnt.sum(axis=1)
        level[:], used[:] = link(b, full, w)
    else:
        first = m.notna().any().idxmax()
        years = np.array([p.year for p in full])
        for y in range(first.year, years.max() + 1):
            cols = full[years == y]
            if y == first.year:
                ref = first
                wsrc = full[years == y]
            else:
                prior = level[full[full < cols[0]]].dropna()
                ref = prior.index[-1]
                wsrc = full[years == y - 1]
            if weights == "all":
                w = cnt.sum(axis=1)
            else:
                src = cnt if weights == "sales" else val
                w = src[wsrc].sum(axis=1)
                if (w[m[ref].notna()] > 0).sum() == 0:
                    w = src[ref]
            start_level = 1.0 if y == first.year else level[ref]
            lv, us = link(ref, cols, w)
            level[cols] = start_level * lv
            used[cols] = us
    if base is None:
        bb = level.first_valid_index()
    else:
        bb = pd.Period(base, freq=freq)
    index = 100 * level / level[bb]
    return serial_from_timestamp(full.to_timestamp(how="start")).values, index.values, used.values


cases = [
    dict(freq="M"),
    dict(freq="Q"),
    dict(freq="Q", weights="value"),
    dict(freq="Q", weights="all"),
    dict(freq="M", empty="carry"),
    dict(freq="M", stat="mean"),
    dict(freq="M", minsales=3),
    dict(freq="M", minsales=3, empty="carry"),
    dict(freq="Q", base="2021Q3"),
    dict(freq="M", base="2021-06", empty="carry"),
    dict(freq="Q", chain=True),
    dict(freq="M", chain=True),
    dict(freq="M", chain=True, empty="carry", minsales=2),
    dict(freq="Q", chain=True, weights="value"),
    dict(freq="Y", chain=True),
]
for case in cases:
    opts = {"strata": "region|type", "freq": case["freq"], "stat": case.get("stat", "median"),
            "weights": case.get("weights", "sales"), "chain": int(case.get("chain", False)),
            "empty": case.get("empty", "reweight"), "minsales": case.get("minsales", 1)}
    if "base" in case:
        opts["base"] = float(serial_from_timestamp(pd.Period(case["base"], freq=case["freq"]).to_timestamp(how="start")))
    got = run_refcli(args.refcli, "mix", frame, **opts)
    starts, index, used = pandas_mix(**case)
    label = ", ".join(f"{k}={v}" for k, v in case.items())
    checks.close(f"[{label}] period starts", got.period, starts, rel=0, source="pandas period_range")
    checks.close(f"[{label}] index", got["index"], index, rel=1e-11, source="pandas groupby median/mean, pivot, weighted relatives")
    checks.close(f"[{label}] sales used", got.sales, used, rel=0, source="pandas groupby size over priced weighted strata")
    checks.true(f"[{label}] no bands (documented)", got.lower.isna().all() and got.upper.isna().all())

# The shifting mix: villas (fastest growth, most expensive) gain share, so the raw median
# overstates growth relative to the mix-adjusted median. True growth of each type over
# 2019 -> 2023 (48 months between mid-years) is exp(48 g) - 1: 10 %, 21 %, 33 %.
raw = run_refcli(args.refcli, "raw_median", frame[frame.region != ""], freq="Y")
mix = run_refcli(args.refcli, "mix", frame, strata="region|type", freq="Y")
checks.true("raw yearly median grows more than the mix-adjusted median (composition shift)",
            raw["index"].iloc[-1] > mix["index"].iloc[-1] + 10, f"raw {raw['index'].iloc[-1]:.1f}, mix {mix['index'].iloc[-1]:.1f}")
checks.true("mix-adjusted 2023 lies within the types' true growth (110 .. 133)",
            110 - 3 < mix["index"].iloc[-1] < 133 + 3, f"{mix['index'].iloc[-1]:.1f}")

# Signal-to-noise: the jumpy raw monthly median against a smooth modelled stand-in.
raw_m = run_refcli(args.refcli, "raw_median", frame, freq="M")
t = np.arange(60)
modelled = 100 * np.exp(0.002 * t + rng.normal(0, 0.003, 60))
snr_raw = run_refcli(args.refcli, "snr", pd.DataFrame({"index": raw_m["index"]}), freq="M").snr.iloc[0]
snr_mod = run_refcli(args.refcli, "snr", pd.DataFrame({"index": modelled}), freq="M").snr.iloc[0]
checks.true("smooth modelled index scores a higher signal-to-noise ratio than the raw median",
            snr_mod > 10 * snr_raw, f"modelled {snr_mod:.3g}, raw median {snr_raw:.3g}")

# Bootstrap bands (option bands=bootstrap): against a numpy implementation of the same
# documented scheme with its own random numbers (numpy Generator, seed 7): redraw each
# stratum-period cell's sales with replacement, recompute the quarterly fixed-base
# sales-weighted index, take the 2.5 % and 97.5 % quantiles. Monte Carlo error of 1,000
# replicates is a few per cent of the width, so the widths must agree within 25 % in every
# quarter and within 8 % in the median over quarters.
d = frame[np.isfinite(frame.price) & (frame.price > 0) & (frame.include == 1) & (frame.region != "")].copy()
ts = pd.Timestamp("1899-12-30") + pd.to_timedelta(d.date.values, unit="D")
d["q"] = pd.PeriodIndex(ts, freq="Q")
d["stratum"] = d.region + "|" + d.type
quarters = pd.period_range(d.q.min(), d.q.max(), freq="Q")
strata = sorted(d.stratum.unique())
cells = {(h, q): g.price.to_numpy() for (h, q), g in d.groupby(["stratum", "q"])}
w = np.array([len(cells.get((h, quarters[0]), [])) for h in strata], dtype=float)
brng = np.random.default_rng(7)
B = 1000
reps = np.empty((B, len(quarters)))
for k in range(B):
    m = np.full((len(strata), len(quarters)), np.nan)
    for (h, q), v in cells.items():
        m[strata.index(h), quarters.get_loc(q)] = np.median(v[brng.integers(0, len(v), len(v))])
    rel = m / m[:, [0]]
    present = np.isfinite(rel) & (w[:, None] > 0)
    reps[k] = 100 * np.nansum(np.where(present, rel, 0) * w[:, None], axis=0) / (present * w[:, None]).sum(axis=0)
lo_np, hi_np = np.quantile(reps, 0.025, axis=0), np.quantile(reps, 0.975, axis=0)
got = run_refcli(args.refcli, "mix", frame, strata="region|type", freq="Q", bands="bootstrap", reps=B, seed=3)
width, width_np = (got.upper - got.lower).to_numpy()[1:], (hi_np - lo_np)[1:]
ratio = width / width_np
checks.true("bootstrap band widths within 25 % of numpy's in every quarter", np.all(np.abs(ratio - 1) < 0.25),
            f"ratios {np.round(ratio.min(), 3)} .. {np.round(ratio.max(), 3)}")
checks.true("bootstrap band widths: median ratio within 8 %", abs(np.median(ratio) - 1) < 0.08, f"{np.median(ratio):.3f}")
checks.close("bootstrap band centre near numpy's", ((got.upper + got.lower) / 2).to_numpy()[1:], ((hi_np + lo_np) / 2)[1:],
             rel=0.01, source="numpy bootstrap of the same scheme")
checks.true("bootstrap band contains the index; base band is [100, 100]",
            np.all((got.lower <= got["index"] + 1e-9) & (got["index"] <= got.upper + 1e-9)) and got.lower[0] == 100 == got.upper[0])
again = run_refcli(args.refcli, "mix", frame, strata="region|type", freq="Q", bands="bootstrap", reps=B, seed=3)
checks.true("bootstrap is deterministic for a seed", again.lower.equals(got.lower) and again.upper.equals(got.upper))

checks.finish()
