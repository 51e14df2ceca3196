"""Does INDEXBACKTEST recommend the truly best index? Checked on simulated markets from the
project's own generator (demo-workbooks/market_model.py, whose docstring states the model),
where the true constant-quality index is known: ln I_true(t) = market_level(t).

Scenarios (seeds 1..6 of the generator each):
- large: the whole invented town, about 12,000 sales over 132 months (about 90 a month), with
  the wave of new flats that shifts the mix from mid-2020;
- thin: one district ("Varnholt"), about 2,500 sales (about 19 a month).
Candidates: median, mean, mix (strata district x type), hedonic (district, type, ln floor
area, lot, age), repeat (Case-Shiller), repeat method=bmn; the generator's renovation flag
is the changed column; default folds (10), seed (1) and revisions (12).

Truth error of a method: the root mean square over its periods with a value of
(ln I_t - ln I_true(t)) minus its mean (the level up to the base), in log points; the truly
best method has the smallest. Agreement: the recommended method is the truly best; and the
looser "as good": its truth error is within 5 % of the best's (the two repeat-sales variants
differ by less than that in every run, so exact agreement between them is a coin toss).

What the data support (LINTEL_BACKTEST_SEEDS=12 runs seeds 1..12; figures also in
docs/methods/backtest.md): large, exact 7/12, as good 11/12, worst ratio 1.116 (seed 5: the
held-out resales prefer repeat sales, 6.80 % against hedonic's 6.85 %, while hedonic is closer
to the truth, 1.33 against 1.49: the known bias of the test towards repeat sales); thin, exact
6/12, as good 12/12, worst ratio 1.008. A first version of the rule let revision differences
of more than 0.1 points decide among methods as accurate within noise: on thin seeds 1..8 it
picked hedonic (revising about 0.03 %) over repeat sales (about 0.3 %) for seeds 6 and 7, where
repeat sales was truly better by 12 % and 26 %: as good 6/8, worst ratio 1.26; hence the
0.5-point band. This test runs seeds 1..6 (LINTEL_BACKTEST_SEEDS sets more) and
asserts what they give, no margin for wishes: per scenario "as good" in at least 5 of 6 runs,
exact in at least 3 of 6, never a raw median or mean, and no recommended method worse than
1.2 times the best. The figures are printed.
"""
import io
import os
import subprocess
import sys
import tempfile

import numpy as np
import pandas as pd

from refcommon import Checks, parse_args

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "..", "demo-workbooks"))
import market_model  # noqa: E402  (the project's generator)

args = parse_args()
checks = Checks("backtest recommendation vs a simulated market's truth")
METHODS = ["median", "mean", "mix", "hedonic log=3", "repeat", "repeat method=bmn"]
SEEDS = range(1, 1 + int(os.environ.get("LINTEL_BACKTEST_SEEDS", "6")))  # more for the docs' figures


def frame_of(df):
    return pd.DataFrame({
        "id": df.property_id, "date": pd.to_numeric(df.date, errors="coerce"),
        "price": pd.to_numeric(df.price, errors="coerce"), "changed": df.renovated,
        "c_district": df.district, "c_type": df.type, "c_area": df.floor_area, "c_lot": df.lot,
        "c_age": df.age, "s_district": df.district, "s_type": df.type})


def backtest(frame):
    with tempfile.TemporaryDirectory() as d:
        path = os.path.join(d, "sales.csv")
        frame.to_csv(path, index=False, float_format="%.17g")
        out = subprocess.run([args.refcli, "backtest_report", path, "methods=" + "|".join(METHODS)],
                             capture_output=True, text=True)
    if out.returncode:
        raise RuntimeError(out.stderr)
    summary, indexes = out.stdout.split("\n\n")
    return pd.read_csv(io.StringIO(summary)), pd.read_csv(io.StringIO(indexes))


def truth_errors(indexes):
    when = pd.Timestamp("1899-12-30") + pd.to_timedelta(indexes.period, unit="D")
    t = ((when.dt.year - 2015) * 12 + when.dt.month - 1).values
    truth = market_level(t)
    err = []
    for k in range(len(METHODS)):
        log = indexes[f"log_{k + 1}"].values
        ok = np.isfinite(log)
        d = log[ok] - truth[ok]
        err.append(100 * np.sqrt(np.mean((d - d.mean()) ** 2)))
    return np.array(err)


market_level = market_model.market_level
for scenario in ["large", "thin"]:
    exact = good = 0
    worst = 1.0
    raw = False
    print(f"== {scenario}: truth error (log points) / median abs error % of each method; * recommended")
    for seed in SEEDS:
        sales = market_model.generate(seed=seed)
        if scenario == "thin":
            sales = sales[sales.district == "Varnholt"].reset_index(drop=True)
        summary, indexes = backtest(frame_of(sales))
        te = truth_errors(indexes)
        rec = int(np.argmax(summary.recommended.values))
        best = int(np.argmin(te))
        ratio = te[rec] / te[best]
        exact += rec == best
        good += ratio <= 1.05
        worst = max(worst, ratio)
        raw = raw or METHODS[rec] in ("median", "mean")
        cells = "  ".join(f"{m}{'*' if k == rec else ''} {te[k]:.2f}/{summary.mdae[k]:.2f}"
                          for k, m in enumerate(METHODS))
        print(f"  seed {seed} ({len(sales)} sales): {cells}; truly best {METHODS[best]}, ratio {ratio:.3f}")
    n = len(SEEDS)
    print(f"  {scenario}: recommended = truly best in {exact}/{n}; within 5 % of the best in {good}/{n}; "
          f"worst ratio {worst:.3f}")
    checks.true(f"{scenario}: recommended within 5 % of the truly best in at least 5 of 6 runs",
                good >= 5 * n / 6, f"{good}/{n}")
    checks.true(f"{scenario}: recommended is the truly best in at least 3 of 6 runs", exact >= 3 * n / 6,
                f"{exact}/{n}")
    checks.true(f"{scenario}: never a raw median or mean (the mix shifts and thin noise make them worst)",
                not raw)
    checks.true(f"{scenario}: recommended within 1.2 x the truly best's error in every run", worst <= 1.2,
                f"worst {worst:.3f}")
checks.finish()
