"""Real-Calc tests of the analytics functions: INDEXMIX, INDEXVOLATILITY, INDEXTREND, INDEXSNR,
INDEXLEADLAG, INDEXTURNS, INDEXSEASONAL, INDEXCOMPARE. Install lintel.oxt into a throwaway
profile, start headless soffice, write generated data, set array formulas, recalculate, and
compare every output cell with a reference computed here on the same data:

- INDEXMIX: a direct pandas computation of P_t = sum_h w_h m_h^t / m_h^0 (Eurostat RPPI
  Handbook 2013, ch. 4; fixed base, base-period sales-count weights, re-weighting over the
  strata priced); the other options (mean, value weights, chain, carry, bootstrap bands) against
  the core run through lintel_refcli, which reference.test_analytics_mix_pandas checks against
  pandas and a numpy bootstrap;
- INDEXTREND: statsmodels' hpfilter; with gaps, a dense numpy solve of the weighted HP
  objective (W + lambda K'K) tau = W y (docs/methods/analytics.md);
- INDEXVOLATILITY: numpy / pandas sample standard deviation of 100 ln(I_t / I_{t-lag});
- INDEXSNR: its definition (docs/methods/analytics.md) evaluated with statsmodels' hpfilter;
- INDEXLEADLAG: numpy corrcoef of the complete pairs of year-over-year changes at each lag;
- INDEXSEASONAL: statsmodels' seasonal_decompose(model="multiplicative");
- INDEXTURNS: the known peaks and troughs of a sine wave; the option mapping (window,
  minphase, mincycle, ends, freq) against the core through lintel_refcli (the turns core is
  checked against constructed series in tests/core/test_analytics_turns.cpp);
- INDEXCOMPARE: each column's figures computed as above.

Generating models (test data, seeds stated in the code):
- sales (seed 11): 1,500 sales, dates uniform over 2022-01-01 .. 2023-12-31; region N / S / E
  with probability 0.45 / 0.4 / 0.15; type flat / house with P(house) rising from 0.3 to 0.6
  over the two years (shifting mix); ln price = 12 + (0, 0.2, -0.15)[region] + 0.35 [house]
  + 0.004 * month + N(0, 0.2^2);
- monthly index series, 2014-01 .. 2023-12 (120 months, seed 5):
  g_t = 0.003 t + 0.05 sin(2 pi t / 60) (trend and cycle), s_t = 0.02 cos(2 pi (t mod 12) / 12)
  (season), A_t = 100 exp(g_t + s_t + e_t), B_t = 100 exp(g_{t-3} + u_t) (B follows A's
  trend 3 months later, no season), e, u ~ N(0, 0.005^2); C = A with rows 20, 21 and 57 blank
  and row 90 the text "n/a";
- turning points: S_t = 100 + 8 sin(2 pi t / 48), monthly 2012-01 .. 2023-12 (144 months):
  peaks at t = 12, 60, 108, troughs at t = 36, 84, 132 (24 months apart).
"""
import json
import math
import os
import sys
import unittest

import numpy as np
import pandas as pd
from statsmodels.tsa.filters.hp_filter import hpfilter
from statsmodels.tsa.seasonal import seasonal_decompose

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "..", "scripts"))
sys.path.insert(0, os.path.join(HERE, "..", "reference"))
from lintel_office import SharedOffice, SheetCalls, sheet_values  # noqa: E402
from refcommon import run_refcli  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
GEN_JSON = os.environ.get("LINTEL_TABLE_JSON")
# The reference driver is built next to the tests (build/tests/lintel_refcli).
REFCLI = os.environ.get("LINTEL_REFCLI") or os.path.join(os.path.dirname(OXT or "."), "tests", "lintel_refcli")
EPOCH = pd.Timestamp("1899-12-30")
SNR_LAMBDA_M = 1 / (4 * (1 - math.cos(2 * math.pi / 24)) ** 2)  # two-year half gain, monthly

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


def serial(ts):
    return float((pd.Timestamp(ts) - EPOCH).days)


def month_starts(first, n):
    return [serial(p.to_timestamp()) for p in pd.period_range(first, periods=n, freq="M")]


def value(cell):
    """A cell as a float; the "no value" cell (empty text) as NaN."""
    if cell == "" or cell is None:
        return float("nan")
    assert isinstance(cell, float), cell
    return cell


def column(cells, j=0):
    return np.array([value(r[j]) for r in cells])


# ---- data -------------------------------------------------------------------------------
def make_sales(seed=11):
    rng = np.random.default_rng(seed)
    n = 1500
    start = pd.Timestamp("2022-01-01")
    dates = start + pd.to_timedelta(rng.integers(0, 730, n), unit="D")
    month = np.asarray((dates.year - 2022) * 12 + dates.month - 1)
    region = rng.choice(["N", "S", "E"], n, p=[0.45, 0.4, 0.15])
    house = rng.random(n) < 0.3 + 0.3 * month / 23
    reff = pd.Series(region).map({"N": 0.0, "S": 0.2, "E": -0.15}).to_numpy()
    price = np.round(np.exp(12 + reff + 0.35 * house + 0.004 * month + rng.normal(0, 0.2, n)))
    return pd.DataFrame({"date": np.asarray((dates - EPOCH).days, dtype=float), "price": price,
                         "region": region, "type": np.where(house, "house", "flat")})


def make_series(seed=5):
    rng = np.random.default_rng(seed)
    t = np.arange(120)
    g = lambda k: 0.003 * k + 0.05 * np.sin(2 * np.pi * k / 60)  # noqa: E731
    s = 0.02 * np.cos(2 * np.pi * (t % 12) / 12)
    a = 100 * np.exp(g(t) + s + rng.normal(0, 0.005, 120))
    b = 100 * np.exp(g(t - 3) + rng.normal(0, 0.005, 120))
    c = a.copy()
    c[[20, 21, 57, 90]] = np.nan
    return a, b, c


def pandas_mix(df, base_month=0):
    """Fixed-base stratified median index with base-period sales-count weights, re-weighted
    over the strata priced in each period; returns index and sales used per month."""
    ts = EPOCH + pd.to_timedelta(df.date, unit="D")
    d = df.assign(period=pd.PeriodIndex(ts, freq="M"), stratum=df.region + "|" + df.type)
    full = pd.period_range(d.period.min(), d.period.max(), freq="M")
    g = d.groupby(["stratum", "period"]).price
    med = g.median().unstack("period").reindex(columns=full)
    cnt = g.size().unstack("period").reindex(columns=full).fillna(0)
    b = full[base_month]
    w = cnt[b][med[b].notna()]
    w = w / w.sum()
    rel = med.loc[w.index].div(med.loc[w.index, b], axis=0)
    present = rel.notna()
    index = 100 * rel.mul(w, axis=0).sum() / present.mul(w, axis=0).sum()
    used = cnt.loc[w.index].where(present).sum()
    starts = [serial(p.to_timestamp()) for p in full]
    return np.array(starts), index.to_numpy(), used.to_numpy()


def hp_dense(y, lam):
    """The HP trend with gaps: minimise sum over observed (y - tau)^2 + lam sum (D2 tau)^2 over
    the span of the values; dense numpy solve of (W + lam K'K) tau = W y."""
    y = np.asarray(y, dtype=float)
    obs = np.where(np.isfinite(y))[0]
    lo, hi = obs[0], obs[-1]
    m = hi - lo + 1
    w = np.isfinite(y[lo:hi + 1]).astype(float)
    k = np.zeros((m - 2, m))
    for i in range(m - 2):
        k[i, i:i + 3] = [1, -2, 1]
    tau = np.linalg.solve(np.diag(w) + lam * k.T @ k, w * np.nan_to_num(y[lo:hi + 1]))
    out = np.full(len(y), np.nan)
    out[lo:hi + 1] = tau
    return out


def snr_reference(index, lam=SNR_LAMBDA_M):
    """SNR = mean (D tau)^2 / mean (D n)^2 over consecutive pairs, x = 100 ln I = tau + n."""
    x = 100 * np.log(np.asarray(index, dtype=float))
    if np.isfinite(x).all():
        cycle, trend = hpfilter(x, lamb=lam)
        cycle, trend = np.asarray(cycle), np.asarray(trend)
    else:
        trend = hp_dense(x, lam)
        cycle = x - trend
    ok = np.isfinite(x[1:]) & np.isfinite(x[:-1])
    dt = np.diff(trend)[ok]
    dn = np.diff(cycle)[ok]
    return {"snr": np.mean(dt ** 2) / np.mean(dn ** 2), "signal": math.sqrt(np.mean(dt ** 2)),
            "noise": math.sqrt(np.mean(dn ** 2)), "pairs": float(ok.sum())}


def volatility_reference(index, lag=1):
    r = 100 * np.log(pd.Series(index)).diff(lag)  # NaN where an end is missing
    return float(r.std(ddof=1))


def leadlag_reference(a, b, k=12, maxlag=12, minpairs=3):
    """corr(a_t, b_{t+L}) of k-period log changes over complete pairs, L = -maxlag .. maxlag."""
    ca = 100 * np.log(pd.Series(a)).diff(k).to_numpy()
    cb = 100 * np.log(pd.Series(b)).diff(k).to_numpy()
    rows = []
    n = len(ca)
    for lag in range(-maxlag, maxlag + 1):
        x = np.array([ca[t] for t in range(n) if 0 <= t + lag < n])
        y = np.array([cb[t + lag] for t in range(n) if 0 <= t + lag < n])
        ok = np.isfinite(x) & np.isfinite(y)
        corr = np.corrcoef(x[ok], y[ok])[0, 1] if ok.sum() >= minpairs else float("nan")
        rows.append((lag, corr, float(ok.sum())))
    return rows


def best_of(rows):
    best = None
    for lag, corr, _ in rows:
        if math.isnan(corr):
            continue
        if best is None or corr > best[1] or (corr == best[1] and abs(lag) < abs(best[0])):
            best = (lag, corr)
    return best


class Sheet(SheetCalls):

    def assertColumn(self, got, want, rel=1e-9, what=""):
        self.assertEqual(len(got), len(want), what)
        for i, (g, w) in enumerate(zip(got, want)):
            if math.isnan(w):
                self.assertTrue(math.isnan(g), f"{what} row {i}: {g} where no value is expected")
            else:
                self.assertFalse(math.isnan(g), f"{what} row {i}: no value where {w} is expected")
                self.assertAlmostEqual(g, w, delta=rel * max(abs(w), 1e-300), msg=f"{what} row {i}")


class MixTest(unittest.TestCase, Sheet):
    @classmethod
    def setUpClass(cls):
        cls.df = make_sales()
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        rows = [("date", "price", "region", "type")] + [
            (r.date, r.price, r.region, r.type) for r in cls.df.itertuples()]
        cls.n = len(rows)
        cls.sheet.getCellRangeByName(f"A1:D{cls.n}").setDataArray(rows)

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def test_fixed_base_median_against_pandas(self):
        n = self.n
        cells = self.array("F1:J25", f'=INDEXMIX(A1:A{n};B1:B{n};C1:D{n};;;;"header=1; titles=1")')
        self.assertEqual(cells[0], ["period", "index", "sales", "lower", "upper"])
        starts, index, used = pandas_mix(self.df)  # pandas groupby().median(), weights written out
        self.assertEqual(column(cells[1:], 0).tolist(), starts.tolist())
        self.assertColumn(column(cells[1:], 1), index, 1e-12, "index")
        self.assertEqual(column(cells[1:], 2).tolist(), used.tolist())
        self.assertEqual(cells[1][1], 100.0)
        for row in cells[1:]:
            self.assertEqual(row[3:], ["", ""], "no bands without bands=bootstrap")

    def test_options_against_core(self):
        n = self.n
        opts = "stat=mean; weights=value; chain=1; empty=carry; bands=bootstrap; reps=50; seed=3; level=0.9"
        cells = self.array("L1:P8", f'=INDEXMIX(A2:A{n};B2:B{n};C2:D{n};;"Q";DATE(2022;4;15);"{opts}")')
        want = run_refcli(REFCLI, "mix", self.df, strata="region|type", stat="mean", weights="value", chain=1,
                          empty="carry", bands="bootstrap", reps=50, seed=3, level=0.9, freq="Q",
                          base=serial("2022-04-15"))
        self.assertEqual(len(want), 8)
        for j, name in enumerate(["period", "index", "sales", "lower", "upper"]):
            self.assertColumn(column(cells, j), want[name].to_numpy(), 1e-12, name)
        self.assertEqual(cells[1][1], 100.0)  # 2022-Q2 is the base
        self.assertEqual(cells[1][3:], [100.0, 100.0])

    def test_notes_include_the_strata_counts(self):
        n = self.n
        cells = self.array("R1:V40", f'=INDEXMIX(A2:A{n};B2:B{n};C2:D{n};;"Y";;"notes=1; minsales=5")')
        notes = {r[0]: r[1] for r in cells[2:] if isinstance(r[0], str) and r[0]}
        self.assertEqual(notes["strata"], 6.0)
        self.assertEqual(notes["links"], 1.0)
        self.assertEqual(notes["rows used"], float(len(self.df)))
        self.assertEqual(cells[0][1], 100.0)

    def test_bad_input(self):
        n = self.n
        cases = {
            f"=INDEXMIX(A2:A{n};B2:B{n};C2:D10)": f"Lintel: dates has {n - 1} rows, strata has 9",
            f'=INDEXMIX(A2:A{n};B2:B{n};C2:C{n};;;;"weights=price")':
                'Lintel: option weights must be "sales", "value" or "all", got "price"',
            f'=INDEXMIX(A2:A{n};B2:B{n};C2:C{n};;;;"bands=bootstrap; reps=5")':
                "Lintel: reps must lie between 20 and 10000, got 5",
            f'=INDEXMIX(A2:A{n};B2:B{n};C2:C{n};;;DATE(2030;1;1))': "Lintel: base 2030-01-01 lies outside the data",
            f'=INDEXMIX(A2:A{n};B2:B{n};C2:C{n};;;;"colour=red")': 'Lintel: unknown option "colour" for INDEXMIX',
        }
        row = 50
        for formula, want in cases.items():
            got = self.array(f"F{row}:J{row}", formula)[0][0]
            self.assertTrue(isinstance(got, str) and got.startswith(want), f"{formula}: {got!r}")
            row += 1
        self.assertTrue(office.alive())


class SeriesTest(unittest.TestCase, Sheet):
    @classmethod
    def setUpClass(cls):
        cls.a, cls.b, cls.c = make_series()
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        cls.periods = month_starts("2014-01", 120)
        rows = [("period", "A", "B", "C")]
        for i in range(120):
            c = cls.c[i]
            rows.append((cls.periods[i], float(cls.a[i]), float(cls.b[i]),
                         "n/a" if i == 90 else ("" if math.isnan(c) else float(c))))
        cls.sheet.getCellRangeByName("A1:D121").setDataArray(rows)
        t = np.arange(144)
        cls.sine = 100 + 8 * np.sin(2 * np.pi * t / 48)
        cls.sine_periods = month_starts("2012-01", 144)
        cls.sheet.getCellRangeByName("X1:Y144").setDataArray(
            [(p, float(v)) for p, v in zip(cls.sine_periods, cls.sine)])

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    # -- INDEXTREND
    def test_trend_against_statsmodels_and_dense_solve(self):
        got = column(self.array("F2:F121", "=INDEXTREND(B2:B121)"))
        _, trend = hpfilter(self.a, lamb=129600)  # statsmodels, Ravn-Uhlig monthly lambda
        self.assertColumn(got, np.asarray(trend), 1e-9, "trend")
        got = column(self.array("G2:G121", '=INDEXTREND(B2:B121;"Q";14400)'))
        _, trend = hpfilter(self.a, lamb=14400)  # lambda given: freq only sets the default
        self.assertColumn(got, np.asarray(trend), 1e-9, "trend lambda 14400")
        got = column(self.array("H2:H121", "=INDEXTREND(D2:D121)"))
        self.assertColumn(got, hp_dense(self.c, 129600), 1e-8, "trend with gaps")

    # -- INDEXVOLATILITY
    def test_volatility_against_numpy(self):
        want = np.std(100 * np.diff(np.log(self.a)), ddof=1)  # numpy, n - 1
        self.assertAlmostEqual(self.formula("J2", "=INDEXVOLATILITY(B2:B121)"), want, delta=1e-12 * want)
        want12 = np.std(100 * (np.log(self.a[12:]) - np.log(self.a[:-12])), ddof=1)
        self.assertAlmostEqual(self.formula("J3", '=INDEXVOLATILITY(B2:B121;12;"annual=1")'), want12,
                               delta=1e-12 * want12)  # sqrt(12 / 12) = 1
        self.assertAlmostEqual(self.formula("J4", '=INDEXVOLATILITY(B2:B121;1;"annual=1")'),
                               want * math.sqrt(12), delta=1e-12 * want)
        want_gaps = volatility_reference(self.c)  # pandas: diff() then std() skipping NaN
        self.assertAlmostEqual(self.formula("J5", '=INDEXVOLATILITY(D1:D121;;"header=1")'), want_gaps,
                               delta=1e-12 * want_gaps)
        cells = self.array("K2:L8", '=INDEXVOLATILITY(D2:D121;;"notes=1")')
        notes = {r[0]: r[1] for r in cells if isinstance(r[0], str) and r[0]}
        self.assertAlmostEqual(notes["volatility"], want_gaps, delta=1e-12 * want_gaps)
        self.assertEqual(notes["changes used"], float(np.isfinite(np.diff(np.log(self.c))).sum()))
        self.assertEqual(notes["rows used"], 116.0)

    # -- INDEXSNR
    def test_snr_against_statsmodels(self):
        want = snr_reference(self.a)
        self.assertAlmostEqual(self.formula("N2", "=INDEXSNR(B2:B121)"), want["snr"], delta=1e-8 * want["snr"])
        cells = self.array("O2:P6", '=INDEXSNR(B2:B121;"M";"output=detail")')
        d = {r[0]: r[1] for r in cells}
        self.assertAlmostEqual(d["signal-to-noise"], want["snr"], delta=1e-8 * want["snr"])
        self.assertAlmostEqual(d["signal (rms trend change)"], want["signal"], delta=1e-8 * want["signal"])
        self.assertAlmostEqual(d["noise (rms noise change)"], want["noise"], delta=1e-8 * want["noise"])
        self.assertEqual(d["pairs"], 119.0)
        self.assertAlmostEqual(d["lambda"], SNR_LAMBDA_M, delta=1e-9)
        want = snr_reference(self.b, lam=50)
        self.assertAlmostEqual(self.formula("N3", '=INDEXSNR(C2:C121;;"lambda=50")'), want["snr"],
                               delta=1e-8 * want["snr"])
        want = snr_reference(self.c)  # gaps: dense solve of the HP objective
        self.assertAlmostEqual(self.formula("N4", "=INDEXSNR(D2:D121)"), want["snr"], delta=1e-7 * want["snr"])

    # -- INDEXLEADLAG
    def test_leadlag_against_numpy(self):
        cells = self.array("R1:T27", '=INDEXLEADLAG(B1:B121;C1:C121;;"header=1; titles=1")')
        self.assertEqual(cells[0], ["lag", "correlation", "pairs"])
        want = leadlag_reference(self.a, self.b)  # numpy corrcoef, year-over-year changes
        self.assertEqual(len(want), 25)
        for row, (lag, corr, pairs) in zip(cells[1:26], want):
            self.assertEqual(row[0], float(lag))
            self.assertAlmostEqual(row[1], corr, delta=1e-12)
            self.assertEqual(row[2], pairs)
        best = best_of(want)
        self.assertEqual(best[0], 3, "B follows A by 3 months: a leads b, positive lag")
        self.assertEqual(cells[26][0], "best lag")
        self.assertEqual(cells[26][1], 3.0)
        self.assertAlmostEqual(cells[26][2], best[1], delta=1e-12)
        # Swapped: b leads a by -3 (a negative lag), maxlag 4.
        cells = self.array("R30:T39", "=INDEXLEADLAG(C2:C121;B2:B121;4)")
        want = leadlag_reference(self.b, self.a, maxlag=4)
        for row, (lag, corr, pairs) in zip(cells[:9], want):
            self.assertEqual(row[0], float(lag))
            self.assertAlmostEqual(row[1], corr, delta=1e-12)
            self.assertEqual(row[2], pairs)
        self.assertEqual(cells[9][1], -3.0, "b leads a: negative lag")
        # One-period changes (option lag) and minpairs: the lags +-3 have 116 pairs < 117.
        cells = self.array("R41:T48", '=INDEXLEADLAG(B2:B121;C2:C121;3;"lag=1; minpairs=117")')
        want = leadlag_reference(self.a, self.b, k=1, maxlag=3, minpairs=117)
        self.assertTrue(math.isnan(want[0][1]) and math.isnan(want[6][1]))
        for row, (lag, corr, pairs) in zip(cells[:7], want):
            self.assertEqual(row[0], float(lag))
            if math.isnan(corr):
                self.assertEqual(row[1], "")
            else:
                self.assertAlmostEqual(row[1], corr, delta=1e-12)
            self.assertEqual(row[2], pairs)
        self.assertEqual(cells[7][1], float(best_of(want)[0]))

    # -- INDEXTURNS
    def test_turns_of_a_sine(self):
        cells = self.array("AA1:AD7", '=INDEXTURNS(X1:X144;Y1:Y144;;"titles=1")')
        self.assertEqual(cells[0], ["period", "turn", "index", "months since previous"])
        at = [12, 36, 60, 84, 108, 132]
        for k, (row, t) in enumerate(zip(cells[1:], at)):
            self.assertEqual(row[0], self.sine_periods[t])
            self.assertEqual(row[1], "peak" if k % 2 == 0 else "trough")
            self.assertAlmostEqual(row[2], 108.0 if k % 2 == 0 else 92.0, delta=1e-9)
            self.assertEqual(row[3], "" if k == 0 else 24.0)

    def test_turns_options_against_core(self):
        opts = "window=3; minphase=3; mincycle=9; ends=3"
        formula = f'=INDEXTURNS(A2:A121;B2:B121;"M";"{opts}")'
        want = run_refcli(REFCLI, "turns", pd.DataFrame({"period": self.periods, "index": self.a}),
                          freq="M", window=3, minphase=3, mincycle=9, ends=3)
        self.assertGreater(len(want), 2)
        cells = self.array(f"AF1:AI{len(want)}", formula)
        for row, w in zip(cells, want.itertuples()):
            self.assertEqual(row[0], w.period)
            self.assertEqual(row[1], "peak" if w.peak == 1 else "trough")
            self.assertAlmostEqual(row[2], w.value, delta=1e-12 * w.value)
            self.assertEqual(row[3], "" if math.isnan(w.months) else w.months)

    # -- INDEXSEASONAL
    def test_seasonal_against_statsmodels(self):
        dec = seasonal_decompose(pd.Series(self.a), model="multiplicative", period=12)
        factors = np.asarray(dec.seasonal)
        got = column(self.array("AK2:AK121", '=INDEXSEASONAL(B2:B121;"M")'))
        self.assertColumn(got, factors, 1e-12, "factor")
        got = column(self.array("AL1:AL121", '=INDEXSEASONAL(B1:B121;;"header=1; titles=1; output=adjusted")')[1:])
        self.assertColumn(got, self.a / factors, 1e-12, "adjusted")
        cells = self.array("AM1:AO121", '=INDEXSEASONAL(B2:B121;"M";"output=table; titles=1")')
        self.assertEqual(cells[0], ["factor", "adjusted", "moving average"])
        self.assertColumn(column(cells[1:], 0), factors, 1e-12, "table factor")
        self.assertColumn(column(cells[1:], 1), self.a / factors, 1e-12, "table adjusted")
        self.assertColumn(column(cells[1:], 2), np.asarray(dec.trend), 1e-12, "moving average")
        # The generating season: factors close to exp(0.02 cos(2 pi m / 12)) normalised.
        s = np.exp(0.02 * np.cos(2 * np.pi * np.arange(12) / 12))
        self.assertLess(np.max(np.abs(factors[:12] - s / s.mean())), 0.01)  # half the amplitude

    # -- INDEXCOMPARE
    def test_compare_against_references(self):
        cells = self.array("AQ1:AW4", '=INDEXCOMPARE(B1:D121;"M";"header=1; titles=1")')
        self.assertEqual(cells[0], ["name", "volatility", "signal-to-noise", "largest change %",
                                    "lag vs first", "correlation", "missing"])
        cols = {"A": self.a, "B": self.b, "C": self.c}
        for row, name in zip(cells[1:], "ABC"):
            x = cols[name]
            self.assertEqual(row[0], name)
            v = volatility_reference(x)
            self.assertAlmostEqual(row[1], v, delta=1e-12 * v)
            s = snr_reference(x)["snr"]
            self.assertAlmostEqual(row[2], s, delta=1e-7 * s)
            ch = np.nanmax(np.abs(100 * (x[1:] / x[:-1] - 1)))
            self.assertAlmostEqual(row[3], ch, delta=1e-12 * ch)
            if name == "A":
                self.assertEqual(row[4:6], [0.0, 1.0])
            else:
                best = best_of(leadlag_reference(x, self.a))  # this column vs the first
                self.assertEqual(row[4], float(best[0]))
                self.assertAlmostEqual(row[5], best[1], delta=1e-12)
            self.assertEqual(row[6], float(np.isnan(x).sum()))
        self.assertEqual(cells[2][4], -3.0, "B follows A: B lags the first column")
        self.assertEqual(cells[3][4], 0.0)

    def test_wizard_texts(self):
        with open(GEN_JSON) as f:
            table = {t["name"]: t for t in json.load(f)}
        fd = office.service("com.sun.star.sheet.FunctionDescriptions")
        shown = {}
        for i in range(fd.Count):
            d = {p.Name: p.Value for p in fd.getByIndex(i)}
            shown[d["Name"]] = d
        for name in ["INDEXMIX", "INDEXVOLATILITY", "INDEXTREND", "INDEXSNR", "INDEXLEADLAG",
                     "INDEXTURNS", "INDEXSEASONAL", "INDEXCOMPARE"]:
            d = shown[name]
            self.assertEqual(d["Description"], table[name]["description"])
            self.assertEqual([a.Description for a in d["Arguments"]],
                             [a["description"] for a in table[name]["args"]])
        self.assertIn("a leads b", shown["INDEXLEADLAG"]["Description"])

    def test_bad_input(self):
        cases = {
            "=INDEXVOLATILITY(B2:B3)": "Lintel: volatility needs at least 2 changes over 1 period(s); the index gives 1",
            "=INDEXVOLATILITY(B2:B121;0)": "Lintel: lag must be a whole number of at least 1, got 0",
            "=INDEXVOLATILITY(B2:C121)": "Lintel: index must be one column, got 2 columns",
            "=INDEXTREND(B2:B121;;0)": "Lintel: lambda must be greater than 0, got 0",
            "=INDEXTREND(B2:B3)": "Lintel: the trend needs at least 3 values, the index has 2",
            '=INDEXSNR(B2:B121;"W")': 'Lintel: freq must be "M", "Q" or "Y", got "W"',
            '=INDEXSNR(B2:B121;;"lambda=abc")': 'Lintel: option lambda must be a number, got "abc"',
            "=INDEXLEADLAG(B2:B121;C2:C120)": "Lintel: the two indexes must cover the same periods: 120 rows and 119 rows",
            "=INDEXLEADLAG(B2:B121;C2:C121;200)": "Lintel: maxlag must be smaller than the number of rows (120), got 200",
            '=INDEXLEADLAG(B2:B121;C2:C121;;"minpairs=2")': "Lintel: option minpairs must be a whole number of at least 3",
            '=INDEXTURNS(A2:A121;B2:B121;;"window=0")': "Lintel: option window must be a whole number of at least 1, got 0",
            '=INDEXTURNS(B2:B121;B2:B121)': "Lintel: periods must be period start dates",
            '=INDEXTURNS(A2:A121;B2:B120)': "Lintel: periods has 120 rows, index has 119",
            "=INDEXSEASONAL(B2:B13)": "Lintel: seasonal factors need at least 2 years of rows (24), the index has 12",
            '=INDEXSEASONAL(B2:B121;"Y")': "Lintel: seasonal factors need a monthly or quarterly index (freq M or Q)",
            '=INDEXCOMPARE(B1:D121;;"lag=0")': "Lintel: option lag must be a whole number of at least 1, got 0",
            '=INDEXCOMPARE(B1:D1;;"header=1")': "Lintel: indexes holds no rows below the header",
        }
        row = 130
        for formula, want in cases.items():
            got = self.array(f"F{row}:H{row + 1}", formula)[0][0]
            self.assertTrue(isinstance(got, str) and got.startswith(want), f"{formula}: {got!r}")
            row += 2
        # An error cell in the input is named; no crash.
        self.sheet.getCellRangeByName("Z1").setFormula("=1/0")
        self.sheet.getCellRangeByName("Z2:Z4").setDataArray(((101.0,), (102.0,), (99.0,)))
        got = self.array("F200:F203", "=INDEXTREND(Z1:Z4)")
        self.assertEqual(got[0][0], f"Lintel: index holds #DIV/0! in cell {self.sheet.Name}.Z1: correct or clear that cell")
        self.assertTrue(office.alive())


if __name__ == "__main__":
    unittest.main(verbosity=2)
