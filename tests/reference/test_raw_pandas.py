"""INDEXMEAN / INDEXMEDIAN core against pandas groupby (python3-pandas, scipy.stats.trim_mean
from python3-scipy) on generated data.

Generating model (test data, not the demo): 4,000 sales with dates uniform over 2019-01-01 ..
2023-12-31 minus an empty March 2021, log-normal prices ln p = 12.5 + 0.004 * month + N(0, 0.3^2),
5 % of rows excluded by a random include mask, a few rows with blank or non-positive prices.
"""
import numpy as np
import pandas as pd
from scipy import stats as sps

from refcommon import Checks, parse_args, run_refcli, serial_from_timestamp

args = parse_args()
checks = Checks("raw index vs pandas")
rng = np.random.default_rng(20261201)

n = 4000
days = rng.integers(0, (pd.Timestamp("2023-12-31") - pd.Timestamp("2019-01-01")).days + 1, n)
dates = pd.Timestamp("2019-01-01") + pd.to_timedelta(days, unit="D")
keep = ~((dates.year == 2021) & (dates.month == 3))
dates = dates[keep]
n = len(dates)
months = (dates.year - 2019) * 12 + dates.month - 1
price = np.exp(12.5 + 0.004 * np.asarray(months) + rng.normal(0, 0.3, n))
price[rng.choice(n, 7, replace=False)] = np.nan
price[rng.choice(n, 3, replace=False)] = -5.0
include = (rng.random(n) > 0.05).astype(int)
frame = pd.DataFrame({"date": serial_from_timestamp(dates) + 0.5, "price": price, "include": include})

usable = frame[np.isfinite(frame.price) & (frame.price > 0) & (frame.include == 1)].copy()


def pandas_index(freq, stat, base_period=None, trim=0.0, minsales=1):
    ts = pd.Timestamp("1899-12-30") + pd.to_timedelta(usable.date.astype(float).values, unit="D")
    period = pd.PeriodIndex(ts, freq={"M": "M", "Q": "Q", "Y": "Y"}[freq])
    g = usable.price.groupby(period.values)
    if stat == "median":
        level = g.median()
    elif trim > 0:
        level = g.apply(lambda v: sps.trim_mean(v, trim))
    else:
        level = g.mean()
    counts = g.size()
    full = pd.period_range(period.min(), period.max(), freq=period.freq)
    level = level.reindex(full)
    counts = counts.reindex(full).fillna(0)
    level[counts < minsales] = np.nan
    base = full[0] if base_period is None else pd.Period(base_period, freq=period.freq)
    index = 100 * level / level[base]
    starts = serial_from_timestamp(full.to_timestamp(how="start"))
    return starts.values, index.values, counts.values


for freq in ["M", "Q", "Y"]:
    for stat in ["mean", "median"]:
        got = run_refcli(args.refcli, f"raw_{stat}", frame, freq=freq)
        starts, index, counts = pandas_index(freq, stat)
        checks.close(f"{stat} {freq} period starts", got.period, starts, rel=0, source="pandas period_range")
        checks.close(f"{stat} {freq} index", got["index"], index, rel=1e-12, source=f"pandas groupby().{stat}()")
        checks.close(f"{stat} {freq} sales counts", got.sales, counts, rel=0, source="pandas groupby().size()")

# The empty month stays as a row with no value and 0 sales.
got = run_refcli(args.refcli, "raw_median", frame, freq="M")
row = got[got.period == float(serial_from_timestamp(pd.Timestamp("2021-03-01")))]
checks.true("empty month kept as a row", len(row) == 1 and np.isnan(row["index"].iloc[0]) and row.sales.iloc[0] == 0)

# Base period in the middle, trimming and minsales.
base_serial = float(serial_from_timestamp(pd.Timestamp("2022-06-15")))
got = run_refcli(args.refcli, "raw_mean", frame, freq="Q", base=base_serial, trim=0.1)
_, index, _ = pandas_index("Q", "mean", base_period="2022Q2", trim=0.1)
checks.close("trimmed mean 10% quarterly, base 2022Q2", got["index"], index, rel=1e-12,
             source="scipy.stats.trim_mean per pandas group")
got = run_refcli(args.refcli, "raw_median", frame, freq="M", minsales=70)
_, index, _ = pandas_index("M", "median", minsales=70)
# The first period may lack a value under minsales 70: the default base is then the first
# period with a value, as the docs say.
first = np.argmax(np.isfinite(index))
checks.close("median monthly, minsales 70", got["index"], 100 * index / index[first], rel=1e-12,
             source="pandas groupby().median() with counts < 70 masked")

# Bands: the mean's t-interval against scipy.stats.t.interval; the median's order-statistic
# interval against the binomial quantile rule computed with scipy.stats.binom.
got = run_refcli(args.refcli, "raw_mean", frame, freq="Y", level=0.9)
ts = pd.Timestamp("1899-12-30") + pd.to_timedelta(usable.date.astype(float).values, unit="D")
years = ts.year
base_mean = usable.price[years == years.min()].mean()
lo, hi = [], []
for y in sorted(set(years)):
    v = usable.price[years == y].values
    a, b = sps.t.interval(0.9, len(v) - 1, loc=v.mean(), scale=sps.sem(v))
    lo.append(100 * a / base_mean)
    hi.append(100 * b / base_mean)
checks.close("mean band (t, 90%) lower", got.lower, lo, rel=1e-10, source="scipy.stats.t.interval")
checks.close("mean band (t, 90%) upper", got.upper, hi, rel=1e-10, source="scipy.stats.t.interval")

got = run_refcli(args.refcli, "raw_median", frame, freq="Y")
base_median = usable.price[years == years.min()].median()
lo, hi = [], []
for y in sorted(set(years)):
    v = np.sort(usable.price[years == y].values)
    m = len(v)
    # Largest j with P(B <= j-1) <= 0.025, B ~ Binomial(m, 1/2): j - 1 = binom.ppf(0.025) - 1
    # unless the cdf at the ppf is exactly 0.025.
    j = int(sps.binom.ppf(0.025, m, 0.5))
    if sps.binom.cdf(j, m, 0.5) <= 0.025:
        j += 1
    lo.append(100 * v[j - 1] / base_median)
    hi.append(100 * v[m - j] / base_median)
checks.close("median band (order statistics, 95%) lower", got.lower, lo, rel=1e-12, source="scipy.stats.binom")
checks.close("median band (order statistics, 95%) upper", got.upper, hi, rel=1e-12, source="scipy.stats.binom")

checks.finish()
