"""Speed of Lintel in a real headless Calc (measurements, not tests).

    /usr/bin/python3 tests/bench/bench_calc.py --oxt build/lintel.oxt [--only SECTION ...]

Starts the office with scripts/lintel_office.py, writes generated data to sheets, sets array
formulas and prints the median time of `--runs` full recalculations (doc.calculateAll(),
which includes handing the ranges to the add-in and the result back). Sections:

hedonic   INDEXHEDONIC over `--rows` sales (default 35,000) with 12 characteristic terms.
          Target: under 0.5 s.
columns   Every function over whole columns (A:A) and over the same rows given as ranges
          (A1:A1001), with 1,000 sales and a 60-month index table. Target: whole columns within
          0.2 s. Also says whether both forms gave the same cells. A whole column given to a
          value argument (an include expression, PRICEADJUST's price and dates) is an array of
          1,048,576 rows that Calc builds before any add-in is called: the section prints what
          that costs LibreOffice's own Analysis add-in (SERIESSUM over B:B and over an
          expression) as the reference for those cases.
blank     PERIODOF over a range of n rows of which the first 1,000 hold dates and the rest are
          blank, into an array of n rows: the cost of blank result cells, and what the first
          row below the data shows (blank, or #N/A where a long blank tail was left out).
backtest  INDEXBACKTEST over `--rows` sales of the hedonic data below with a property id, 10 folds x
          6 methods (median, mean, mix by district, hedonic log=1, repeat, repeat method=bmn),
          12 revision periods. Target (issue 14): a few seconds.
full      The worst case (issue 10): the worst realistic formula of every function over whole
          columns of a full sheet (1,048,575 sales, masks included); prints a table function |
          case | seconds | first cell and the worst. Target: a few seconds each (a refusal
          with Lintel's message counts).
span      One date mistyped as year 2995 among 1,000 sales (issue 10): INDEXMIX bootstrap and
          the other estimators; answers or refusals in a few seconds.

Generated data (not the demo; numpy's default_rng, seeds below):
  hedonic (seed `--seed`): `--rows` sales spread evenly over `--months` months from 2019-01
    (day 1 + i mod 28); size ~ U(40, 240) m^2 (in logs), rooms ~ U{1..5}, bathrooms ~ U{1..3},
    age ~ U{0..99}, lot ~ U(100, 1000) m^2, garage ~ Bernoulli(0.4), district ~ U{"district A"
    .. "district G"}; ln price = 11 + 0.003 t + 0.7 ln size + 0.04 rooms + 0.06 bathrooms
    - 0.003 age + 0.00001 lot + 0.05 garage + c_district + N(0, 0.2^2),
    c = (0, 0.1, -0.1, 0.2, 0.05, -0.15, 0.3).
  backtest: the hedonic data, and an id "P<k>", k ~ U{0..0.4 rows - 1} (seed `--seed` + 1),
    so most properties sell two or three times (prices independent across a property's
    sales: the speed does not depend on it).
  columns (seed 1000): 1,000 sales over 60 months from 2019-01 (month i*60//1000, day
    1 + i mod 28); id "P<k>", k ~ U{0..399}; size ~ U(40, 200); rooms ~ U{1..5}; district ~
    U{"district A" .. "district E"}; ln price = 12 + 0.004 t + 0.6 ln(size/100) + 0.03 rooms
    + (0, 0.1, -0.1, 0.2, -0.05)[district] + N(0, 0.15^2). Index table, months t = 0..59:
    A = 100 exp(0.004 t + 0.02 sin(2 pi t/12) + N(0, 0.005^2)), B the same shape 3 months
    later.
  full (seed 5): 1,048,575 sales over 120 months from 2020-01; id ~ U{0..299999} (numbers);
    size ~ U(40, 240); district ~ U{"district A" .. "district G"}; ln price = 12 + 0.003 t +
    N(0, 0.2^2).
  span (seed 10): 1,000 sales, month i*60//1000 from 2023-01, day 1 + i mod 28, the last date
    400000; stratum "s<i mod 12>", size ~ U(40, 240), id "P<i mod 400>"; ln price = 12 +
    0.004 t + N(0, 0.2^2).
"""
import argparse
import os
import statistics
import sys
import time

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
from lintel_office import Office, sheet_values  # noqa: E402

SHEET_ROWS = 1048576


def serial_of(year, month, day):
    """Date serial (day 0 = 1899-12-30) without pandas."""
    return float((np.datetime64(f"{year:04d}-{month:02d}-01") - np.datetime64("1899-12-30")).astype(int) + day - 1)


def recalc_times(doc, runs):
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        doc.calculateAll()
        times.append(time.perf_counter() - t0)
    return times


def timed_array(doc, sheet, ref, formula, runs, read=None):
    """Sets an array formula, recalculates once, returns (median of runs, cells of `read`,
    default the whole array)."""
    rng = sheet.getCellRangeByName(ref)
    rng.setArrayFormula(formula)
    doc.calculateAll()
    times = recalc_times(doc, runs)
    cells = sheet_values(sheet, read or ref)
    rng.setArrayFormula("")
    return statistics.median(times), cells


def cell_text(v):
    if v is None or v == "":
        return "blank"
    if isinstance(v, tuple):
        return {32767: "#N/A", 504: "Err:504"}.get(v[1], f"error {v[1]}")
    return repr(v)


# --- hedonic ----------------------------------------------------------------------------------
def hedonic_market(rows, months, seed):
    rng = np.random.default_rng(seed)
    i = np.arange(rows)
    t = i * months // rows
    serial = np.array([serial_of(2019 + k // 12, k % 12 + 1, 1) for k in t]) + i % 28
    size = rng.uniform(40, 240, rows)
    rooms = rng.integers(1, 6, rows).astype(float)
    bath = rng.integers(1, 4, rows).astype(float)
    age = rng.integers(0, 100, rows).astype(float)
    lot = rng.uniform(100, 1000, rows)
    garage = (rng.random(rows) < 0.4).astype(float)
    d = rng.integers(0, 7, rows)
    c = np.array([0, 0.1, -0.1, 0.2, 0.05, -0.15, 0.3])
    lnp = (11 + 0.003 * t + 0.7 * np.log(size) + 0.04 * rooms + 0.06 * bath - 0.003 * age
           + 0.00001 * lot + 0.05 * garage + c[d] + rng.normal(0, 0.2, rows))
    district = [f"district {chr(65 + k)}" for k in d]
    header = ("date", "price", "size", "rooms", "bathrooms", "age", "lot", "garage", "district")
    return [header] + [
        (float(serial[k]), float(np.exp(lnp[k])), float(size[k]), float(rooms[k]), float(bath[k]),
         float(age[k]), float(lot[k]), float(garage[k]), district[k]) for k in range(rows)]


def bench_hedonic(office, a):
    data = hedonic_market(a.rows, a.months, a.seed)
    n = len(data)
    doc = office.new_calc()
    sheet = doc.Sheets.getByIndex(0)
    sheet.getCellRangeByName(f"A1:I{n}").setDataArray(data)
    out = f"K1:O{a.months}"
    formula = f'=INDEXHEDONIC(A1:A{n};B1:B{n};C1:I{n};;;;"header=1; log=1")'
    sheet.getCellRangeByName(out).setArrayFormula(formula)
    doc.calculateAll()
    cells = sheet_values(sheet, out)
    if not isinstance(cells[0][1], float):
        raise SystemExit(f"the formula did not give an index: {cells[0][:2]!r}")
    times = recalc_times(doc, a.runs)
    if sheet_values(sheet, out) != cells:
        raise SystemExit("the recalculated table differs from the first one")
    doc.close(True)
    med = statistics.median(times)
    print(f"INDEXHEDONIC: {a.rows} sales, {a.months} months, 12 characteristic terms; "
          f"recalculation over {a.runs} runs: median {med:.3f} s "
          f"(runs: {', '.join(f'{x:.3f}' for x in times)}); target < 0.5 s: "
          f"{'met' if med < 0.5 else 'NOT met'}", flush=True)


def bench_backtest(office, a):
    data = hedonic_market(a.rows, a.months, a.seed)
    rng = np.random.default_rng(a.seed + 1)
    ids = ["id"] + [f"P{k}" for k in rng.integers(0, max(1, a.rows * 2 // 5), a.rows)]
    data = [row + (pid,) for row, pid in zip(data, ids)]
    methods = ["median", "mean", "mix", "hedonic log=1", "repeat", "repeat method=bmn"]
    n = len(data)
    doc = office.new_calc()
    sheet = doc.Sheets.getByIndex(0)
    sheet.getCellRangeByName(f"A1:J{n}").setDataArray(data)
    sheet.getCellRangeByName(f"L1:L{len(methods)}").setDataArray([(m,) for m in methods])
    out = f"N1:X{len(methods)}"
    formula = (f'=INDEXBACKTEST(J2:J{n};A2:A{n};B2:B{n};C2:I{n};I2:I{n};;;"M";L1:L{len(methods)};'
               f'"revisions=12")')
    sheet.getCellRangeByName(out).setArrayFormula(formula)
    doc.calculateAll()
    cells = sheet_values(sheet, out)
    if not isinstance(cells[0][1], float):
        raise SystemExit(f"the formula did not give a table: {cells[0][:2]!r}")
    times = recalc_times(doc, a.runs)
    if sheet_values(sheet, out) != cells:
        raise SystemExit("the recalculated table differs from the first one")
    doc.close(True)
    med = statistics.median(times)
    print(f"INDEXBACKTEST: {a.rows} sales, {a.months} months, 10 folds x 6 methods, 12 revisions; "
          f"recalculation over {a.runs} runs: median {med:.3f} s "
          f"(runs: {', '.join(f'{x:.3f}' for x in times)}); target a few seconds (< 5 s): "
          f"{'met' if med < 5 else 'NOT met'}", flush=True)


# --- columns ----------------------------------------------------------------------------------
SALES = 1000
PERIODS = 60

# name, formula with {A}..{J} (one column) and {DF}, {IJ} (blocks), output rows x columns.
# A name ending in * gives a whole column to a value argument (Calc builds the array).
COLUMN_CASES = [
    ("PERIODOF", "=PERIODOF({A})", SALES + 1, 1),
    ("INDEXMEDIAN", '=INDEXMEDIAN({A};{B};;;;"header=1")', PERIODS, 5),
    ("INDEXMEAN", '=INDEXMEAN({A};{B};;;;"header=1")', PERIODS, 5),
    ("INDEXMEAN+include*", '=INDEXMEAN({A};{B};{F}="district A";;;"header=1")', PERIODS, 5),
    ("INDEXMIX", '=INDEXMIX({A};{B};{F};;;;"header=1")', PERIODS, 5),
    ("INDEXHEDONIC", '=INDEXHEDONIC({A};{B};{DF};;;;"header=1; log=1")', PERIODS, 5),
    ("HEDONICCOEFS", '=HEDONICCOEFS({A};{B};{DF};;;;"header=1; log=1")', 80, 4),
    ("REFHOMEVALUE", '=REFHOMEVALUE({A};{B};{DF};;;;;"header=1; log=1")', PERIODS, 4),
    ("CHAINRS", '=CHAINRS({C};{A};{B};;;;;"header=1")', PERIODS, 5),
    ("RSPAIRS", '=RSPAIRS({C};{A};{B};;;"header=1")', 700, 10),
    ("INDEXREBASE", "=INDEXREBASE({H};{I};DATE(2020;1;1))", PERIODS + 1, 1),
    ("INDEXCHANGE", "=INDEXCHANGE({I};12)", PERIODS + 1, 1),
    ("PRICEADJUST*", "=PRICEADJUST({B};{A};DATE(2023;12;31);{H};{I})", SALES + 1, 1),
    ("INDEXVOLATILITY", '=INDEXVOLATILITY({I};1;"header=1")', 1, 1),
    ("INDEXTREND", "=INDEXTREND({I})", PERIODS + 1, 1),
    ("INDEXSNR", '=INDEXSNR({I};;"header=1")', 1, 1),
    ("INDEXLEADLAG", '=INDEXLEADLAG({I};{J};;"header=1")', 26, 3),
    ("INDEXTURNS", '=INDEXTURNS({H};{I};;"header=1")', 10, 4),
    ("INDEXSEASONAL", '=INDEXSEASONAL({I};"M";"header=1")', PERIODS + 1, 1),
    ("INDEXCOMPARE", '=INDEXCOMPARE({IJ};"M";"header=1")', 3, 7),
]


def column_sheet_data():
    rng = np.random.default_rng(1000)
    i = np.arange(SALES)
    t = i * PERIODS // SALES
    serial = np.array([serial_of(2019 + k // 12, k % 12 + 1, 1) for k in t]) + i % 28
    ids = [f"P{k}" for k in rng.integers(0, 400, SALES)]
    size = rng.uniform(40, 200, SALES)
    rooms = rng.integers(1, 6, SALES).astype(float)
    d = rng.integers(0, 5, SALES)
    lnp = (12 + 0.004 * t + 0.6 * np.log(size / 100) + 0.03 * rooms
           + np.array([0, 0.1, -0.1, 0.2, -0.05])[d] + rng.normal(0, 0.15, SALES))
    sales = [("date", "price", "id", "size", "rooms", "district")] + [
        (float(serial[k]), float(np.exp(lnp[k])), ids[k], float(size[k]), float(rooms[k]),
         f"district {chr(65 + d[k])}") for k in range(SALES)]
    m = np.arange(PERIODS)
    index_a = 100 * np.exp(0.004 * m + 0.02 * np.sin(2 * np.pi * m / 12) + rng.normal(0, 0.005, PERIODS))
    index_b = 100 * np.exp(0.004 * (m - 3) + 0.02 * np.sin(2 * np.pi * (m - 3) / 12)
                           + rng.normal(0, 0.005, PERIODS))
    table = [("period", "index A", "index B")] + [
        (serial_of(2019 + k // 12, k % 12 + 1, 1), float(index_a[k]), float(index_b[k])) for k in m]
    return sales, table


def column_refs(whole):
    refs = {}
    for c in "ABCDEF":
        refs[c] = f"$Sales.{c}:{c}" if whole else f"$Sales.{c}1:{c}{SALES + 1}"
    for c in "HIJ":
        refs[c] = f"$Sales.{c}:{c}" if whole else f"$Sales.{c}1:{c}{PERIODS + 1}"
    refs["DF"] = "$Sales.D:F" if whole else f"$Sales.D1:F{SALES + 1}"
    refs["IJ"] = "$Sales.I:J" if whole else f"$Sales.I1:J{PERIODS + 1}"
    return refs


def bench_columns(office, a):
    sales, table = column_sheet_data()
    doc = office.new_calc()
    doc.Sheets.getByIndex(0).Name = "Sales"
    s = doc.Sheets.getByName("Sales")
    s.getCellRangeByName(f"A1:F{SALES + 1}").setDataArray(sales)
    s.getCellRangeByName(f"H1:J{PERIODS + 1}").setDataArray(table)
    doc.Sheets.insertNewByName("Out", 1)
    out = doc.Sheets.getByName("Out")
    wanted = set(a.functions.split(",")) if a.functions else None
    print(f"Every function with {SALES} sales and a {PERIODS}-month index table: whole columns "
          f"(A:A) vs the same rows as ranges (A1:A{SALES + 1}); median of {a.runs} recalculations",
          flush=True)
    worst = worst_value = 0.0
    for name, formula, rows, cols in COLUMN_CASES:
        if wanted and name.rstrip("*") not in wanted:
            continue
        ref = f"A1:{chr(64 + cols)}{rows}"
        t_range, cells_range = timed_array(doc, out, ref, formula.format(**column_refs(False)), a.runs)
        t_whole, cells_whole = timed_array(doc, out, ref, formula.format(**column_refs(True)), a.runs)
        if name.endswith("*"):
            worst_value = max(worst_value, t_whole)
        else:
            worst = max(worst, t_whole)
        print(f"  {name:18s} whole columns {t_whole:8.3f} s   ranges {t_range:8.3f} s   "
              f"same cells: {'yes' if cells_whole == cells_range else 'NO'}", flush=True)
    # Calc's own cost of handing a whole column to an add-in as values, with LibreOffice's
    # Analysis add-in (SERIESSUM takes its coefficients as an array of numbers).
    print("  * a whole column given to a value argument: Calc builds all 1,048,576 rows before "
          "the add-in is called. The same with LibreOffice's own Analysis add-in:", flush=True)
    for label, formula in [("SERIESSUM(1;0;1;B:B)", "=SERIESSUM(1;0;1;$Sales.B:B)"),
                           ('SERIESSUM(1;0;1;F:F="district A")', '=SERIESSUM(1;0;1;$Sales.F:F="district A")'),
                           ("SERIESSUM(1;0;1;B1:B1001)", "=SERIESSUM(1;0;1;$Sales.B1:B1001)")]:
        t, _ = timed_array(doc, out, "A1:A1", formula, a.runs)
        print(f"    {label:36s} {t:8.3f} s", flush=True)
    doc.close(True)
    print(f"  slowest over whole cells arguments: {worst:.3f} s; target 0.2 s: "
          f"{'met' if worst <= 0.2 else 'NOT met'}; slowest with a whole column as a value "
          f"argument (*): {worst_value:.3f} s", flush=True)


# --- blank ------------------------------------------------------------------------------------
def bench_blank(office, a):
    doc = office.new_calc()
    s = doc.Sheets.getByIndex(0)
    s.getCellRangeByName("A1:A1000").setDataArray([(43831.0 + k,) for k in range(1000)])
    doc.Sheets.insertNewByName("Out", 1)
    out = doc.Sheets.getByName("Out")
    print("PERIODOF over n rows (1,000 dates, then blank cells) into an array of n rows; median of "
          f"{a.runs} recalculations", flush=True)
    for n in [int(x) for x in a.blank_rows.split(",")]:
        rng = out.getCellRangeByName(f"A1:A{n}")
        rng.setArrayFormula(f"=PERIODOF($Sheet1.A1:A{n})")
        doc.calculateAll()
        times = recalc_times(doc, a.runs)
        below = sheet_values(out, "A1001:A1001")[0][0]
        rng.setArrayFormula("")
        print(f"  n = {n:9d}: {statistics.median(times):8.3f} s; row 1001 (first below the data) "
              f"shows {cell_text(below)}", flush=True)
    doc.close(True)


# --- full -------------------------------------------------------------------------------------
# The worst realistic formula of each function over a full sheet (issue 10): whole columns of
# 1,048,575 sales (A date, B price, C id, D size, E district; header in row 1), masks included.
# name, case, formula, output range. A refusal with Lintel's message counts as an answer.
S = "$Sales."
INCL = f'ISSEGMENT({S}E:E;"district A")'
FULL_CASES = [
    ("PERIODOF", "whole column into a whole column", f"=PERIODOF({S}A:A)", "A1:A1048576"),
    ("PERIODOF", "one cell", f"=PERIODOF({S}A:A)", "A1:A1"),
    ("INDEXMEDIAN", "whole columns", f"=INDEXMEDIAN({S}A:A;{S}B:B)", "A1:E130"),
    ("INDEXMEDIAN", "ISSEGMENT mask", f"=INDEXMEDIAN({S}A:A;{S}B:B;{INCL})", "A1:E130"),
    ("INDEXMEAN", "(E=...) mask, notes", f'=INDEXMEAN({S}A:A;{S}B:B;{S}E:E="district B";;;"notes=1")',
     "A1:E140"),
    ("INDEXMIX", "district strata", f"=INDEXMIX({S}A:A;{S}B:B;{S}E:E)", "A1:E130"),
    ("INDEXMIX", "chain, bootstrap 200 reps", f'=INDEXMIX({S}A:A;{S}B:B;{S}E:E;;;;"chain=1;bands=bootstrap")',
     "A1:E130"),
    ("INDEXMIX", "bootstrap 100 reps", f'=INDEXMIX({S}A:A;{S}B:B;{S}E:E;;;;"bands=bootstrap;reps=100")',
     "A1:E130"),
    ("INDEXHEDONIC", "size, district; log", f'=INDEXHEDONIC({S}A:A;{S}B:B;{S}D:E;;;;"log=1")', "A1:E130"),
    ("INDEXHEDONIC", "window=12, mask", f'=INDEXHEDONIC({S}A:A;{S}B:B;{S}D:E;{INCL};;;"log=1;window=12")',
     "A1:E130"),
    ("INDEXHEDONIC", "smooth=trend", f'=INDEXHEDONIC({S}A:A;{S}B:B;{S}D:E;;;;"log=1;smooth=trend")', "A1:E130"),
    ("INDEXHEDONIC", "smooth=trend realtime=1", f'=INDEXHEDONIC({S}A:A;{S}B:B;{S}D:E;;;;"log=1;smooth=trend;realtime=1")',
     "A1:E130"),
    ("INDEXHEDONIC", "id as categorical", f'=INDEXHEDONIC({S}A:A;{S}B:B;{S}C:D;;;;"categorical=1")', "A1:E130"),
    ("HEDONICCOEFS", "size, district; se=hc1", f'=HEDONICCOEFS({S}A:A;{S}B:B;{S}D:E;;;;"log=1;se=hc1")', "A1:D140"),
    ("REFHOMEVALUE", "size, district", f'=REFHOMEVALUE({S}A:A;{S}B:B;{S}D:E;;;;;"log=1")', "A1:D130"),
    ("CHAINRS", "whole columns", f"=CHAINRS({S}C:C;{S}A:A;{S}B:B)", "A1:E130"),
    ("CHAINRS", "chain=1, bmn", f'=CHAINRS({S}C:C;{S}A:A;{S}B:B;;;;;"chain=1;method=bmn")', "A1:E130"),
    ("CHAINRS", "smooth=trend, mask", f'=CHAINRS({S}C:C;{S}A:A;{S}B:B;;{INCL};;;"smooth=trend")', "A1:E130"),
    ("RSPAIRS", "all pairs", f"=RSPAIRS({S}C:C;{S}A:A;{S}B:B)", "A1:J100"),
    ("SALESCHECK", "list, ids, segments", f"=SALESCHECK({S}A:A;{S}B:B;{S}C:C;{S}E:E)", "A1:F100"),
    ("SALESCHECK", "output=use", f'=SALESCHECK({S}A:A;{S}B:B;{S}C:C;{S}E:E;;;"output=use")', "A1:A1048576"),
    ("ISSEGMENT", "whole column", f'=ISSEGMENT({S}E:E;"district A")', "A1:A1048576"),
    ("INDEXBACKTEST", "default methods", f"=INDEXBACKTEST({S}C:C;{S}A:A;{S}B:B;{S}D:D;{S}E:E)", "A1:K6"),
    ("INDEXTREND", "1M-value series", f"=INDEXTREND({S}B:B)", "A1:A1048576"),
    ("INDEXVOLATILITY", "1M-value series", f"=INDEXVOLATILITY({S}B:B)", "A1:A1"),
    ("INDEXSNR", "1M-value series", f"=INDEXSNR({S}B:B)", "A1:A1"),
    ("INDEXSEASONAL", "1M-value series", f"=INDEXSEASONAL({S}B:B)", "A1:A100"),
    ("INDEXTURNS", "dates, 1M values", f"=INDEXTURNS({S}A:A;{S}B:B)", "A1:D100"),
    ("INDEXLEADLAG", "two 1M-value series", f"=INDEXLEADLAG({S}B:B;{S}D:D)", "A1:C30"),
    ("INDEXCOMPARE", "three 1M-value series", f"=INDEXCOMPARE({S}B:D)", "A1:G5"),
    ("INDEXCHANGE", "1M-value series", f"=INDEXCHANGE({S}B:B;12)", "A1:A1048576"),
    ("INDEXREBASE", "dates, 1M values", f"=INDEXREBASE({S}A:A;{S}B:B;DATE(2021;1;1))", "A1:A1048576"),
    ("PRICEADJUST", "1M prices, 1M-row table", f"=PRICEADJUST({S}B:B;{S}A:A;DATE(2029;12;31);{S}A:A;{S}B:B)",
     "A1:A1048576"),
]


def bench_full(office, a):
    n = SHEET_ROWS - 1
    rng = np.random.default_rng(5)
    t = np.arange(n) * 120 // n
    first = np.array([serial_of(2020 + k // 12, k % 12 + 1, 1) for k in range(120)])
    serial = first[t] + np.arange(n) % 28
    price = np.exp(12 + 0.003 * t + rng.normal(0, 0.2, n))
    ids = rng.integers(0, 300000, n).astype(float)
    size = rng.uniform(40, 240, n)
    district = [f"district {chr(65 + k)}" for k in range(7)]
    dk = rng.integers(0, 7, n)
    doc = office.new_calc()
    doc.Sheets.getByIndex(0).Name = "Sales"
    s = doc.Sheets.getByName("Sales")
    t0 = time.perf_counter()
    s.getCellRangeByName("A1:E1").setDataArray((("date", "price", "id", "size", "district"),))
    step = 200000
    for lo in range(0, n, step):
        hi = min(n, lo + step)
        s.getCellRangeByName(f"A{lo + 2}:E{hi + 1}").setDataArray(
            tuple((float(serial[k]), float(price[k]), float(ids[k]), float(size[k]), district[dk[k]])
                  for k in range(lo, hi)))
    doc.Sheets.insertNewByName("Out", 1)
    out = doc.Sheets.getByName("Out")
    wanted = set(a.functions.split(",")) if a.functions else None
    print(f"Full sheet: {n} sales in A:E (filled in {time.perf_counter() - t0:.1f} s); median of "
          f"{a.full_runs} recalculations", flush=True)
    print(f"  {'function':16s} | {'case':34s} | {'seconds':>8s} | first cell", flush=True)
    worst = (0.0, "")
    for name, case, formula, ref in FULL_CASES:
        if wanted and name not in wanted:
            continue
        med, cells = timed_array(doc, out, ref, formula, a.full_runs, read="A1:A1")
        if med > worst[0]:
            worst = (med, f"{name} ({case})")
        first_cell = cell_text(cells[0][0])
        print(f"  {name:16s} | {case:34s} | {med:8.3f} | {first_cell[:160]}", flush=True)
    doc.close(True)
    print(f"  worst case over {SHEET_ROWS} rows: {worst[0]:.3f} s, {worst[1]}", flush=True)


# --- span -------------------------------------------------------------------------------------
# One mistyped date (issue 10): 1,000 sales over 60 months from 2023-01, 12 strata, the last
# date typed as 400000 (year 2995).
SPAN_CASES = [
    ("INDEXMIX", "chain, bootstrap 200 reps", '=INDEXMIX($Sales.A1:A1000;$Sales.B1:B1000;$Sales.C1:C1000;;;;"chain=1;bands=bootstrap")'),
    ("INDEXMIX", "chain, bootstrap 1000 reps",
     '=INDEXMIX($Sales.A1:A1000;$Sales.B1:B1000;$Sales.C1:C1000;;;;"chain=1;bands=bootstrap;reps=1000")'),
    ("INDEXMIX", "chain, bootstrap 10000 reps",
     '=INDEXMIX($Sales.A1:A1000;$Sales.B1:B1000;$Sales.C1:C1000;;;;"chain=1;bands=bootstrap;reps=10000")'),
    ("INDEXHEDONIC", "smooth=trend", '=INDEXHEDONIC($Sales.A1:A1000;$Sales.B1:B1000;$Sales.D1:D1000;;;;"smooth=trend")'),
    ("INDEXHEDONIC", "window=12", '=INDEXHEDONIC($Sales.A1:A1000;$Sales.B1:B1000;$Sales.D1:D1000;;;;"window=12")'),
    ("CHAINRS", "default", "=CHAINRS($Sales.E1:E1000;$Sales.A1:A1000;$Sales.B1:B1000)"),
    ("INDEXMEDIAN", "default", "=INDEXMEDIAN($Sales.A1:A1000;$Sales.B1:B1000)"),
]


def bench_span(office, a):
    rng = np.random.default_rng(10)
    i = np.arange(1000)
    t = i * 60 // 1000
    serial = [serial_of(2023 + k // 12, k % 12 + 1, 1) + float(j % 28) for j, k in zip(i, t)]
    serial[-1] = 400000.0
    price = np.exp(12 + 0.004 * t + rng.normal(0, 0.2, 1000))
    size = rng.uniform(40, 240, 1000)
    doc = office.new_calc()
    doc.Sheets.getByIndex(0).Name = "Sales"
    s = doc.Sheets.getByName("Sales")
    s.getCellRangeByName("A1:E1000").setDataArray(tuple(
        (serial[k], float(price[k]), f"s{k % 12}", float(size[k]), f"P{k % 400}") for k in range(1000)))
    doc.Sheets.insertNewByName("Out", 1)
    out = doc.Sheets.getByName("Out")
    print("One date typed as 400000 (year 2995) among 1,000 sales of 2023-2027; median of "
          f"{a.full_runs} recalculations", flush=True)
    for name, case, formula in SPAN_CASES:
        med, cells = timed_array(doc, out, "A1:E60", formula, a.full_runs)
        print(f"  {name:16s} | {case:34s} | {med:8.3f} | {cell_text(cells[0][0])[:200]}", flush=True)
    doc.close(True)


def main():
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--oxt", required=True, help="path to lintel.oxt")
    p.add_argument("--only", nargs="*", default=["hedonic", "backtest", "columns", "blank", "full", "span"],
                   help="sections to run (default: all)")
    p.add_argument("--runs", type=int, default=5)
    p.add_argument("--full-runs", type=int, default=3)
    p.add_argument("--rows", type=int, default=35000)
    p.add_argument("--months", type=int, default=60)
    p.add_argument("--seed", type=int, default=35000)
    p.add_argument("--functions", default="", help="columns, full: only these functions (comma list)")
    p.add_argument("--blank-rows", default="65536,131072,262144,1048576",
                   help="blank: the array heights n (comma list)")
    a = p.parse_args()
    with Office(os.path.abspath(a.oxt)) as office:
        for section in a.only:
            {"hedonic": bench_hedonic, "backtest": bench_backtest, "columns": bench_columns, "blank": bench_blank,
             "full": bench_full, "span": bench_span}[section](office, a)
        alive = office.alive()
    print(f"office alive: {alive}")


if __name__ == "__main__":
    main()
