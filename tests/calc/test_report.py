"""Headless report builds (org.lintel.ReportBuilder, the service behind the sidebar's
"Build report" and "Update report") on generated workbooks: the report sheet, its formulas,
its charts and their ranges, values equal to the functions called directly, the base date
cell driving the whole report, and settings that survive save and reload (.ods).

Generating model of the test data (not the demo): 900 sales over 2021-01 .. 2023-12, districts
East / West (1:1), ln price = 12 + 0.01 * month + 0.2 * [East] + N(0, 0.2^2), ids from a stock
of 500 properties.
"""
import os
import sys
import unittest

import numpy as np
import pandas as pd

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
import uno  # noqa: E402
from com.sun.star.beans import NamedValue  # noqa: E402
from lintel_office import SharedOffice, prop, sheet_values  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
EPOCH = pd.Timestamp("1899-12-30")
office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


def sales_rows(n=900, seed=3, months=36):
    rng = np.random.default_rng(seed)
    month = rng.integers(0, months, n)
    day = rng.integers(1, 28, n)
    dates = [pd.Timestamp(2021 + m // 12, m % 12 + 1, d) for m, d in zip(month, day)]
    east = rng.random(n) < 0.5
    price = np.round(np.exp(12 + 0.01 * month + 0.2 * east + rng.normal(0, 0.2, n)), 0)
    ids = rng.integers(1, 500, n)
    rows = [("Sold", "Price", "Id", "District", "Area")]
    for dt, p, i, e in zip(dates, price, ids, east):
        rows.append((float((dt - EPOCH).days), float(p), f"H{i:03d}", "East" if e else "West",
                     float(rng.integers(50, 200))))
    return rows


SETTINGS = """data=Sales.A1:E{last}
date=Sold
price=Price
id=Id
characteristics=Area
segment.District=East
freq=Q
base=2022-02-10
level=0.9
methods=median|mean
"""


class ReportTest(unittest.TestCase):
    def setUp(self):
        self.doc = office.new_calc()
        self.rows = sales_rows()
        sales = self.doc.Sheets.getByIndex(0)
        sales.Name = "Sales"
        sales.getCellRangeByName(f"A1:E{len(self.rows)}").setDataArray(self.rows)
        self.job = office.service("org.lintel.ReportBuilder")

    def tearDown(self):
        self.doc.close(True)

    def named(self, name):
        """The cells a named range of the report covers."""
        return self.doc.NamedRanges.getByName(name).ReferredCells

    def address(self, rng):
        a = rng.RangeAddress
        return (a.StartRow, a.StartColumn, a.EndRow, a.EndColumn)

    def build(self, settings=None, mode="build", sheet=None):
        args = [NamedValue("Document", self.doc), NamedValue("Mode", mode)]
        if settings is not None:
            args.append(NamedValue("Settings", settings))
        if sheet:
            args.append(NamedValue("Sheet", sheet))
        return self.job.execute(tuple(args))

    def test_report_sheet_formulas_charts_and_values(self):
        status = self.build(SETTINGS.format(last=len(self.rows)))
        self.assertEqual(status.split(":")[0], "Report East")
        self.assertIn("12 periods (2021-Q1 .. 2023-Q4)", status)
        rep = self.doc.Sheets.getByName("Report East")
        last_sale = max(r[0] for r in self.rows[1:] if r[3] == "East")
        up_to = (EPOCH + pd.Timedelta(days=last_sale)).strftime("%Y-%m-%d")
        self.assertEqual(rep.getCellRangeByName("A1").getString(),
                         f"Price indexes: District = East (2021-Q1 .. 2023-Q4), sales up to {up_to}")
        self.assertIn("appraisal by a licensed professional", rep.getCellRangeByName("A2").getString())
        self.assertEqual(rep.getCellRangeByName("B7").getString(), '($Sales.$D$2:$D$901="East")')
        # Index tables: one array formula per method, sized to the 12 periods, each a named range.
        table = self.named("Lintel_r1_table_median")
        self.assertEqual(table.Rows.Count, 12)
        # (the API shows array formulas in braces with "," separators)
        self.assertEqual(table.getArrayFormula(),
                         '{=INDEXMEDIAN($Sales.$A$2:$A$901,$Sales.$B$2:$B$901,($Sales.$D$2:$D$901="East"),$B$8,$B$9,"level="&$B$10)}')
        self.assertTrue(self.named("Lintel_r1_table_mean").getArrayFormula().startswith("{=INDEXMEAN("))
        # The report's values equal the function called directly.
        direct = self.doc.Sheets
        direct.insertNewByName("Direct", direct.Count)
        d = direct.getByName("Direct")
        d.getCellRangeByName("A1:E12").setArrayFormula(
            '=INDEXMEDIAN($Sales.A2:A901;$Sales.B2:B901;($Sales.D2:D901="East");"Q";DATE(2022;2;10);"level=0.9")')
        self.doc.calculateAll()
        self.assertEqual([list(r) for r in table.getDataArray()], sheet_values(d, "A1:E12"))
        self.assertEqual(table.getCellByPosition(1, 4).getValue(), 100.0)  # 2022-Q1 is the base
        # Charts and the ranges they show.
        charts = rep.Charts
        names = set(charts.ElementNames)
        self.assertEqual(names, {"Lintel_r1_levels", "Lintel_r1_yearchange", "Lintel_r1_periodchange",
                                 "Lintel_r1_signalnoise", "Lintel_r1_sales"})
        levels = charts.getByName("Lintel_r1_levels").Ranges[0]
        t0 = table.RangeAddress
        self.assertEqual((levels.StartRow, levels.EndRow), (t0.StartRow - 1, t0.EndRow))
        self.assertEqual(levels.EndColumn - levels.StartColumn, 2)  # periods + 2 methods
        # Chart data lines the methods up by period.
        block = rep.getCellRangeByPosition(levels.StartColumn + 1, t0.StartRow, levels.StartColumn + 1, t0.EndRow)
        self.assertEqual([r[0] for r in block.getDataArray()], [r[1] for r in table.getDataArray()])
        # Change the base date in the settings block: the whole report follows.
        rep.getCellRangeByName("B9").setValue(float((pd.Timestamp("2023-11-30") - EPOCH).days))
        self.doc.calculateAll()
        self.assertEqual(table.getCellByPosition(1, 11).getValue(), 100.0)
        self.assertEqual(self.named("Lintel_r1_table_mean").getCellByPosition(1, 11).getValue(), 100.0)
        # ... and Update keeps the edited base date.
        self.assertTrue(self.build(mode="update", sheet="Report East").startswith("Report East: "))
        self.assertEqual(rep.getCellRangeByName("B9").getString(), "2023-11-30")
        self.assertEqual(self.named("Lintel_r1_table_median").getCellByPosition(1, 11).getValue(), 100.0)

    def test_settings_survive_save_reload_and_update_grows(self):
        self.assertTrue(self.build(SETTINGS.format(last=len(self.rows))).startswith("Report East"))
        path = os.path.join(office.scratch, "report-test.ods")
        self.doc.storeToURL(uno.systemPathToFileUrl(path), (prop("FilterName", "calc8"),))
        self.doc.close(True)
        self.doc = office.load(path)
        stored = self.doc.DocumentProperties.UserDefinedProperties.getPropertyValue("Lintel report: Report East")
        self.assertIn("segment.District=East", stored)
        self.assertIn("methods=median|mean", stored)
        # New sales pasted below the table, in 2024-Q1: update rewrites in place and grows.
        sales = self.doc.Sheets.getByName("Sales")
        extra = [(float((pd.Timestamp("2024-02-15") - EPOCH).days), 200000.0 + i, "H900", "East", 90.0)
                 for i in range(5)]
        last = len(self.rows)
        sales.getCellRangeByName(f"A{last + 1}:E{last + 5}").setDataArray(extra)
        status = self.build(mode="update", sheet="Report East")
        self.assertIn("13 periods (2021-Q1 .. 2024-Q1)", status)
        table = self.named("Lintel_r1_table_median")
        self.assertEqual(table.Rows.Count, 13)
        self.assertEqual(table.getArrayFormula().count("$A$2:$A$906"), 1)
        self.assertEqual(table.getCellByPosition(2, 12).getValue(), 5.0)
        self.assertEqual(self.doc.Sheets.Count, 2)  # updated in place, not added

    def test_sheet_name_with_spaces_and_a_dot(self):
        self.doc.Sheets.getByIndex(0).Name = "Closed sales v1.2"
        settings = SETTINGS.format(last=len(self.rows)).replace("data=Sales.", "data=Closed sales v1.2.")
        status = self.build(settings)
        self.assertTrue(status.startswith("Report East: "), status)
        table = self.named("Lintel_r1_table_median")
        self.assertIn("$'Closed sales v1.2'.$A$2:$A$901", table.getArrayFormula())
        self.assertEqual(table.getCellByPosition(1, 4).getValue(), 100.0)

    def test_bad_settings_give_messages(self):
        last = len(self.rows)
        cases = {
            SETTINGS.format(last=last).replace("price=Price", "price=Cost"):
                'Lintel: the price column "Cost" is not in the header of Sales.A1:E901',
            SETTINGS.format(last=last).replace("segment.District=East", "segment.District=North"):
                "Lintel: the segment (District = North) keeps no sale with a date and a price",
            SETTINGS.format(last=last).replace("methods=median|mean", "methods=median|magic"):
                'Lintel: unknown method "magic"',
            SETTINGS.format(last=last).replace("data=Sales.A1", "data=Nowhere.A1"):
                'Lintel: there is no sheet "Nowhere" for the sales data',
        }
        for settings, want in cases.items():
            got = self.build(settings)
            self.assertTrue(got.startswith(want), got)
        self.assertTrue(self.build(mode="update", sheet="Sales").startswith(
            'Lintel: sheet "Sales" is not a Lintel report'))
        self.assertTrue(office.alive())

    # ---- Issue 9 regressions: sheets the report did not make, null date, progress ----------

    def test_never_replaces_a_sheet_it_did_not_make(self):
        # A user's own sheet that happens to carry the report's name is kept; the report goes
        # to a free name.
        self.doc.Sheets.insertNewByName("Report East", 1)
        mine = self.doc.Sheets.getByName("Report East")
        mine.getCellRangeByName("C3").setString("my notes")
        status = self.build(SETTINGS.format(last=len(self.rows)))
        self.assertTrue(status.startswith("Report East (2): "), status)
        self.assertEqual(self.doc.Sheets.getByName("Report East").getCellRangeByName("C3").getString(),
                         "my notes")
        # Building the same report again rebuilds its own sheet, not the user's.
        self.assertTrue(self.build(SETTINGS.format(last=len(self.rows))).startswith("Report East (2): "))
        self.assertEqual(self.doc.Sheets.Count, 3)
        # A sheet named explicitly that is not a report is refused, the sales sheet included.
        before = sheet_values(self.doc.Sheets.getByName("Sales"), f"A1:E{len(self.rows)}")
        got = self.build(SETTINGS.format(last=len(self.rows)) + "sheet=Sales\n")
        self.assertEqual(got, 'Lintel: the sheet "Sales" exists and is not a Lintel report; Lintel '
                              'never replaces a sheet it did not make: choose another sheet name')
        self.assertEqual(sheet_values(self.doc.Sheets.getByName("Sales"), f"A1:E{len(self.rows)}"), before)

    def test_segments_whose_names_truncate_alike_get_their_own_sheets(self):
        # Calc sheet names have at most 31 characters: two long segment values share the first 31.
        sales = self.doc.Sheets.getByName("Sales")
        for r in range(2, len(self.rows) + 1):
            cell = sales.getCellRangeByName(f"D{r}")
            cell.setString("Harbourside quarter north side" if cell.getString() == "East"
                           else "Harbourside quarter north edge")
        base = SETTINGS.format(last=len(self.rows))
        a = self.build(base.replace("segment.District=East", "segment.District=Harbourside quarter north side"))
        b = self.build(base.replace("segment.District=East", "segment.District=Harbourside quarter north edge"))
        self.assertTrue(a.startswith("Report Harbourside quarter nort: "), a)
        self.assertTrue(b.startswith("Report Harbourside quarter (2): "), b)
        self.assertEqual(self.doc.Sheets.Count, 3)
        # Each report names its charts apart (chart names are unique in a document).
        first = set(self.doc.Sheets.getByName("Report Harbourside quarter nort").Charts.ElementNames)
        second = set(self.doc.Sheets.getByName("Report Harbourside quarter (2)").Charts.ElementNames)
        self.assertEqual(len(first), 5)
        self.assertEqual(len(second), 5)
        self.assertFalse(first & second)

    def test_a_document_counting_from_1904(self):
        # The report reads and writes the document's own serials (NullDate 1904-01-01: 1462 days
        # later than Calc's default): same periods, base date shown as the same day, charts fed.
        self.doc.NullDate = uno.createUnoStruct("com.sun.star.util.Date", 1, 1, 1904)
        sales = self.doc.Sheets.getByName("Sales")
        shifted = [self.rows[0]] + [(r[0] - 1462,) + tuple(r[1:]) for r in self.rows[1:]]
        sales.getCellRangeByName(f"A1:E{len(self.rows)}").setDataArray(shifted)
        status = self.build(SETTINGS.format(last=len(self.rows)))
        self.assertIn("12 periods (2021-Q1 .. 2023-Q4)", status)
        rep = self.doc.Sheets.getByName("Report East")
        self.assertEqual(rep.getCellRangeByName("B9").getString(), "2022-02-10")
        table = self.named("Lintel_r1_table_median")
        self.assertEqual(table.getCellByPosition(1, 4).getValue(), 100.0)
        # The chart data block lines the methods up by period: numbers, not gaps.
        levels = rep.Charts.getByName("Lintel_r1_levels").Ranges[0]
        block = rep.getCellRangeByPosition(levels.StartColumn + 1, levels.StartRow + 1,
                                           levels.StartColumn + 1, levels.EndRow)
        values = [r[0] for r in block.getDataArray()]
        self.assertTrue(all(isinstance(v, float) for v in values), values)

    def test_progress_is_ended_when_a_build_fails(self):
        import unohelper
        from com.sun.star.task import XStatusIndicator

        class Recorder(unohelper.Base, XStatusIndicator):
            def __init__(self):
                self.calls = []

            def start(self, text, rng):
                self.calls.append("start")

            def end(self):
                self.calls.append("end")

            def setText(self, text):
                pass

            def setValue(self, value):
                pass

            def reset(self):
                pass

        rec = Recorder()
        bad = SETTINGS.format(last=len(self.rows)).replace("price=Price", "price=Cost")
        got = self.job.execute((NamedValue("Document", self.doc), NamedValue("Mode", "build"),
                                NamedValue("Settings", bad), NamedValue("StatusIndicator", rec)))
        self.assertTrue(got.startswith("Lintel: the price column"), got)
        self.assertEqual(rec.calls, ["start", "end"])


if __name__ == "__main__":
    unittest.main(verbosity=2)
