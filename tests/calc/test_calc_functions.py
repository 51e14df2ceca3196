"""Real-Calc integration tests: install lintel.oxt into a throwaway profile, start headless
soffice on loopback, write data and formulas, recalculate, compare every cell.

Reference values come from pandas (python3-pandas) computed in this file on the same data,
and from the index-arithmetic formulas of common practice (no source needed: rebase
100 I_t/I_b, change 100 (I_t/I_{t-k} - 1), time adjustment P I_target/I_sale).

Generating model of the test data (not the demo): 720 sales, dates uniform over
2022-01-01 .. 2023-12-31 except none in 2022-07; district North or South with probability
0.4 / 0.6; ln price = 12.6 + 0.006 * month + 0.25 * [North] + N(0, 0.25^2).
"""
import json
import math
import os
import sys
import unittest

import numpy as np
import pandas as pd

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
import uno  # noqa: E402
from lintel_office import SharedOffice, SheetCalls, sheet_values  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
GEN_JSON = os.environ.get("LINTEL_TABLE_JSON")
EPOCH = pd.Timestamp("1899-12-30")

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


def make_sales(seed=7):
    rng = np.random.default_rng(seed)
    n = 720
    days = rng.integers(0, 730, n * 2)
    dates = pd.Timestamp("2022-01-01") + pd.to_timedelta(days, unit="D")
    dates = dates[~((dates.year == 2022) & (dates.month == 7))][:n]
    month = np.asarray((dates.year - 2022) * 12 + dates.month - 1)
    north = rng.random(n) < 0.4
    price = np.round(np.exp(12.6 + 0.006 * month + 0.25 * north + rng.normal(0, 0.25, n)), 0)
    serial = np.asarray((dates - EPOCH).days, dtype=float)
    return pd.DataFrame({"date": serial, "price": price,
                         "district": np.where(north, "North", "South")})


def pandas_index(df, stat="median", freq="M", base=None):
    ts = EPOCH + pd.to_timedelta(df.date, unit="D")
    per = pd.PeriodIndex(ts, freq=freq)
    g = df.price.groupby(per.values)
    level = getattr(g, stat)()
    full = pd.period_range(per.min(), per.max(), freq=freq)
    level = level.reindex(full)
    counts = g.size().reindex(full).fillna(0).values
    b = full[0] if base is None else pd.Period(base, freq=freq)
    index = (100 * level / level[b]).values
    starts = np.asarray((full.to_timestamp(how="start") - EPOCH).days, dtype=float)
    return starts, index, counts


class CalcTest(SheetCalls, unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.df = make_sales()
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        rows = [("date", "price", "district")] + [
            (float(r.date), float(r.price), r.district) for r in cls.df.itertuples()]
        cls.sheet.getCellRangeByName(f"A1:C{len(rows)}").setDataArray(rows)
        cls.last = len(rows)

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)


    def assertIndexTable(self, cells, starts, index, counts, rel=1e-12):
        self.assertEqual(len(cells), len(starts))
        for row, s, i, c in zip(cells, starts, index, counts):
            self.assertEqual(row[0], s)
            if math.isnan(i):
                self.assertEqual(row[1], "", "a period without a value shows an empty text cell")
            else:
                self.assertAlmostEqual(row[1], i, delta=rel * abs(i))
            self.assertEqual(row[2], c)

    def test_median_monthly_every_cell(self):
        n = self.last
        cells = self.array("F2:J25", f"=INDEXMEDIAN(A2:A{n};B2:B{n})")
        starts, index, counts = pandas_index(self.df)  # pandas groupby().median()
        self.assertIndexTable(cells, starts, index, counts)
        july = cells[6]
        self.assertEqual(july[2], 0.0)
        self.assertEqual(july[1:], ["", 0.0, "", ""][0:1] + [0.0, "", ""])
        # AVERAGE skips the empty month (the "no value" cell is text, not 0).
        avg = self.formula("L2", "=AVERAGE(G2:G25)")
        self.assertAlmostEqual(avg, np.nanmean(index), places=9)
        # Bands bracket the index where present.
        for row in cells:
            if row[3] != "":
                self.assertLessEqual(row[3], row[1])
                self.assertGreaterEqual(row[4], row[1])

    def test_mean_with_segment_mask(self):
        n = self.last
        cells = self.array("F30:J37", f'=INDEXMEAN(A2:A{n};B2:B{n};(C2:C{n}="North");"Q")')
        starts, index, counts = pandas_index(self.df[self.df.district == "North"], "mean", "Q")
        self.assertIndexTable(cells, starts, index, counts)

    def test_quarterly_median_with_base(self):
        n = self.last
        cells = self.array("F40:J47", f"=INDEXMEDIAN(A2:A{n};B2:B{n};;\"Q\";DATE(2023;5;17))")
        starts, index, counts = pandas_index(self.df, "median", "Q", base="2023Q2")
        self.assertIndexTable(cells, starts, index, counts)
        self.assertEqual(cells[5][1], 100.0)

    def test_rebase_and_change(self):
        n = self.last
        self.array("F50:J73", f"=INDEXMEDIAN(A2:A{n};B2:B{n})")
        rebased = self.array("L50:L73", "=INDEXREBASE(F50:F73;G50:G73;DATE(2023;1;1))")
        _, index, _ = pandas_index(self.df)
        want = 100 * index / index[12]  # common practice: 100 I_t / I_base
        for got, w in zip(rebased, want):
            if math.isnan(w):
                self.assertEqual(got[0], "")
            else:
                self.assertAlmostEqual(got[0], w, delta=1e-10 * w)
        yoy = self.array("M50:M73", "=INDEXCHANGE(G50:G73;12)")
        logc = self.array("N50:N73", '=INDEXCHANGE(G50:G73;1;"log")')
        ann = self.array("O50:O73", '=INDEXCHANGE(G50:G73;3;"annual";"M")')
        for t in range(24):
            w = 100 * (index[t] / index[t - 12] - 1) if t >= 12 else float("nan")
            self.assertTrue(yoy[t][0] == "" if math.isnan(w) else abs(yoy[t][0] - w) < 1e-9)
            w = 100 * math.log(index[t] / index[t - 1]) if t >= 1 else float("nan")
            self.assertTrue(logc[t][0] == "" if math.isnan(w) else abs(logc[t][0] - w) < 1e-9)
            w = 100 * ((index[t] / index[t - 3]) ** 4 - 1) if t >= 3 else float("nan")
            self.assertTrue(ann[t][0] == "" if math.isnan(w) else abs(ann[t][0] - w) < 1e-9)

    def test_price_adjust(self):
        n = self.last
        self.array("F80:J103", f"=INDEXMEDIAN(A2:A{n};B2:B{n})")
        _, index, _ = pandas_index(self.df)
        got = self.formula("L80", "=PRICEADJUST(300000;DATE(2022;3;9);DATE(2023;12;1);F80:F103;G80:G103)")
        self.assertAlmostEqual(got, 300000 * index[23] / index[2], delta=1e-6)
        self.sheet.getCellRangeByName("M80:N82").setDataArray(
            ((250000.0, 44600.0), (260000.0, 44755.0), (270000.0, 45300.0)))
        col = self.array("O80:O82", "=PRICEADJUST(M80:M82;N80:N82;DATE(2023;12;31);F80:F103;G80:G103)")
        # 44600 = 2022-02-08, 44755 = 2022-07-13 (no sales that month), 45300 = 2024-01-09 (outside)
        self.assertAlmostEqual(col[0][0], 250000 * index[23] / index[1], delta=1e-6)
        self.assertTrue(col[1][0].startswith("Lintel: saledate 2022-07-13 falls on period"), col[1][0])
        self.assertTrue(col[2][0].startswith("Lintel: saledate 2024-01-09 lies outside the index"), col[2][0])

    def test_periodof(self):
        # date is a cells argument: a cell holding a date, or a range.
        self.sheet.getCellRangeByName("K110").setFormula("=DATE(2024;2;29)")
        self.sheet.getCellRangeByName("K112").setString("2023-11-30")
        self.assertEqual(self.formula("L110", "=PERIODOF(K110)"), 45323.0)  # 2024-02-01
        self.assertEqual(self.formula("L111", '=PERIODOF(K110;"Q")'), 45292.0)  # 2024-01-01
        self.assertEqual(self.formula("L112", '=PERIODOF(K112;"Y")'), 44927.0)  # 2023-01-01
        # A value instead of a cell is refused by Calc before the call (docs/errors.md).
        self.assertEqual(self.formula("L113", "=PERIODOF(DATE(2024;2;29))"), ("error", 504))
        self.sheet.getCellRangeByName("M110:M112").setDataArray(((45351.0,), ("",), ("soon",)))
        col = self.array("N110:N112", "=PERIODOF(M110:M112)")
        self.assertEqual(col, [[45323.0], [""], ["Lintel: not a date"]])

    def test_titles_notes_and_options_range(self):
        n = self.last
        self.sheet.getCellRangeByName("Q1:R2").setDataArray((("titles", 1.0), ("notes", 1.0)))
        cells = self.array("F120:J150", f"=INDEXMEDIAN(A1:A{n};B1:B{n};;;;Q1:R2)")
        self.assertEqual(cells[0], ["period", "index", "sales", "lower", "upper"])
        # header row "date"/"price" without header=1 is dropped with reasons; notes list them
        # and name the row as a likely header
        labels = [r[0] for r in cells[25:29]]
        self.assertEqual(labels[0], "rows used")
        self.assertEqual(cells[25][1], float(n - 1))
        self.assertIn("dropped: unreadable date", labels)
        warning = [r[1] for r in cells[25:30] if r[0] == "warning"][0]
        self.assertTrue(warning.startswith('unreadable date (1 row), first row 1: "date" is not a date'), warning)
        self.assertTrue(warning.endswith("(a header row? add header=1 to the options)"), warning)
        cells = self.array("F160:J161", f'=INDEXMEDIAN(A1:A{n};B1:B{n};;;;"header=1; titles=1")')
        self.assertEqual(cells[1][1], 100.0)

    def test_wizard_texts_come_from_the_table(self):
        with open(GEN_JSON) as f:
            table = json.load(f)
        fd = office.service("com.sun.star.sheet.FunctionDescriptions")
        shown = {}
        for i in range(fd.Count):
            d = {p.Name: p.Value for p in fd.getByIndex(i)}
            shown[d["Name"]] = d
        for f in table:
            self.assertIn(f["name"], shown, f"{f['name']} missing from the function wizard")
            d = shown[f["name"]]
            # Calc 7.4 has fixed categories; add-in functions are all listed under "Add-in"
            # (com.sun.star.sheet.FunctionCategory.ADDIN = 11).
            self.assertEqual(d["Category"], 11)
            self.assertEqual(d["Description"], f["description"])
            self.assertEqual([a.Name for a in d["Arguments"]], [a["name"] for a in f["args"]])
            self.assertEqual([a.Description for a in d["Arguments"]], [a["description"] for a in f["args"]])
            self.assertEqual([bool(a.IsOptional) for a in d["Arguments"]], [a["optional"] for a in f["args"]])


class PackageTest(SheetCalls, unittest.TestCase):
    def test_extension_is_installed_with_complete_metadata(self):
        import xml.etree.ElementTree as ET
        pip = office.ctx.getValueByName("/singletons/com.sun.star.deployment.PackageInformationProvider")
        ids = {e[0]: e[1] for e in pip.getExtensionList()}
        self.assertIn("org.lintel.calc", ids)
        self.assertRegex(ids["org.lintel.calc"], r"^\d+\.\d+\.\d+$")
        folder = uno.fileUrlToSystemPath(pip.getPackageLocation("org.lintel.calc"))
        ns = {"d": "http://openoffice.org/extensions/description/2006"}
        root = ET.parse(os.path.join(folder, "description.xml")).getroot()
        self.assertEqual(root.find("d:display-name/d:name", ns).text, "Lintel: property price indexes")
        self.assertEqual(root.find("d:publisher/d:name", ns).text, "The Lintel developers")
        self.assertTrue(os.path.getsize(os.path.join(folder, "LICENSE.txt")) > 10000)  # MPL-2.0 text
        with open(os.path.join(folder, "description-en.txt")) as f:
            self.assertIn("licensed professional", f.read())


class BadInputTest(SheetCalls, unittest.TestCase):
    """Bad input gives a clear message in the cell and never takes soffice down."""

    @classmethod
    def setUpClass(cls):
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        rows = [(44927.0 + 9 * i, 200000.0 + 500 * i) for i in range(40)]
        cls.sheet.getCellRangeByName("A1:B40").setDataArray(rows)

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def test_mismatched_ranges(self):
        cells = self.array("D1:H2", "=INDEXMEDIAN(A1:A40;B1:B39)")
        self.assertEqual(cells[0][0], "Lintel: dates has 40 rows, prices has 39")

    def test_text_prices_and_blank_rows(self):
        self.sheet.getCellRangeByName("J1:K6").setDataArray(
            ((44927.0, 100.0), (44930.0, "n/a"), ("", ""), (44935.0, 120.0), (44940.0, -3.0),
             ("later", 130.0)))
        cells = self.array("M1:Q12", '=INDEXMEAN(J1:J6;K1:K6;;;;"notes=1")')
        self.assertEqual(cells[0][:3], [44927.0, 100.0, 2.0])
        notes = {r[0]: r[1] for r in cells[1:] if isinstance(r[0], str) and r[0]}
        self.assertEqual(notes["rows used"], 2.0)
        self.assertEqual(notes["dropped: unreadable price"], 1.0)  # "n/a"
        self.assertEqual(notes["dropped: non-positive price"], 1.0)
        self.assertEqual(notes["dropped: empty row"], 1.0)
        self.assertEqual(notes["dropped: unreadable date"], 1.0)  # "later"

    def test_error_cells_in_input(self):
        self.sheet.getCellRangeByName("S1").setFormula("=1/0")
        self.sheet.getCellRangeByName("S2:S3").setDataArray(((5.0,), (6.0,)))
        cells = self.array("U1:Y2", "=INDEXMEDIAN(A1:A3;S1:S3)")
        # prices is a cells argument: Lintel reads the range and names the error cell.
        self.assertEqual(cells[0][0], "Lintel: prices holds #DIV/0! in cell Sheet1.S1: correct or clear that cell")
        # include is not: Calc passes the error on before the call (Err:504).
        cells = self.array("U4:Y5", "=INDEXMEDIAN(A1:A3;B1:B3;S1:S3)")
        self.assertEqual(cells[0][0], ("error", 504))
        self.assertTrue(office.alive())

    def test_error_cells_where_the_call_does_not_use_them(self):
        # Issue 10: an error value in a row the include column leaves out, or below an index
        # series, is passed over (read as empty); in a row the call uses it is still named.
        # Expected medians worked by hand: Jan {100, 120} -> 110, Feb {130} -> 130 (the
        # #DIV/0! row is left out), Mar {150, 170} -> 160; index = 100 * median / 110.
        s = self.sheet
        s.getCellRangeByName("AA2:AA7").setDataArray(
            ((44927.0,), (44930.0,), (44958.0,), (44960.0,), (44990.0,), (44995.0,)))
        s.getCellRangeByName("AB2:AB7").setDataArray(((100.0,), (120.0,), (0.0,), (130.0,), (150.0,), (170.0,)))
        s.getCellRangeByName("AB4").setFormula("=1/0")
        s.getCellRangeByName("AC2:AC7").setDataArray(((1.0,), (1.0,), (0.0,), (1.0,), (1.0,), (1.0,)))
        cells = self.array("AE1:AG4", "=INDEXMEDIAN(AA2:AA7;AB2:AB7;AC2:AC7)")
        self.assertEqual([r[0] for r in cells[:3]], [44927.0, 44958.0, 44986.0])
        for got, want in zip([r[1] for r in cells[:3]], [100.0, 100 * 130 / 110, 100 * 160 / 110]):
            self.assertAlmostEqual(got, want, places=10)
        self.assertEqual([r[2] for r in cells[:3]], [2.0, 1.0, 2.0])
        # The same row chosen by include: the error is named.
        s.getCellRangeByName("AC4").setValue(1.0)
        cells = self.array("AE6:AG7", "=INDEXMEDIAN(AA2:AA7;AB2:AB7;AC2:AC7)")
        self.assertEqual(cells[0][0], "Lintel: prices holds #DIV/0! in cell Sheet1.AB4: correct or clear that cell")
        # An index series with #N/A below it (a whole column): the change is computed, the
        # rows below the series stay blank; an #N/A inside the series is named.
        s.getCellRangeByName("AI1:AI5").setDataArray(((100.0,), (101.0,), (102.0,), (103.0,), (104.0,)))
        s.getCellRangeByName("AI8").setFormula("=NA()")
        cells = self.array("AJ1:AJ8", "=INDEXCHANGE(AI:AI)")
        self.assertEqual(cells[0][0], "")
        self.assertAlmostEqual(cells[1][0], 1.0, places=12)  # 100 (101/100 - 1)
        self.assertAlmostEqual(cells[4][0], 100 * (104 / 103 - 1), places=12)
        self.assertEqual([r[0] for r in cells[5:]], ["", "", ""])
        s.getCellRangeByName("AI3").setFormula("=NA()")
        cells = self.array("AK1:AK8", "=INDEXCHANGE(AI:AI)")
        self.assertEqual(cells[0][0], "Lintel: index holds #N/A in cell Sheet1.AI3: correct or clear that cell")
        self.assertTrue(office.alive())

    def test_one_row_and_one_period(self):
        cells = self.array("D5:H6", "=INDEXMEDIAN(A1;B1)")
        self.assertEqual(cells[0][:3], [44927.0, 100.0, 1.0])
        cells = self.array("D8:H9", '=INDEXMEAN(A1:A40;B1:B40;;"Y")')
        self.assertEqual(cells[0][:3], [44927.0, 100.0, 40.0])
        # A one-row result gets a blank second row, so Calc does not repeat the row down
        # the array range.
        self.assertEqual(cells[1], ["", "", "", "", ""])

    def test_whole_column_references(self):
        cells = self.array("D12:H24", "=INDEXMEDIAN(A:A;B:B)")
        self.assertEqual(cells[0][0], 44927.0)
        self.assertEqual(sum(r[2] for r in cells if isinstance(r[2], float)), 40.0)

    def test_bad_arguments(self):
        cases = {
            '=INDEXMEDIAN(A1:A40;B1:B40;;"W")': 'Lintel: freq must be "M", "Q" or "Y", got "W"',
            '=INDEXMEDIAN(A1:A40;B1:B40;;;DATE(2030;1;1))': "Lintel: base 2030-01-01 lies outside the data (2023-01 .. 2023-12)",
            '=INDEXMEDIAN(A1:A40;B1:B40;;;;"minsales=x")': 'Lintel: option minsales must be a number, got "x"',
            '=INDEXMEDIAN(A1:A40;B1:B40;;;;"trim=0.1")': 'Lintel: unknown option "trim" for INDEXMEDIAN (known: minsales, level, dateorder, header, titles, notes)',
            '=INDEXMEAN(A1:A40;B1:B40;;;;"trim=0.7")': "Lintel: option trim must lie in [0, 0.5), got 0.7",
            '=INDEXMEDIAN(A1:A40;B1:B40;;;;"level=95")': "Lintel: option level must lie between 0 and 1, got 95",
            '=INDEXMEDIAN(A1:B40;B1:B40)': "Lintel: dates must be one column, got 2 columns",
            '=INDEXMEDIAN(B1:B40;A1:A40)': None,  # prices as dates: years 2448..; still no crash
            '=INDEXCHANGE(B1:B40;0)': "Lintel: lag must be a whole number of at least 1, got 0",
            '=INDEXREBASE(A1:A40;B1:B40;DATE(2023;1;1))': "Lintel: periods must be period start dates",
        }
        row = 30
        for formula, want in cases.items():
            got = self.array(f"D{row}:H{row}", formula)[0][0]
            if want is not None:
                self.assertTrue(isinstance(got, str) and got.startswith(want), f"{formula}: {got!r}")
            row += 1
        self.assertTrue(office.alive())


class NullDateTest(SheetCalls, unittest.TestCase):
    def test_document_with_1904_null_date(self):
        from com.sun.star.util import Date
        doc = office.new_calc()
        try:
            d = Date()
            d.Day, d.Month, d.Year = 1, 1, 1904
            doc.NullDate = d
            sheet = doc.Sheets.getByIndex(0)
            sheet.getCellRangeByName("B1").setValue(45.0)  # 1904-02-15
            sheet.getCellRangeByName("A1").setFormula("=PERIODOF(B1)")
            doc.calculateAll()
            self.assertEqual(sheet.getCellRangeByName("A1").getValue(), 31.0)  # 1904-02-01
        finally:
            doc.close(True)


if __name__ == "__main__":
    unittest.main(verbosity=2)
