"""Real-Calc tests of extreme values (issue 10): prices and index values near the largest
number a cell holds (1.8e308) and the smallest (1e-308), 0 and negative values. Each case
gives the value that exists or a "Lintel: ..." message; never a blank in place of a number.

Data are written to cells (the *(cells)* arguments refuse expressions by design). Reference
values are computed exactly in this file: Python's fractions.Fraction on the very doubles
written (medians, means, the mix formula of docs/methods/analytics.md (INDEXMIX): base-period sales weights,
relatives to the base period), decimal at 40 digits for logs (ln(1e308 / 1e-308) ~ 1418.39),
and the HP filter passing a constant through unchanged (Hodrick & Prescott 1997).

Generating model of the test data: 360 sales, 30 a month over 2024-01 .. 2024-12, day of
month 1 + (k * 7) % 28; stratum "a" or "b" alternating; price = 1e308 * (0.5 + u) with
u uniform on [0, 1.2) (seed 11), so prices lie in [0.5e308, 1.7e308] and every sum of two
overflows.
"""
import math
import os
import sys
import unittest
from decimal import Decimal, getcontext
from fractions import Fraction

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
import uno  # noqa: E402,F401
from lintel_office import SharedOffice, SheetCalls  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop

getcontext().prec = 40


def serial(y, m, d):
    """Calc's date serial (days from 1899-12-30)."""
    import datetime
    return float((datetime.date(y, m, d) - datetime.date(1899, 12, 30)).days)


def make_sales(seed=11):
    rng = np.random.default_rng(seed)
    rows = []
    for month in range(1, 13):
        for k in range(30):
            price = float(1e308 * (0.5 + 1.2 * rng.random()))
            rows.append((serial(2024, month, 1 + (k * 7) % 28), price, "a" if k % 2 else "b", month))
    return rows


def exact_median(values):
    v = sorted(Fraction(x) for x in values)
    n = len(v)
    return v[n // 2] if n % 2 else (v[n // 2 - 1] + v[n // 2]) / 2


def exact_mean(values):
    return sum(Fraction(x) for x in values) / len(values)


def ln_ratio(b, a):
    """ln(b / a) of two doubles, exactly to 40 digits (decimal)."""
    return (Decimal(b) / Decimal(a)).ln()


class ExtremesTest(SheetCalls, unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.sales = make_sales()
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        data = [(d, p, s) for d, p, s, _ in cls.sales]
        cls.n = len(data)
        cls.sheet.getCellRangeByName(f"A1:C{cls.n}").setDataArray(data)

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def by_month(self):
        out = {}
        for _, p, s, m in self.sales:
            out.setdefault(m, []).append((p, s))
        return out

    # Issue 10: "INDEXMEDIAN(A1:A1000;F1:F1000) with prices around 1e308 gives period dates
    # and counts but a blank index column."
    def test_indexmedian_and_indexmean_of_prices_near_1e308(self):
        months = self.by_month()
        for name, stat, col in (("INDEXMEDIAN", exact_median, "E"), ("INDEXMEAN", exact_mean, "K")):
            last = chr(ord(col) + 4)
            cells = self.array(f"{col}1:{last}12", f"={name}(A1:A{self.n};B1:B{self.n})")
            base = stat([p for p, _ in months[1]])
            for m in range(1, 13):
                level = stat([p for p, _ in months[m]])
                want = float(100 * level / base)
                row = cells[m - 1]
                self.assertEqual(row[0], serial(2024, m, 1))
                self.assertIsInstance(row[1], float, f"{name} month {m}: {row[1]!r}")
                self.assertAlmostEqual(row[1], want, delta=1e-12 * want)
                self.assertEqual(row[2], 30.0)
            if name == "INDEXMEAN":  # bands are numbers too (scaled, never overflowing)
                for row in cells:
                    self.assertIsInstance(row[3], float)
                    self.assertIsInstance(row[4], float)
                    self.assertLess(row[3], row[1])
                    self.assertGreater(row[4], row[1])

    # Issue 10: "INDEXMIX's even-count median overflows and miscounts." 15 sales per stratum
    # and month (odd) and, with the first row of each month left out by include, 14 or 15.
    def test_indexmix_near_1e308(self):
        months = self.by_month()
        cells = self.array("Q1:U12", f'=INDEXMIX(A1:A{self.n};B1:B{self.n};C1:C{self.n})')
        # docs/methods/analytics.md (INDEXMIX), fixed base (default): index_t = 100 * sum_h w_h med_h,t / med_h,base,
        # w_h = sales of stratum h in the base period (the first) / all base sales.
        med = {(m, h): exact_median([p for p, s in months[m] if s == h]) for m in months for h in "ab"}
        w = {h: Fraction(sum(1 for _, s in months[1] if s == h), len(months[1])) for h in "ab"}
        for m in range(1, 13):
            want = float(100 * sum(w[h] * med[(m, h)] / med[(1, h)] for h in "ab"))
            self.assertIsInstance(cells[m - 1][1], float, f"month {m}: {cells[m - 1][1]!r}")
            self.assertAlmostEqual(cells[m - 1][1], want, delta=1e-12 * want)
            self.assertEqual(cells[m - 1][2], 30.0)
        # An even count in every cell: drop the first sale of every month with include.
        keep = [0.0 if k % 30 == 0 else 1.0 for k in range(self.n)]
        self.sheet.getCellRangeByName(f"D1:D{self.n}").setDataArray([(x,) for x in keep])
        cells = self.array("W1:AA12", f'=INDEXMIX(A1:A{self.n};B1:B{self.n};C1:C{self.n};D1:D{self.n};;;"weights=value")')
        kept = {m: [(p, s) for k, (p, s) in enumerate(months[m]) if k] for m in months}
        med = {(m, h): exact_median([p for p, s in kept[m] if s == h]) for m in kept for h in "ab"}
        value = {h: sum(Fraction(p) for p, s in kept[1] if s == h) for h in "ab"}
        w = {h: value[h] / (value["a"] + value["b"]) for h in "ab"}
        for m in range(1, 13):
            want = float(100 * sum(w[h] * med[(m, h)] / med[(1, h)] for h in "ab"))
            self.assertIsInstance(cells[m - 1][1], float, f"month {m}: {cells[m - 1][1]!r}")
            self.assertAlmostEqual(cells[m - 1][1], want, delta=1e-12 * want)
            self.assertEqual(cells[m - 1][2], 29.0)

    def index_table(self, top, values):
        """Period starts 2024-01.. in column AC, values in AD, from row `top`; returns the refs."""
        n = len(values)
        rows = [(serial(2024 + i // 12, 1 + i % 12, 1), v) for i, v in enumerate(values)]
        self.sheet.getCellRangeByName(f"AC{top}:AD{top + n - 1}").setDataArray(rows)
        return f"AC{top}:AC{top + n - 1}", f"AD{top}:AD{top + n - 1}"

    # Issue 10: "PRICEADJUST(1E+308; ...) returns a blank."
    def test_priceadjust_of_1e308(self):
        periods, index = self.index_table(1, [100.0, 105.0, 200.0])
        self.sheet.getCellRangeByName("AF1:AH3").setDataArray([
            (1e308, serial(2024, 1, 15), serial(2024, 2, 15)),
            (1e308, serial(2024, 1, 15), serial(2024, 3, 15)),
            (1e-308, serial(2024, 3, 15), serial(2024, 1, 15))])
        got = self.formula("AI1", f"=PRICEADJUST(AF1;AG1;AH1;{periods};{index})")
        want = float(Fraction(1e308) * 105 / 100)  # exact, then rounded once
        self.assertAlmostEqual(got, want, delta=1e-15 * want)
        got = self.formula("AI2", f"=PRICEADJUST(AF2;AG2;AH2;{periods};{index})")
        self.assertEqual(got, "Lintel: the adjusted price 1e+308 x 200 / 100 is beyond the range "
                              "of numbers (about 1e-308 to 1e308)")
        got = self.formula("AI3", f"=PRICEADJUST(AF3;AG3;AH3;{periods};{index})")
        self.assertAlmostEqual(got, 5e-309, delta=1e-12 * 5e-309)  # 1e-308 * 100 / 200

    # Issue 10: "INDEXSEASONAL on a negative index says 'too many missing values'."
    def test_indexseasonal_names_the_negative_value(self):
        values = [100.0 + (i % 12) for i in range(24)]
        values[6] = -5.0
        _, index = self.index_table(10, values)
        got = self.formula("AJ1", f"=INDEXSEASONAL({index})")
        self.assertEqual(got, "Lintel: seasonal factors need index values above 0: row 7 holds -5")

    # Issue 10: "INDEXVOLATILITY on values alternating 1e308/1e-308 says '0 changes'."
    def test_indexvolatility_of_1e308_and_1e_308(self):
        _, index = self.index_table(40, [1e308, 1e-308, 1e308, 1e-308])
        got = self.formula("AJ2", f"=INDEXVOLATILITY({index})")
        # changes -c, +c, -c (c = 100 ln(1e308 / 1e-308)): sample sd 2c / sqrt(3)
        c = 100 * ln_ratio(1e308, 1e-308)
        want = float(2 * c / Decimal(3).sqrt())
        self.assertIsInstance(got, float, repr(got))
        self.assertAlmostEqual(got, want, delta=1e-13 * want)

    # Issue 10: "INDEXTREND of a constant 5 returns 5.000000000055."
    def test_indextrend_of_a_constant_is_exact(self):
        _, index = self.index_table(50, [5.0] * 36)
        cells = self.array("AK50:AK85", f"=INDEXTREND({index})")
        self.assertEqual([r[0] for r in cells], [5.0] * 36)

    # INDEXREBASE and INDEXCHANGE near the largest number.
    def test_indexrebase_and_indexchange_near_1e308(self):
        periods, index = self.index_table(90, [1e308, 2e307, 1.5e308])
        cells = self.array("AL90:AL92", f"=INDEXREBASE({periods};{index};AC90)")
        for got, v in zip([r[0] for r in cells], [1e308, 2e307, 1.5e308]):
            want = float(100 * Fraction(v) / Fraction(1e308))
            self.assertAlmostEqual(got, want, delta=1e-14 * want)
        _, index = self.index_table(95, [1e-308, 1e308])
        cells = self.array("AM95:AM96", f'=INDEXCHANGE({index};;"log")')
        want = float(100 * ln_ratio(1e308, 1e-308))
        self.assertEqual(cells[0][0], "")
        self.assertAlmostEqual(cells[1][0], want, delta=1e-14 * want)
        got = self.array("AN95:AN96", f"=INDEXCHANGE({index})")[0][0]
        self.assertTrue(got.startswith("Lintel: the change at row 2 (1e+308 after 1e-308) is beyond"), got)

    # Prices 1e308 and 1e-308 side by side: no index can hold their ratio; the rows are named.
    def test_prices_too_far_apart_are_named(self):
        self.sheet.getCellRangeByName("AP1:AQ2").setDataArray([
            (serial(2024, 1, 5), 1e308), (serial(2024, 2, 5), 1e-308)])
        got = self.array("AS1:AW2", "=INDEXMEDIAN(AP1:AP2;AQ1:AQ2)")[0][0]
        self.assertEqual(got, "Lintel: prices span too far to compare: row 2 holds 1e-308 and row 1 "
                              "holds 1e+308 (a ratio beyond the range of numbers, about 1e308)")


if __name__ == "__main__":
    unittest.main()
