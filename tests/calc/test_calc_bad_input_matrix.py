"""The bad-input matrix in real Calc: every Lintel function x every argument x every kind of
bad input, each case one argument of a valid call changed.

For each case the test asserts:
  - an answer within a hang detector: each case's array formula is set with automatic
    calculation on (Calc computes that one cell) and read back within HANG_SECONDS (not a
    speed test: a hang kills the office by its process id and fails the test naming the
    case); about 1 300 cases take a minute or two in all;
  - the first cell is a value or a message starting "Lintel: ", never a programming fault
    (docs/errors.md: "Lintel never lets an exception leave a function"); no cell of the
    result holds an internal-fault message or a Calc error other than the #N/A Calc puts
    beyond the end of a result; an extreme value never turns a number the valid call has
    into a blank in silence;
  - where docs/errors.md or docs/functions.md says the outcome, that outcome:
      * an error value in a (cells) argument: "Lintel: <arg> holds #DIV/0! in cell
        Sheet1.X5: correct or clear that cell" (docs/errors.md, "An error value inside a
        (cells) argument");
      * an error value in any other argument, or a value or an expression in a (cells)
        argument: Calc's own error before Lintel is called (Err:504, #VALUE! or the error
        itself; docs/errors.md and docs/functions.md "Conventions");
      * an unknown option: 'Lintel: unknown option "colour" for F (known: ...)' with the
        function's keys from the table (docs/errors.md, "Messages you may meet");
      * ranges of different lengths: "Lintel: <a> has N rows, <b> has M rows";
      * a message never echoes a 10 KB option text whole (its length < 300);
  - the office is alive after each function.
The summary (function x kind -> values / messages / Calc errors) and the findings are printed
at the end; with LINTEL_MATRIX_OUT=file the whole matrix, case by case, is written there as
markdown. LINTEL_MATRIX_FULL=1 also gives a whole column to every argument that is not
(cells), not only to the first function with that argument (seconds a case: Calc hands over
every row). LINTEL_MATRIX_ONLY=F,G runs those functions only (to debug).

Test data (generated here, no source needed): 240 sales, 10 a month from 2022-01 over 24
months, sorted by date; 80 properties each sold three times (ids repeat, 8 months apart);
price 300000 * 1.005^month * area/100 * (1.1 North, 1.0 South, 0.95 East) * (1.05 house)
with a fixed deterministic wiggle; district and type as text columns; an include mask of
1s and a changed column of 0s with a few 1s. An index series of 36 months with a cycle and
a second one shifted by three months.
"""
import json
import math
import os
import re
import signal
import sys
import threading
import time
import unittest

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
from lintel_office import SharedOffice  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
GEN_JSON = os.environ.get("LINTEL_TABLE_JSON")
OUT_MD = os.environ.get("LINTEL_MATRIX_OUT")
HANG_SECONDS = 60.0  # per call; one function's batch gets this per its slowest possible call

office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop

N = 240          # sales rows (rows 1..N, no header)
M = 36           # index rows
FIRST_MONTH = 10  # rows 1..10 are the sales of 2022-01 (one period)

# Calc's error codes (formula/errorcodes.hxx): what a cell's getError() returns.
CALC_ERRORS = {504: "Err:504", 519: "#VALUE!", 532: "#DIV/0!", 32767: "#N/A", 503: "#NUM!",
               502: "Err:502", 523: "Err:523", 522: "Err:522", 511: "Err:511"}
EXTREMES = [("1E+308", 1e308), ("-1E+308", -1e308), ("1E-308", 1e-308), ("0", 0.0), ("-5", -5.0)]
LONG = 10 * 1024
BLOCK_ROWS = 4  # each case's array formula: 4 rows x 2 columns (row 3 holds the extremes)
STEP = BLOCK_ROWS + 1


def col_name(i):
    """0 -> A, 25 -> Z, 26 -> AA."""
    s = ""
    i += 1
    while i:
        i, r = divmod(i - 1, 26)
        s = chr(65 + r) + s
    return s


def col_index(name):
    i = 0
    for ch in name:
        i = i * 26 + ord(ch) - 64
    return i - 1


# ---------------------------------------------------------------------------------------
# The data
# ---------------------------------------------------------------------------------------
def sales_columns():
    """Columns A..H of the sales table as lists of N values."""
    import datetime
    epoch = datetime.date(1899, 12, 30)
    dates, prices, ids, area, district, kind, include, changed = ([] for _ in range(8))
    for i in range(N):
        month = i // 10
        day = 1 + (i % 10) * 2
        d = datetime.date(2022 + month // 12, month % 12 + 1, day)
        dates.append(float((d - epoch).days))
        p = i % 80
        ids.append(f"P{p:03d}")
        a = 60.0 + (p * 7) % 90
        area.append(a)
        dist = ("North", "South", "East")[p % 3]
        district.append(dist)
        typ = ("flat", "house")[(p // 3) % 2]
        kind.append(typ)
        wiggle = 1 + 0.04 * math.sin(1.7 * i + 0.3 * p)
        price = 300000 * 1.005 ** month * a / 100 * {"North": 1.1, "South": 1.0, "East": 0.95}[dist] \
            * (1.05 if typ == "house" else 1.0) * wiggle
        prices.append(float(round(price)))
        include.append(1.0)
        changed.append(1.0 if i in (170, 200) else 0.0)
    return {"A": dates, "B": prices, "C": ids, "D": area, "E": district, "F": kind,
            "G": include, "H": changed}


def index_columns():
    import datetime
    epoch = datetime.date(1899, 12, 30)
    periods, a, b = [], [], []
    for t in range(M):
        periods.append(float((datetime.date(2022 + t // 12, t % 12 + 1, 1) - epoch).days))
        a.append(round(100 * 1.004 ** t * (1 + 0.03 * math.sin(2 * math.pi * t / 14)), 6))
        b.append(round(100 * 1.004 ** t * (1 + 0.03 * math.sin(2 * math.pi * (t - 3) / 14)), 6))
    return {"J": periods, "K": a, "L": b}


# Roles of the source columns: what a cell of it should hold (for the wrong-type kind).
COLUMN_TYPE = {"A": "date", "B": "number", "C": "text", "D": "number", "E": "text", "F": "text",
               "G": "number", "H": "number", "J": "date", "K": "number", "L": "number"}

# Fixed cells (column N onwards; derived columns start at column AA).
HOME = "N1:P1"          # the reference home: area, district, type
METHODS = "Q1:Q2"       # INDEXBACKTEST methods
BLANK = "R1"            # a cell that stays empty
DIV0, NA = "S1", "S2"   # =1/0 and =NA()
LONG_JUNK = "T1"        # 10 KB of "x"
LONG_VALUE = "T2"       # <first option>=<10 KB of digits>
LONG_KEYS = "T3"        # "k0=1; k1=1; ..." 10 KB of unknown keys
NBSP_END = "T4"         # "<key>\u00a0=<value>": a no-break space after the key
NBSP_MID = "T5"         # a no-break space inside the key
LONG_FREQ = "T6"        # 10 KB text where a short text is expected
EXTREME_CELLS = "U"     # U1..U5: the extremes as cell values (a formula literal 1E-308 is
                        # refused by Calc's own parser, see test_calc_literal_subnormal)


class Arg:
    """One argument of a valid call. role: 'sales' / 'index' (row-aligned columns, `cols`
    their letters), 'mask' (an include/changed column given to an optional argument),
    'number', 'date', 'text', 'options', 'home', 'methods'."""

    def __init__(self, name, role, valid, cols=None, option_value=None):
        self.name, self.role, self.valid, self.cols = name, role, valid, cols
        self.option_value = option_value


def S(name, cols):  # sales column(s)
    return Arg(name, "sales", None, cols)


def I(name, cols):  # index column(s)
    return Arg(name, "index", None, cols)


def MASK(name, col):
    return Arg(name, "mask", None, col)


BASE = Arg("base", "date", "DATE(2022;6;15)")
FREQ = Arg("freq", "text", '"M"')
FREQ_Q = Arg("freq", "text", '"Q"')


def OPTS(text):
    return Arg("options", "options", f'"{text}"', option_value=text)


# A valid call of every function; each case changes one argument (or, for the call-level
# kinds, every row-aligned argument together).
CALLS = {
    "PERIODOF": [S("date", "A"), FREQ],
    "INDEXMEAN": [S("dates", "A"), S("prices", "B"), MASK("include", "G"), FREQ, BASE,
                  OPTS("minsales=1")],
    "INDEXMEDIAN": [S("dates", "A"), S("prices", "B"), MASK("include", "G"), FREQ, BASE,
                    OPTS("minsales=1")],
    "INDEXREBASE": [I("periods", "J"), I("index", "K"), Arg("base", "date", "DATE(2022;6;15)")],
    "INDEXCHANGE": [I("index", "K"), Arg("lag", "number", "1"), Arg("kind", "text", '"pct"'), FREQ],
    "PRICEADJUST": [Arg("price", "number", "300000"), Arg("saledate", "date", "DATE(2022;3;9)"),
                    Arg("targetdate", "date", "DATE(2023;6;1)"), I("periods", "J"), I("index", "K")],
    "INDEXHEDONIC": [S("dates", "A"), S("prices", "B"), S("characteristics", "DEF"),
                     MASK("include", "G"), FREQ_Q, BASE, OPTS("log=1")],
    "HEDONICCOEFS": [S("dates", "A"), S("prices", "B"), S("characteristics", "DEF"),
                     MASK("include", "G"), FREQ_Q, BASE, OPTS("log=1")],
    "REFHOMEVALUE": [S("dates", "A"), S("prices", "B"), S("characteristics", "DEF"),
                     Arg("home", "home", HOME), MASK("include", "G"), FREQ_Q, BASE, OPTS("log=1")],
    "INDEXMIX": [S("dates", "A"), S("prices", "B"), S("strata", "EF"), MASK("include", "G"),
                 FREQ_Q, BASE, OPTS("stat=median")],
    "INDEXVOLATILITY": [I("index", "K"), Arg("lag", "number", "1"), OPTS("annual=1")],
    "INDEXTREND": [I("index", "K"), FREQ, Arg("lambda", "number", "14400")],
    "INDEXSNR": [I("index", "K"), FREQ, OPTS("output=ratio")],
    "INDEXLEADLAG": [I("a", "K"), I("b", "L"), Arg("maxlag", "number", "6"), OPTS("lag=12")],
    "INDEXTURNS": [I("periods", "J"), I("index", "K"), FREQ, OPTS("titles=0")],
    "INDEXSEASONAL": [I("index", "K"), FREQ, OPTS("output=factors")],
    "INDEXCOMPARE": [I("indexes", "KL"), FREQ, OPTS("lag=1")],
    "CHAINRS": [S("ids", "C"), S("dates", "A"), S("prices", "B"), MASK("changed", "H"),
                MASK("include", "G"), FREQ_Q, BASE, OPTS("minhold=6")],
    "RSPAIRS": [S("ids", "C"), S("dates", "A"), S("prices", "B"), MASK("changed", "H"),
                MASK("include", "G"), OPTS("freq=Q")],
    "ISSEGMENT": [S("labels", "E"), Arg("values", "text", '"North"'), OPTS("labels=clean")],
    "SALESCHECK": [S("dates", "A"), S("prices", "B"), MASK("ids", "C"), MASK("segments", "E"),
                   MASK("include", "G"), FREQ, OPTS("output=counts")],
    "INDEXBACKTEST": [S("ids", "C"), S("dates", "A"), S("prices", "B"), MASK("characteristics", "DEF"),
                      MASK("strata", "EF"), MASK("changed", "H"), MASK("include", "G"), FREQ_Q,
                      Arg("methods", "methods", METHODS), OPTS("folds=2; revisions=1")],
}

# Findings: cases that fail today, recorded rather than fixed in the core (other helpers
# work on extreme values and work limits). Key: (function, argument, kind) -> why.
_OVERFLOW = ("extremes (issue 10, helper 'extremes'): an intermediate overflows near 1E+308 "
             "and the number shows as a blank")
KNOWN = {
}


# ---------------------------------------------------------------------------------------
# Cases
# ---------------------------------------------------------------------------------------
class Sheet:
    """Writes the data block and hands out derived columns (copies of a source column with
    one change) at fresh columns from AA on."""

    def __init__(self, sheet):
        self.sheet = sheet
        self.next_col = col_index("AA")
        self.cache = {}
        self.sales = sales_columns()
        self.index = index_columns()
        for letter, values in list(self.sales.items()) + list(self.index.items()):
            self.write_column(letter, 1, values)
        self.set(HOME, [[100.0, "North", "flat"]])
        self.set(METHODS, [["median"], ["repeat"]])
        for k, (_, v) in enumerate(EXTREMES):
            self.sheet.getCellRangeByName(f"{EXTREME_CELLS}{k + 1}").setValue(v)
        self.sheet.getCellRangeByName(DIV0).setFormula("=1/0")
        self.sheet.getCellRangeByName(NA).setFormula("=NA()")

    def set(self, ref, rows):
        self.sheet.getCellRangeByName(ref).setDataArray(tuple(tuple(r) for r in rows))

    def set_text(self, ref, text):
        self.sheet.getCellRangeByName(ref).setString(text)

    def write_column(self, letter, first_row, values):
        self.set(f"{letter}{first_row}:{letter}{first_row + len(values) - 1}", [[v] for v in values])

    def source(self, letter):
        return self.sales.get(letter) or self.index[letter]

    def rows_of(self, cols):
        return len(self.source(cols[0]))

    def derived(self, cols, kind):
        """Columns like `cols` (a string of letters, contiguous) with the first one changed:
        'text' (every cell of the wrong type), 'div0' / 'na' (row 5 an error cell), 'ext:V'
        (row 3 the number V), 'blank' (all empty). Returns the range text."""
        key = (cols, kind)
        if key in self.cache:
            return self.cache[key]
        n = self.rows_of(cols)
        first = self.next_col
        self.next_col += len(cols)
        letters = [col_name(first + j) for j in range(len(cols))]
        for j, src in enumerate(cols):
            values = list(self.source(src))
            if j == 0:
                if kind == "text":
                    values = [7.0] * n if COLUMN_TYPE[src] == "text" else ["abc"] * n
                elif kind.startswith("ext:"):
                    values[2] = float(kind[4:])
                elif kind == "blank":
                    values = None
            if values is not None:
                self.write_column(letters[j], 1, values)
        if kind in ("div0", "na"):
            self.sheet.getCellRangeByName(f"{letters[0]}5").setFormula(
                "=1/0" if kind == "div0" else "=NA()")
        ref = f"{letters[0]}1:{letters[-1]}{n}"
        self.cache[key] = ref
        return ref

    def home_variant(self, kind):
        """A reference-home row with its first cell changed, in W:Y (so that the whole
        columns N:P hold the valid home row only)."""
        key = ("home", kind)
        if key in self.cache:
            return self.cache[key]
        row = 1 + len([k for k in self.cache if k[0] == "home"])
        ref = f"W{row}:Y{row}"
        if kind in ("div0", "na"):
            self.set(ref, [["", "North", "flat"]])
            self.sheet.getCellRangeByName(f"W{row}").setFormula("=1/0" if kind == "div0" else "=NA()")
        elif kind == "text":
            self.set(ref, [["abc", "North", "flat"]])
        else:
            self.set(ref, [[float(kind[4:]), "North", "flat"]])
        self.cache[key] = ref
        return ref


def rng(cols, first, last):
    return f"{cols[0]}{first}:{cols[-1]}{last}"


def whole(cols):
    return f"{cols[0]}:{cols[-1]}"


class Case:
    def __init__(self, fn, arg, kind, formula, expect=None, doc=""):
        self.fn, self.arg, self.kind, self.formula = fn, arg, kind, formula
        self.expect = expect  # None: value or message; else a check returning an error text
        self.doc = doc
        self.outcome = None
        self.problem = None


def expect_calc_error(codes):
    def check(cell):
        if isinstance(cell, tuple) and cell[1] in codes:
            return None
        return f"want a Calc error {sorted(CALC_ERRORS.get(c, c) for c in codes)}"
    return check


def expect_message(pred, what):
    def check(cell):
        if isinstance(cell, str) and pred(cell):
            return None
        return f"want {what}"
    return check


# A whole column given to an argument that is not (cells) makes Calc hand over all 1,048,576
# rows (docs/functions.md, "Conventions"): seconds a case. The default run tries it on the
# first function with each argument name; LINTEL_MATRIX_FULL=1 on every argument.
FULL = os.environ.get("LINTEL_MATRIX_FULL") == "1"
_whole_tried = set()


# Calc hands a reference to an empty cell to an optional value argument as the number 0; the
# messages refusing that 0 say so (docs/errors.md).
EMPTY_CELL_HINT = " (an empty cell reads as 0)"
EMPTY_CELL_HINTED = {"freq", "kind", "lag", "base", "price", "saledate", "targetdate"}


def short_if_message(cell):
    """A value, or a message that does not echo a 10 KB text whole."""
    if isinstance(cell, tuple):
        return "Calc error where a value or a short message was expected"
    if isinstance(cell, str) and cell.startswith("Lintel: ") and len(cell) >= 300:
        return f"a message of {len(cell)} characters (want < 300)"
    return None


def build_cases(fn, spec, sh):
    """Every case of one function: (kind label, formula, expectation)."""
    args = CALLS[fn]
    kinds = {a["name"]: a["kind"] for a in spec["args"]}
    assert [a.name for a in args] == [a["name"] for a in spec["args"]], f"{fn}: CALLS out of date"
    aligned = [a for a in args if a.role in ("sales", "index", "mask")]
    nrows = {a.name: sh.rows_of(a.cols) for a in aligned}

    def call(replace=None):
        parts = []
        for a in args:
            if replace and a.name in replace:
                parts.append(replace[a.name])
            elif a.role in ("sales", "index", "mask"):
                parts.append(rng(a.cols, 1, nrows[a.name]))
            else:
                parts.append(a.valid)
        return f"={fn}({';'.join(parts)})"

    cases = [Case(fn, "-", "valid call", call())]
    for a in args:
        cells = kinds[a.name] == "column"
        add = lambda kind, text, expect=None, doc="": cases.append(  # noqa: E731
            Case(fn, a.name, kind, call({a.name: text}), expect, doc))
        if a.role in ("sales", "index", "mask"):
            n = nrows[a.name]
            wrong = "number" if COLUMN_TYPE[a.cols[0]] == "text" else "text"
            if a.name == "changed":  # text that is no flag is refused (docs/errors.md)
                want = ('Lintel: changed holds "abc" in row 1: write 1 (or TRUE) where the property '
                        'changed before that sale, 0 or nothing otherwise')
                add(f"wrong type ({wrong})", sh.derived(a.cols, "text"),
                    expect_message(lambda s, w=want: s == w, repr(want)), "errors.md")
            else:
                add(f"wrong type ({wrong})", sh.derived(a.cols, "text"))
            add("blank", sh.derived(a.cols, "blank"))
            for err, code, name in (("div0", 532, "#DIV/0!"), ("na", 32767, "#N/A")):
                ref = sh.derived(a.cols, err)
                if cells:
                    cell = ref.split(":")[0][:-1] + "5"
                    want = f"Lintel: {a.name} holds {name} in cell Sheet1.{cell}: correct or clear that cell"
                    add(f"error cell {name}", ref,
                        expect_message(lambda s, w=want: s == w, repr(want)), "errors.md")
                else:
                    add(f"error cell {name}", ref, expect_calc_error({504, code}), "errors.md")
            if cells or FULL or a.name not in _whole_tried:
                _whole_tried.add(a.name)
                add("whole column", whole(a.cols))
            if len(aligned) > 1:
                short = rng(a.cols, 1, n - 1)
                add("mismatched lengths", short, expect_message(
                    lambda s, n=n: s.startswith("Lintel: ") and {str(n - 1), str(n)} <= set(re.findall(r"\d+", s)),
                    f"a message naming {n - 1} rows and {n} rows"), "errors.md")
            for label, v in EXTREMES:
                add(f"extreme {label}", sh.derived(a.cols, f"ext:{v!r}"))
            if cells:
                add("expression", f"{rng(a.cols, 1, n)}*1", expect_calc_error({504, 519}),
                    "functions.md")
                add("a value", "5", expect_calc_error({504, 519}), "functions.md")
        elif a.role in ("number", "date", "text", "methods", "home"):
            if a.role == "text" or a.role == "methods":
                add("wrong type (number)", "7")
            else:
                add("wrong type (text)", '"abc"')
            if a.name in EMPTY_CELL_HINTED:
                add("blank", BLANK, expect_message(lambda s: s.endswith(EMPTY_CELL_HINT),
                                                   "the empty-cell hint"), "errors.md")
            else:
                add("blank", BLANK)
            codes = {504, 532, 32767}
            if a.role == "home":
                add("error cell #DIV/0!", sh.home_variant("div0"), expect_calc_error(codes), "errors.md")
                add("error cell #N/A", sh.home_variant("na"), expect_calc_error(codes), "errors.md")
            else:
                add("error cell #DIV/0!", DIV0, expect_calc_error({504, 532}), "errors.md")
                add("error cell #N/A", NA, expect_calc_error({504, 32767}), "errors.md")
            if FULL or a.name not in _whole_tried:
                _whole_tried.add(a.name)
                add("whole column", {"number": "B:B", "date": "A:A", "text": "E:E",
                                     "methods": "Q:Q", "home": "N:P"}[a.role])
            if a.role == "home":
                add("mismatched lengths", "N1:O1", expect_message(
                    lambda s: s.startswith("Lintel: home has 2 cells but characteristics has 3 columns"),
                    "the documented home/characteristics message"), "errors.md")
            if a.role in ("number", "date"):
                for k, (label, _) in enumerate(EXTREMES):
                    add(f"extreme {label}", f"{EXTREME_CELLS}{k + 1}")
            elif a.role == "home":
                for label, v in EXTREMES:
                    add(f"extreme {label}", sh.home_variant(f"ext:{v!r}"))
            else:
                add("10 KB text", LONG_FREQ, short_if_message)
        elif a.role == "options":
            add("wrong type (number)", "7")
            add("blank", BLANK, expect_message(lambda s: s.endswith(EMPTY_CELL_HINT),
                                               "the empty-cell hint"), "errors.md")
            add("error cell #DIV/0!", DIV0, expect_calc_error({504, 532}), "errors.md")
            add("error cell #N/A", NA, expect_calc_error({504, 32767}), "errors.md")
            if FULL or a.name not in _whole_tried:
                _whole_tried.add(a.name)
                add("whole column", "E:F")
            key = spec["options"][0]
            for label, _ in EXTREMES:
                add(f"extreme {label}", f'"{key}={label}"')
            short = expect_message(lambda s: s.startswith("Lintel: ") and len(s) < 300,
                                   "a message under 300 characters")
            add("10 KB options (junk)", LONG_JUNK, short)
            add("10 KB options (long value)", LONG_VALUE, short)
            add("10 KB options (many keys)", LONG_KEYS, short)
            add("no-break space after a key", NBSP_END)
            add("no-break space inside a key", NBSP_MID, expect_message(
                lambda s: s.startswith(f'Lintel: unknown option "') and len(s) < 300,
                "an unknown-option message"))
            want = f'Lintel: unknown option "colour" for {fn} (known: {", ".join(spec["options"])})'
            add("unknown option", '"colour=red"', expect_message(lambda s, w=want: s == w, repr(want)),
                "errors.md")
    # Call-level kinds: every row-aligned argument at once.
    if aligned:
        sales_fn = any(a.role == "sales" for a in aligned)
        # Whole columns where users give them: the (cells) arguments (=INDEXMEDIAN(A:A;B:B)).
        cols = {a.name: whole(a.cols) for a in aligned if kinds[a.name] == "column"}
        if cols:
            cases.append(Case(fn, "(all)", "whole column", call(cols)))
        cases.append(Case(fn, "(all)", "one row", call({a.name: rng(a.cols, 1, 1) for a in aligned})))
        if sales_fn:
            cases.append(Case(fn, "(all)", "one period", call(
                {a.name: rng(a.cols, 1, FIRST_MONTH) for a in aligned if a.role != "index"})))
        else:
            cases.append(Case(fn, "(all)", "one period", call(
                {a.name: rng(a.cols, 1, 1) for a in aligned})))
            cases[-1].kind = "one period (one row)"
    return cases


# ---------------------------------------------------------------------------------------
# Running
# ---------------------------------------------------------------------------------------
def read_cell(cell):
    err = cell.getError()
    if err:
        return ("error", err)
    kind = cell.getType().value
    if kind == "EMPTY":
        return None
    if kind == "VALUE" or (kind == "FORMULA" and cell.FormulaResultType2 == 1):
        return cell.getValue()
    return cell.getString()


def silent_blank(valid, c):
    """An extreme value sits in row 3 of a row-aligned argument (the first period of the
    sales, the third row of an index series). A blank cell where the valid call has a
    number, in the first row or the third, is a number the function lost in silence
    (docs/functions.md: a blank means a period without enough sales)."""
    if isinstance(c.outcome, str) and c.outcome.startswith("Lintel: "):
        return None
    if c.fn == "INDEXSNR":  # docs/functions.md: "blank when the index has no noise at all"
        return None
    for r, k in ((0, 0), (0, 1), (2, 0), (2, 1)):
        # In a table (period | value ...) compare a row of the same period only: an extreme
        # date moves the table's first period.
        if k == 1 and c.rows[r][0] != valid.rows[r][0]:
            continue
        if r < len(valid.rows) and isinstance(valid.rows[r][k], float) and c.rows[r][k] == "":
            return f"blank in row {r + 1}, column {k + 1} where the valid call has a number"
    return None


def first_row_text(v):
    if isinstance(v, float):
        return f"{v:.6g}"
    if v is None:
        return "(none)"
    return "(blank)" if v == "" else str(v)[:30]


def describe(cell):
    if isinstance(cell, tuple):
        return CALC_ERRORS.get(cell[1], f"Err:{cell[1]}")
    if cell is None:
        return "(empty)"
    if isinstance(cell, str):
        return cell if cell.startswith("Lintel: ") else ("value (blank text)" if cell == "" else "value (text)")
    return f"value {cell:.6g}"


class Watchdog:
    """Kills the office (by its process id) when a call takes longer than `seconds`."""

    def __init__(self, seconds, label):
        self.seconds, self.label, self.fired = seconds, label, False
        self.timer = threading.Timer(seconds, self._fire)

    def _fire(self):
        self.fired = True
        pid = office.proc.pid
        os.kill(pid, signal.SIGKILL)

    def __enter__(self):
        self.timer.start()
        return self

    def __exit__(self, *exc):
        self.timer.cancel()


class BadInputMatrix(unittest.TestCase):
    maxDiff = None
    @classmethod
    def setUpClass(cls):
        with open(GEN_JSON) as f:
            cls.table = json.load(f)
        cls.doc = office.new_calc()
        cls.sheet = cls.doc.Sheets.getByIndex(0)
        cls.sh = Sheet(cls.sheet)
        first_key = {}
        for f in cls.table:
            if f["options"]:
                first_key[f["name"]] = f["options"][0]
        cls.sh.set_text(LONG_JUNK, "x" * LONG)
        cls.sh.set_text(LONG_KEYS, "; ".join(f"k{i}=1" for i in range(LONG // 6))[:LONG])
        cls.sh.set_text(LONG_FREQ, "M" * LONG)

    @classmethod
    def tearDownClass(cls):
        cls.doc.close(True)

    def test_calc_literal_subnormal(self):
        """Calc's own parser refuses the formula literal 1E-308 (below the smallest normal
        double, 2.2E-308) with Err:502 before any function sees it; a cell holding 1E-308
        (set through the API) is a plain value. So the matrix gives extremes to value
        arguments through cells."""
        cell = self.sheet.getCellRangeByName("V1")
        cell.setFormula("=1E-308")
        self.assertEqual(read_cell(cell), ("error", 502))
        self.assertEqual(read_cell(self.sheet.getCellRangeByName(f"{EXTREME_CELLS}3")), 1e-308)

    def option_cells(self, fn, spec, args):
        """T2, T4, T5 depend on the function's first option and its valid value."""
        opt = [a for a in args if a.role == "options"]
        if not opt:
            return
        key, value = opt[0].option_value.split(";")[0].split("=")
        self.sh.set_text(LONG_VALUE, f"{key}=" + "9" * LONG)
        self.sh.set_text(NBSP_END, f"{key}\u00a0={value}")
        self.sh.set_text(NBSP_MID, f"{key[:2]}\u00a0{key[2:]}={value}")

    def test_matrix(self):
        names = [f["name"] for f in self.table]
        self.assertEqual(sorted(names), sorted(CALLS), "every function of the table has a valid call here")
        only = os.environ.get("LINTEL_MATRIX_ONLY")  # a comma list of functions, to debug one
        out_col = self.sh.next_col + 300  # derived columns stay left of this (asserted below)
        results = []
        failures = []
        started = time.time()
        for fi, spec in enumerate(self.table):
            fn = spec["name"]
            if only and fn not in only.split(","):
                continue
            cases = build_cases(fn, spec, self.sh)
            self.assertLess(self.sh.next_col, out_col)
            self.option_cells(fn, spec, CALLS[fn])
            col = col_name(out_col + 3 * fi)
            col2 = col_name(out_col + 3 * fi + 1)
            t0 = time.time()
            for ci, c in enumerate(cases):
                c.row = STEP * ci + 1  # the case's result block: BLOCK_ROWS x 2 cells
                c.ref = f"{col}{c.row}:{col2}{c.row + BLOCK_ROWS - 1}"
                t1 = time.time()
                with Watchdog(HANG_SECONDS, fn) as dog:
                    try:
                        # Automatic calculation is on: setting the formula computes it.
                        rng_ = self.sheet.getCellRangeByName(c.ref)
                        rng_.setArrayFormula(c.formula)
                        c.outcome = read_cell(rng_.getCellByPosition(0, 0))
                    except Exception:  # the bridge dies when the watchdog kills the office
                        if dog.fired:
                            self.fail(f"{fn} {c.arg} {c.kind}: {c.formula[:200]}: no answer within "
                                      f"{HANG_SECONDS:.0f} s (hang); office killed")
                        raise
                c.seconds = time.time() - t1
            seconds = time.time() - t0
            # The output block read in one call, to find internal faults in any cell.
            area = self.sheet.getCellRangeByName(f"{col}1:{col2}{STEP * len(cases)}")
            block = area.getDataArray()
            # Cells holding a Calc error (FormulaResult.ERROR = 4), found in one call.
            error_cells = set()
            for ra in area.queryFormulaCells(4).getRangeAddresses():
                for r in range(ra.StartRow, ra.EndRow + 1):
                    for cc in range(ra.StartColumn, ra.EndColumn + 1):
                        error_cells.add((r, cc - out_col - 3 * fi))
            for ci, c in enumerate(cases):
                cell = c.outcome
                rows = block[STEP * ci:STEP * ci + BLOCK_ROWS]
                c.first_row = rows[0]
                c.rows = rows
                texts = [v for r in rows for v in r if isinstance(v, str)]
                # Beyond the end of a result Calc shows #N/A; any other error in a cell of a
                # result that is not itself a Calc error is a fault (an infinity, say).
                bad = [(r, k) for (r, k) in error_cells
                       if c.row - 1 <= r < c.row - 1 + BLOCK_ROWS and (r, k) != (c.row - 1, 0)]
                bad = [self.sheet.getCellByPosition(out_col + 3 * fi + k, r).getError() for r, k in bad]
                bad = [b for b in bad if b != 32767]
                if any(t.startswith("Lintel: internal") for t in texts):
                    c.problem = "internal fault: " + [t for t in texts if t.startswith("Lintel: internal")][0]
                elif bad and not isinstance(cell, tuple):
                    c.problem = "Calc error in a cell of the result: " + ", ".join(
                        CALC_ERRORS.get(b, f"Err:{b}") for b in bad)
                elif c.expect is not None:
                    c.problem = c.expect(cell)
                elif c.kind.startswith("extreme") and not isinstance(cell, tuple):
                    c.problem = silent_blank(cases[0], c)
                elif isinstance(cell, tuple):
                    c.problem = "Calc error where a value or a Lintel message was expected"
                elif isinstance(cell, str) and cell.startswith("Lintel:") and not cell.startswith("Lintel: "):
                    c.problem = "message without the 'Lintel: ' prefix"
                if isinstance(cell, str) and len(cell) >= 300 and "10 KB" in c.kind:
                    c.problem = f"message of {len(cell)} characters echoes the long text"
                known = KNOWN.get((fn, c.arg, c.kind))
                if c.problem and not known:
                    failures.append(c)
                elif known and not c.problem:
                    failures.append(c)
                    c.problem = f"listed as a finding ({known}) but passes now: remove it from KNOWN"
            self.assertTrue(office.alive(), f"office died during {fn}")
            results.append((fn, cases, seconds))
        total = time.time() - started
        summary, report = render(results, total)
        print(summary)  # the whole matrix goes to LINTEL_MATRIX_OUT
        if OUT_MD:
            with open(OUT_MD, "w") as f:
                f.write(report)
        self.assertEqual([], [f"{c.fn} {c.arg} {c.kind}: {c.formula[:120]} -> {describe(c.outcome)!r}"
                              f" ({c.problem})" for c in failures])


SUMMARY_KINDS = [("wrong type", "wrong type"), ("blank", "blank"), ("error cell", "error cell"),
                 ("whole column", "whole column"), ("mismatched lengths", "mismatched"),
                 ("one row", "one row"), ("one period", "one period"), ("extreme", "extremes"),
                 ("expression", "expression or value in (cells)"), ("a value", None),
                 ("10 KB", "10 KB text"), ("no-break space", "no-break space in a key"),
                 ("unknown option", "unknown option")]


def kind_group(kind):
    for prefix, label in SUMMARY_KINDS:
        if kind.startswith(prefix):
            return label or "expression or value in (cells)"
    return None


def outcome_class(c):
    if isinstance(c.outcome, tuple):
        return "E"
    if isinstance(c.outcome, str) and c.outcome.startswith("Lintel: "):
        return "M"
    return "V"


def render(results, total):
    groups = [label for _, label in SUMMARY_KINDS if label]
    ncases = sum(len(c) for _, c, _ in results)
    nfail = sum(1 for _, cs, _ in results for c in cs if c.problem and not KNOWN.get((c.fn, c.arg, c.kind)))
    every = [c for _, cs, _ in results for c in cs]
    slow = max(every, key=lambda c: c.seconds)
    longest = max((len(c.outcome) for c in every if isinstance(c.outcome, str)), default=0)
    internal = sum(1 for c in every if c.problem and c.problem.startswith("internal fault"))
    lines = ["# Bad-input matrix (real Calc)", "",
             f"{ncases} cases over {len(results)} functions, {total:.1f} s in all; "
             f"{nfail} unexpected outcome(s), {len(KNOWN)} known finding(s). Slowest case: "
             f"{slow.seconds:.1f} s ({slow.fn} {slow.arg}, {slow.kind}); longest message: "
             f"{longest} characters; internal faults: {internal}; no hang (limit "
             f"{HANG_SECONDS:.0f} s a call: a hang stops the test).", "",
             "Summary: per function and kind of bad input (over all its arguments), how many cases"
             " gave a value (V), a `Lintel: ...` message (M) or Calc's own error before the call"
             " (E); `!` marks a case that failed its check (the known findings below included). Each case changes one argument of a"
             " valid call (one row, one period and whole column: every row-aligned argument"
             " together).", "",
             "| function | " + " | ".join(groups) + " |", "|---" * (len(groups) + 1) + "|"]
    for fn, cases, _ in results:
        row = []
        for g in groups:
            cs = [c for c in cases if kind_group(c.kind) == g]
            if not cs:
                row.append("")
                continue
            counts = {}
            for c in cs:
                counts[outcome_class(c)] = counts.get(outcome_class(c), 0) + 1
            cell = " ".join(f"{k}{counts[k]}" for k in "VME" if k in counts)
            if any(c.problem for c in cs):
                cell += " !"
            row.append(cell)
        lines.append(f"| {fn} | " + " | ".join(row) + " |")
    lines += ["", "Findings (recorded as expected failures in the test's KNOWN list):", ""]
    for _, cases, _ in results:
        for c in cases:
            known = KNOWN.get((c.fn, c.arg, c.kind))
            if known:
                lines.append(f"- {c.fn} {c.arg}, {c.kind}: `{c.formula}`: {known}.")
    summary_end = len(lines)
    lines += ["", "Every case below: the outcome of the first cell of the result, the seconds the"
              " call took (set and recalculate; not a speed test), the page that documents the"
              " outcome where one does, and the check.", ""]
    for fn, cases, seconds in results:
        lines += [f"## {fn} ({len(cases)} cases, {seconds:.2f} s)", "",
                  "| argument | kind | outcome | s | doc | check |", "|---|---|---|---|---|---|"]
        for c in cases:
            out = describe(c.outcome)
            if not isinstance(c.outcome, tuple) and not (isinstance(c.outcome, str) and c.outcome.startswith("Lintel: ")):
                out = "value: " + "; ".join(first_row_text(v) for v in c.first_row)
                if c.kind.startswith("extreme"):
                    out += " / row 3: " + "; ".join(first_row_text(v) for v in c.rows[2])
            out = out.replace("|", "\\|")
            if len(out) > 160:
                out = out[:157] + "..."
            known = KNOWN.get((c.fn, c.arg, c.kind))
            check = ("finding: " + known) if known else ("FAIL: " + c.problem if c.problem else "ok")
            lines.append(f"| {c.arg} | {c.kind} | {out} | {c.seconds:.2f} | {c.doc} | {check} |")
        lines.append("")
    return "\n".join(lines[:summary_end]) + "\n", "\n".join(lines) + "\n"


if __name__ == "__main__":
    unittest.main(verbosity=2)
