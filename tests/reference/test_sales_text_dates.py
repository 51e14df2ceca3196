"""Dates written as text (native/core/date_text.hpp) against Python's datetime.strptime and
pandas.to_datetime (python3-pandas) on the same texts.

Generating model (test data): 2,500 (year, month, day) triples, year uniform 1995..2030,
month uniform 1..12 (5 % of them 13), day uniform 1..31 (so about 1 in 30 is no calendar
date: 31 April, 30 February, 29 February of common years), each written in one of these
forms chosen at random: ISO year-first with -, / or . and optional zero padding;
day/month/year and month/day/year with /, . or - and optional padding; the same with a
two-digit year; English month names ("15 March 2024", "15-Mar-2024", "March 15, 2024");
each with a time after it in 30 % of cases (" 14:30", "T14:30:00", " 2:30 PM"), and
surrounding blanks (also U+00A0) in 10 %. Plus the fixed texts 31/02/2024, 29/02/2023,
2024-13-01 and a few that are no date at all.

Reference rule, spelled out with strptime (C locale): a text is read when it matches one of
the formats of the order (year-first "%Y-%m-%d" etc. always; "%d/%m/%Y" for day/month/year,
"%m/%d/%Y" for month/day/year, both when no order is known) with a four-digit year, followed
by one of the time formats; with no order, a text that matches both with different dates is
ambiguous. A text whose numeric fields have a two-digit year is refused as such; a text of
the numeric or month-name shape that strptime refuses is no calendar date.

pandas.to_datetime(text, dayfirst=...) (dateutil underneath) is more lenient; every text
where it reads a date we refuse must fall in one of these documented groups: a two-digit
year (pandas guesses the century); a day/month text that is a date only in the other order
(dateutil swaps silently); a year-first text read as year/day/month under dayfirst=True
(dateutil's reading of "2012-6-10 2:30 PM" as 6 October); texts that are no full date by
our rules (a year alone, "15th", mixed or no separators).
"""
import re
import warnings
from datetime import datetime

import numpy as np
import pandas as pd

from refcommon import Checks, parse_args, run_refcli

args = parse_args()
warnings.simplefilter("ignore", UserWarning)  # pandas: "Parsing dates in DD/MM/YYYY format ..."
checks = Checks("dates as text vs strptime and pandas")
rng = np.random.default_rng(20240315)

OK, BLANK, UNREADABLE, TWO_DIGIT, NO_SUCH, AMBIGUOUS = range(6)
MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August",
          "September", "October", "November", "December"]


def pad(v, width):
    return f"{v:0{width}d}" if rng.random() < 0.5 else str(v)


def make_text(y, m, d):
    form = rng.choice(["iso", "dmy", "mdy", "dmy2", "mdy2", "name"], p=[0.2, 0.25, 0.25, 0.05, 0.05, 0.2])
    s = rng.choice(["/", ".", "-"])
    if form == "iso":
        t = f"{y:04d}{s}{pad(m, 2)}{s}{pad(d, 2)}"
    elif form == "dmy":
        t = f"{pad(d, 2)}{s}{pad(m, 2)}{s}{y:04d}"
    elif form == "mdy":
        t = f"{pad(m, 2)}{s}{pad(d, 2)}{s}{y:04d}"
    elif form == "dmy2":
        t = f"{pad(d, 2)}{s}{pad(m, 2)}{s}{y % 100:02d}"
    elif form == "mdy2":
        t = f"{pad(m, 2)}{s}{pad(d, 2)}{s}{y % 100:02d}"
    else:
        if m > 12:
            m = 12
        name = MONTHS[m - 1]
        t = rng.choice([f"{d} {name} {y}", f"{d} {name[:3]} {y}", f"{d:02d}-{name[:3]}-{y}",
                        f"{name} {d}, {y}", f"{name[:3]} {d} {y}"])
    if rng.random() < 0.3:
        t += rng.choice([" 14:30", "T14:30:00", " 2:30 PM", " 09:05:59"])
    if rng.random() < 0.1:
        t = rng.choice([" ", "\u00a0", "  "]) + t + rng.choice([" ", "\u00a0", ""])
    return t


texts = []
for _ in range(2500):
    y = int(rng.integers(1995, 2031))
    m = int(rng.integers(1, 13)) if rng.random() > 0.05 else 13
    d = int(rng.integers(1, 32))
    texts.append(make_text(y, m, d))
texts += ["31/02/2024", "29/02/2023", "2024-13-01", "29/02/2024", "31.04.2024", "04/31/2024",
          "yesterday", "2024", "15th March 2024", "15/03-2024", "20240315"]

TIME_FORMATS = ["", " %H:%M", " %H:%M:%S", "T%H:%M", "T%H:%M:%S", " %I:%M %p"]
YEAR_FIRST = [f"%Y{s}%m{s}%d" for s in "-/."]
NAMES = ["%d %B %Y", "%d %b %Y", "%d-%b-%Y", "%B %d, %Y", "%b %d %Y", "%B %d %Y", "%b %d, %Y"]
DMY = [f"%d{s}%m{s}%Y" for s in "/.-"]
MDY = [f"%m{s}%d{s}%Y" for s in "/.-"]
FOUR_DIGIT_YEAR = re.compile(r"(?<!\d)\d{4}(?!\d)")
NUMERIC = re.compile(r"^(\d+)([/.-])(\d+)\2(\d+)")
NAMED = re.compile(r"^(\d{1,2}[ -][A-Za-z]+[ -]\d{4}|[A-Za-z]+ \d{1,2},? \d{4})(?!\d)")


def parse_with(text, date_formats):
    found = set()
    for df in date_formats:
        for tf in TIME_FORMATS:
            try:
                dt = datetime.strptime(text, df + tf)
            except ValueError:
                continue
            found.add(dt.date())
    return found


def reference(text, order):
    t = " ".join(text.replace("\u00a0", " ").split())
    shape = NUMERIC.match(t)
    if shape:
        a, b, c = shape.group(1), shape.group(3), shape.group(4)
        if len(a) != 4 and len(c) != 4:
            if all(1 <= len(f) <= 2 for f in (a, b, c)):
                return TWO_DIGIT, None
            return UNREADABLE, None
    if re.match(r"^\d{1,2}-[A-Za-z]{3}-\d{2}(?!\d)", t):
        return TWO_DIGIT, None
    if not FOUR_DIGIT_YEAR.search(t):
        return UNREADABLE, None
    base = YEAR_FIRST + NAMES
    if order == "DMY":
        got = parse_with(t, base + DMY)
    elif order == "MDY":
        got = parse_with(t, base + MDY)
    else:
        got = parse_with(t, base + DMY) | parse_with(t, base + MDY)
    if len(got) == 1:
        return OK, got.pop()
    if len(got) > 1:
        return AMBIGUOUS, None
    return (NO_SUCH if shape or NAMED.match(t) else UNREADABLE), None


def serial(date):
    return (date - datetime(1899, 12, 30).date()).days


frame = pd.DataFrame({"text": texts})
for order in ["DMY", "MDY", "auto"]:
    got = run_refcli(args.refcli, "date_text", frame, order=order)
    want = [reference(t, order) for t in texts]
    want_status = np.array([w[0] for w in want], dtype=float)
    want_serial = np.array([serial(w[1]) if w[1] else np.nan for w in want], dtype=float)
    checks.close(f"{order}: status of {len(texts)} texts", got.status.values, want_status, rel=0,
                 source="datetime.strptime with the formats of the order")
    checks.close(f"{order}: date serials", got.serial.values, want_serial, rel=0,
                 source="datetime.strptime, days from 1899-12-30")
    counts = {name: int((want_status == code).sum()) for name, code in
              [("read", OK), ("two-digit", TWO_DIGIT), ("no such date", NO_SUCH), ("ambiguous", AMBIGUOUS),
               ("unreadable", UNREADABLE)]}
    print(f"    {order}: {counts}")
    checks.true(f"{order}: every outcome occurs", all(v > 0 for k, v in counts.items()
                                                      if not (k == "ambiguous" and order != "auto")),
                str(counts))

    # pandas.to_datetime on the same texts, one by one (dateutil's parser underneath).
    if order == "auto":
        continue
    dayfirst = order == "DMY"
    tally = {"agree": 0, "pandas refuses what we read": 0, "two-digit year": 0, "other order": 0,
             "year/day/month": 0, "no full date": 0, "other": 0}
    LENIENT = {"2024", "15th March 2024", "15/03-2024", "20240315"}
    for t, st, sv in zip(texts, got.status.values, got.serial.values):
        clean = " ".join(t.replace("\u00a0", " ").split())
        try:
            p = pd.to_datetime(clean, dayfirst=dayfirst)
            ps = float(serial(p.date()))
        except (ValueError, OverflowError, pd.errors.ParserError):
            ps = None
        shape = NUMERIC.match(clean)
        ydm = None
        if shape and len(shape.group(1)) == 4:
            try:
                ydm = float(serial(datetime(int(shape.group(1)), int(shape.group(4)), int(shape.group(3))).date()))
            except ValueError:
                pass
        if st == OK and ps == sv:
            tally["agree"] += 1
        elif st == OK and ps is None:
            tally["pandas refuses what we read"] += 1
        elif ps is None:
            continue  # both refuse
        elif ydm is not None and ps == ydm and dayfirst:
            tally["year/day/month"] += 1
        elif st == TWO_DIGIT:
            tally["two-digit year"] += 1
        elif st != OK and reference(t, "MDY" if dayfirst else "DMY")[0] == OK and \
                float(serial(reference(t, "MDY" if dayfirst else "DMY")[1])) == ps:
            tally["other order"] += 1
        elif t in LENIENT:
            tally["no full date"] += 1
        else:
            tally["other"] += 1
            print(f"    unexplained: {t!r} ours {st}/{sv} pandas {ps}")
    print(f"    {order} vs pandas: {tally}")
    checks.true(f"{order}: pandas.to_datetime(dayfirst={dayfirst}) gives our date for every text we read "
                "(but year-first texts it reads as year/day/month)",
                tally["pandas refuses what we read"] == 0 and tally["other"] == 0 and tally["agree"] > 1200,
                str(tally))
    checks.true(f"{order}: where pandas reads what we refuse, it is a documented case",
                tally["two-digit year"] > 0 and tally["other order"] > 0 and tally["no full date"] == len(LENIENT),
                str(tally))

checks.finish()
