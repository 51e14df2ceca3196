"""INDEXTREND core (Hodrick-Prescott trend) against Stata's values and statsmodels.

Sources:
- Stata's HP filter output on statsmodels' macrodata realgdp (1959Q1-2009Q3), lambda 1600,
  the table statsmodels uses in its own tests (statsmodels/tsa/filters/tests/test_filters.py,
  test_hpfilter; read from the installed python3-statsmodels). Four of its values are also
  quoted in ../shared/notes/methods.md and checked even if the table cannot be read.
- statsmodels.tsa.filters.hp_filter.hpfilter (sparse spsolve of (I + lambda K'K) tau = y).
- numpy.linalg.solve of the weighted normal equations (W + lambda K'K) tau = W y for series
  with gaps (W = 0/1 diagonal of observed periods): our documented objective, solved densely.

Generated data (monthly check and gaps): ln y_t = 4.6 + 0.004 t + 0.05 sin(2 pi t / 70)
+ N(0, 0.01^2), 150 months, y = 100 exp(...), seed 20260301; gaps at rows 0-2, 40-44, 90, 149.
"""
import ast
import os

import numpy as np
import pandas as pd
import statsmodels.api as sm
from statsmodels.tsa.filters.hp_filter import hpfilter

from refcommon import Checks, parse_args, run_refcli

args = parse_args()
checks = Checks("HP trend vs Stata / statsmodels / numpy")

gdp = sm.datasets.macrodata.load_pandas().data["realgdp"].to_numpy(dtype=float)
got = run_refcli(args.refcli, "hp", pd.DataFrame({"y": gdp}), freq="Q")

# Methods.md check values (Stata, as in statsmodels' tests).
checks.close("realgdp first cycle", got.cycle.iloc[0], 39.51191484, abs_=1e-6, source="Stata via statsmodels tests / methods.md")
checks.close("realgdp first trend", got.trend.iloc[0], 2670.83708516, abs_=1e-6, source="Stata via statsmodels tests / methods.md")
checks.close("realgdp last cycle", got.cycle.iloc[-1], -333.11524280, abs_=1e-6, source="Stata via statsmodels tests / methods.md")
checks.close("realgdp last trend", got.trend.iloc[-1], 13323.45624280, abs_=1e-6, source="Stata via statsmodels tests / methods.md")

# The full Stata table from statsmodels' test module.
import statsmodels.tsa.filters.tests as tests_pkg

path = os.path.join(os.path.dirname(tests_pkg.__file__), "test_filters.py")
table = None
if os.path.exists(path):
    tree = ast.parse(open(path).read())
    for node in ast.walk(tree):
        if isinstance(node, ast.FunctionDef) and node.name == "test_hpfilter":
            for stmt in node.body:
                if isinstance(stmt, ast.Assign) and getattr(stmt.targets[0], "id", "") == "hpfilt_res":
                    table = np.array(ast.literal_eval(stmt.value.args[0]), dtype=float)
if checks.true("Stata table found in statsmodels' tests", table is not None and table.shape == (203, 2), path):
    checks.close("realgdp cycle, all 203 quarters", got.cycle, table[:, 0], rel=1e-8, abs_=1e-7, source="Stata (statsmodels test_hpfilter)")
    checks.close("realgdp trend, all 203 quarters", got.trend, table[:, 1], rel=1e-10, source="Stata (statsmodels test_hpfilter)")

cycle, trend = hpfilter(gdp, 1600)
checks.close("realgdp trend vs hpfilter(1600)", got.trend, trend, rel=1e-10, source="statsmodels hpfilter")
got = run_refcli(args.refcli, "hp", pd.DataFrame({"y": gdp}), freq="Q", **{"lambda": 400})
checks.close("realgdp trend vs hpfilter(400), lambda option", got.trend, hpfilter(gdp, 400)[1], rel=1e-10, source="statsmodels hpfilter")

# Monthly series, default lambda 129600 (Ravn & Uhlig 2002).
rng = np.random.default_rng(20260301)
t = np.arange(150)
y = 100 * np.exp(4.6 + 0.004 * t + 0.05 * np.sin(2 * np.pi * t / 70) + rng.normal(0, 0.01, 150))
got = run_refcli(args.refcli, "hp", pd.DataFrame({"y": y}), freq="M")
checks.close("monthly trend, default lambda 129600", got.trend, hpfilter(y, 129600)[1], rel=1e-10, source="statsmodels hpfilter")
got = run_refcli(args.refcli, "hp", pd.DataFrame({"y": y}), freq="Y")
checks.close("yearly default lambda 6.25", got.trend, hpfilter(y, 6.25)[1], rel=1e-10, source="statsmodels hpfilter")


def weighted_hp(y, lamb):
    """Dense solve of the documented objective over the span of observed values."""
    obs = np.isfinite(y)
    first, last = np.argmax(obs), len(y) - 1 - np.argmax(obs[::-1])
    ys, w = y[first:last + 1], obs[first:last + 1].astype(float)
    m = len(ys)
    K = np.zeros((m - 2, m))
    for i in range(m - 2):
        K[i, i:i + 3] = [1, -2, 1]
    tau = np.linalg.solve(np.diag(w) + lamb * K.T @ K, np.where(w > 0, ys, 0.0))
    out = np.full(len(y), np.nan)
    out[first:last + 1] = tau
    return out


gappy = y.copy()
gappy[[0, 1, 2, 40, 41, 42, 43, 44, 90, 149]] = np.nan
for lamb in (129600, 14400, 50):
    got = run_refcli(args.refcli, "hp", pd.DataFrame({"y": gappy}), freq="M", **{"lambda": lamb})
    want = weighted_hp(gappy, lamb)
    checks.close(f"trend with gaps, lambda {lamb}", got.trend, want, rel=1e-8, source="numpy.linalg.solve of (W + lambda K'K) tau = W y")
    checks.true(f"no trend outside the observed span, lambda {lamb}",
                got.trend.iloc[:3].isna().all() and np.isnan(got.trend.iloc[149]) and got.trend.iloc[40:45].notna().all())
    checks.close(f"cycle = y - trend where y has a value, lambda {lamb}", got.cycle, gappy - want, rel=1e-6, abs_=1e-8,
                 source="numpy")

checks.finish()
