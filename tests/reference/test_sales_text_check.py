"""The sales check (native/core/sales_check.hpp): duplicates, conflicting prices and the
price-outlier rule against a pandas/numpy groupby computation on a generated sales table.

Generating model (test data, invented): 3 segments of about 40 sales a month and one thin
segment of 5 a month, 24 months from 2022-01; ln price = 12.4 + segment effect (0, 0.3, -0.2,
0.1) + 0.006 * month + N(0, 0.25^2); ids H00001...; segment labels written with random
padding, case and no-break spaces; dates as day/month/year text for half of the rows and as
date cells (serial numbers) for the rest; prices as numbers, "350,000" or "$350,000" text.
Planted: 15 prices times 10 and 5 divided by 10 (keying errors), 20 rows repeated later with
the id in another case (duplicates), 8 rows repeated with the price 5 % higher (conflicts),
and one extra group where 7 of 12 prices are equal (MAD = 0).

Reference: pandas duplicated() / groupby().nunique() for duplicates and conflicts; per
period-and-segment group of at least 10 used sales, numpy median and MAD of the log prices
and z = 0.6745 (x - median) / MAD, |z| > 3.5 (Iglewicz & Hoaglin 1993, as quoted in the
header of price_outliers.hpp), or (x - median) / (1.253314 MeanAD) when MAD = 0.
"""
import numpy as np
import pandas as pd

from refcommon import Checks, parse_args, run_refcli, serial_from_timestamp

args = parse_args()
checks = Checks("sales check vs pandas groupby")
rng = np.random.default_rng(3002)

SEGMENTS = {"Ellenford": (0.0, 40), "Brookmere": (0.3, 40), "Ashgrove": (-0.2, 40), "Kestrel Row": (0.1, 5)}
rows = []
for month in range(24):
    for seg, (effect, per_month) in SEGMENTS.items():
        for _ in range(per_month):
            day = pd.Timestamp(2022 + month // 12, month % 12 + 1, int(rng.integers(1, 29)))
            price = float(np.round(np.exp(12.4 + effect + 0.006 * month + rng.normal(0, 0.25)), -2))
            rows.append({"day": day, "price": price, "segment": seg})
# One group with MAD = 0: 12 sales in 2022-01 of a fifth segment, 7 at one price.
for k, p in enumerate([250000] * 7 + [240000, 262000, 255000, 231000, 900000]):
    rows.append({"day": pd.Timestamp(2022, 1, 3 + k), "price": float(p), "segment": "Harwick"})
table = pd.DataFrame(rows)
table["id"] = [f"H{i:05d}" for i in range(1, len(table) + 1)]
n0 = len(table)

# Keying errors.
planted_high = rng.choice(n0 - 12, 15, replace=False)
table.loc[planted_high, "price"] *= 10
rest = np.setdiff1d(np.arange(n0 - 12), planted_high)
planted_low = rng.choice(rest, 5, replace=False)
table.loc[planted_low, "price"] = np.round(table.loc[planted_low, "price"] / 10, -1)
# Duplicates (same id in another case, same day and price) and conflicts (price 5 % higher).
dups = table.iloc[rng.choice(rest, 20, replace=False)].copy()
dups["id"] = dups["id"].str.lower() + " "
conf = table.iloc[rng.choice(rest, 8, replace=False)].copy()
conf["price"] = np.round(conf["price"] * 1.05, -2)
table = pd.concat([table, dups, conf], ignore_index=True)
table = table.iloc[rng.permutation(len(table))].reset_index(drop=True)


def write_date(d):
    if rng.random() < 0.5:
        return f"{d.day:02d}/{d.month:02d}/{d.year}"
    return "=" + repr(float(serial_from_timestamp(d)))


def write_price(p):
    r = rng.random()
    if r < 0.6:
        return "=" + repr(p)
    s = f"{p:,.0f}" if p == int(p) else f"{p:,.2f}"
    return s if r < 0.8 else "$" + s


def write_label(s):
    s = rng.choice([s, s.lower(), s.upper()], p=[0.8, 0.1, 0.1])
    return rng.choice(["", " ", "\u00a0"]) + s + rng.choice(["", " ", "  "])


frame = pd.DataFrame({
    "date": [write_date(d) for d in table.day],
    "price": [write_price(p) for p in table.price],
    "id": list(table.id),
    "segment": [write_label(s) for s in table.segment],
})
opts = dict(order="DMY", freq="M", year=2030)
got_rows = run_refcli(args.refcli, "sales_rows", frame, **opts)
got_list = run_refcli(args.refcli, "sales_check", frame, **opts)

# Reference with pandas.
ref = table.copy()
ref["idk"] = ref.id.str.strip().str.casefold()
ref["segk"] = ref.segment.str.strip().str.casefold()
ref["serial"] = serial_from_timestamp(ref.day).values
conflict = ref.groupby(["idk", "serial"]).price.transform("nunique") > 1
duplicate = ref.duplicated(["idk", "serial", "price"], keep="first") & ~conflict
used = ~conflict & ~duplicate
ref["period"] = ref.day.dt.to_period("M").astype(str)
z = pd.Series(np.nan, index=ref.index)
mad_zero_groups = 0
for key, g in ref[used].groupby(["period", "segk"]):
    if len(g) < 10:
        continue
    x = np.log(g.price.values)
    med = np.median(x)
    mad = np.median(np.abs(x - med))
    if mad > 0:
        z[g.index] = 0.6745 * (x - med) / mad
    else:
        mad_zero_groups += 1
        z[g.index] = (x - med) / (1.253314 * np.mean(np.abs(x - med)))
flag = z.abs() > 3.5

checks.close("dates read (day/month/year text and date cells)", got_rows.date, ref.serial, rel=0,
             source="pandas Timestamp - 1899-12-30")
checks.close("prices read (numbers and 350,000 / $350,000 text)", got_rows.price, ref.price, rel=1e-15,
             source="the generated prices")
checks.close("rows used (duplicates and conflicts dropped)", got_rows.used, used.astype(float), rel=0,
             source="pandas duplicated(keep='first'), groupby().nunique() > 1")
# abs 1e-12: z near 0 is a difference of two logs near 12.5 (cancellation).
checks.close("robust z-scores of the log prices per month and segment", got_rows.z, z, rel=1e-12, abs_=1e-12,
             source="numpy median / MAD per pandas group")
checks.true("the MAD = 0 group was met and used the MeanAD fallback", mad_zero_groups == 1,
            f"{mad_zero_groups} group(s)")

problem = {4 + 8: "duplicate", 13: "conflicting prices", 14: "price outlier"}
listed = {name: set(got_list.row[got_list.problem == code].astype(int) - 1) for code, name in problem.items()}
checks.true("duplicates listed = pandas duplicated()", listed["duplicate"] == set(np.flatnonzero(duplicate)),
            f"{len(listed['duplicate'])} rows")
checks.true("conflicting prices listed = both rows of each conflict", listed["conflicting prices"] ==
            set(np.flatnonzero(conflict)) and len(listed["conflicting prices"]) == 16,
            f"{len(listed['conflicting prices'])} rows")
checks.true("outliers listed = |z| > 3.5 in pandas", listed["price outlier"] == set(np.flatnonzero(flag)),
            f"{len(listed['price outlier'])} rows")
outl = got_list[got_list.problem == 14].sort_values("row")
checks.close("z of the listed outliers", outl.z.values, z.values[outl.row.values.astype(int) - 1], rel=1e-12,
             source="numpy")
# Every keying error planted in a tested group is found (factor 10 is ln 10 = 2.3 away).
ids_high = set(table.index[table.id.isin(set(f"H{i + 1:05d}" for i in planted_high)) & used & z.notna()])
ids_low = set(table.index[table.id.isin(set(f"H{i + 1:05d}" for i in planted_low)) & used & z.notna()])
checks.true("every planted x10 and /10 price in a tested group is listed",
            (ids_high | ids_low) <= listed["price outlier"] and len(ids_high | ids_low) >= 15,
            f"{len(ids_high | ids_low)} planted in tested groups")
# Nothing but planted problems and the outliers: no date, price or label problem is listed.
others = set(got_list.problem.astype(int)) - set(problem)
checks.true("no other problem listed", not others, f"other codes {sorted(others)}")
# Thin segment: never tested (5 a month < 10).
thin = (ref.segk == "kestrel row").values
checks.true("the thin segment's sales are not tested", bool(np.all(np.isnan(got_rows.z.values[thin]))),
            f"{thin.sum()} rows")

checks.finish()
