#!/usr/bin/python3
"""Builds the demo workbook: the invented market of market_model.py in a Sales sheet, a
report sheet laid out by Lintel's report builder (the same service the sidebar's "Build
report" calls), and an Examples sheet of single formulas; saved as .ods and .pdf.

    build_demo.py --oxt build/lintel.oxt --profile out/profile --out out/demo
"""
import argparse
import os
import shutil
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "scripts"))
sys.path.insert(0, HERE)

import pandas as pd  # noqa: E402
import uno  # noqa: E402
from com.sun.star.beans import NamedValue  # noqa: E402

from lintel_office import Office, prop  # noqa: E402
import market_model  # noqa: E402

# The methods the demo report shows (all that the add-in offers).
METHODS = os.environ.get("LINTEL_DEMO_METHODS", "median|mean|mix|hedonic|repeat|refhome")


def number_format(doc, pattern):
    from com.sun.star.lang import Locale
    formats = doc.NumberFormats
    key = formats.queryKey(pattern, Locale(), False)
    return key if key != -1 else formats.addNew(pattern, Locale())


def report_settings(n_rows, segment=None):
    lines = [f"data=Sales.A1:J{n_rows}", "date=date", "price=price", "id=property_id",
             "changed=renovated", "characteristics=district|type|floor_area|lot|bedrooms|age",
             "strata=district|type", "freq=M", "base=2015-01-01", "level=0.95", f"methods={METHODS}",
             "options.hedonic=log=3", "options.refhome=log=3"]
    if not segment:
        # The market summary: three districts x two types, plus the whole market.
        lines += ["segments=district|type",
                  "segmentlist=" + "|".join(f"{d}/{t}" for d in ("Brindle Flats", "Tallowick", "Quessenby")
                                            for t in ("flat", "terraced"))]
    if segment:
        lines.append(segment)
    return "\n".join(lines) + "\n"


def examples_sheet(doc, sales, n):
    sheets = doc.Sheets
    sheets.insertNewByName("Examples", sheets.Count)
    ex = sheets.getByName("Examples")
    d, p, dist = f"$Sales.$A$2:$A${n}", f"$Sales.$B$2:$B${n}", f"$Sales.$D$2:$D${n}"
    typ = f"$Sales.$E$2:$E${n}"
    ex.getCellRangeByName("A1").setString("Single Lintel formulas on the demo sales (invented data)")
    ex.getCellRangeByName("A1").CharHeight = 14
    ex.getCellRangeByName("A2").setString(
        "Caution: an index describes a market, not one home. Time-adjusting a sale is no substitute "
        "for an appraisal by a licensed professional; follow local appraisal standards and regulations.")
    heads = [("A4", f"Quarterly median, all sales: =INDEXMEDIAN(...;;\"Q\";;\"titles=1\")"),
             ("G4", "Rebased to 2020-Q1 = 100: =INDEXREBASE(A6:A49;B6:B49;DATE(2020;1;1))"),
             ("I4", "Year-over-year %: =INDEXCHANGE(B6:B49;4)"),
             ("K4", "Mean, Tallowick flats only (segment mask), quarterly")]
    for ref, text in heads:
        ex.getCellRangeByName(ref).setString(text)
    ex.getCellRangeByName("A5:E49").setArrayFormula(f"=INDEXMEDIAN({d};{p};;\"Q\";;\"titles=1\")")
    ex.getCellRangeByName("G5").setString("rebased")
    ex.getCellRangeByName("G6:G49").setArrayFormula("=INDEXREBASE(A6:A49;B6:B49;DATE(2020;1;1))")
    ex.getCellRangeByName("I5").setString("change %")
    ex.getCellRangeByName("I6:I49").setArrayFormula("=INDEXCHANGE(B6:B49;4)")
    ex.getCellRangeByName("K5:O49").setArrayFormula(
        f"=INDEXMEAN({d};{p};({dist}=\"Tallowick\")*({typ}=\"flat\");\"Q\";;\"titles=1\")")
    ex.getCellRangeByName("Q4").setString("Time adjustment with the quarterly median index")
    ex.getCellRangeByName("Q5").setString("A sale of 412,000 on 2017-05-20, adjusted to 2025-12-31:")
    ex.getCellRangeByName("Q6").setFormula("=PRICEADJUST(412000;DATE(2017;5;20);DATE(2025;12;31);A6:A49;B6:B49)")
    for ref, fmt in (("A6:A49", "YYYY-\"Q\"Q"), ("K6:K49", "YYYY-\"Q\"Q"), ("B6:B49", "0.0"),
                     ("D6:E49", "0.0"), ("C6:C49", "0"), ("G6:G49", "0.0"), ("I6:I49", "0.0"),
                     ("L6:L49", "0.0"), ("M6:M49", "0"), ("N6:O49", "0.0"), ("Q6", "#,##0")):
        ex.getCellRangeByName(ref).NumberFormat = number_format(doc, fmt)
    comparables(doc, ex, sales, n)
    ex.setPrintAreas((ex.getCellRangeByName("A1:AB49").RangeAddress,))
    pages = doc.StyleFamilies.getByName("PageStyles")
    if not pages.hasByName("Lintel examples"):
        pages.insertByName("Lintel examples", doc.createInstance("com.sun.star.style.PageStyle"))
    style = pages.getByName("Lintel examples")
    w, h = style.Width, style.Height
    style.IsLandscape = True
    style.Width, style.Height = max(w, h), min(w, h)
    style.ScaleToPagesX, style.ScaleToPagesY = 1, 1
    ex.PageStyle = "Lintel examples"


def comparables(doc, ex, sales, n):
    """Three comparable sales of detached homes in Varnholt, time-adjusted to a valuation date
    with the all-sales median index and with a Varnholt hedonic index: the two disagree
    because the median also moves with the mix of homes sold."""
    d, p = f"$Sales.$A$2:$A${n}", f"$Sales.$B$2:$B${n}"
    ex.getCellRangeByName("Q9").setString(
        "Comparable sales (Varnholt, detached) time-adjusted to 2025-12-31")
    ex.getCellRangeByName("Q9").CharWeight = 150
    for c, h in zip("QRSTU", ["sale date", "price", "adjusted: median, all sales",
                              "adjusted: hedonic, Varnholt", "difference %"]):
        ex.getCellRangeByName(f"{c}10").setString(h)
    picked = []
    for year in (2017, 2019, 2022):
        for row in sales.itertuples(index=False):
            if (row.district == "Varnholt" and row.type == "detached" and isinstance(row.date, float)
                    and isinstance(row.price, float)
                    and (pd_year(row.date) == year) and row.price < 3_000_000):
                picked.append(row)
                break
    for i, row in enumerate(picked):
        r = 11 + i
        ex.getCellRangeByName(f"Q{r}").setValue(row.date)
        ex.getCellRangeByName(f"R{r}").setValue(row.price)
        ex.getCellRangeByName(f"S{r}").setFormula(f"=PRICEADJUST(R{r};Q{r};DATE(2025;12;31);$A$6:$A$49;$B$6:$B$49)")
        ex.getCellRangeByName(f"T{r}").setFormula(f"=PRICEADJUST(R{r};Q{r};DATE(2025;12;31);$W$6:$W$49;$X$6:$X$49)")
        ex.getCellRangeByName(f"U{r}").setFormula(f"=100*(S{r}/T{r}-1)")
    ex.getCellRangeByName("Q15").setString(
        "An index moves a price with its market; it does not value a home. Use such figures as "
        "an input to, not a substitute for, an appraisal.")
    ex.getCellRangeByName("W4").setString("Hedonic, Varnholt, quarterly: type, floor area (log), lot, bedrooms, age")
    ex.getCellRangeByName("W5:AA49").setArrayFormula(
        f"=INDEXHEDONIC({d};{p};$Sales.$E$2:$I${n};($Sales.$D$2:$D${n}=\"Varnholt\");\"Q\";;\"log=2; titles=1\")")
    for ref, fmt in (("Q11:Q13", "YYYY-MM-DD"), ("R11:T13", "#,##0"), ("U11:U13", "0.0"),
                     ("W6:W49", "YYYY-\"Q\"Q"), ("X6:X49", "0.0"), ("Y6:Y49", "0"), ("Z6:AA49", "0.0")):
        ex.getCellRangeByName(ref).NumberFormat = number_format(doc, fmt)


def pd_year(serial):
    """Calendar year of a date serial (day 0 = 1899-12-30)."""
    return (market_model.EPOCH + pd.Timedelta(days=serial)).year


def build(office, out_dir):
    sales = market_model.generate()
    n = len(sales) + 1
    doc = office.new_calc()
    sheets = doc.Sheets
    sheets.getByIndex(0).Name = "Sales"
    s = sheets.getByName("Sales")
    rows = [tuple(sales.columns)] + [tuple(r) for r in sales.itertuples(index=False)]
    s.getCellRangeByName(f"A1:J{n}").setDataArray(rows)
    s.getCellRangeByName(f"A2:A{n}").NumberFormat = number_format(doc, "YYYY-MM-DD")
    s.setPrintAreas((s.getCellRangeByName("A1:J40").RangeAddress,))
    page = doc.StyleFamilies.getByName("PageStyles").getByName(s.PageStyle)
    page.ScaleToPagesX = 1
    page.ScaleToPagesY = 0

    job = office.service("org.lintel.ReportBuilder")
    status = job.execute((NamedValue("Document", doc), NamedValue("Settings", report_settings(n)),
                          NamedValue("Mode", "build")))
    print(status)
    if status.startswith("Lintel:"):
        raise SystemExit(f"report failed: {status}")
    examples_sheet(doc, sales, n)
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
