"""Numbers written as text (native/core/number_text.hpp) against a Python reading of the
same texts with the locale rules spelled out, and pandas.read_csv(thousands=..., decimal=...)
(python3-pandas).

Generating model (test data): for each of four conventions (decimal "." thousands "," as
en-US; decimal "," thousands "." as de-DE; decimal "," thousands U+202F as fr-FR; decimal
"." thousands "'" as de-CH), 1,500 amounts, log-uniform over 1 .. 5,000,000, half whole and
half with two decimals, written with Python's own grouping (format(x, ",.2f") with the
separators swapped in), each decorated at random with a currency before or after ($, €, £,
EUR, USD, CHF, with or without a space), a sign or accounting parentheses, surrounding blanks
(also U+00A0), or the group separator replaced by a space or U+00A0. Then 500 deliberately
bad texts per convention: a thousands separator moved to a wrong place, the text written in
another convention, a single separator followed by three digits (ambiguous), two currencies,
letters.

Reference rule (spelled out here, independently of the C++): strip blanks; a lone dash is
blank; parentheses or a leading minus make it negative; one currency before or after;
the body is either digits with at most one decimal separator, or groups "d{1,3}(G ddd)*"
with one kind of thousands separator G (the locale's, a space, a no-break space or an
apostrophe) and an optional decimal part; a single "." or "," followed by exactly three
digits with 1-3 integer digits (no leading zero) and no other separator is ambiguous.
"""
import io
import re

import numpy as np
import pandas as pd

from refcommon import Checks, parse_args, run_refcli

args = parse_args()
checks = Checks("numbers as text vs Python rules and pandas")
rng = np.random.default_rng(350000)

OK, BLANK, UNREADABLE, AMBIGUOUS = range(4)
CONVENTIONS = {  # name: (decimal, group, refcli group argument)
    "en-US": (".", ",", ","),
    "de-DE": (",", ".", "."),
    "fr-FR": (",", "\u202f", "nnbsp"),
    "de-CH": (".", "'", "apostrophe"),
}
CURRENCIES = ["$", "\u20ac", "\u00a3", "EUR", "USD", "CHF"]
BLANKS = " \u00a0\u202f\u2009'\u2019"


def write(x, decimals, dec, grp):
    s = format(x, f",.{decimals}f")  # Python's grouping: "1,250,000.50"
    return s.replace(",", "\x00").replace(".", dec).replace("\x00", grp)


def decorate(s):
    r = rng.random()
    if r < 0.2:
        c = rng.choice(CURRENCIES)
        s = c + rng.choice(["", " "]) + s
    elif r < 0.4:
        c = rng.choice(CURRENCIES)
        s = s + rng.choice(["", " "]) + c
    r = rng.random()
    if r < 0.07:
        s = "-" + s
    elif r < 0.1:
        s = "(" + s + ")"
    if rng.random() < 0.1:
        s = rng.choice([" ", "\u00a0"]) + s + rng.choice([" ", "\u00a0", ""])
    return s


def make_texts(dec, grp):
    texts, plain = [], []
    for _ in range(1500):
        x = float(np.exp(rng.uniform(0, np.log(5e6))))
        decimals = 0 if rng.random() < 0.5 else 2
        x = round(x, decimals)
        s = write(x, decimals, dec, grp)
        if rng.random() < 0.15 and x >= 1000:
            s = s.replace(grp, rng.choice([" ", "\u00a0"]))
        plain.append(s)
        texts.append(decorate(s))
    for _ in range(500):
        kind = rng.integers(0, 5)
        x = int(np.exp(rng.uniform(np.log(1000), np.log(5e6))))
        s = write(x, 0, dec, grp)
        if kind == 0:  # a thousands separator moved
            digits = s.replace(grp, "")
            cut = int(rng.integers(1, len(digits)))
            s = digits[:cut] + grp + digits[cut:]
        elif kind == 1:  # the other convention
            other = {".": ",", ",": "."}[dec]
            s = write(x + 0.5, 2, other, dec)
        elif kind == 2:  # ambiguous: 1-3 digits, one separator, three digits
            s = f"{rng.integers(1, 1000)}{rng.choice(['.', ','])}{rng.integers(0, 1000):03d}"
        elif kind == 3:
            s = "$" + s + " EUR"
        else:
            s = s + rng.choice(["k", " m2", "x"])
        texts.append(s)
        plain.append(s)
    texts += ["", "  ", "-", "\u2013", "0", ".5", "1,5", "1.234,56", "350.000", "350,000"]
    plain += ["", "  ", "-", "\u2013", "0", ".5", "1,5", "1.234,56", "350.000", "350,000"]
    return texts, plain


SYMBOLS = sorted(["$", "\u20ac", "\u00a3", "EUR", "USD", "CHF"], key=len, reverse=True)


def reference(text, dec, grp):
    t = text.strip()  # str.strip removes U+00A0 and U+202F too (Unicode white space)
    if t in ("", "-", "\u2013", "\u2014"):
        return BLANK, None
    neg = False
    if t.startswith("(") and t.endswith(")"):
        neg, t = True, t[1:-1].strip()
    sign = False
    if t.startswith("-"):
        sign, t = True, t[1:].strip()
    cur = False
    for c in SYMBOLS:
        if t.startswith(c):
            t, cur = t[len(c):].strip(), True
            break
    if cur and not sign and t.startswith("-"):
        sign, t = True, t[1:].strip()
    if not cur:
        for c in SYMBOLS:
            if t.endswith(c):
                t, cur = t[:-len(c)].strip(), True
                break
    if neg and sign:
        return UNREADABLE, None
    neg = neg or sign
    # Every kind of blank is one kind of thousands separator ("350 000" with a space and a
    # no-break space).
    t = "".join(" " if c in " \u00a0\u202f\u2009" else c for c in t)
    group_chars = {" " if grp in " \u00a0\u202f\u2009" else grp} | set(BLANKS)
    d = re.escape(dec)
    # Ambiguous first: one separator ("." or ",") that is the decimal one, three digits.
    m = re.fullmatch(r"([1-9]\d{0,2})([.,])(\d{3})", t)
    if m and m.group(2) == dec:
        return AMBIGUOUS, None
    if re.fullmatch(rf"\d*{d}\d+|\d+", t):
        v = float(t.replace(dec, "."))
        return OK, -v if neg else v
    m = re.fullmatch(rf"(\d{{1,3}})((?:(.)\d{{3}})(?:\3\d{{3}})*)({d}\d+)?", t)
    if m and m.group(3) in group_chars and m.group(3) != dec:
        body = t.replace(m.group(3), "").replace(dec, ".")
        v = float(body)
        return OK, -v if neg else v
    return UNREADABLE, None


def pandas_value(text, dec, grp):
    """pandas.read_csv of one field with thousands=grp, decimal=dec: a float, or None when
    pandas keeps it as text."""
    frame = pd.read_csv(io.StringIO("x\n" + text + "\n"), sep="\t", thousands=grp, decimal=dec,
                        skip_blank_lines=False, keep_default_na=False)
    v = frame.x.iloc[0]
    return float(v) if isinstance(v, (int, float, np.integer, np.floating)) else None


for name, (dec, grp, grp_arg) in CONVENTIONS.items():
    texts, plain = make_texts(dec, grp)
    got = run_refcli(args.refcli, "number_text", pd.DataFrame({"text": texts}), decimal=dec, group=grp_arg)
    want = [reference(t, dec, grp) for t in texts]
    want_status = np.array([w[0] for w in want], dtype=float)
    want_value = np.array([w[1] if w[1] is not None else np.nan for w in want], dtype=float)
    checks.close(f"{name}: status of {len(texts)} texts", got.status.values, want_status, rel=0,
                 source="the locale rules spelled out in Python")
    # rel 1e-15: the driver prints 17 digits and pandas.read_csv reads them back within an ulp.
    checks.close(f"{name}: values", got.value.values, want_value, rel=1e-15,
                 source="float() of the text with the separators removed")
    counts = {k: int((want_status == c).sum()) for k, c in
              [("read", OK), ("blank", BLANK), ("unreadable", UNREADABLE), ("ambiguous", AMBIGUOUS)]}
    print(f"    {name}: {counts}")
    checks.true(f"{name}: every outcome occurs", all(v > 0 for v in counts.values()), str(counts))

    # pandas.read_csv with this convention, on the undecorated texts that use only the
    # locale's own separators (pandas takes one thousands character and no currency).
    if grp not in (",", "."):  # pandas' C parser takes a one-byte thousands character
        continue
    res = run_refcli(args.refcli, "number_text", pd.DataFrame({"text": plain}), decimal=dec, group=grp_arg)
    tally = {"agree": 0, "differ": 0, "misplaced group (pandas drops it)": 0, "ambiguous (pandas: locale reading)": 0}
    for t, st, v in zip(plain, res.status.values, res.value.values):
        if not re.fullmatch(rf"[0-9{re.escape(dec)}{re.escape(grp)}]+", t) or t.startswith((dec, grp)):
            continue
        p = pandas_value(t, dec, grp)
        if st == OK:
            same = p is not None and abs(p - v) <= 1e-15 * abs(v)  # 17 digits read back by pandas
            tally["agree" if same else "differ"] += 1
            if not same:
                print(f"    differs: {t!r} ours {v} pandas {p}")
        elif st == AMBIGUOUS and p == float(t.replace(dec, ".")):
            tally["ambiguous (pandas: locale reading)"] += 1
        elif st == UNREADABLE and p is not None and p == float(t.replace(grp, "").replace(dec, ".")):
            tally["misplaced group (pandas drops it)"] += 1
        elif st == UNREADABLE and p is None:
            tally["agree"] += 1  # both refuse
        else:
            tally["differ"] += 1
            print(f"    differs: {t!r} ours status {st} pandas {p}")
    print(f"    {name} vs pandas.read_csv(thousands={grp!r}, decimal={dec!r}): {tally}")
    checks.true(f"{name}: pandas.read_csv gives our value for every text we read; where we refuse, "
                "pandas dropped a misplaced thousands separator or took the locale's reading of an "
                "ambiguous text", tally["differ"] == 0 and tally["agree"] > 1000
                and tally["misplaced group (pandas drops it)"] > 0, str(tally))

checks.finish()
