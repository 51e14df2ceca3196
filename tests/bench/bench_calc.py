"""Speed of INDEXHEDONIC in a real headless Calc (a measurement, not a test).

    /usr/bin/python3 tests/bench/bench_calc.py --oxt build/lintel.oxt

Starts the office with scripts/lintel_office.py, writes generated sales to a sheet, sets one
INDEXHEDONIC array formula and prints the median time of `--runs` full recalculations
(doc.calculateAll(), which includes handing the ranges to the add-in and the result back).
Target: under 0.5 s for 35,000 sales with about 12 characteristic terms.

Generated market (not the demo): `--rows` sales spread evenly over `--months` months from
2019-01 (day 1 + i mod 28); per sale, from numpy's default_rng(`--seed`):
  size ~ U(40, 240) m^2 (taken in logs), rooms ~ U{1..5}, bathrooms ~ U{1..3},
  age ~ U{0..99}, lot ~ U(100, 1000) m^2, garage ~ Bernoulli(0.4),
  district ~ U{"district A" .. "district G"} (text: 6 dummy terms);
  ln price = 11 + 0.003 t + 0.7 ln size + 0.04 rooms + 0.06 bathrooms - 0.003 age
             + 0.00001 lot + 0.05 garage + c_district + N(0, 0.2^2),
  c = (0, 0.1, -0.1, 0.2, 0.05, -0.15, 0.3).
Terms: log(size), rooms, bathrooms, age, lot, garage and 6 district dummies = 12.
"""
import argparse
import os
import statistics
import sys
import time

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
from lintel_office import Office, sheet_values  # noqa: E402


def market(rows, months, seed):
    rng = np.random.default_rng(seed)
    i = np.arange(rows)
    t = i * months // rows
    year, month = 2019 + t // 12, t % 12 + 1
    day = 1 + i % 28
    # Date serials (day 0 = 1899-12-30) without pandas: days from 1899-12-30 to year-month-day.
    serial = (np.array([np.datetime64(f"{y:04d}-{m:02d}-01") for y, m in zip(year, month)])
              - np.datetime64("1899-12-30")).astype(float) + day - 1
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
    data = [header] + [
        (float(serial[k]), float(np.exp(lnp[k])), float(size[k]), float(rooms[k]), float(bath[k]),
         float(age[k]), float(lot[k]), float(garage[k]), district[k]) for k in range(rows)]
    return data


def main():
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--oxt", required=True, help="path to lintel.oxt")
    p.add_argument("--rows", type=int, default=35000)
    p.add_argument("--months", type=int, default=60)
    p.add_argument("--runs", type=int, default=5)
    p.add_argument("--seed", type=int, default=35000)
    p.add_argument("--options", default="header=1; log=1",
                   help="the options text of the formula (default: %(default)s)")
    a = p.parse_args()

    data = market(a.rows, a.months, a.seed)
    n = len(data)
    with Office(os.path.abspath(a.oxt)) as office:
        doc = office.new_calc()
        sheet = doc.Sheets.getByIndex(0)
        sheet.getCellRangeByName(f"A1:I{n}").setDataArray(data)
        out = f"K1:O{a.months}"
        formula = f'=INDEXHEDONIC(A1:A{n};B1:B{n};C1:I{n};;;;"{a.options}")'
        sheet.getCellRangeByName(out).setArrayFormula(formula)
        doc.calculateAll()
        cells = sheet_values(sheet, out)
        if not isinstance(cells[0][1], float):
            raise SystemExit(f"the formula did not give an index: {cells[0][:2]!r}")
        times = []
        for _ in range(a.runs):
            t0 = time.perf_counter()
            doc.calculateAll()
            times.append(time.perf_counter() - t0)
        check = sheet_values(sheet, out)
        if check != cells:
            raise SystemExit("the recalculated table differs from the first one")
        doc.close(True)
        alive = office.alive()
    med = statistics.median(times)
    print(f"INDEXHEDONIC in Calc: {a.rows} sales, {a.months} months, 12 characteristic terms "
          f"({a.options}); recalculation (calculateAll) over {a.runs} runs: "
          f"median {med:.3f} s (runs: {', '.join(f'{x:.3f}' for x in times)}); "
          f"target < 0.5 s: {'met' if med < 0.5 else 'NOT met'}; "
          f"last index {cells[-1][1]:.2f}; office alive: {alive}")


if __name__ == "__main__":
    main()
