"""The market report over several segments in one build (issue 15's "done when").

Data: the demo market of demo-workbooks/market_model.py (invented; its generating model is in
that file's docstring): 12,000 sales over 2015-01 .. 2025-12 in four districts and four types.
One build covers three districts x two types plus the whole market. Every figure of the market
summary is checked against the Lintel functions called directly on the same sales, with the
same options and include (ISSEGMENT times SALESCHECK's use mask, as in the report): the
measure quoted (the one INDEXBACKTEST recommends on the segment's sales) and its reason, the
level, the change over a month and over a year (INDEXCHANGE), the band of the year change
(the index with its base a year before the headline month), and the sales and median price
of the month (numpy on the same rows). The small charts share
one value scale; the client pages export to a PDF of exactly two pages; the values copy holds
no formula and the same summary.
"""
import os
import re
import sys
import unittest

import numpy as np
import pandas as pd

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "..", "scripts"))
sys.path.insert(0, os.path.join(HERE, "..", "..", "demo-workbooks"))
import uno  # noqa: E402
from com.sun.star.beans import NamedValue  # noqa: E402
from lintel_office import SharedOffice, sheet_values  # noqa: E402
import market_model  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop

DISTRICTS = ["Brindle Flats", "Tallowick", "Quessenby"]
TYPES = ["flat", "terraced"]


def col(k):
    """Column letters of a 0-based index."""
    out = ""
    k += 1
    while k:
        k, r = divmod(k - 1, 26)
        out = chr(ord("A") + r) + out
    return out


def components():
    """The office's open documents."""
    out, e = [], office.desktop.Components.createEnumeration()
    while e.hasMoreElements():
        out.append(e.nextElement())
    return out


class SegmentReportTest(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.sales = market_model.generate()
        cls.n = len(cls.sales) + 1
        cls.doc = office.new_calc()
        s = cls.doc.Sheets.getByIndex(0)
        s.Name = "Sales"
        rows = [tuple(cls.sales.columns)] + [tuple(r) for r in cls.sales.itertuples(index=False)]
        s.getCellRangeByName(f"A1:J{cls.n}").setDataArray(rows)
        settings = "\n".join([
            f"data=Sales.A1:J{cls.n}", "date=date", "price=price", "id=property_id", "changed=renovated",
            "characteristics=district|type|floor_area|lot|bedrooms|age", "strata=district|type",
            "freq=M", "base=2015-01-01", "level=0.95", "methods=median|mix|hedonic",
            "options.hedonic=log=3", "segments=district|type",
            "segmentlist=" + "|".join(f"{d}/{t}" for d in DISTRICTS for t in TYPES)]) + "\n"
        job = office.service("org.lintel.ReportBuilder")
        cls.status = job.execute((NamedValue("Document", cls.doc), NamedValue("Mode", "build"),
                                  NamedValue("Settings", settings)))
        cls.job = job

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def usable(self):
        """Rows with a date and a price (the demo plants a few unreadable ones)."""
        date = pd.to_numeric(self.sales["date"], errors="coerce")
        price = pd.to_numeric(self.sales["price"], errors="coerce")
        return (date.notna() & (price > 0)).to_numpy()

    def summary(self):
        return self.doc.NamedRanges.getByName("Lintel_r1_summary").ReferredCells.getDataArray()

    def test_status_and_segments(self):
        self.assertTrue(self.status.startswith(
            f"Report All sales: {int(self.usable().sum())} sales, 7 segments, 132 periods (2015-01 .. 2025-12)"),
            self.status)
        labels = [r[0] for r in self.summary()[1:]]
        self.assertEqual(labels[0], "All sales")
        self.assertEqual(sorted(labels[1:]), sorted(f"{d}, {t}" for d in DISTRICTS for t in TYPES))

    def test_summary_equals_the_functions_called_directly(self):
        n = self.n
        sheets = self.doc.Sheets
        sheets.insertNewByName("Direct", sheets.Count)
        d = sheets.getByName("Direct")
        rows = self.summary()
        # The rows the report uses: SALESCHECK's use mask (each sale once; unreadable rows out).
        check = f'SALESCHECK($Sales.A2:A{n};$Sales.B2:B{n};$Sales.C2:C{n};;;;"output=use; labels=clean")'
        d.getCellRangeByName(f"ZZ1:ZZ{n - 1}").setArrayFormula("=" + check)
        self.doc.calculateAll()
        use = np.array([r[0] for r in sheet_values(d, f"ZZ1:ZZ{n - 1}")]) == 1
        # The candidates: a thin segment's hedonic index borrows strength from the market.
        d.getCellRangeByName("ZY1:ZY3").setDataArray((("median",), ("mix",), ("hedonic log=3",)))
        d.getCellRangeByName("ZY5:ZY7").setDataArray((("median",), ("mix",), ("hedonic log=3 smooth=trend borrow=1",)))
        date = pd.to_numeric(self.sales["date"], errors="coerce")
        month = (pd.Timestamp("1899-12-30") + pd.to_timedelta(date.fillna(0), unit="D")).dt.strftime("%Y-%m")
        dec = (month == "2025-12").to_numpy() & self.usable()
        price = pd.to_numeric(self.sales["price"], errors="coerce").to_numpy()
        for i, row in enumerate(rows[1:]):
            label = row[0]
            if label == "All sales":
                include, mask = check, np.ones(len(self.sales), bool)
                candidates = "$ZY$1:$ZY$3"
            else:
                dist, typ = label.split(", ")
                include = f'ISSEGMENT($Sales.D2:D{n};"{dist}")*ISSEGMENT($Sales.E2:E{n};"{typ}")*{check}'
                mask = ((self.sales["district"] == dist) & (self.sales["type"] == typ)).to_numpy()
                # Every one of these segments is thin (under 20 sales a month on average).
                self.assertLess(int((mask & self.usable()).sum()), 20 * 132, label)
                candidates = "$ZY$5:$ZY$7"
            c = 12 * i
            ref = lambda k, r0, r1: f"{col(c + k)}{r0}:{col(c + k)}{r1}"  # noqa: E731
            # The measure quoted is the one INDEXBACKTEST recommends on the segment's sales.
            d.getCellRangeByName(f"{col(c)}140:{col(c + 10)}142").setArrayFormula(
                f'=INDEXBACKTEST($Sales.C2:C{n};$Sales.A2:A{n};$Sales.B2:B{n};$Sales.D2:I{n};$Sales.D2:E{n};'
                f'$Sales.J2:J{n};{include};"M";{candidates})')
            self.doc.calculateAll()
            bt = sheet_values(d, f"{col(c)}140:{col(c + 10)}142")
            best = [r for r in bt if r[9] == 1]
            self.assertEqual(len(best), 1, (label, bt))
            measure = {"median": "Median", "mix": "Mix-adjusted median", "hedonic log=3": "Hedonic time dummy",
                       "hedonic log=3 smooth=trend borrow=1": "Hedonic, borrowing"}
            self.assertEqual(row[1], measure[best[0][0]], label)
            lowest = min(r[2] for r in bt if isinstance(r[2], float))
            self.assertEqual(row[10], ("most accurate on unseen resales" if best[0][2] == lowest else
                                       "as accurate within noise, steadier") + f" (error {round(best[0][2], 1):g} %)",
                             label)
            call = {"Median": f'=INDEXMEDIAN($Sales.A2:A{n};$Sales.B2:B{n};{include};"M";{{base}};"level=0.95")',
                    "Mix-adjusted median": f'=INDEXMIX($Sales.A2:A{n};$Sales.B2:B{n};$Sales.D2:E{n};{include};"M";'
                                           '{base};"level=0.95; labels=clean")',
                    "Hedonic time dummy": f'=INDEXHEDONIC($Sales.A2:A{n};$Sales.B2:B{n};$Sales.D2:I{n};{include};"M";'
                                          '{base};"level=0.95; labels=clean; log=3")',
                    "Hedonic, borrowing":
                        f'=INDEXHEDONIC($Sales.A2:A{n};$Sales.B2:B{n};$Sales.D2:I{n};{include};"M";'
                        '{base};"level=0.95; labels=clean; log=3; smooth=trend; borrow=1")'}[row[1]]
            d.getCellRangeByName(f"{col(c)}1:{col(c + 4)}132").setArrayFormula(call.format(base="DATE(2015;1;1)"))
            d.getCellRangeByName(ref(5, 1, 132)).setArrayFormula(f"=INDEXCHANGE({ref(1, 1, 132)};1)")
            d.getCellRangeByName(ref(6, 1, 132)).setArrayFormula(f"=INDEXCHANGE({ref(1, 1, 132)};12)")
            d.getCellRangeByName(f"{col(c + 7)}1:{col(c + 11)}132").setArrayFormula(
                call.format(base="DATE(2024;12;1)"))
            self.doc.calculateAll()
            got = dict(zip(["segment", "measure", "median", "index", "month", "year", "low", "high",
                            "sales", "flags", "why"], row))
            last = sheet_values(d, f"{col(c)}132:{col(c + 11)}132")[0]
            self.assertEqual(last[0], 45992.0, label)  # 2025-12-01: the headline month
            self.assertAlmostEqual(got["index"], last[1], places=9, msg=label)
            self.assertAlmostEqual(got["month"], last[5], places=9, msg=label)
            self.assertAlmostEqual(got["year"], last[6], places=9, msg=label)
            self.assertAlmostEqual(got["low"], last[10] - 100, places=9, msg=label)
            self.assertAlmostEqual(got["high"], last[11] - 100, places=9, msg=label)
            prices = price[mask & dec & use]
            self.assertEqual(got["sales"], len(prices), label)
            self.assertEqual(got["median"], float(np.median(prices)), label)
            flags = ("thin" if len(prices) < 20 else "") + (" borrowed" if row[1].endswith("borrowing") else "")
            self.assertEqual(got["flags"], flags.strip(), label)

    def test_charts_small_multiples_share_one_scale(self):
        rep = self.doc.Sheets.getByName("Report All sales")
        names = set(rep.Charts.ElementNames)
        self.assertEqual(names, {"Lintel_r1_quoted", "Lintel_r1_sales", "Lintel_r1_measures", "Lintel_r1_yearly"}
                         | {f"Lintel_r1_segment{i}" for i in range(1, 7)})
        scales = set()
        for i in range(1, 7):
            chart = rep.Charts.getByName(f"Lintel_r1_segment{i}").EmbeddedObject
            y = chart.Diagram.YAxis
            scales.add((y.AutoMin, y.AutoMax, y.Min, y.Max))
        self.assertEqual(len(scales), 1, scales)
        auto_min, auto_max, lo, hi = scales.pop()
        self.assertFalse(auto_min or auto_max)
        self.assertLess(lo, hi)

    def test_client_pages_as_pdf_and_a_values_copy(self):
        path = os.path.join(office.scratch, "client.pdf")
        got = self.job.execute((NamedValue("Document", self.doc), NamedValue("Mode", "pdf"),
                                NamedValue("Sheet", "Report All sales"),
                                NamedValue("Url", uno.systemPathToFileUrl(path))))
        self.assertTrue(got.startswith("Report All sales: client pages written to"), got)
        with open(path, "rb") as f:
            pdf = f.read()
        pages = len(re.findall(rb"/Type\s*/Page\b", pdf))
        self.assertEqual(pages, 2)  # the client page and the charts page, nothing stray
        before = len(components())
        got = self.job.execute((NamedValue("Document", self.doc), NamedValue("Mode", "values"),
                                NamedValue("Sheet", "Report All sales"), NamedValue("Hidden", True)))
        self.assertTrue(got.startswith("Report All sales: copied as values"), got)
        copies = [c for c in components()
                  if c.supportsService("com.sun.star.sheet.SpreadsheetDocument") and c is not self.doc
                  and c.Sheets.hasByName("Report All sales") and not c.Sheets.hasByName("Sales")]
        self.assertEqual(len(copies), 1)
        self.assertEqual(len(components()), before + 1)
        copy = copies[0]
        sheet = copy.Sheets.getByName("Report All sales")
        formulas = sheet.queryContentCells(16)  # FORMULA cells
        self.assertEqual(formulas.Count, 0, formulas.RangeAddressesAsString[:500])
        summary = sheet.getCellRangeByName(f"A7:K{6 + 7}").getDataArray()
        self.assertEqual([list(r) for r in summary], [list(r) for r in self.summary()[1:]])
        self.assertEqual(len(sheet.Charts.ElementNames), 10)
        copy.close(True)


if __name__ == "__main__":
    unittest.main(verbosity=2)
