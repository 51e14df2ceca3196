"""INDEXBACKTEST in a real headless Calc, on the demo market.

Data: the demo market of demo-workbooks/market_model.py (generate(), seed 2015; its docstring
states the generating model: about 12,000 sales of 4,800 properties, 2015-01 .. 2025-12, a
wave of new flats from mid-2020 that pulls raw medians and means down, 4 % of sales after a
renovation, 6 prices with an extra zero, 4 blank prices, 3 dates "unknown"), written to the
sheet in the demo workbook's layout (A date | B price | C property_id | D district | E type |
F floor_area | G lot | H bedrooms | I age | J renovated).

Checks against references outside the project:
- the held-out resales (CHAINRS's pair rules of docs/methods/repeat_sales.md written out
  with pandas), the folds (the documented hash, FNV-1a 64 and splitmix64, written out here),
  and for the median and mean rows every figure: each fold's index is the pandas median or
  mean by month of the sales of the other folds' properties, the predictions
  P2_hat = P1 I(t2)/I(t1), the median and RMS log errors (numpy), the revisions (0: a raw
  period value depends only on that period's sales), the volatility (numpy sd, ddof 1, of
  100 diff ln I) and the missing share;
- for every row: the layout declared in the spec; one recommended method with rank 1, and on
  this market not a raw median or mean (the mix shift makes them mispredict resales; the
  simulated check tests/reference/test_backtest_simulated.py shows it on 12 seeds);
- a bad methods row gives one message naming the row.
"""
import os
import sys
import unittest

import numpy as np
import pandas as pd

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "..", "scripts"))
sys.path.insert(0, os.path.join(HERE, "..", "..", "demo-workbooks"))
from lintel_office import SharedOffice, sheet_values  # noqa: E402
import market_model  # noqa: E402  (the project's generator)

OXT = os.environ.get("LINTEL_OXT")
EPOCH = pd.Timestamp("1899-12-30")
FOLDS, SEED, MINHOLD, MAXRATE = 10, 1, 6, 1.0
METHODS = ["median", "mean", "mix", "hedonic log=3", "repeat", "repeat method=bmn"]
HEAD = ["method", "pairs", "median abs error %", "rms error %", "mean revision %",
        "largest revision %", "volatility", "missing %", "rank", "recommended", "reason"]

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop

M64 = (1 << 64) - 1


def splitmix64(x):
    """Steele, Lea & Flood (2014); constants from Vigna's public-domain splitmix64.c."""
    z = (x + 0x9E3779B97F4A7C15) & M64
    z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & M64
    z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & M64
    return z ^ (z >> 31)


def fnv1a64(text):
    """FNV-1a 64-bit (Fowler, Noll & Vo): offset basis 14695981039346656037, prime 1099511628211."""
    h = 14695981039346656037
    for b in text.encode("utf-8"):
        h = ((h ^ b) * 1099511628211) & M64
    return h


def fold_of(pid):
    t = pid.strip()
    return -1 if not t else splitmix64(fnv1a64(t) ^ splitmix64(SEED)) % FOLDS


def held_out_pairs(df):
    """CHAINRS's used pairs (docs/methods/repeat_sales.md): consecutive sales of one id with a
    usable date, sorted by day; a pair is used when both prices are positive numbers, the second
    sale is not after a renovation, the sales lie in different months, the hold is at least
    MINHOLD completed months and |annualised log return| <= MAXRATE."""
    d = df[np.isfinite(df.serial) & (df.property_id.str.strip() != "")].copy()
    d["pid"] = d.property_id.str.strip()
    d["day"] = np.floor(d.serial)
    d = d.sort_values(["pid", "day", "row"])
    prev = d.groupby("pid").shift(1)
    has = prev.row.notna()
    a, b = prev[has], d[has]
    t1 = EPOCH + pd.to_timedelta(a.day.values, unit="D")
    t2 = EPOCH + pd.to_timedelta(b.day.values, unit="D")
    months = 12 * (t2.year - t1.year) + (t2.month - t1.month) - (t2.day < t1.day).astype(int)
    p1, p2 = a.value.values, b.value.values
    ok1, ok2 = np.isfinite(p1) & (p1 > 0), np.isfinite(p2) & (p2 > 0)
    with np.errstate(invalid="ignore", divide="ignore"):
        y = np.log(p2 / p1)
        rate = y * 365.25 / (b.day.values - a.day.values)
    used = (ok1 & ok2 & (b.renovated.values == 0) & (a.key.values != b.key.values)
            & (np.asarray(months) >= MINHOLD) & (np.abs(rate) <= MAXRATE))
    P = pd.DataFrame({"pid": b.pid.values, "k1": a.key.values, "k2": b.key.values, "y": y})[used]
    P["fold"] = P.pid.map(fold_of)
    return P.reset_index(drop=True)


class BacktestCalcTest(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        sales = market_model.generate()
        cls.n = n = len(sales) + 1
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        rows = [tuple(sales.columns)] + [tuple(r) for r in sales.itertuples(index=False)]
        cls.sheet.getCellRangeByName(f"A1:J{n}").setDataArray(rows)
        cls.sheet.getCellRangeByName(f"L1:L{len(METHODS)}").setDataArray([(m,) for m in METHODS])

        df = sales.copy()
        df["row"] = np.arange(len(df))
        df["serial"] = pd.to_numeric(df.date, errors="coerce").astype(float)
        df["value"] = pd.to_numeric(df.price, errors="coerce").astype(float)
        ts = EPOCH + pd.to_timedelta(np.floor(df.serial.fillna(0)), unit="D")
        df["key"] = np.where(np.isfinite(df.serial), ts.dt.year * 12 + ts.dt.month - 1, -1)
        df["fold"] = df.property_id.map(fold_of)
        cls.df = df
        cls.pairs = held_out_pairs(df)
        m = len(METHODS)
        cls.formula = (f"=INDEXBACKTEST(C2:C{n};A2:A{n};B2:B{n};D2:I{n};D2:E{n};J2:J{n};;\"M\";"
                       f"L1:L{m};\"titles=1; notes=1\")")
        cls.cells = cls.array("N1:X40", cls.formula)

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    @classmethod
    def array(cls, ref, formula):
        cls.sheet.getCellRangeByName(ref).setArrayFormula(formula)
        cls.doc.calculateAll()
        return sheet_values(cls.sheet, ref)

    def row(self, label):
        for r in self.cells[1:1 + len(METHODS)]:
            if r[0] == label:
                return dict(zip(HEAD, r))
        self.fail(f"no row {label}")

    def usable(self):
        d = self.df
        return d[np.isfinite(d.serial) & np.isfinite(d.value) & (d.value > 0)]

    # ---- layout
    def test_layout(self):
        self.assertEqual(self.cells[0], HEAD)
        self.assertEqual([r[0] for r in self.cells[1:1 + len(METHODS)]], METHODS)
        notes = {r[0]: r[1] for r in self.cells[1 + len(METHODS):] if isinstance(r[0], str)}
        self.assertEqual(notes.get("held-out resales"), float(len(self.pairs)),
                         "held-out resales = the pandas pair count")
        self.assertEqual(notes.get("properties with resales"), float(self.pairs.pid.nunique()))
        self.assertEqual(notes.get("folds"), float(FOLDS))
        self.assertEqual(notes.get("revision periods"), 12.0)
        self.assertGreater(len(self.pairs), 3000, "test data: thousands of resales")
        self.assertEqual(set(self.pairs.fold), set(range(FOLDS)), "test data: every fold holds resales")

    # ---- median and mean, every figure from pandas
    def check_raw(self, label, how):
        U = self.usable()
        P = self.pairs
        pred = np.full(len(P), np.nan)
        for f in range(FOLDS):
            est = U[U.fold != f]
            li = np.log(est.groupby("key").value.agg(how))
            idx = np.where(P.fold.values == f)[0]
            v1 = li.reindex(P.k1.values[idx]).values
            v2 = li.reindex(P.k2.values[idx]).values
            pred[idx] = v2 - v1
        e = pred - P.y.values
        e = e[np.isfinite(e)]
        got = self.row(label)
        self.assertEqual(got["pairs"], float(len(e)), f"{label}: pairs predicted")
        self.assertAlmostEqual(got["median abs error %"], 100 * np.median(np.abs(e)), delta=1e-9,
                               msg=f"{label}: median abs error (numpy median)")
        self.assertAlmostEqual(got["rms error %"], 100 * np.sqrt(np.mean(e ** 2)), delta=1e-9,
                               msg=f"{label}: rms error")
        full = np.log(U.groupby("key").value.agg(how))
        series = full.reindex(range(int(U.key.min()), int(U.key.max()) + 1))
        self.assertAlmostEqual(got["volatility"], np.std(100 * series.diff().dropna(), ddof=1), delta=1e-9,
                               msg=f"{label}: volatility (numpy sd, ddof 1)")
        self.assertAlmostEqual(got["missing %"], 100 * float(series.isna().mean()), delta=1e-12,
                               msg=f"{label}: missing %")
        self.assertAlmostEqual(got["mean revision %"], 0.0, delta=1e-9,
                               msg=f"{label}: a raw period value does not revise")
        self.assertAlmostEqual(got["largest revision %"], 0.0, delta=1e-9)

    def test_median_against_pandas(self):
        self.check_raw("median", "median")

    def test_mean_against_pandas(self):
        self.check_raw("mean", "mean")

    # ---- the verdict
    def test_one_method_recommended(self):
        rows = [self.row(m) for m in METHODS]
        self.assertEqual(sum(r["recommended"] for r in rows), 1.0)
        rec = [r for r in rows if r["recommended"] == 1.0][0]
        self.assertEqual(rec["rank"], 1.0)
        ranks = sorted(r["rank"] for r in rows if isinstance(r["rank"], float))
        self.assertEqual(ranks, [float(k) for k in range(1, len(ranks) + 1)], "ranks 1..n")
        self.assertNotIn(rec["method"], ("median", "mean"), "the mix shift makes raw measures mispredict")
        for r in rows:
            self.assertIsInstance(r["reason"], str)
            self.assertTrue(r["reason"], f"{r['method']}: a reason")
            self.assertNotIn("\n", r["reason"])
            self.assertIsInstance(r["pairs"], float, f"{r['method']}: estimated")
        # The recommended one predicts at least as well as the raw ones, by a clear margin here.
        self.assertLess(rec["median abs error %"], self.row("median")["median abs error %"])
        print("\nINDEXBACKTEST on the demo market:")
        for r in rows:
            print(f"  {r['method']:18s} pairs {r['pairs']:.0f}  mdae {r['median abs error %']:.2f}  "
                  f"rmse {r['rms error %']:.2f}  rev {r['mean revision %']:.3f}/{r['largest revision %']:.3f}  "
                  f"vol {r['volatility']:.2f}  miss {r['missing %']:.0f}  rank {r['rank']}  {r['reason']}")

    # ---- a bad methods row
    def test_bad_row_is_named(self):
        n = self.n
        self.sheet.getCellRangeByName("L20:L21").setDataArray([("median",), ("hedonic lgo=1",)])
        got = self.array("Z1:Z2", f"=INDEXBACKTEST(C2:C{n};A2:A{n};B2:B{n};D2:I{n};;;;\"M\";L20:L21)")[0][0]
        self.assertIsInstance(got, str)
        self.assertIn("methods row 2 (\"hedonic lgo=1\"): unknown option \"lgo\" for hedonic", got)


if __name__ == "__main__":
    unittest.main(verbosity=2)
