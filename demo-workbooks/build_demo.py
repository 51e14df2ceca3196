#!/usr/bin/python3
"""Builds the demo workbook: the invented market of market_model.py in a Sales sheet, and an
Index sheet of ordinary Lintel formulas with a chart; saved as .ods and .pdf.

    build_demo.py --oxt build/lintel.oxt --profile out/profile --out out/demo
"""
import argparse
import os
import shutil
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "scripts"))
sys.path.insert(0, HERE)

import uno  # noqa: E402
from com.sun.star.awt import Rectangle  # noqa: E402

from lintel_office import Office, prop  # noqa: E402
import market_model  # noqa: E402

CAUTION = ("Caution: an index describes a market, not one home. Time-adjusting a sale is no "
           "substitute for an appraisal by a licensed professional; follow local appraisal "
           "standards and regulations. All data in this workbook are invented.")


def date_format(doc, pattern="YYYY-MM-DD"):
    from com.sun.star.lang import Locale
    formats = doc.NumberFormats
    loc = Locale()
    key = formats.queryKey(pattern, loc, False)
    return key if key != -1 else formats.addNew(pattern, loc)


def build(office, out_dir):
    sales = market_model.generate()
    n = len(sales) + 1
    doc = office.new_calc()
    sheets = doc.Sheets
    sheets.getByIndex(0).Name = "Sales"
    s = sheets.getByName("Sales")
    rows = [tuple(sales.columns)] + [tuple(r) for r in sales.itertuples(index=False)]
    s.getCellRangeByName(f"A1:J{n}").setDataArray(rows)
    s.getCellRangeByName(f"A2:A{n}").NumberFormat = date_format(doc)
    s.setPrintAreas((s.getCellRangeByName("A1:J45").RangeAddress,))

    sheets.insertNewByName("Index", 1)
    ix = sheets.getByName("Index")
    ix.getCellRangeByName("A1").setString("Demo market: price indexes (invented data)")
    ix.getCellRangeByName("A1").CharHeight = 16
    ix.getCellRangeByName("A2").setString(CAUTION)
    labels = [("Frequency", "M"), ("Base date", None), ("Segment (mean index)", "Varnholt")]
    for i, (k, v) in enumerate(labels):
        ix.getCellByPosition(0, 3 + i).setString(k)
    ix.getCellRangeByName("B4").setString("M")
    ix.getCellRangeByName("B5").setFormula("=DATE(2015;1;1)")
    ix.getCellRangeByName("B5").NumberFormat = date_format(doc)
    ix.getCellRangeByName("B6").setString("Varnholt")
    heads = ["Period", "Median index", "Sales", "Lower 95%", "Upper 95%", "",
             "Period", "Mean index (segment)", "Sales"]
    for c, h in enumerate(heads):
        ix.getCellByPosition(c, 8).setString(h)
    periods = 132
    top, bottom = 10, 10 + periods - 1
    d, p, dist = f"$Sales.$A$2:$A${n}", f"$Sales.$B$2:$B${n}", f"$Sales.$D$2:$D${n}"
    # notes=1: the diagnostics (rows used, dropped by reason) follow below the table.
    ix.getCellRangeByName(f"A{top}:E{bottom + 5}").setArrayFormula(
        f"=INDEXMEDIAN({d};{p};;$B$4;$B$5;\"notes=1\")")
    ix.getCellRangeByName(f"G{top}:I{bottom}").setArrayFormula(
        f"=INDEXMEAN({d};{p};({dist}=$B$6);$B$4;$B$5)")
    # Calc gives a formula result the format of the first date it references: set the
    # number formats of the index tables explicitly.
    for col in ("A", "G"):
        ix.getCellRangeByName(f"{col}{top}:{col}{bottom}").NumberFormat = date_format(doc, "YYYY-MM")
    for cols in ("B", "D", "E", "H"):
        ix.getCellRangeByName(f"{cols}{top}:{cols}{bottom}").NumberFormat = date_format(doc, "0.0")
    for cols in ("C", "I"):
        ix.getCellRangeByName(f"{cols}{top}:{cols}{bottom}").NumberFormat = date_format(doc, "0")
    ix.getCellRangeByName(f"B{bottom + 1}:B{bottom + 5}").NumberFormat = date_format(doc, "0")
    page = doc.StyleFamilies.getByName("PageStyles").getByName(ix.PageStyle)
    page.IsLandscape = True
    w, h = page.Width, page.Height
    if w < h:
        page.Width, page.Height = h, w
    page.ScaleToPagesX = 1
    page.ScaleToPagesY = 0
    doc.calculateAll()

    rect = Rectangle()
    rect.X, rect.Y, rect.Width, rect.Height = 1000, 1500, 24000, 11000
    addr = [ix.getCellRangeByName(f"A9:B{bottom}").RangeAddress,
            ix.getCellRangeByName(f"H9:H{bottom}").RangeAddress]
    # Place the chart to the right of the tables.
    anchor = ix.getCellRangeByName("N9")
    rect.X = anchor.Position.X
    rect.Y = anchor.Position.Y
    ix.Charts.addNewByName("IndexChart", rect, tuple(addr), True, True)
    chart = ix.Charts.getByName("IndexChart").EmbeddedObject
    chart.setDiagram(chart.createInstance("com.sun.star.chart.LineDiagram"))
    chart.HasMainTitle = True
    chart.Title.String = "Median index (all sales) and mean index (Varnholt), 2015-01 = 100"
    ix.setPrintAreas((ix.getCellRangeByName(f"A1:Z{bottom + 5}").RangeAddress,))
    doc.calculateAll()

    tmp_ods = os.path.join(office.scratch, "lintel-demo.ods")
    tmp_pdf = os.path.join(office.scratch, "lintel-demo.pdf")
    doc.storeToURL(uno.systemPathToFileUrl(tmp_ods), (prop("FilterName", "calc8"),))
    doc.storeToURL(uno.systemPathToFileUrl(tmp_pdf), (prop("FilterName", "calc_pdf_Export"),))
    doc.close(True)
    os.makedirs(out_dir, exist_ok=True)
    for f in (tmp_ods, tmp_pdf):
        shutil.copy(f, out_dir)
    sales.to_csv(os.path.join(out_dir, "demo-sales.csv"), index=False)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--oxt", required=True)
    ap.add_argument("--profile", required=True)
    ap.add_argument("--out", required=True)
    a = ap.parse_args()
    with Office(a.oxt, profile=a.profile) as office:
        build(office, a.out)


if __name__ == "__main__":
    main()
