"""INDEXHEDONIC, HEDONICCOEFS and REFHOMEVALUE in a real headless Calc, every cell compared
with statsmodels OLS (python3-statsmodels) fitted on explicit dummy columns of the same data.

Generating model of the test data (not the demo): 12 months 2023-01 .. 2023-12; month m
(0-based) has U{35..45} sales on days U{1..28}, except 2023-05 (m = 4), which has none.
Per sale:
  size ~ 50 + 150 U(0, 1) (m^2);  bedrooms = clip(round(size / 40 + N(0, 0.6^2)), 1, 5);
  district ~ {North .4, South .3, East .2, West .1} (a text column);  age ~ U{0..60};
  ln price = 12 + 0.01 m + 0.02 sin(m) + 0.7 ln size + b_bed[bedrooms] + b_dist[district]
             - 0.004 age + e,   e ~ N(0, (0.08 + 0.002 age)^2) (heteroskedastic, for HC1),
  b_bed = {1: -0.08, 2: -0.03, 3: 0, 4: 0.04, 5: 0.07},
  b_dist = {North: 0, South: -0.1, East: 0.15, West: 0.05}.
The sheet has a header row (date, price, size, bedrooms, district, age); the functions run
with header=1, log=1 (size), categorical=2 (bedrooms); district is text.

Reference model (statsmodels): y = ln price on [const, one dummy per month with sales except
the reference month, ln size, bedroom dummies and district dummies (the most frequent level
of the sales used left out, ties to the first in sorted order), age]. The index is
100 exp(coefficient of the month's dummy) with the base month as reference; bands
100 exp(b -/+ t_{0.975, df} se). Rolling window k: the chain of docs/methods/hedonic.md, each
window fitted by statsmodels, bands from the weights X (X'X)^-1 l of every window estimate
the chain uses (sales shared by windows counted once). Reference home: get_prediction() with
Duan's smearing factor mean(exp(resid)) or exp(scale / 2).
"""
import math
import os
import sys
import unittest

import numpy as np
import pandas as pd
import statsmodels.api as sm
from scipy import stats as sps

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
from lintel_office import SharedOffice, SheetCalls, sheet_values  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
EPOCH = pd.Timestamp("1899-12-30")
OPTS = "header=1; log=1; categorical=2"
REL = 1e-9

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


# ---- data and the statsmodels reference -------------------------------------------------

B_BED = {1: -0.08, 2: -0.03, 3: 0.0, 4: 0.04, 5: 0.07}
B_DIST = {"North": 0.0, "South": -0.1, "East": 0.15, "West": 0.05}


def make_sales(seed=20231):
    rng = np.random.default_rng(seed)
    rows = []
    for m in range(12):
        if m == 4:
            continue
        k = int(rng.integers(35, 46))
        day = rng.integers(1, 29, k)
        size = 50 + 150 * rng.random(k)
        bed = np.clip(np.round(size / 40 + rng.normal(0, 0.6, k)), 1, 5).astype(int)
        dist = rng.choice(list(B_DIST), k, p=[0.4, 0.3, 0.2, 0.1])
        age = rng.integers(0, 61, k).astype(float)
        e = rng.normal(0, 1, k) * (0.08 + 0.002 * age)
        lnp = (12 + 0.01 * m + 0.02 * np.sin(m) + 0.7 * np.log(size)
               + np.array([B_BED[b] for b in bed]) + np.array([B_DIST[d] for d in dist])
               - 0.004 * age + e)
        for i in range(k):
            ts = pd.Timestamp(year=2023, month=m + 1, day=int(day[i]))
            rows.append((float((ts - EPOCH).days), float(np.exp(lnp[i])), float(size[i]),
                         float(bed[i]), str(dist[i]), float(age[i]), m))
    return pd.DataFrame(rows, columns=["date", "price", "size", "bedrooms", "district", "age", "m"])


MONTH_START = [float((pd.Timestamp(year=2023, month=m + 1, day=1) - EPOCH).days) for m in range(12)]


def most_frequent(s):
    c = s.value_counts()
    return sorted(c[c == c.max()].index)[0]


class Reference:
    """The statsmodels fits on a data frame of used sales."""

    def __init__(self, use):
        self.use = use
        self.bed_levels = sorted(use.bedrooms.unique())
        self.dist_levels = sorted(use.district.unique())
        self.ref_bed = most_frequent(use.bedrooms)
        self.ref_dist = most_frequent(use.district)

    def design(self, sub, ref_period, months=None):
        months = sorted(sub.m.unique()) if months is None else months
        cols = {"const": np.ones(len(sub))}
        for m in months:
            if m != ref_period:
                cols[f"P{m}"] = (sub.m == m).astype(float).values
        cols["log(size)"] = np.log(sub["size"].values)
        for b in self.bed_levels:
            if b != self.ref_bed:
                cols[f"bedrooms={b:g}"] = (sub.bedrooms == b).astype(float).values
        for d in self.dist_levels:
            if d != self.ref_dist:
                cols[f"district={d}"] = (sub.district == d).astype(float).values
        cols["age"] = sub.age.values
        return pd.DataFrame(cols, index=sub.index), np.log(sub.price.values)

    def fit(self, sub, ref_period, cov="nonrobust"):
        X, y = self.design(sub, ref_period)
        X = X.loc[:, X.abs().sum(axis=0) > 0]  # a level absent from a window: no column
        return X, sm.OLS(y, X).fit(cov_type=cov, use_t=True)

    def pooled_index(self, cov="nonrobust", kennedy=False, level=0.95):
        X, res = self.fit(self.use, 0, cov)
        q = sps.t.ppf(0.5 + level / 2, res.df_resid)
        out = []
        for m in range(12):
            if m == 0:
                d, v = 0.0, 0.0
            elif f"P{m}" in res.params:
                d, v = res.params[f"P{m}"], res.bse[f"P{m}"] ** 2
            else:
                out.append(["", "", ""])
                continue
            i = 100 * math.exp(d - v / 2 if kennedy else d)
            out.append([i, 100 * math.exp(d - q * math.sqrt(v)), 100 * math.exp(d + q * math.sqrt(v))])
        return out

    def rolling_index(self, k, level=0.95):
        """The documented chain (docs/methods/hedonic.md, rolling window), classical."""
        use = self.use
        counts = use.groupby("m").size().reindex(range(12), fill_value=0).values
        L, W, dfmin = {}, {}, {}

        def estimate(p0, p1):
            sub = use[(use.m >= p0) & (use.m <= p1)]
            X, res = self.fit(sub, sorted(sub.m.unique())[0])

            def contrast(e, s):
                lam = pd.Series(0.0, index=X.columns)
                for p, sign in ((e, 1.0), (s, -1.0)):
                    if f"P{p}" in lam.index:
                        lam[f"P{p}"] += sign
                c = X.values @ (res.normalized_cov_params.values @ lam.values) * math.sqrt(res.scale)
                w = pd.Series(c, index=sub.index).reindex(use.index, fill_value=0.0).values
                return float(lam.values @ res.params.values), w
            return res, contrast

        res0, c0 = estimate(0, k - 1)
        for a in range(k):
            if counts[a]:
                L[a], W[a] = c0(a, 0)
                dfmin[a] = res0.df_resid
        for t in range(k, 12):
            if not counts[t]:
                continue
            s = max(p for p in L if p < t)
            res, c = estimate(min(t - k + 1, s), t)
            d, w = c(t, s)
            L[t], W[t], dfmin[t] = L[s] + d, W[s] + w, min(dfmin[s], res.df_resid)
        out = []
        for m in range(12):
            if m not in L:
                out.append(["", "", ""])
                continue
            sd = math.sqrt(float(W[m] @ W[m]))
            q = sps.t.ppf(0.5 + level / 2, dfmin[m])
            out.append([100 * math.exp(L[m]), 100 * math.exp(L[m] - q * sd), 100 * math.exp(L[m] + q * sd)])
        return out

    def home_values(self, home, retransform, level=0.95):
        X, res = self.fit(self.use, 0)
        factor = np.mean(np.exp(res.resid)) if retransform == "smearing" else math.exp(res.scale / 2)
        q = sps.t.ppf(0.5 + level / 2, res.df_resid)
        months = sorted(self.use.m.unique())
        out = []
        for m in range(12):
            if m not in months:
                out.append(["", "", ""])
                continue
            row = pd.DataFrame([dict(home, m=m, price=1.0)])
            Xh, _ = self.design(row, 0, months)
            p = res.get_prediction(Xh.reindex(columns=X.columns, fill_value=0.0))
            mu, se = float(p.predicted_mean[0]), float(p.se_mean[0])
            out.append([factor * math.exp(mu), factor * math.exp(mu - q * se), factor * math.exp(mu + q * se)])
        return out, factor

    def typical_home(self):
        base = self.use[self.use.m == 0]
        return dict(size=base["size"].median(), bedrooms=most_frequent(base.bedrooms),
                    district=most_frequent(base.district), age=base.age.median())


# ---- the tests ---------------------------------------------------------------------------


class HedonicCalcTest(SheetCalls, unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.df = make_sales()
        cls.ref = Reference(cls.df)
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        rows = [("date", "price", "size", "bedrooms", "district", "age")] + [
            (r.date, r.price, r.size, r.bedrooms, r.district, r.age) for r in cls.df.itertuples()]
        cls.n = len(rows)
        cls.sheet.getCellRangeByName(f"A1:F{cls.n}").setDataArray(rows)
        n = cls.n
        cls.ranges = f"A1:A{n};B1:B{n};C1:F{n}"

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def assertCell(self, got, want, what):
        if want == "":
            self.assertEqual(got, "", what)
        elif isinstance(want, str):
            self.assertEqual(got, want, what)
        else:
            self.assertIsInstance(got, float, what)
            self.assertLessEqual(abs(got - want), REL * max(abs(want), 1e-12), f"{what}: {got} vs {want}")

    def assertIndexCells(self, cells, want, source):
        """period | index | sales | lower | upper against the reference rows."""
        counts = self.df.groupby("m").size().reindex(range(12), fill_value=0).values
        self.assertEqual(len(cells), 12)
        for m, (row, w) in enumerate(zip(cells, want)):
            self.assertEqual(row[0], MONTH_START[m])
            self.assertEqual(row[2], float(counts[m]), "sales used: pandas groupby().size()")
            for j, k, col in ((1, 0, "index"), (3, 1, "lower"), (4, 2, "upper")):
                self.assertCell(row[j], w[k], f"{source}, month {m} {col}")

    def test_index_pooled_classical(self):
        cells = self.array("H1:L12", f'=INDEXHEDONIC({self.ranges};;;;"{OPTS}")')
        self.assertIndexCells(cells, self.ref.pooled_index(), "statsmodels OLS nonrobust")
        self.assertEqual(cells[0][1:], [100.0, cells[0][2], 100.0, 100.0])
        self.assertEqual(cells[4][1:], ["", 0.0, "", ""], "2023-05 has no sales: no value")

    def test_index_hc1_and_kennedy(self):
        cells = self.array("H20:L31", f'=INDEXHEDONIC({self.ranges};;;;"{OPTS}; se=hc1")')
        self.assertIndexCells(cells, self.ref.pooled_index("HC1"), "statsmodels OLS cov_type=HC1")
        classical = self.ref.pooled_index()
        self.assertGreater(abs(cells[11][3] - classical[11][1]), 1e-6, "HC1 bands differ from classical")
        cells = self.array("H40:L51", f'=INDEXHEDONIC({self.ranges};;;;"{OPTS}; bias=kennedy")')
        self.assertIndexCells(cells, self.ref.pooled_index(kennedy=True),
                              "Kennedy 1981: 100 exp(d - var(d)/2), statsmodels d and bse")

    def test_index_rolling_window(self):
        cells = self.array("H60:L71", f'=INDEXHEDONIC({self.ranges};;;;"{OPTS}; window=3")')
        self.assertIndexCells(cells, self.ref.rolling_index(3), "chained statsmodels window fits")

    def test_coefs_with_header_names(self):
        for cov, se in (("nonrobust", "classical"), ("HC1", "hc1")):
            X, res = self.ref.fit(self.df, 0, cov)
            chars = (["log(size)"]
                     + [f"bedrooms={b:g}" for b in self.ref.bed_levels if b != self.ref.ref_bed]
                     + [f"district={d}" for d in self.ref.dist_levels if d != self.ref.ref_dist]
                     + ["age"])
            months = [m for m in range(1, 12) if m != 4]
            names = ["(Intercept)"] + chars + [f"period 2023-{m + 1:02d}" for m in months]
            sm_names = ["const"] + chars + [f"P{m}" for m in months]
            rows = 1 + len(names) + 7
            top = 80 if se == "classical" else 120
            cells = self.array(f"N{top}:Q{top + rows - 1}",
                               f'=HEDONICCOEFS({self.ranges};;;;"{OPTS}; se={se}; titles=1")')
            self.assertEqual(cells[0], ["term", "coefficient", "std error", "t"])
            self.assertEqual([r[0] for r in cells[1:1 + len(names)]], names,
                             "term names from the header row, in column order, then the periods")
            for r, s in zip(cells[1:], sm_names):
                src = f"statsmodels OLS {cov} {s}"
                self.assertCell(r[1], res.params[s], src + " params")
                self.assertCell(r[2], res.bse[s], src + " bse")
                self.assertCell(r[3], res.tvalues[s], src + " tvalues")
            stats = {r[0]: r[1:] for r in cells[1 + len(names):]}
            self.assertEqual(list(stats), ["observations", "dropped", "R-squared", "adjusted R-squared",
                                           "residual standard error", "residual df", "dropped terms"])
            self.assertEqual(stats["observations"], [float(len(self.df)), "", ""])
            self.assertEqual(stats["dropped"][0], 0.0)
            self.assertCell(stats["R-squared"][0], res.rsquared, "statsmodels rsquared")
            self.assertCell(stats["adjusted R-squared"][0], res.rsquared_adj, "statsmodels rsquared_adj")
            self.assertCell(stats["residual standard error"][0], math.sqrt(res.scale), "sqrt(statsmodels scale)")
            self.assertEqual(stats["residual df"][0], res.df_resid)
            self.assertEqual(stats["dropped terms"][0], "")

    def test_coefs_name_a_collinear_term(self):
        # A fifth column copying age: dropped as collinear, named; the rest as before.
        n = self.n
        col = [("age2",)] + [(a,) for a in self.df.age]
        self.sheet.getCellRangeByName(f"G1:G{n}").setDataArray(col)
        _, res = self.ref.fit(self.df, 0)
        rows = len(res.params) + 7
        cells = self.array(f"S1:V{rows}", f'=HEDONICCOEFS(A1:A{n};B1:B{n};C1:G{n};;;;"{OPTS}")')
        self.assertEqual(cells[-1][:2], ["dropped terms", "age2 (collinear with earlier terms)"])
        age = [r for r in cells if r[0] == "age"]
        self.assertEqual(len(age), 1)
        self.assertCell(age[0][1], res.params["age"], "statsmodels age, fitted without the copy")
        self.assertCell(age[0][2], res.bse["age"], "statsmodels age bse, fitted without the copy")

    def test_refhome_empty_home_is_typical(self):
        want, factor = self.ref.home_values(self.ref.typical_home(), "smearing")
        cells = self.array("X1:AA21", f'=REFHOMEVALUE({self.ranges};;;;;"{OPTS}; notes=1; titles=1")')
        self.assertEqual(cells[0], ["period", "value", "lower", "upper"])
        for m in range(12):
            self.assertEqual(cells[1 + m][0], MONTH_START[m])
            for j in range(3):
                self.assertCell(cells[1 + m][1 + j], want[m][j], f"statsmodels get_prediction x smearing, month {m}")
        typical = self.ref.typical_home()
        home = {r[0]: r[1:] for r in cells[13:17]}
        self.assertCell(home["home: size"][0], typical["size"], "pandas median of January's size")
        self.assertEqual(home["home: size"][1], "base-period median home")
        self.assertEqual(home["home: bedrooms"][:2], [f"{typical['bedrooms']:g}", "base-period median home"])
        self.assertEqual(home["home: district"][:2], [typical["district"], "base-period median home"])
        self.assertCell(home["home: age"][0], typical["age"], "pandas median of January's age")
        self.assertEqual(cells[17][0], "retransformation factor")
        self.assertCell(cells[17][1], factor, "Duan smearing: mean(exp(statsmodels resid))")
        self.assertEqual(cells[18][:2], ["rows used", float(len(self.df))])

    def test_refhome_given_home_lognormal(self):
        # The home with its header row (header=1): 120 m^2, 3 bedrooms, South, 25 years.
        self.sheet.getCellRangeByName("AC1:AF2").setDataArray(
            (("size", "bedrooms", "district", "age"), (120.0, 3.0, "South", 25.0)))
        want, _ = self.ref.home_values(dict(size=120.0, bedrooms=3, district="South", age=25.0), "lognormal")
        cells = self.array("AH1:AK12", f'=REFHOMEVALUE({self.ranges};AC1:AF2;;;;"{OPTS}; retransform=lognormal")')
        for m in range(12):
            self.assertEqual(cells[m][0], MONTH_START[m])
            for j in range(3):
                self.assertCell(cells[m][1 + j], want[m][j], f"statsmodels get_prediction x exp(scale/2), month {m}")

    def test_wizard_shows_home_as_optional(self):
        fd = office.service("com.sun.star.sheet.FunctionDescriptions")
        shown = {}
        for i in range(fd.Count):
            d = {p.Name: p.Value for p in fd.getByIndex(i)}
            shown[d["Name"]] = d
        args = shown["REFHOMEVALUE"]["Arguments"]
        self.assertEqual([a.Name for a in args],
                         ["dates", "prices", "characteristics", "home", "include", "freq", "base", "options"])
        self.assertEqual([bool(a.IsOptional) for a in args], [False] * 3 + [True] * 5)
        self.assertIn("base period's median home", args[3].Description)
        for name in ("INDEXHEDONIC", "HEDONICCOEFS"):
            self.assertEqual([a.Name for a in shown[name]["Arguments"]],
                             ["dates", "prices", "characteristics", "include", "freq", "base", "options"])


class HedonicBadInputTest(SheetCalls, unittest.TestCase):
    """Bad input gives a clear "Lintel:" message or a counted drop, never a crash."""

    @classmethod
    def setUpClass(cls):
        cls.df = make_sales(seed=5).iloc[:150].reset_index(drop=True)
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        rows = [[r.date, r.price, r.size, r.bedrooms, r.district, r.age] for r in cls.df.itertuples()]
        rows[3][1] = "n/a"      # a text price
        rows[7][2] = 0.0        # size 0, taken in logs
        rows[9][2] = -40.0      # a negative size, taken in logs
        cls.sheet.getCellRangeByName(f"A1:F{len(rows)}").setDataArray([tuple(r) for r in rows])
        cls.n = len(rows)

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def test_drops_are_counted(self):
        n = self.n
        cells = self.array("H1:L20", f'=INDEXHEDONIC(A1:A{n};B1:B{n};C1:F{n};;;;"log=1; categorical=2; notes=1")')
        notes = {r[0]: r[1] for r in cells if isinstance(r[0], str) and r[0]}
        self.assertEqual(notes["rows used"], float(n - 3))
        self.assertEqual(notes["dropped: unreadable price"], 1.0)  # "n/a" is no number
        self.assertEqual(notes["dropped: log of a non-positive characteristic"], 2.0)

    def test_messages(self):
        n = self.n
        r = f"A1:A{n};B1:B{n};C1:F{n}"
        cases = {
            f"=INDEXHEDONIC(A1:A{n};B1:B{n};C1:F{n - 1})": f"Lintel: dates has {n} rows, characteristics has {n - 1}",
            f'=INDEXHEDONIC({r};;;;"log=1; colour=red")':
                'Lintel: unknown option "colour" for INDEXHEDONIC (known: log, categorical, window, se, bias, '
                "smooth, seasonal, realtime, borrow, minsales, level, dateorder, labels, header, titles, notes)",
            f'=HEDONICCOEFS({r};;;;"bias=kennedy")': 'Lintel: unknown option "bias" for HEDONICCOEFS',
            f'=INDEXHEDONIC({r};;;;"log=3")': "Lintel: log: column 3 (x3) holds text, not numbers",
            f'=INDEXHEDONIC({r};;;;"window=1")': "Lintel: window must be 0 (pooled) or at least 2 periods, got 1",
            f'=REFHOMEVALUE({r};N1:P1;;;;"log=1")': "Lintel: home has 3 cells but characteristics has 4 columns",
            f'=REFHOMEVALUE({r};N1:Q2;;;;"log=1")':
                "Lintel: home must be one row with a cell per characteristics column, got 2 rows",
            f'=HEDONICCOEFS({r};;"W")': 'Lintel: freq must be "M", "Q" or "Y", got "W"',
        }
        self.sheet.getCellRangeByName("N1:Q2").setDataArray(((100.0, 2.0, "North", 10.0),) * 2)
        row = 30
        for formula, want in cases.items():
            got = self.array(f"H{row}:K{row}", formula)[0][0]
            self.assertTrue(isinstance(got, str) and got.startswith(want), f"{formula}: {got!r}")
            row += 1
        self.assertTrue(office.alive())


if __name__ == "__main__":
    unittest.main(verbosity=2)
