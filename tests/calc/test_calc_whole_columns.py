"""Real-Calc tests: whole columns cost what their data costs, and long results do not freeze.

Column arguments (dates, prices, ids ...) reach the add-in as the cell range itself, and only
the rows down to the last one holding data are read; results whose blank tail would take
Calc minutes to store are cut (docs/errors.md). Before, A:A handed the add-in 1,048,576 rows
(notes=1 counted them as "dropped: empty row 1047575") and PERIODOF(A:A) returned a million
rows whose blank cells took Calc minutes to store. The time limits below are hang detectors
(generous: 60 s against well under a second), not speed tests; speed is printed by
tests/bench/bench_calc.py.

Reference values: pandas (python3-pandas) monthly medians and month starts computed in this
file on the same data.

Generating model of the test data (not the demo): 1,000 sales, sale i on day i * 1.5 from
2021-01-01 (about 50 months); district "A" for even i, "B" for odd i;
ln price = 12.5 + 0.005 * (day / 30) + 0.1 [district B] + N(0, 0.2^2), numpy default_rng(11),
rounded to whole units.
"""
import os
import sys
import threading
import unittest

import numpy as np
import pandas as pd

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
from lintel_office import SharedOffice, SheetCalls, sheet_values  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
EPOCH = pd.Timestamp("1899-12-30")
HANG = 60.0  # seconds: a hang detector, not a speed test

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


def make_sales(seed=11):
    rng = np.random.default_rng(seed)
    n = 1000
    day = np.arange(n) * 1.5
    serial = float((pd.Timestamp("2021-01-01") - EPOCH).days) + np.floor(day)
    b = np.arange(n) % 2 == 1
    price = np.round(np.exp(12.5 + 0.005 * day / 30 + 0.1 * b + rng.normal(0, 0.2, n)), 0)
    return pd.DataFrame({"date": serial, "price": price, "district": np.where(b, "B", "A")})


def pandas_median_index(df):
    per = pd.PeriodIndex(EPOCH + pd.to_timedelta(df.date, unit="D"), freq="M")
    level = df.price.groupby(per.values).median()
    full = pd.period_range(per.min(), per.max(), freq="M")
    level = level.reindex(full)
    starts = np.asarray((full.to_timestamp(how="start") - EPOCH).days, dtype=float)
    return starts, (100 * level / level.iloc[0]).values


def within(seconds, call):
    """Runs call() and fails when it has not returned after `seconds` (a hang)."""
    out = {}

    def run():
        try:
            out["value"] = call()
        except BaseException as e:  # noqa: BLE001 - reported below
            out["error"] = e

    t = threading.Thread(target=run, daemon=True)
    t.start()
    t.join(seconds)
    if t.is_alive():
        raise AssertionError(f"no answer within {seconds:.0f} s: Calc hangs")
    if "error" in out:
        raise out["error"]
    return out.get("value")


def sales_document(df):
    """A document with the sales on sheet Sales (header row, A date, B price, C district) and
    an empty sheet Out for the formulas."""
    doc = office.new_calc()
    doc.Sheets.getByIndex(0).Name = "Sales"
    rows = [("date", "price", "district")] + [
        (float(r.date), float(r.price), r.district) for r in df.itertuples()]
    doc.Sheets.getByName("Sales").getCellRangeByName(f"A1:C{len(rows)}").setDataArray(rows)
    doc.Sheets.insertNewByName("Out", 1)
    return doc


class WholeColumnTest(SheetCalls, unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.df = make_sales()
        cls.doc = sales_document(cls.df)
        cls.data = cls.doc.Sheets.getByName("Sales")
        cls.sheet = cls.doc.Sheets.getByName("Out")
        cls.last = len(cls.df) + 1  # 1001

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def array(self, ref, formula):
        return within(HANG, lambda: SheetCalls.array(self, ref, formula))

    def values(self, ref, formula):
        """Like array(), for long results: the cells as Calc's data array (text, numbers; an
        error is None), read in one call."""
        rng = self.sheet.getCellRangeByName(ref)
        rng.setArrayFormula(formula)
        within(HANG, self.doc.calculateAll)
        return [list(r) for r in rng.getDataArray()]

    def test_whole_columns_read_only_their_data(self):
        starts, index = pandas_median_index(self.df)
        n = len(starts)
        whole = self.array(f"A1:E{n + 4}", '=INDEXMEDIAN($Sales.A:A;$Sales.B:B;;;;"header=1; notes=1")')
        for row, s, i in zip(whole, starts, index):
            self.assertEqual(row[0], s)
            self.assertAlmostEqual(row[1], i, delta=1e-9 * i)
        # The diagnostics below the table: 1,000 rows used and nothing else offered. Reading
        # all of A:A would add "dropped: empty row 1047575".
        self.assertEqual(whole[n][:2], ["rows used", 1000.0])
        self.assertEqual(whole[n + 1][0], ("error", 32767))  # nothing more: Calc's #N/A
        ranged = self.array(f"H1:L{n + 4}",
                            f'=INDEXMEDIAN($Sales.A1:A{self.last};$Sales.B1:B{self.last};;;;"header=1; notes=1")')
        self.assertEqual(whole, ranged)

    def test_include_expression_over_whole_columns(self):
        # An include mask over whole columns arrives as a million values; it is cut with the
        # data columns it belongs to.
        sub = self.df[self.df.district == "B"]
        starts, index = pandas_median_index(sub)
        cells = self.array(f"N1:R{len(starts)}",
                           '=INDEXMEDIAN($Sales.A:A;$Sales.B:B;$Sales.C:C="B";;;"header=1")')
        self.assertEqual([r[0] for r in cells], list(starts))
        for row, i in zip(cells, index):
            self.assertAlmostEqual(row[1], i, delta=1e-9 * i)

    def test_periodof_whole_column(self):
        # Before: a million-row result whose blank cells took Calc minutes to store.
        cells = self.array(f"T1:T{self.last + 3}", "=PERIODOF($Sales.A:A)")
        month_starts = (EPOCH + pd.to_timedelta(self.df.date, unit="D")).dt.to_period("M").dt.to_timestamp()
        want = list(np.asarray((month_starts - EPOCH).dt.days, dtype=float))
        self.assertEqual(cells[0], ["Lintel: not a date"])  # the header
        self.assertEqual([r[0] for r in cells[1:self.last]], want)
        # The result ends at the last row with data; array cells below show Calc's #N/A.
        self.assertEqual(cells[self.last], [("error", 32767)])

    def test_periodof_over_60000_blank_rows(self):
        # A range (not a whole column) keeps its shape: blank cells below the dates.
        n = self.last + 60000
        cells = self.values(f"V1:V{n}", f"=PERIODOF($Sales.A1:A{n})")
        self.assertEqual(len(cells), n)
        month_starts = (EPOCH + pd.to_timedelta(self.df.date, unit="D")).dt.to_period("M").dt.to_timestamp()
        want = list(np.asarray((month_starts - EPOCH).dt.days, dtype=float))
        self.assertEqual([r[0] for r in cells[1:self.last]], want)
        self.assertEqual({r[0] for r in cells[self.last:]}, {""})

    def test_a_change_recalculates_and_formulas_are_current(self):
        # Prices of the last month through formulas =B*$Z$1 in column D; the function reads
        # the current values when Z1 changes (autocalc, no calculateAll). Own document: the
        # data change.
        doc = sales_document(self.df)
        try:
            self.change_and_formulas(doc, doc.Sheets.getByName("Sales"), doc.Sheets.getByName("Out"))
        finally:
            doc.close(True)

    def change_and_formulas(self, doc, data, out):
        period = (EPOCH + pd.to_timedelta(self.df.date, unit="D")).dt.to_period("M")
        rows = np.nonzero((period == period.iloc[-1]).values)[0]
        data.getCellRangeByName("Z1").setValue(1.0)
        formulas = [(f"=B{r + 2}",) for r in range(len(self.df))]
        for r in rows:
            formulas[r] = (f"=B{r + 2}*$Z$1",)
        data.getCellRangeByName(f"D2:D{self.last}").setFormulaArray(formulas)
        cell = out.getCellRangeByName("X1")
        cell.setFormula("=INDEX(INDEXMEDIAN($Sales.A:A;$Sales.D:D);ROWS(INDEXMEDIAN($Sales.A:A;$Sales.D:D));2)")
        within(HANG, doc.calculateAll)
        before = cell.getValue()
        within(HANG, lambda: data.getCellRangeByName("Z1").setValue(2.0))
        self.assertAlmostEqual(within(HANG, cell.getValue), 2 * before, delta=1e-9 * before)
        # A sale added far below the data is read (the range is the whole column).
        count = out.getCellRangeByName("X2")
        count.setFormula('=INDEX(INDEXMEDIAN($Sales.A:A;$Sales.D:D;;;;"notes=1");'
                         'ROWS(INDEXMEDIAN($Sales.A:A;$Sales.D:D)) + 1;2)')
        within(HANG, doc.calculateAll)
        self.assertEqual(count.getValue(), 1000.0)  # rows used
        within(HANG, lambda: data.getCellRangeByName("A5000:B5000").setDataArray(
            ((float(self.df.date.iloc[-1]), 300000.0),)))
        within(HANG, lambda: data.getCellRangeByName("D5000").setFormula("=B5000"))
        self.assertEqual(within(HANG, count.getValue), 1001.0)
        self.assertTrue(office.alive())


if __name__ == "__main__":
    unittest.main(verbosity=2)
