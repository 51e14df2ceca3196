"""The demo market: an invented town's closed sales, generated from the model below.

Everything here is made up (the town, its districts, the properties, every sale); it is for
the demo and the report screenshots only, never for checks of the estimators.

Model (all logs natural; t = months since 2015-01):
- Stock: 4,200 properties in four invented districts (Varnholt, Quessenby, Brindle Flats,
  Tallowick), each with a type (detached, semi-detached, terraced, flat) drawn with
  district-specific shares, a floor area (m2, log-normal around 165 / 120 / 95 / 68 by type,
  sd 0.22), a lot (m2; flats 0, others log-normal around 700 / 420 / 260, sd 0.3), bedrooms
  (floor area / 32, rounded, 1..6) and a build year (1920..2012). From 2020-06, 600 new flats
  in Tallowick (built 2020-2021) come on the market: the sales mix shifts towards cheaper
  new flats, which pulls the raw mean and median down while like-for-like prices rise.
- Market level m(t) = 0.0042 t + 0.09 sin(2 pi (t - 30) / 100) + 0.018 cos(2 pi (month - 7) / 12):
  steady growth, a slow cycle (a peak near 2022-02, a trough near 2026) and a summer high.
- Price of property i sold in month t:
  ln p = 9.6 + m(t) + district premium (0.32, 0.12, 0.00, -0.18) + 0.80 ln(area)
         + 0.06 ln(1 + lot) + type effect (detached 0.10, semi 0.04, terraced 0, flat -0.06)
         - 0.0025 age + u_i + e, with a lasting property effect u_i ~ N(0, 0.10^2) and a
         sale effect e ~ N(0, 0.07^2); prices rounded to 500.
- Sales: about 95 a month (Poisson, more in spring and summer, more near the cycle's peak);
  each sale picks a property at random (new flats twice as likely in their first year).
  4 % of sales follow a renovation (flag `renovated` = 1; u_i rises by 0.15 from then on).
- Data problems on purpose, to show rows dropped with reasons: 6 prices keyed with an extra
  zero, 4 blank prices, 3 sales dated as text "unknown".
"""
import numpy as np
import pandas as pd

DISTRICTS = ["Varnholt", "Quessenby", "Brindle Flats", "Tallowick"]
PREMIUM = np.array([0.32, 0.12, 0.00, -0.18])
TYPES = ["detached", "semi-detached", "terraced", "flat"]
TYPE_EFFECT = np.array([0.10, 0.04, 0.0, -0.06])
TYPE_SHARES = np.array([[0.45, 0.30, 0.15, 0.10],
                        [0.25, 0.30, 0.30, 0.15],
                        [0.10, 0.25, 0.40, 0.25],
                        [0.05, 0.15, 0.40, 0.40]])
AREA = np.array([165.0, 120.0, 95.0, 68.0])
LOT = np.array([700.0, 420.0, 260.0, 0.0])
EPOCH = pd.Timestamp("1899-12-30")


def market_level(t):
    month = t % 12 + 1
    return 0.0042 * t + 0.09 * np.sin(2 * np.pi * (t - 30) / 100) + 0.018 * np.cos(2 * np.pi * (month - 7) / 12)


def generate(seed=2015, months=132):
    rng = np.random.default_rng(seed)
    # --- the stock ---
    n_old, n_new = 4200, 600
    district = rng.choice(4, n_old, p=[0.22, 0.28, 0.30, 0.20])
    ptype = np.array([rng.choice(4, p=TYPE_SHARES[d]) for d in district])
    built = rng.integers(1920, 2013, n_old)
    district = np.concatenate([district, np.full(n_new, 3)])
    ptype = np.concatenate([ptype, np.full(n_new, 3)])
    built = np.concatenate([built, rng.integers(2020, 2022, n_new)])
    n = n_old + n_new
    area = np.round(AREA[ptype] * np.exp(rng.normal(0, 0.22, n)), 0)
    area[n_old:] = np.round(58 * np.exp(rng.normal(0, 0.15, n_new)), 0)
    lot = np.where(ptype == 3, 0.0, np.round(np.maximum(LOT[ptype], 1) * np.exp(rng.normal(0, 0.3, n)), 0))
    bedrooms = np.clip(np.round(area / 32), 1, 6).astype(int)
    effect = rng.normal(0, 0.10, n)
    available = np.concatenate([np.zeros(n_old, int), np.full(n_new, 65)])  # 2020-06
    ids = np.array([f"P{i + 1:05d}" for i in range(n)])

    rows = []
    for t in range(months):
        month = t % 12 + 1
        lam = 95 * (1 + 0.15 * np.sin(2 * np.pi * (month - 3) / 12)) * (1 + 0.25 * np.sin(2 * np.pi * (t - 30) / 100))
        k = rng.poisson(lam)
        weight = np.where(available <= t, 1.0, 0.0)
        weight[(available <= t) & (available > t - 12) & (available > 0)] = 2.0
        chosen = rng.choice(n, k, replace=False, p=weight / weight.sum())
        year = 2015 + t // 12
        days_in = pd.Period(f"{year}-{month:02d}").days_in_month
        for i in chosen:
            renovated = rng.random() < 0.04
            if renovated:
                effect[i] += 0.15
            age = max(year - built[i], 0)
            lnp = (9.6 + market_level(t) + PREMIUM[district[i]] + 0.80 * np.log(area[i])
                   + 0.06 * np.log1p(lot[i]) + TYPE_EFFECT[ptype[i]] - 0.0025 * age
                   + effect[i] + rng.normal(0, 0.07))
            day = int(rng.integers(1, days_in + 1))
            date = pd.Timestamp(year=year, month=month, day=day)
            rows.append((float((date - EPOCH).days), float(np.round(np.exp(lnp) / 500) * 500), ids[i],
                         DISTRICTS[district[i]], TYPES[ptype[i]], float(area[i]), float(lot[i]),
                         int(bedrooms[i]), int(age), int(renovated)))
    df = pd.DataFrame(rows, columns=["date", "price", "property_id", "district", "type", "floor_area",
                                     "lot", "bedrooms", "age", "renovated"])
    df = df.sort_values(["date", "property_id"], kind="stable").reset_index(drop=True)
    df["date"] = df["date"].astype(object)
    df["price"] = df["price"].astype(object)
    bad = rng.choice(len(df), 13, replace=False)
    for j in bad[:6]:
        df.at[j, "price"] = float(df.at[j, "price"]) * 10
    for j in bad[6:10]:
        df.at[j, "price"] = ""
    for j in bad[10:]:
        df.at[j, "date"] = "unknown"
    return df


if __name__ == "__main__":
    d = generate()
    print(len(d), "sales;", d.head())
