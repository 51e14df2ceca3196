"""Real-Calc test of a sales export as it comes (issue 12): a messy sheet in a day-first
document (dates and prices written as text, padded and mixed-case labels, duplicated rows,
conflicting prices, unreadable cells, extreme prices) gives the same index values through the
functions, with ISSEGMENT(...)*SALESCHECK(...;"output=use") as include, as the clean version of
the same sales; and SALESCHECK lists every planted problem and nothing else.

References outside the project: the clean sheet's median and mean indexes against pandas
(groupby median / mean, common-practice index 100 x_t / x_base); the price outliers against a
numpy computation of the modified z-score of the log price within quarter and district
(Iglewicz & Hoaglin 1993: z = 0.6745 (x - median) / MAD, |z| > 3.5); the texts' meaning is a
calendar fact (14/06/2022 day first is 14 June 2022) or the separators of the document's
language as LibreOffice's own locale data gives them (en-GB: "." and ","; de-DE: "," and ".").

Generating model of the clean sales (invented, no real place): 480 sales, 20 in each month of
2022-01 .. 2023-12 on day 1 + (7 i mod 28); sale i is of property K-(i mod 220) (so a
property sells every 11 months); a property's district is Ellenford with probability 0.6 else
Marrow Hill, its type house with probability 0.45 else flat, its floor area uniform on 45..159
m2; ln price = 12.4 + 0.005 month + 0.2 [Ellenford] + 0.3 [house] + 0.004 (area - 80) +
U(-0.12, 0.12), rounded to 100. Two prices carry an extra zero (x10) and one district is blank,
in both versions: they are sales as recorded.
"""
import datetime as dt
import os
import sys
import unittest

import numpy as np
import pandas as pd

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
import uno  # noqa: E402
from lintel_office import SharedOffice, SheetCalls, sheet_values  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
EPOCH = dt.date(1899, 12, 30)
MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August", "September",
          "October", "November", "December"]

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


def serial(d):
    return float((d - EPOCH).days)


def make_sales(seed=7):
    rng = np.random.default_rng(seed)
    n, props = 480, 220
    district_of = np.where(rng.random(props) < 0.6, "Ellenford", "Marrow Hill")
    type_of = np.where(rng.random(props) < 0.45, "house", "flat")
    area_of = rng.integers(45, 160, props)
    rows = []
    noise = rng.uniform(-0.12, 0.12, n)
    for i in range(n):
        month = i // 20
        day = dt.date(2022 + month // 12, month % 12 + 1, 1 + (7 * i) % 28)
        p = i % props
        lp = (12.4 + 0.005 * month + 0.2 * (district_of[p] == "Ellenford") + 0.3 * (type_of[p] == "house")
              + 0.004 * (area_of[p] - 80) + noise[i])
        rows.append({"date": day, "price": float(round(np.exp(lp), -2)), "id": f"K-{p:04d}",
                     "district": str(district_of[p]), "type": str(type_of[p]), "area": float(area_of[p])})
    df = pd.DataFrame(rows)
    df.loc[57, "price"] *= 10     # an extra zero
    df.loc[333, "price"] *= 10
    df.loc[201, "district"] = ""  # no district
    return df


def messy_date(d, i):
    k = i % 7
    if k == 0:
        return serial(d)                                # a date cell
    if k == 1:
        return d.isoformat()                            # 2022-03-15
    if k == 2:
        return f"{d.day}.{d.month}.{d.year}"            # 15.3.2022
    if k == 3:
        return f"{d.day} {MONTHS[d.month - 1]} {d.year}"  # 15 March 2022
    return f"{d.day:02d}/{d.month:02d}/{d.year}"        # 15/03/2022


def messy_price(x, i):
    x = int(x)
    g = f"{x:,}"
    return [float(x), g, "\u00a3" + g, g.replace(",", " "), str(x)][i % 5]


def messy_label(v, i):
    if not v:
        return v
    return [v, v + " ", v.lower(), v.upper(), "\u00a0" + v, v][i % 6]


def messy_type(v, i):
    return [v, v.capitalize(), v + " ", v, v][i % 5]


def messy_id(v, i):
    return [v, v.lower(), v + " ", v][i % 4]


class MessyExportTest(SheetCalls, unittest.TestCase):
    @classmethod
    def setUpClass(cls):
        cls.df = make_sales()
        cls.doc = office.new_calc()
        # A day-first document: its language is English (United Kingdom).
        cls.doc.CharLocale = uno.createUnoStruct("com.sun.star.lang.Locale", "en", "GB", "")
        sheets = cls.doc.Sheets
        sheets.insertNewByName("Clean", 0)
        sheets.insertNewByName("Messy", 1)
        cls.sheet = sheets.getByIndex(2)  # the new document's own sheet: the formulas go here
        header = ("date", "price", "id", "district", "type", "area")
        clean = [header] + [(serial(r.date), r.price, r.id, r.district, r.type, r.area)
                            for r in cls.df.itertuples()]
        sheets.getByName("Clean").getCellRangeByName(f"A1:F{len(clean)}").setDataArray(clean)
        cls.clean_last = len(clean)

        # The messy export: the same sales written differently, and planted rows. `planted`
        # maps a sheet row to the problems SALESCHECK must list for it.
        rows, cls.planted = [header], {}

        def plant(cells, *problems):
            rows.append(cells)
            cls.planted[len(rows)] = list(problems)

        extra = ("Ellenford", "flat", 80.0)
        for r in cls.df.itertuples():
            i = r.Index
            rows.append((messy_date(r.date, i), messy_price(r.price, i), messy_id(r.id, i),
                         messy_label(r.district, i), messy_type(r.type, i),
                         str(int(r.area)) if i % 3 == 0 else r.area))
            if i in (57, 333):
                cls.planted[len(rows)] = [("prices", "price outlier")]
            if i == 201:
                cls.planted[len(rows)] = [("segment", "blank segment")]
            if i == 100:   # sale 10 again, written otherwise: a duplicate
                s = cls.df.loc[10]
                plant((serial(s.date), f"{int(s.price):,}", s.id.lower() + " ", s.district, s.type, s.area),
                      ("ids", "duplicate"))
            if i == 310:   # sale 300 again
                s = cls.df.loc[300]
                plant((s.date.strftime("%d/%m/%Y"), float(s.price), s.id, s.district.upper(), s.type, s.area),
                      ("ids", "duplicate"))
            if i == 150:   # one property, one day, two prices
                plant(("10/05/2023", "410,000", "K-9001") + extra, ("prices", "conflicting prices"))
                plant(("10/05/2023", "455,000", "k-9001") + extra, ("prices", "conflicting prices"))
            if i == 250:
                plant(("14/06/23", "390,000", "K-9002") + extra, ("dates", "two-digit year"))
                plant(("15/06/2023", "350.000", "K-9003") + extra, ("prices", "ambiguous number"))
                plant((350000.0, 350000.0, "K-9004") + extra, ("dates", "date implausible for a sale"))
                plant(("16/06/2023", "n/a", "K-9005") + extra, ("prices", "unreadable price"))
        sheets.getByName("Messy").getCellRangeByName(f"A1:F{len(rows)}").setDataArray(rows)
        cls.messy_last = len(rows)

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    # Formulas over the two sheets, for the segment Ellenford.
    def clean(self, fn):
        n = self.clean_last
        c = lambda col: f"$Clean.{col}2:{col}{n}"  # noqa: E731
        return fn.format(d=c("A"), p=c("B"), id=c("C"), seg=c("D"), t=c("E"), chars=f"$Clean.E2:F{n}",
                         inc=f'({c("D")}="Ellenford")')

    def messy(self, fn):
        n = self.messy_last
        c = lambda col: f"$Messy.{col}2:{col}{n}"  # noqa: E731
        use = f'SALESCHECK({c("A")};{c("B")};{c("C")};;;;"output=use; labels=clean")'
        return fn.format(d=c("A"), p=c("B"), id=c("C"), seg=c("D"), t=c("E"), chars=f"$Messy.E2:F{n}",
                         inc=f'ISSEGMENT({c("D")};"Ellenford")*{use}')

    def both(self, ref_clean, ref_messy, template):
        clean = self.array(ref_clean, "=" + self.clean(template))
        messy = self.array(ref_messy, "=" + self.messy(template))
        self.assertFalse(isinstance(clean[0][0], str), clean[0][0])
        self.assertFalse(isinstance(messy[0][0], str), messy[0][0])
        return clean, messy

    def test_median_and_mean_as_clean_and_as_pandas(self):
        seg = self.df[self.df.district == "Ellenford"]
        month = pd.PeriodIndex(pd.to_datetime(seg.date), freq="M")
        for fn, stat, rows in (("INDEXMEDIAN", "median", "A1:E24"), ("INDEXMEAN", "mean", "G1:K24")):
            with self.subTest(fn):
                clean, messy = self.both(rows, rows.replace("1:", "31:").replace("24", "54"),
                                         fn + "({d};{p};{inc})")
                self.assertEqual(messy, clean)
                level = getattr(seg.price.groupby(month.values), stat)()
                want = 100 * level / level.iloc[0]  # pandas; common practice 100 x_t / x_base
                self.assertEqual(len(clean), len(want))
                for row, w, n in zip(clean, want.values, seg.price.groupby(month.values).size().values):
                    self.assertAlmostEqual(row[1], w, delta=1e-10 * w)
                    self.assertEqual(row[2], float(n))

    def test_mix_hedonic_and_repeat_sales_as_clean(self):
        cases = [("INDEXMIX({d};{p};{t};{inc};\"Q\";;\"labels=clean\")", 5),
                 ("INDEXHEDONIC({d};{p};{chars};{inc};\"Q\";;\"labels=clean\")", 5),
                 ("CHAINRS({id};{d};{p};;{inc};\"Q\";;\"labels=clean\")", 5)]
        for k, (template, width) in enumerate(cases):
            with self.subTest(template.split("(")[0]):
                col = "ABCDEFGHIJKLMNOPQRSTUVWXYZ"[k * 6]
                last = "ABCDEFGHIJKLMNOPQRSTUVWXYZ"[k * 6 + width - 1]
                clean, messy = self.both(f"{col}60:{last}67", f"{col}70:{last}77", template)
                self.assertEqual(messy, clean)

    def test_salescheck_lists_every_planted_problem_and_nothing_else(self):
        n = self.messy_last
        c = lambda col: f"$Messy.{col}2:{col}{n}"  # noqa: E731
        cells = self.array("A100:F140", f'=SALESCHECK({c("A")};{c("B")};{c("C")};{c("D")};;"Q";"labels=clean")')
        listed = {}
        for row in cells:
            if isinstance(row[0], float):
                listed.setdefault(int(row[0]), []).append((row[1], row[2]))
        want = {r: sorted(p) for r, p in self.planted.items()}
        self.assertEqual({r: sorted(p) for r, p in listed.items()}, want)
        # Rows are the sheet's numbers: the duplicate of sale 10 names its first copy (row 12).
        dup = [row for row in cells if row[2] == "duplicate"][0]
        self.assertIn("same id, date and price as row 12", dup[5])
        # The rest of the selected range is Calc's #N/A: the list ended.
        self.assertEqual(cells[len(sum(want.values(), []))][0], ("error", 32767))

    def test_outliers_as_numpy_finds_them(self):
        # The used rows of the messy sheet are the clean sales: their modified z-scores within
        # quarter and district (a blank district is a group of its own).
        df = self.df.copy()
        df["q"] = pd.PeriodIndex(pd.to_datetime(df.date), freq="Q")
        z = pd.Series(np.nan, index=df.index)
        for _, g in df.groupby(["q", "district"]):
            if len(g) < 10:
                continue
            x = np.log(g.price.values)
            med = np.median(x)
            mad = np.median(np.abs(x - med))
            z[g.index] = 0.6745 * (x - med) / mad
        flagged = sorted(df.index[np.abs(z) > 3.5])
        self.assertEqual(flagged, [57, 333])
        n = self.messy_last
        c = lambda col: f"$Messy.{col}2:{col}{n}"  # noqa: E731
        cells = self.array("H100:M140", f'=SALESCHECK({c("A")};{c("B")};{c("C")};{c("D")};;"Q";"labels=clean")')
        got = [row[4] for row in cells if row[2] == "price outlier"]
        self.assertEqual(len(got), 2)
        for g, i in zip(got, flagged):
            self.assertAlmostEqual(g, z[i], delta=1e-9 * abs(z[i]))

    def test_use_mask_and_counts(self):
        n = self.messy_last
        c = lambda col: f"$Messy.{col}2:{col}{n}"  # noqa: E731
        use = self.array(f"O100:O{100 + n - 2}", f'=SALESCHECK({c("A")};{c("B")};{c("C")};;;;"output=use; labels=clean")')
        zeros = sorted(i + 2 for i, r in enumerate(use) if r[0] == 0.0)
        dropped = sorted(r for r, p in self.planted.items()
                         if p[0][1] not in ("price outlier", "blank segment"))
        self.assertEqual(zeros, dropped)
        counts = self.array("Q100:R116", f'=SALESCHECK({c("A")};{c("B")};{c("C")};{c("D")};;"Q";"output=counts; labels=clean")')
        got = {r[0]: r[1] for r in counts}
        self.assertEqual(got["rows checked"], float(n - 1))
        self.assertEqual(got["rows used"], float(len(self.df)))
        self.assertEqual(got["duplicate"], 2.0)
        self.assertEqual(got["conflicting prices"], 2.0)
        self.assertEqual(got["price outlier"], 2.0)
        self.assertEqual(got["blank date"], 0.0)

    def test_base_date_in_the_documents_order(self):
        # 01/03/2023 in an en-GB document is 1 March 2023: the base period of the table.
        n = self.clean_last
        cells = self.array("T1:X24", f'=INDEXMEDIAN($Clean.A2:A{n};$Clean.B2:B{n};;;"01/03/2023")')
        self.assertEqual(cells[14][0], serial(dt.date(2023, 3, 1)))
        self.assertEqual(cells[14][1], 100.0)
        msg = self.formula("Z1", f'=INDEXMEDIAN($Clean.A2:A{n};$Clean.B2:B{n};;;"01/03/23")')
        self.assertTrue(msg.startswith('Lintel: base: "01/03/23" has a two-digit year'), msg)


class OtherLanguagesTest(SheetCalls, unittest.TestCase):
    """The document's language decides the date order and the separators (LibreOffice's own
    locale data): German writes 15.03.2024 and 350.000,00, US English 03/15/2024 and 350,000."""

    def check(self, language, country, date_text, price_text):
        doc = office.new_calc()
        try:
            doc.CharLocale = uno.createUnoStruct("com.sun.star.lang.Locale", language, country, "")
            sheet = doc.Sheets.getByIndex(0)
            days = [dt.date(2023, 1, 1) + dt.timedelta(days=int(k)) for k in np.arange(0, 730, 9)]
            prices = [200000 + 1000 * (k % 13) + 500 * k for k in range(len(days))]
            rows = [(serial(d), float(p), date_text(d), price_text(p)) for d, p in zip(days, prices)]
            sheet.getCellRangeByName(f"A1:D{len(rows)}").setDataArray(rows)
            n = len(rows)
            self.doc, self.sheet = doc, sheet
            cells = self.array("F1:J24", f"=INDEXMEAN(A1:A{n};B1:B{n})")
            texts = self.array("L1:P24", f"=INDEXMEAN(C1:C{n};D1:D{n})")
            self.assertFalse(isinstance(texts[0][0], str), texts[0][0])
            self.assertEqual(texts, cells)
        finally:
            doc.close(True)

    def test_german(self):
        self.check("de", "DE", lambda d: f"{d.day:02d}.{d.month:02d}.{d.year}",
                   lambda p: f"{p:,.2f}".replace(",", "X").replace(".", ",").replace("X", "."))

    def test_us_english(self):
        self.check("en", "US", lambda d: f"{d.month}/{d.day}/{d.year}", lambda p: f"${p:,}")


if __name__ == "__main__":
    unittest.main()
