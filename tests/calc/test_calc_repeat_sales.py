"""CHAINRS and RSPAIRS in a real headless Calc. The pairs are built here independently with
pandas from the raw sales by the rules of docs/methods/repeat_sales.md; every CHAINRS cell is
compared with statsmodels OLS (bmn, Bailey, Muth & Nourse 1963) or the Case & Shiller
(1987) three stages OLS -> OLS(e^2 on 1, years[, years^2]) -> WLS (python3-statsmodels) on
those pairs, every RSPAIRS cell with the pandas pair table. chain=1 (our own construction,
no published reference) against a numpy implementation of the documented recursion.

Generating model of the test data (not the demo): 600 properties, property j sold
1 + Poisson(1.4) times on distinct days uniform over 2018-01-01 .. 2021-12-31, except that no
sale falls in 2019-07 (days in it are drawn again); month m = 0 .. 47;
  ln p = a_j + 0.006 m + 0.02 sin(m / 4) + H_j(m) + e,
  a_j ~ N(12, 0.3^2), H_j a Gaussian random walk with variance 0.0003 per month,
  e ~ N(0, 0.06^2), prices rounded to whole units.
Then: 2 % of prices times 4 (keying errors), 1.5 % blank prices, 4 % of sales flagged changed,
1 % of ids blank. The rows are shuffled (sheet order is not sorted). Ids: text "R0001" ..;
the same data with numeric ids 5001 .., and with every second sale of a property holding its
id as text "5001" ...
"""
import math
import os
import sys
import unittest

import numpy as np
import pandas as pd
import statsmodels.api as sm
from scipy import stats as sps
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
from lintel_office import SharedOffice, sheet_values  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
EPOCH = pd.Timestamp("1899-12-30")
REL = 1e-9
MINHOLD, MAXRATE = 6, 1.0

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


# ---- data ------------------------------------------------------------------------------

def serial(ts):
    return float((pd.Timestamp(ts) - EPOCH).days)


def make_sales(seed=4417):
    rng = np.random.default_rng(seed)
    first = pd.Timestamp("2018-01-01")
    span = (pd.Timestamp("2021-12-31") - first).days + 1
    gap0, gap1 = (pd.Timestamp("2019-07-01") - first).days, (pd.Timestamp("2019-07-31") - first).days
    rows = []
    for j in range(600):
        k = 1 + rng.poisson(1.4)
        days = set()
        while len(days) < k:
            d = int(rng.integers(0, span))
            if not gap0 <= d <= gap1:
                days.add(d)
        a = rng.normal(12, 0.3)
        walk = np.cumsum(rng.normal(0, math.sqrt(0.0003), 48))
        for i, d in enumerate(sorted(days)):
            ts = first + pd.Timedelta(days=d)
            m = (ts.year - 2018) * 12 + ts.month - 1
            lp = a + 0.006 * m + 0.02 * math.sin(m / 4) + walk[m] + rng.normal(0, 0.06)
            rows.append((j, i, float((ts - EPOCH).days), float(round(math.exp(lp)))))
    df = pd.DataFrame(rows, columns=["prop", "k", "date", "price"])
    n = len(df)
    typo = rng.random(n) < 0.02
    df.loc[typo, "price"] *= 4
    df["price"] = df.price.where(rng.random(n) >= 0.015, np.nan)
    df["changed"] = (rng.random(n) < 0.04).astype(int)
    blank = rng.random(n) < 0.01
    df["id"] = np.where(blank, "", [f"R{j + 1:04d}" for j in df.prop])
    df["numid"] = np.where(blank, np.nan, 5001.0 + df.prop)
    df = df.iloc[rng.permutation(n)].reset_index(drop=True)
    return df


def period_of(serials, freq):
    ts = EPOCH + pd.to_timedelta(np.floor(np.asarray(serials, dtype=float)), unit="D")
    p = pd.PeriodIndex(ts, freq=freq)
    base = pd.Period("2018-01", freq=freq)
    return np.asarray([(x - base).n for x in p])


def build_pairs(df, freq="M", base=None):
    """The pair table of docs/methods/repeat_sales.md, in RSPAIRS order (ids by first
    appearance in the sheet, then by date)."""
    d = df.copy()
    d["row"] = np.arange(len(d))
    d["id"] = d["id"].str.strip()
    d = d[d.id != ""]
    order = {k: i for i, k in enumerate(pd.unique(d.id))}
    d["first_seen"] = d.id.map(order)
    d = d.sort_values(["first_seen", "date"])
    prev = d.groupby("id").shift(1)
    has = prev.row.notna()
    cur = d[has]
    prv = prev[has]
    p = pd.DataFrame({"id": cur.id.values, "d1": prv.date.values, "p1": prv.price.values,
                      "d2": cur.date.values, "p2": cur.price.values,
                      "changed": cur.changed.values == 1})
    t1 = EPOCH + pd.to_timedelta(p.d1, unit="D")
    t2 = EPOCH + pd.to_timedelta(p.d2, unit="D")
    p["months"] = (12 * (t2.dt.year - t1.dt.year) + (t2.dt.month - t1.dt.month)
                   - (t2.dt.day < t1.dt.day).astype(int)).astype(float)
    u1 = np.isfinite(p.p1) & (p.p1 > 0)
    u2 = np.isfinite(p.p2) & (p.p2 > 0)
    with np.errstate(invalid="ignore", divide="ignore"):
        p["rate"] = np.where(u1 & u2, np.log(p.p2 / p.p1) * 365.25 / (p.d2 - p.d1), np.nan)
    p["s"] = period_of(p.d1, freq)
    p["t"] = period_of(p.d2, freq)
    rules = [(~u1, "first sale: blank or non-numeric price"),
             (~u2, "second sale: blank or non-numeric price"),
             (p.changed, "property changed at the second sale"),
             (p.s == p.t, "both sales in one period"),
             (p.months < MINHOLD, "held less than minhold months"),
             (np.abs(p.rate) > MAXRATE, "annualised log return beyond +/-maxrate")]
    reason = np.full(len(p), "", dtype=object)
    for cond, text in reversed(rules):
        reason[np.asarray(cond)] = text
    p["reason"] = reason
    p["used"] = p.reason == ""
    return p.reset_index(drop=True)


def components(pairs):
    u = pairs[pairs.used]
    T = int(max(u.s.max(), u.t.max())) + 1
    g = coo_matrix((np.ones(len(u)), (u.s, u.t)), shape=(T, T))
    return connected_components(g, directed=False)[0] - (T - len(np.unique(np.r_[u.s, u.t])))


def reference_fit(pairs, method, periods_per_year, base=0):
    """statsmodels on the used pairs: (log index by period, conf_int, df, weights, fit)."""
    u = pairs[pairs.used].reset_index(drop=True)
    touched = sorted(set(u.s) | set(u.t))
    cols = [c for c in touched if c != base]
    X = np.zeros((len(u), len(cols)))
    for j, c in enumerate(cols):
        X[:, j] = (u.t.values == c).astype(float) - (u.s.values == c).astype(float)
    y = np.log(u.p2 / u.p1).values
    ols = sm.OLS(y, X).fit()
    if method == "bmn":
        fit, w = ols, np.ones(len(y))
    else:
        years = (u.t - u.s).values / periods_per_year
        terms = [np.ones(len(y)), years] + ([years ** 2] if method == "cs2" else [])
        e2 = ols.resid ** 2
        fitted = sm.OLS(e2, np.column_stack(terms)).fit().fittedvalues
        w = 1.0 / np.maximum(fitted, 0.05 * e2.mean())
        fit = sm.WLS(y, X, weights=w).fit()
    return dict(zip(cols, fit.params)), dict(zip(cols, fit.conf_int(0.05))), fit, w / w.mean(), u


def expected_index(pairs, method, freq, base=0, level=0.95):
    """period start | index | pairs | lower | upper rows for every period of the axis."""
    ppy = {"M": 12, "Q": 4}[freq]
    b, ci, fit, _, u = reference_fit(pairs, method, ppy, base)
    n_periods = 4 * ppy  # 2018 .. 2021: the first and last months hold usable sales
    counts = np.bincount(u.t, minlength=n_periods)
    rows = []
    for k in range(n_periods):
        start = serial(pd.Period("2018-01", freq=freq).to_timestamp() + pd.DateOffset(months=k * 12 // ppy))
        if k == base:
            rows.append([start, 100.0, float(counts[k]), 100.0, 100.0])
        elif k in b:
            rows.append([start, 100 * math.exp(b[k]), float(counts[k]),
                         100 * math.exp(ci[k][0]), 100 * math.exp(ci[k][1])])
        else:
            rows.append([start, "", float(counts[k]), "", ""])
    return rows


def chain_reference(pairs, init, n_periods, level=0.95):
    """chain=1, bmn, as documented: periods 0 .. init-1 jointly by OLS on the pairs ending
    there; then b_t = mean(y_i + b_s(i)) over the pairs ending in t whose first period has a
    value; V(t, u) = sum_s a_s V(s, u), V(t, t) = s^2 / n_t + a' V a, a_s the share of those
    pairs starting in s; s^2 = sum r^2 / (pairs - coefficients) over everything used so far."""
    u = pairs[pairs.used]
    level_ = np.full(n_periods, np.nan)
    V = np.zeros((n_periods, n_periods))
    df = np.full(n_periods, np.nan)
    win = u[u.t < init]
    touched = sorted(set(win.s) | set(win.t))
    ref, cols = touched[0], touched[1:]
    X = np.zeros((len(win), len(cols)))
    for j, c in enumerate(cols):
        X[:, j] = (win.t.values == c).astype(float) - (win.s.values == c).astype(float)
    y = np.log(win.p2 / win.p1).values
    fit = sm.OLS(y, X).fit()
    level_[ref] = 0.0
    level_[cols] = fit.params
    V[np.ix_(cols, cols)] = fit.cov_params()
    ssr, N, K = float(np.sum(fit.resid ** 2)), len(win), len(cols)
    df[touched] = N - K
    for t in range(init, n_periods):
        e = u[u.t == t]
        e = e[np.isfinite(level_[e.s.values])]
        if len(e) == 0:
            continue
        x = np.log(e.p2 / e.p1).values + level_[e.s.values]
        bt = x.mean()
        ssr += float(np.sum((x - bt) ** 2))
        N, K = N + len(e), K + 1
        a = np.bincount(e.s.values, minlength=n_periods)[:t] / len(e)
        V[t, :t] = a @ V[:t, :t]
        V[:t, t] = V[t, :t]
        V[t, t] = ssr / (N - K) / len(e) + a @ V[t, :t]
        level_[t] = bt
        df[t] = N - K
    se = np.sqrt(np.maximum(np.diag(V) + V[ref, ref] - 2 * V[:, ref], 0))
    out = []
    for t in range(n_periods):
        if not np.isfinite(level_[t]):
            out.append(["", "", ""])
        elif t == ref:
            out.append([100.0, 100.0, 100.0])
        else:
            q = sps.t.ppf(0.5 + level / 2, df[t])
            d = level_[t] - level_[ref]
            out.append([100 * math.exp(d), 100 * math.exp(d - q * se[t]), 100 * math.exp(d + q * se[t])])
    return out


# ---- the tests ---------------------------------------------------------------------------

class RepeatSalesCalcTest(unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.df = make_sales()
        cls.pairs = build_pairs(cls.df)
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        df = cls.df
        mixed = [("" if not math.isfinite(v) else (str(int(v)) if k % 2 else v))
                 for v, k in zip(df.numid, df.k)]
        rows = [("id", "date", "price", "changed", "numid", "mixedid")] + [
            (r.id, r.date, r.price if math.isfinite(r.price) else "", float(r.changed),
             r.numid if math.isfinite(r.numid) else "", mx)
            for r, mx in zip(df.itertuples(), mixed)]
        cls.last = len(rows)
        cls.sheet.getCellRangeByName(f"A1:F{cls.last}").setDataArray(rows)
        n = cls.last
        cls.ranges = f"A2:A{n};B2:B{n};C2:C{n};D2:D{n}"

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    # -- helpers
    def array(self, ref, formula, fast=False):
        self.sheet.getCellRangeByName(ref).setArrayFormula(formula)
        self.doc.calculateAll()
        if fast:  # one UNO call; "no value" cells read as ""
            return [list(r) for r in self.sheet.getCellRangeByName(ref).getDataArray()]
        return sheet_values(self.sheet, ref)

    def formula(self, ref, formula):
        self.sheet.getCellRangeByName(ref).setFormula(formula)
        self.doc.calculateAll()
        return sheet_values(self.sheet, ref)[0][0]

    def assertCell(self, got, want, what, rel=REL):
        if isinstance(want, str):
            self.assertEqual(got, want, what)
        else:
            self.assertIsInstance(got, float, what)
            self.assertLessEqual(abs(got - want), rel * max(abs(want), 1e-300), f"{what}: {got} vs {want}")

    def assertRows(self, cells, want, what, rel=REL):
        self.assertEqual(len(cells), len(want), what)
        for i, (row, w) in enumerate(zip(cells, want)):
            self.assertEqual(len(row), len(w))
            for j, (g, x) in enumerate(zip(row, w)):
                self.assertCell(g, x, f"{what}, row {i} column {j}", rel)

    # -- the data itself
    def test_data_has_every_kind_of_pair(self):
        reasons = set(self.pairs.reason)
        for r in ["", "first sale: blank or non-numeric price", "second sale: blank or non-numeric price",
                  "property changed at the second sale", "both sales in one period",
                  "held less than minhold months", "annualised log return beyond +/-maxrate"]:
            self.assertIn(r, reasons)
        self.assertEqual(components(self.pairs), 1, "used pairs form one connected part")
        self.assertGreater(int(self.pairs.used.sum()), 500)

    # -- CHAINRS
    def test_chainrs_bmn_monthly_every_cell(self):
        n = self.last
        cells = self.array("H2:L49", f'=CHAINRS({self.ranges};;;;"method=bmn")')
        want = expected_index(self.pairs, "bmn", "M")
        self.assertRows(cells, want, "bmn monthly vs statsmodels OLS")
        self.assertEqual(cells[18], [serial("2019-07-01"), "", 0.0, "", ""], "2019-07: no pair reaches it")
        self.assertEqual(cells[0][1:], [100.0, 0.0, 100.0, 100.0], "base row; no pair ends in the first month")
        # AVERAGE skips the month without a value.
        avg = self.formula("N2", "=AVERAGE(I2:I49)")
        self.assertAlmostEqual(avg, np.mean([r[1] for r in want if r[1] != ""]), places=8)
        del n

    def test_chainrs_cs_quarterly_base_in_the_middle(self):
        pq = build_pairs(self.df, "Q")
        base = 8  # 2020Q1
        cells = self.array("H60:L75", f'=CHAINRS({self.ranges};;"Q";DATE(2020;2;15))')
        want = expected_index(pq, "cs", "Q", base=base)
        self.assertRows(cells, want, "cs quarterly, base 2020Q1 vs statsmodels OLS -> OLS(e^2) -> WLS")
        self.assertEqual(cells[base][1], 100.0)

    def test_chainrs_cs2_titles_and_notes(self):
        cells = self.array("H80:L160", f'=CHAINRS({self.ranges};;;;"method=cs2; titles=1; notes=1; level=0.9")')
        self.assertEqual(cells[0], ["period", "index", "pairs", "lower", "upper"])
        b, ci, fit, _, u = reference_fit(self.pairs, "cs2", 12)
        ci90 = dict(zip(b.keys(), fit.conf_int(0.10)))
        for k in range(1, 48):
            row = cells[1 + k]
            if k == 18:
                self.assertEqual(row[1], "")
                continue
            self.assertCell(row[1], 100 * math.exp(b[k]), f"cs2 month {k} index")
            self.assertCell(row[3], 100 * math.exp(ci90[k][0]), f"cs2 month {k} 90 % lower")
            self.assertCell(row[4], 100 * math.exp(ci90[k][1]), f"cs2 month {k} 90 % upper")
        notes = {r[0]: r[1] for r in cells[49:] if isinstance(r[0], str)}
        # A blank-id row is counted under its first problem: a blank price comes first.
        blank_ids = int(((self.df.id.str.strip() == "") & np.isfinite(self.df.price)).sum())
        self.assertEqual(notes.get("dropped: blank property id"), float(blank_ids))
        used_rows = len(set(zip(u.id, u.d1)) | set(zip(u.id, u.d2)))
        self.assertEqual(notes.get("rows used"), float(used_rows), "rows in at least one used pair")
        # "pairs": "<used> of <formed> pairs used; dropped: <n> <reason>, ..." (pandas counts)
        summary = notes["pairs"]
        head, _, tail = summary.partition("; dropped: ")
        self.assertEqual(head, f"{int(self.pairs.used.sum())} of {len(self.pairs)} pairs used")
        got = {}
        for item in tail.split(", "):
            count, _, why = item.partition(" ")
            got[why] = int(count)
        want = self.pairs[~self.pairs.used].reason.value_counts().to_dict()
        self.assertEqual(got, want)
        self.assertTrue(any(r[0] == "warning" and "2019-07" in r[1] for r in cells[49:] if r[0]),
                        "the month without a value is named")

    def test_ids_as_numbers_and_mixed_text(self):
        n = self.last
        rest = f"B2:B{n};C2:C{n};D2:D{n}"
        text = self.array("H170:L217", f'=CHAINRS(A2:A{n};{rest};;;;"method=bmn")')
        num = self.array("N170:R217", f'=CHAINRS(E2:E{n};{rest};;;;"method=bmn")')
        mixed = self.array("T170:X217", f'=CHAINRS(F2:F{n};{rest};;;;"method=bmn")')
        self.assertEqual(num, text, "numeric ids: the same properties, the same index")
        self.assertEqual(mixed, text, "123 and \"123\" are one property")
        m = len(self.pairs)
        audit = self.array(f"CF2:CO{1 + m}", f'=RSPAIRS(F2:F{n};{rest})', fast=True)
        want_ids = [str(5001 + int(x[1:]) - 1) for x in self.pairs.id]
        self.assertEqual([r[0] for r in audit], want_ids, "canonical text of the numeric ids")

    # -- RSPAIRS
    def test_rspairs_every_row(self):
        n = self.last
        p = self.pairs
        m = len(p)
        cells = self.array(f"H230:Q{230 + m}", f'=RSPAIRS({self.ranges};;"titles=1")', fast=True)
        self.assertEqual(cells[0], ["id", "first date", "first price", "second date", "second price",
                                    "months held", "annual log return", "used", "reason", "weight"])
        _, _, _, w, u = reference_fit(p, "cs", 12)
        weight = np.zeros(m)
        weight[np.flatnonzero(p.used.values)] = w
        for i, r in enumerate(p.itertuples()):
            row = cells[1 + i]
            what = f"pair {i} ({r.id})"
            want = [r.id, r.d1, r.p1 if math.isfinite(r.p1) else "", r.d2,
                    r.p2 if math.isfinite(r.p2) else "", r.months,
                    r.rate if math.isfinite(r.rate) else "", 1.0 if r.used else 0.0, r.reason,
                    float(weight[i])]
            for j, (g, x) in enumerate(zip(row, want)):
                self.assertCell(g, x, f"{what} column {j}", rel=1e-12 if j != 9 else 1e-8)
        self.assertAlmostEqual(float(np.mean([r[9] for r in cells[1:] if r[7] == 1.0])), 1.0, places=12)

    def test_rspairs_quarterly_option_keys(self):
        pq = build_pairs(self.df, "Q")
        n = self.last
        cells = self.array(f"BU2:CD{1 + len(pq)}",
                           f'=RSPAIRS({self.ranges};;"freq=Q; base=2020-02-15; method=bmn")', fast=True)
        self.assertEqual([r[8] for r in cells], list(pq.reason), "quarterly reasons (same quarter)")
        self.assertEqual([r[7] for r in cells], [1.0 if x else 0.0 for x in pq.used])
        self.assertTrue(all(r[9] == (1.0 if r[7] == 1.0 else 0.0) for r in cells), "bmn: weights 1")
        del n

    # -- chain = 1
    def test_chain_one_values_bands_and_no_revisions(self):
        n = self.last
        cells = self.array("AD2:AH49", f'=CHAINRS({self.ranges};;;;"method=bmn; chain=1; init=12")')
        want = chain_reference(self.pairs, 12, 48)
        starts = [serial(pd.Timestamp("2018-01-01") + pd.DateOffset(months=k)) for k in range(48)]
        self.assertEqual([r[0] for r in cells], starts)
        self.assertRows([[r[1], r[3], r[4]] for r in cells], want, "chain=1 bmn vs numpy recursion")
        # Sales from 2021 on excluded: the published values up to 2020-12 stay exactly the same
        # with chain=1 (default method cs); chain=0 revises them.
        inc = f"B2:B{n}<DATE(2021;1;1)"
        rng_ = f"A2:A{n};B2:B{n};C2:C{n};D2:D{n};{inc}"
        full1 = self.array("AJ2:AN49", f'=CHAINRS({self.ranges};;;;"chain=1")')
        cut1 = self.array("AP2:AT37", f'=CHAINRS({rng_};;;"chain=1")')
        self.assertEqual(cut1, full1[:36], "chain=1: no revision, every cell")
        full0 = self.array("AV2:AZ49", f'=CHAINRS({self.ranges})')
        cut0 = self.array("BB2:BF37", f'=CHAINRS({rng_})')
        gaps = [abs(a[1] / b[1] - 1) for a, b in zip(cut0, full0[:36]) if a[1] != "" and b[1] != ""]
        self.assertGreater(max(gaps), 1e-4, "chain=0 revises the past on the same cut")

    # -- bad input
    def test_bad_input(self):
        n = self.last
        msg = self.formula("BH2", f"=CHAINRS(A2:A{n - 1};B2:B{n};C2:C{n})")
        self.assertEqual(msg, f"Lintel: ids has {n - 2} rows, dates has {n - 1}")
        msg = self.formula("BH3", f"=RSPAIRS(A2:A{n};B2:B{n};C2:C{n};D2:D{n - 3})")
        self.assertEqual(msg, f"Lintel: ids has {n - 1} rows, changed has {n - 4}")
        msg = self.formula("BH4", f'=RSPAIRS({self.ranges};;"colour=red")')
        self.assertTrue(msg.startswith('Lintel: unknown option "colour" for RSPAIRS (known: method,'), msg)
        msg = self.formula("BH5", f'=CHAINRS({self.ranges};;;;"chain=2")')
        self.assertEqual(msg, 'Lintel: option chain must be 1 or 0 (TRUE or FALSE), got "2"')
        # The base in a month no pair reaches: CHAINRS says why ...
        msg = self.formula("BH6", f"=CHAINRS({self.ranges};;;DATE(2019;7;15))")
        self.assertEqual(msg, "Lintel: the base period 2019-07 has no value: no usable pair has a sale in it")
        # ... RSPAIRS lists the pairs, those that passed the filters "index not estimated".
        m = len(self.pairs)
        cells = self.array(f"BJ2:BS{1 + m}", f'=RSPAIRS({self.ranges};;"base=2019-07-15")', fast=True)
        self.assertEqual([r[8] for r in cells],
                         ["index not estimated" if u else r for u, r in zip(self.pairs.used, self.pairs.reason)])
        # Only blank ids: no property, a message.
        msg = self.formula("BH7", f"=CHAINRS(G2:G{n};B2:B{n};C2:C{n})")
        self.assertTrue(msg.startswith("Lintel: no usable pair of sales"), msg)


if __name__ == "__main__":
    unittest.main(verbosity=2)
