"""How close plain, smoothed, real-time and borrowed indexes come to the truth in a thin
segment (figures, not a test): the project's own market generator
(demo-workbooks/market_model.py, whose docstring states the model) over several seeds.

Data per seed: the generator's town (132 months, 2015-01 .. 2025-12, about 95 sales a
month); the thin segment is the district "Varnholt", of whose sales each month keeps a random
U{10..25} (all when it has fewer), so the segment has 10 to 25 sales a month; the whole range
is every other district's sales plus the segment's kept ones. Two scenarios:
  common:  as generated: every district follows the market level m(t) (its premium is
           constant), so the segment's true log index is m(t) - m(base);
  drift:   the segment's log prices get an extra 0.06 sin(2 pi t / 80) (t months since
           2015-01): the segment drifts away from the market and back; its truth is m(t) plus
           that term.
The rows with the generator's deliberate data errors are left in (they are dropped with a
reason by every index).

Indexes (the Lintel core through lintel_refcli, the same bindings as the spreadsheet):
  hedonic: INDEXHEDONIC on the segment, characteristics ln floor area (log=1), ln(1 + lot),
           type (text), age and the property's renovations so far (the generator's
           renovated flags up to and including the sale, over the full generated history);
           plain; smooth=trend; smooth=trend seasonal=1; the same
           realtime=1; borrow=1 (the whole range with district as a further characteristic,
           the include mask choosing the segment);
  repeat sales: CHAINRS (Case-Shiller weights) on the segment with changed = the renovated
           flag, plain and smooth=trend seasonal=1.
Measures against the truth, per seed, then averaged over the seeds (min .. max beside):
  yoy   mean absolute error of the year-over-year change 100 (I_t / I_{t-12} - 1), in
        percentage points, over every month with both values;
  level root mean squared error of ln I_t against the true log index after removing their
        mean difference (so the base period's own error does not count), in percent;
  vol   standard deviation of the monthly log changes of the index / that of the truth;
  cover share of months (base excluded) whose true index lies inside the 95 % band, base
        2015-01 (the first month: every band carries the base month's own error, and the
        first month is where a smoothed level is least certain);
  mid   the same with the base 2020-01 (the middle of the span).

Run: /usr/bin/python3 tests/bench/thin_market_evidence.py --refcli build/tests/lintel_refcli
     [--seeds 10] [--chart docs/methods/smoothing-thin-segment.png]
"""
import argparse
import io
import os
import subprocess
import sys
import tempfile

import numpy as np
import pandas as pd

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "..", "demo-workbooks"))
import market_model  # noqa: E402

MONTHS = 132
SEGMENT = "Varnholt"


def months_of(serials):
    d = pd.to_datetime(np.asarray(serials, float), unit="D", origin="1899-12-30")
    return (d.year - 2015) * 12 + d.month - 1


def drift(t):
    return 0.06 * np.sin(2 * np.pi * np.asarray(t, float) / 80)


def make_data(seed, scenario):
    """The whole range (data frame) and the segment's true log index per month."""
    df = market_model.generate(seed=seed, months=MONTHS)
    rng = np.random.default_rng(10_000 + seed)
    date = pd.to_numeric(df.date, errors="coerce")
    t = np.where(date.notna(), months_of(date.fillna(42005)), -1)
    seg = (df.district == SEGMENT).to_numpy()
    keep = ~seg
    for m in range(MONTHS):
        idx = np.flatnonzero(seg & (t == m))
        k = min(len(idx), int(rng.integers(10, 26)))
        keep[rng.choice(idx, k, replace=False)] = True
    keep[seg & (t < 0)] = True  # a segment sale dated "unknown" stays (and is dropped)
    # Renovations so far: the property's renovated flags up to and including this sale (the
    # generator raises a property's lasting effect by 0.15 at each).
    order = np.argsort(pd.to_numeric(df.date, errors="coerce").fillna(1e9).to_numpy(), kind="stable")
    ren = np.zeros(len(df))
    ren[order] = df.iloc[order].groupby("property_id").renovated.cumsum().to_numpy()
    df["renovations"] = ren
    df = df[keep].reset_index(drop=True)
    t = t[keep]
    truth = market_model.market_level(np.arange(MONTHS))
    if scenario == "drift":
        s = (df.district == SEGMENT).to_numpy() & (t >= 0)
        price = pd.to_numeric(df.price, errors="coerce")
        df.loc[s & price.notna(), "price"] = (price[s & price.notna()] * np.exp(drift(t[s & price.notna()])))
        truth = truth + drift(np.arange(MONTHS))
    return df, truth


class Refcli:
    def __init__(self, path, tmp):
        self.path, self.tmp = path, tmp

    def run(self, command, frame, **opts):
        f = os.path.join(self.tmp, "in.csv")
        frame.to_csv(f, index=False)
        args = [self.path, command, f] + [f"{k}={v}" for k, v in opts.items()]
        p = subprocess.run(args, capture_output=True, text=True)
        if p.returncode != 0:
            raise RuntimeError(f"{' '.join(args[1:2] + args[3:])}: {p.stderr.strip()}")
        return pd.read_csv(io.StringIO(p.stdout))


def hedonic_frame(df, with_district=False, include=None):
    out = pd.DataFrame({"date": df.date, "price": df.price, "floor_area": df.floor_area,
                        "lot1p": np.log1p(df.lot.astype(float)), "type": df.type, "age": df.age,
                        "renovations": df.renovations})
    if with_district:
        out["district"] = df.district
    if include is not None:
        out["include"] = include.astype(int)
    return out


def measures(table, truth):
    """yoy, level, vol, cover of one index table (period, index, lower, upper) against the
    true log index per month (months counted from 2015-01)."""
    t = months_of(table.period)
    idx = table["index"].to_numpy(float)
    lo, hi = table.lower.to_numpy(float), table.upper.to_numpy(float)
    tr = truth[t]
    base = int(np.flatnonzero(np.isfinite(idx) & (np.abs(idx - 100) < 1e-9) & (lo == hi))[0])
    true_index = 100 * np.exp(tr - tr[base])
    have = np.isfinite(idx)
    yoy_err = []
    pos = {m: i for i, m in enumerate(t)}
    for i, m in enumerate(t):
        j = pos.get(m - 12)
        if j is not None and have[i] and have[j]:
            yoy_err.append(abs(100 * (idx[i] / idx[j] - 1) - 100 * (np.exp(tr[i] - tr[j]) - 1)))
    d = np.log(idx[have]) - tr[have]
    level = 100 * np.sqrt(np.mean((d - d.mean()) ** 2))
    li = np.log(idx)
    ch = np.diff(li)
    ok = np.isfinite(ch)
    vol = np.std(ch[ok]) / np.std(np.diff(tr)[ok])
    band = have & np.isfinite(lo) & (np.arange(len(idx)) != base)
    cover = np.mean((true_index[band] >= lo[band]) & (true_index[band] <= hi[band]))
    return dict(yoy=np.mean(yoy_err), level=level, vol=vol, cover=cover)


METHODS = [
    ("hedonic, plain", "hedonic_index", {}),
    ("hedonic, smooth=trend", "hedonic_smooth", dict(smooth="trend")),
    ("hedonic, smooth=trend seasonal=1", "hedonic_smooth", dict(smooth="trend", seasonal=1)),
    ("hedonic, ... realtime=1", "hedonic_smooth", dict(smooth="trend", seasonal=1, realtime=1)),
    ("hedonic, ... borrow=1", "hedonic_smooth", dict(smooth="trend", seasonal=1, borrow=1)),
    ("hedonic, ... borrow=1 realtime=1", "hedonic_smooth", dict(smooth="trend", seasonal=1, borrow=1, realtime=1)),
    ("repeat sales, plain", "repeat_sales_index", {}),
    ("repeat sales, smooth=trend seasonal=1", "repeat_sales_smooth", dict(smooth="trend", seasonal=1)),
]


MID = float((pd.Timestamp("2020-01-01") - pd.Timestamp("1899-12-30")).days)


def run_seed(cli, seed, scenario):
    df, truth = make_data(seed, scenario)
    seg = (df.district == SEGMENT).to_numpy()
    out, tables = {}, {}
    for name, command, opts in METHODS:
        if command.startswith("hedonic"):
            if opts.get("borrow"):
                frame = hedonic_frame(df, with_district=True, include=seg)
            else:
                frame = hedonic_frame(df[seg])
            opts = dict(log=1, **opts)
        else:
            s = df[seg]
            frame = pd.DataFrame({"id": s.property_id, "date": s.date, "price": s.price,
                                  "changed": s.renovated})
        tab = cli.run(command, frame, **opts)
        tables[name] = tab
        out[name] = measures(tab, truth)
        out[name]["mid"] = measures(cli.run(command, frame, base=MID, **opts), truth)["cover"]
    return out, tables, truth


def chart(path, tables, truth, seed):
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    plain = tables["hedonic, plain"]
    smooth = tables["hedonic, smooth=trend seasonal=1"]
    rt = tables["hedonic, ... realtime=1"]
    t = months_of(plain.period)
    x = pd.to_datetime(plain.period, unit="D", origin="1899-12-30")
    true_index = 100 * np.exp(truth[t] - truth[t[0]])
    fig, ax = plt.subplots(figsize=(9, 4.6), dpi=110)
    ax.plot(x, plain["index"], color="#9a9a9a", lw=0.9, label="plain hedonic (INDEXHEDONIC)")
    ax.fill_between(x, smooth.lower, smooth.upper, color="#2b6cb0", alpha=0.18, lw=0,
                    label="95 % band of the smoothed index")
    ax.plot(x, smooth["index"], color="#2b6cb0", lw=1.8, label="smooth=trend; seasonal=1")
    ax.plot(x, rt["index"], color="#dd6b20", lw=1.2, ls="--", label="... realtime=1")
    ax.plot(x, true_index, color="black", lw=1.3, ls=":", label="truth (generator)")
    ax.set_ylabel("index (2015-01 = 100)")
    ax.set_title(f"A thin segment: 10-25 sales a month (invented market, seed {seed})", fontsize=11)
    ax.grid(alpha=0.3)
    ax.legend(loc="upper left", fontsize=8.5, frameon=False)
    fig.tight_layout()
    fig.savefig(path)
    print(f"chart written to {path}")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--refcli", required=True)
    ap.add_argument("--seeds", type=int, default=10)
    ap.add_argument("--chart", default="")
    args = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        cli = Refcli(args.refcli, tmp)
        for scenario in ("common", "drift"):
            results = []
            for seed in range(1, args.seeds + 1):
                r, tables, truth = run_seed(cli, seed, scenario)
                results.append(r)
                if args.chart and scenario == "common" and seed == 1:
                    chart(args.chart, tables, truth, seed)
            print(f"\nScenario {scenario}: {args.seeds} seeds, mean (min .. max)")
            print(f"{'index':38s} {'yoy error, pp':>18s} {'level error, %':>18s} {'volatility ratio':>18s} "
                  f"{'coverage, base 1st':>18s} {'coverage, base mid':>18s}")
            for name, _, _ in METHODS:
                row = f"{name:38s}"
                for key, fmt in (("yoy", "{:.2f}"), ("level", "{:.2f}"), ("vol", "{:.2f}"), ("cover", "{:.2f}"),
                                 ("mid", "{:.2f}")):
                    v = np.array([r[name][key] for r in results])
                    row += f" {(fmt.format(v.mean()) + ' (' + fmt.format(v.min()) + '..' + fmt.format(v.max()) + ')'):>18s}"
                print(row)


if __name__ == "__main__":
    main()
