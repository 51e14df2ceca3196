"""Real-Calc tests of the work limits (issue 10; native/core/work_limits.hpp): a formula past a
limit answers Lintel's message within a hang detector's time, one just under the limit still
computes. The detector is generous (60 s; these are not timed tests): before the limits the
INDEXMIX case ran 122 s in Calc.

Data (generated here, seed 10): 1,000 sales, month i * 60 // 1000 from 2023-01, day
1 + i mod 28; the last date typed as the number 400000 (2995-02-24, a mistyped year, as in
the issue); stratum "s<i mod 12>"; ln price = 12 + 0.004 t + N(0, 0.2^2). Hedonic: n sales
over 60 months, size 40 + (i * 37) mod 200 and a district of 1,000 levels
"d<(i * 7919) mod 1000>" (7919 is prime, so every level occurs).

The expected figures are the products the limits count (work_limits.hpp), worked out in the
comments: 2023-01 .. 2995-02 is 972 * 12 + 2 = 11,666 months.
"""
import math
import os
import sys
import time
import unittest

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "..", "scripts"))
from lintel_office import SharedOffice, SheetCalls  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
HANG_SECONDS = 60

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


def serial_of(year, month, day):
    return float((np.datetime64(f"{year:04d}-{month:02d}-01") - np.datetime64("1899-12-30")).astype(int)
                 + day - 1)


class WorkLimitsTest(SheetCalls, unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.doc = office.new_calc()
        cls.doc.Sheets.getByIndex(0).Name = "Sales"
        sales = cls.doc.Sheets.getByName("Sales")
        rng = np.random.default_rng(10)
        rows = []
        for i in range(1000):
            t = i * 60 // 1000
            rows.append((serial_of(2023 + t // 12, t % 12 + 1, 1 + i % 28),
                         float(math.exp(12 + 0.004 * t + rng.normal(0, 0.2))), f"s{i % 12}"))
        rows[-1] = (400000.0,) + rows[-1][1:]
        sales.getCellRangeByName("A1:C1000").setDataArray(tuple(rows))
        n = 14002
        hed = []
        for i in range(n):
            t = i * 60 // n
            size = 40.0 + (i * 37) % 200
            d = (i * 7919) % 1000
            hed.append((serial_of(2023 + t // 12, t % 12 + 1, 1 + i % 28),
                        math.exp(12 + 0.004 * t + 0.5 * math.log(size) + 0.01 * d), size, f"d{d}"))
        sales.getCellRangeByName(f"E1:H{n}").setDataArray(tuple(hed))
        cls.doc.Sheets.insertNewByName("Out", 1)
        cls.sheet = cls.doc.Sheets.getByName("Out")

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def timed(self, ref, formula):
        t0 = time.perf_counter()
        cells = self.array(ref, formula)
        elapsed = time.perf_counter() - t0
        self.sheet.getCellRangeByName(ref).setArrayFormula("")
        self.assertLess(elapsed, HANG_SECONDS, f"{formula} took {elapsed:.0f} s")
        return cells

    def mix(self, reps):
        return self.timed("A1:E60", "=INDEXMIX($Sales.A1:A1000;$Sales.B1:B1000;$Sales.C1:C1000;;;;"
                                    f'"chain=1;bands=bootstrap;reps={reps}")')

    def test_mix_bootstrap_past_the_limit_answers_the_message(self):
        # 10,000 replicates x (1,000 sales + 12 strata x 11,666 periods) = 1,409,920,000 >
        # 50,000,000 (kMaxMixBootstrapWork): the case of the issue (122 s before).
        cells = self.mix(10000)
        self.assertEqual(
            cells[0][0],
            "Lintel: too much work: bands=bootstrap: 10,000 replicates x (1,000 sales + 12 strata x "
            "11,666 periods; the dates span 2023-01 .. 2995-02 (11,666 months)) = 1,409,920,000 "
            "sales and stratum-periods redrawn; at most 50,000,000 (a few seconds): check for a "
            "mistyped date (SALESCHECK lists implausible dates), or use fewer replicates (reps), "
            "fewer strata or an include mask")
        # Just over: 355 x 140,992 = 50,052,160.
        self.assertTrue(str(self.mix(355)[0][0]).startswith(
            "Lintel: too much work: bands=bootstrap: 355 replicates x (1,000 sales + 12 strata x "
            "11,666 periods; the dates span 2023-01 .. 2995-02 (11,666 months)) = 50,052,160 "))

    def test_mix_bootstrap_just_under_the_limit_computes(self):
        # 354 x 140,992 = 49,911,168 <= 50,000,000: the index with its bands.
        cells = self.mix(354)
        self.assertEqual(cells[0][0], serial_of(2023, 1, 1))
        self.assertEqual(cells[0][1], 100.0)  # base period, chain scaled to 100
        self.assertEqual(cells[0][2], 17.0)   # 2023-01: sales i = 0 .. 16
        self.assertEqual(cells[0][3], 100.0)  # the base's band is [100, 100]
        self.assertEqual(cells[0][4], 100.0)
        for row in cells[1:60]:  # 2023-02 .. 2027-12: a value inside its band
            self.assertIsInstance(row[1], float)
            self.assertLessEqual(row[3], row[1])
            self.assertGreaterEqual(row[4], row[1])

    def hedonic(self, n):
        return self.timed("A1:E60", f"=INDEXHEDONIC($Sales.E1:E{n};$Sales.F1:F{n};$Sales.G1:H{n};;;;"
                                    '"log=1")')

    def test_hedonic_past_the_limit_answers_the_message(self):
        # 999 district terms + log size = 1,000 terms: 14,002 x 1,000^2 + 1,000^3 =
        # 15,002,000,000 > 15,000,000,000 (kMaxHedonicWork).
        self.assertEqual(
            self.hedonic(14002)[0][0],
            "Lintel: too much work: the hedonic fit: 14,002 sales x 1,000 terms^2 + 1,000 terms^3 = "
            "15,002,000,000 steps; at most 15,000,000,000 (a few seconds): group rare levels of a "
            "categorical column (its levels are terms), use fewer characteristics, an include mask")

    def test_hedonic_under_the_limit_computes(self):
        # The first 3,000 sales (2023-01 .. 2024-01: month 2,999 * 60 // 14,002 = 12): 3,000 x
        # 1e6 + 1e9 = 4e9 steps: computed (all 1,000 levels occur).
        cells = self.hedonic(3000)
        self.assertEqual(cells[0][0], serial_of(2023, 1, 1))
        self.assertEqual(cells[0][1], 100.0)
        self.assertEqual(cells[12][0], serial_of(2024, 1, 1))
        self.assertIsInstance(cells[12][1], float)
        self.assertEqual(cells[13][0], ("error", 32767))  # #N/A: no 14th period


if __name__ == "__main__":
    unittest.main()
