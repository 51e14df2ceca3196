"""Smoothed INDEXHEDONIC and CHAINRS (smooth, seasonal, realtime, borrow) in a real headless
Calc. Every value is compared with the Lintel core called through lintel_refcli on the same
data (the core itself is checked against statsmodels and a dense GLS in
tests/reference/test_smoothed_index_statsmodels.py); the real-time index is computed on the
sales up to 2022-12 and again with two more years of sales, and its published rows must not
change.

Generating model of the test data (not the demo): 48 months 2020-01 .. 2023-12; 240
properties (district North for the first 96, South for the rest; size ~ exp(N(4.5, 0.25^2))
m^2; type flat / house with p .6 / .4; age U{0..80}; a lasting effect N(0, 0.15^2)); each
month U{14..24} sales of distinct properties drawn at random, on days U{1..28};
  ln price = 12 + 0.004 m + 0.02 cos(2 pi (m - 6) / 12) + 0.8 ln size + 0.15 [house]
             + 0.1 [North] - 0.002 age + effect + N(0, 0.1^2).
The sheet: A date | B price | C size | D type | E age | F district | G id, header row 1.
"""
import io
import math
import os
import subprocess
import sys
import tempfile
import unittest

import numpy as np
import pandas as pd

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
from lintel_office import SharedOffice, SheetCalls  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
REFCLI = os.environ.get("LINTEL_REFCLI")
EPOCH = pd.Timestamp("1899-12-30")
REL = 1e-12

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


def make_sales(seed=2048):
    rng = np.random.default_rng(seed)
    n_prop = 240
    size = np.exp(rng.normal(4.5, 0.25, n_prop))
    house = rng.random(n_prop) < 0.4
    age = rng.integers(0, 81, n_prop).astype(float)
    effect = rng.normal(0, 0.15, n_prop)
    north = np.arange(n_prop) < 96
    rows = []
    for m in range(48):
        for j in rng.choice(n_prop, int(rng.integers(14, 25)), replace=False):
            lnp = (12 + 0.004 * m + 0.02 * math.cos(2 * math.pi * (m - 6) / 12) + 0.8 * math.log(size[j])
                   + (0.15 if house[j] else 0) + (0.1 if north[j] else 0) - 0.002 * age[j] + effect[j]
                   + rng.normal(0, 0.1))
            ts = pd.Timestamp(year=2020 + m // 12, month=m % 12 + 1, day=int(rng.integers(1, 29)))
            rows.append((float((ts - EPOCH).days), float(round(math.exp(lnp))), float(round(size[j])),
                         "house" if house[j] else "flat", age[j], "North" if north[j] else "South",
                         f"H{j:03d}", m))
    df = pd.DataFrame(rows, columns=["date", "price", "size", "type", "age", "district", "id", "m"])
    return df.sort_values(["date", "id"], kind="stable").reset_index(drop=True)


def refcli(command, frame, **opts):
    with tempfile.TemporaryDirectory() as d:
        path = os.path.join(d, "in.csv")
        frame.to_csv(path, index=False, float_format="%.17g")
        p = subprocess.run([REFCLI, command, path] + [f"{k}={v}" for k, v in opts.items()],
                           capture_output=True, text=True)
        if p.returncode != 0:
            raise RuntimeError(p.stderr)
        return pd.read_csv(io.StringIO(p.stdout))


def rows_of(cells):
    """The rows of an array result up to the first row Calc fills with #N/A (beyond it)."""
    out = []
    for r in cells:
        if isinstance(r[0], tuple):
            break
        out.append(r)
    return out


class SmoothingCalcTest(SheetCalls, unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.df = make_sales()
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        rows = [("date", "price", "size", "type", "age", "district", "id")] + [
            (r.date, r.price, r.size, r.type, r.age, r.district, r.id) for r in cls.df.itertuples()]
        cls.n = len(rows)
        cls.sheet.getCellRangeByName(f"A1:G{cls.n}").setDataArray(rows)
        # Rows up to 2022-12 (the sheet is in date order): the "earlier" sheet state.
        cls.n36 = 1 + int((cls.df.m < 36).sum())

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def hedonic_frame(self, upto=None, chars=("size", "type", "age"), include=None):
        d = self.df if upto is None else self.df[self.df.m < upto]
        f = pd.DataFrame({"date": d.date, "price": d.price})
        if include is not None:
            f["include"] = include.astype(int)
        for c in chars:
            f[c] = d[c]
        return f

    def assertTable(self, cells, want, what):
        """period | index | count | lower | upper against a refcli table."""
        self.assertEqual(len(cells), len(want), what)
        for i, row in enumerate(cells):
            self.assertEqual(row[0], want.period[i], what)
            self.assertEqual(row[2], want["count"][i], f"{what}: count")
            for j, col in ((1, "index"), (3, "lower"), (4, "upper")):
                x = want[col][i]
                self.assertLessEqual(abs(row[j] - x), REL * abs(x), f"{what}, row {i} {col}: {row[j]} vs {x}")

    def test_hedonic_trend_seasonal_with_notes(self):
        n = self.n
        cells = rows_of(self.array("J1:N80", f'=INDEXHEDONIC(A2:A{n};B2:B{n};C2:E{n};;;;"log=1; smooth=trend; seasonal=1; notes=1")'))
        want = refcli("hedonic_smooth", self.hedonic_frame(), log=1, smooth="trend", seasonal=1)
        self.assertTable(cells[:48], want, "INDEXHEDONIC smooth=trend seasonal=1 vs refcli hedonic_smooth")
        notes = {r[0]: r[1] for r in cells[48:]}
        self.assertEqual(notes["rows used"], float(n - 1))
        self.assertEqual(notes["smoothing model"], "local linear trend + seasonal (12)")
        for label, col in (("level variance", "v_level"), ("slope variance", "v_slope"),
                           ("seasonal variance", "v_seasonal"), ("log-likelihood", "ll"),
                           ("signal-to-noise ratio", "q")):
            self.assertLessEqual(abs(notes[label] - want[col][0]), 1e-12 * max(abs(want[col][0]), 1e-300),
                                 f"{label}: refcli {col}")
        self.assertTrue(notes["variances"].startswith("maximum likelihood ("))
        self.assertEqual(notes["periods filled in by the model"], 0.0)

    def test_chainrs_smooth_level(self):
        n = self.n
        cells = rows_of(self.array("P1:T48", f'=CHAINRS(G2:G{n};A2:A{n};B2:B{n};;;;;"smooth=level")'))
        want = refcli("repeat_sales_smooth", pd.DataFrame({"id": self.df.id, "date": self.df.date,
                                                           "price": self.df.price}), smooth="level")
        self.assertTable(cells, want, "CHAINRS smooth=level vs refcli repeat_sales_smooth")

    def test_realtime_never_changes_when_later_sales_arrive(self):
        n, n36 = self.n, self.n36
        for first, last, formula in (
                ("V", "Z", 'INDEXHEDONIC(A2:A{r};B2:B{r};C2:E{r};;;;"log=1; smooth=trend; seasonal=1; realtime=1")'),
                ("AB", "AF", 'CHAINRS(G2:G{r};A2:A{r};B2:B{r};;;;;"smooth=trend; realtime=1")')):
            early = self.array(f"{first}1:{last}36", "=" + formula.format(r=n36))
            later = self.array(f"{first}40:{last}87", "=" + formula.format(r=n))
            self.assertEqual(len(rows_of(later)), 48)
            for t in range(36):
                self.assertEqual(early[t], later[t], f"{formula[:12]}: month {t} published with the sales up to "
                                                     f"2022-12 changed when 2023 was added")
        # Against the core: the full real-time hedonic index.
        want = refcli("hedonic_smooth", self.hedonic_frame(), log=1, smooth="trend", seasonal=1, realtime=1)
        self.assertTable(rows_of(self.sheet_range("V40:Z87")), want, "INDEXHEDONIC realtime=1 vs refcli")
        # The plain pooled index does revise its past (the check above can fail).
        early = self.array("AH1:AL36", f'=INDEXHEDONIC(A2:A{n36};B2:B{n36};C2:E{n36};;;;"log=1")')
        later = self.array("AH40:AL87", f'=INDEXHEDONIC(A2:A{n};B2:B{n};C2:E{n};;;;"log=1")')
        self.assertNotEqual(early[20][1], later[20][1])

    def sheet_range(self, ref):
        from lintel_office import sheet_values
        return sheet_values(self.sheet, ref)

    def test_borrow_on_a_segment(self):
        n = self.n
        cells = rows_of(self.array(
            "AN1:AR70", f'=INDEXHEDONIC(A2:A{n};B2:B{n};C2:F{n};(F2:F{n}="North");;;"log=1; smooth=trend; borrow=1; notes=1")'))
        north = (self.df.district == "North").to_numpy()
        want = refcli("hedonic_smooth", self.hedonic_frame(chars=("size", "type", "age", "district"), include=north),
                      log=1, smooth="trend", borrow=1)
        self.assertTable(cells[:48], want, "INDEXHEDONIC borrow=1 vs refcli hedonic_smooth")
        notes = {r[0]: r[1] for r in cells[48:]}
        self.assertEqual(notes["rows used"], float(north.sum()), "segment rows")
        self.assertEqual(notes["whole range rows used"], float(n - 1))
        self.assertEqual(notes["smoothing model"], "local linear trend + segment deviation")
        self.assertLessEqual(abs(notes["segment deviation variance"] - want.v_deviation[0]),
                             1e-12 * max(want.v_deviation[0], 1e-300))

    def test_messages(self):
        n = self.n
        cases = (
            (f'=INDEXHEDONIC(A2:A{n};B2:B{n};C2:E{n};;;;"log=1; smooth=trend; borrow=1")',
             "Lintel: borrow=1 needs an include mask choosing the segment: its index is the whole range's "
             "price movement plus the segment's own smoothed deviation from it"),
            (f'=INDEXHEDONIC(A2:A{n};B2:B{n};C2:E{n};;;;"log=1; smooth=trend; window=3")',
             "Lintel: smooth works on the pooled fit, not on rolling windows: use window=0 with smooth=trend "
             "(for values that never revise add realtime=1)"),
            (f'=CHAINRS(G2:G{n};A2:A{n};B2:B{n};;;;;"smooth=level; chain=1")',
             "Lintel: smooth needs chain=0: the smoother takes the period effects estimated jointly (for "
             "values that never revise use realtime=1 instead of chain=1)"),
        )
        for formula, want in cases:
            self.assertEqual(self.formula("AT1", formula), want)


if __name__ == "__main__":
    unittest.main()
