"""The date order of a locale (dateOrderForLocale, dateOrderFromPattern in
native/core/date_text.hpp) against the C library's locale data: the d_fmt (short date
format) of every language_COUNTRY locale source in /usr/share/i18n/locales (Debian package
locales, glibc's data), following "copy" lines.

The order of a d_fmt is read here by the position of its first day (%d %e), month (%m %b %B)
and year (%Y %y %C) element, %F = year-month-day, %D = month/day/year, independently of the
C++ reader, which must give the same order for every pattern.

The table of dateOrderForLocale is common practice, no source; where it departs from glibc
the locale is listed below with the reason (a new disagreement fails the check):
- glibc's format is ISO year-first, but numeric dates in the country are commonly day-first:
  de_AT de_BE de_LU en_DK se_NO wae_CH csb_PL, and year-first in glibc for languages of
  Russia, Ghana, Afghanistan and Myanmar whose exports follow the country's day-first
  practice: ce_RU mhr_RU sah_RU ak_GH ps_AF mnw_MM shn_MM bo_IN;
- glibc's format is month-first for a few languages of countries that write day-first:
  ab_GE ka_GE hy_AM bem_ZM kl_GL brx_IN ks_IN en_HK;
- languages of the United States whose glibc format is day-first: exports there follow the
  country's month-first practice: es_US es_PR unm_US yi_US;
- en_PH: glibc's d_fmt is a long date with a month name; numeric dates are month-first;
- Canada and China: we read year-first (so day/month texts count as of unknown order) where
  glibc has a day- or month-first format for a minority language: ik_CA iu_CA shs_CA ug_CN.
"""
import os
import re

import pandas as pd

from refcommon import Checks, parse_args, run_refcli

args = parse_args()
checks = Checks("date order of locales vs glibc locale data")
ROOT = "/usr/share/i18n/locales"
EXCEPTIONS = set("""de_AT de_BE de_LU en_DK se_NO wae_CH csb_PL ce_RU mhr_RU sah_RU ak_GH ps_AF mnw_MM
shn_MM bo_IN ab_GE ka_GE hy_AM bem_ZM kl_GL brx_IN ks_IN en_HK es_US es_PR unm_US yi_US en_PH ik_CA
iu_CA shs_CA ug_CN""".split())
UNKNOWN, DMY, MDY, YMD = range(4)


def d_fmt(name, depth=0):
    try:
        with open(os.path.join(ROOT, name), encoding="utf-8", errors="replace") as f:
            text = f.read()
    except FileNotFoundError:
        return None
    section = re.search(r"^LC_TIME\s*$(.*?)^END LC_TIME", text, re.M | re.S)
    if not section:
        return None
    m = re.search(r'^d_fmt\s+"([^"]*)"', section.group(1), re.M)
    if m:
        fmt = re.sub(r"<U([0-9A-Fa-f]{4,8})>", lambda x: chr(int(x.group(1), 16)), m.group(1))
        return fmt.replace("//", "/").replace("\n", " ")  # one line for the CSV driver
    c = re.search(r'^copy\s+"([^"]+)"', section.group(1), re.M)
    return d_fmt(c.group(1), depth + 1) if c and depth < 5 else None


def order(fmt):
    pos, k, i = {}, 0, 0
    while i < len(fmt):
        if fmt[i] != "%":
            i += 1
            continue
        j = i + 1
        while j < len(fmt) and fmt[j] in "-_0OE^#":
            j += 1
        if j >= len(fmt):
            break
        c = fmt[j]
        seq = {"d": "d", "e": "d", "m": "m", "b": "m", "B": "m", "h": "m", "Y": "y", "y": "y", "C": "y",
               "G": "y", "F": "ymd", "D": "mdy"}.get(c, "")
        for s in seq:
            if s not in pos:
                pos[s], k = k, k + 1
        i = j + 1
    if len(pos) < 3:
        return UNKNOWN
    if pos["y"] == 0:
        return YMD
    return DMY if pos["d"] < pos["m"] else MDY


if not os.path.isdir(ROOT):
    checks.true("glibc locale sources present (Debian package locales)", False, ROOT)
    checks.finish()

rows = []
for name in sorted(os.listdir(ROOT)):
    if not re.fullmatch(r"[a-z]{2,3}_[A-Z]{2}", name):
        continue
    fmt = d_fmt(name)
    if fmt:
        rows.append((name, fmt, order(fmt)))
frame = pd.DataFrame(rows, columns=["locale", "pattern", "glibc"])
print(f"    {len(frame)} locales; glibc orders: {frame.glibc.value_counts().to_dict()}")

got = run_refcli(args.refcli, "date_order_pattern", frame[["pattern"]])
checks.close("dateOrderFromPattern on every glibc d_fmt", got.order, frame.glibc, rel=0,
             source="glibc locale data, order read in Python")

tags = pd.DataFrame({"tag": frame.locale.str.replace("_", "-")})
ours = run_refcli(args.refcli, "date_order", tags).order.values
differ = set(frame.locale[ours != frame.glibc.values])
checks.true("dateOrderForLocale agrees with glibc but for the listed exceptions", differ == EXCEPTIONS,
            f"{len(frame) - len(differ)} of {len(frame)} agree; new: {sorted(differ - EXCEPTIONS)}, "
            f"no longer: {sorted(EXCEPTIONS - differ)}")
major = ["en_US", "en_GB", "en_AU", "en_IE", "en_NZ", "en_ZA", "en_IN", "de_DE", "fr_FR", "fr_CA", "es_ES",
         "es_MX", "it_IT", "nl_NL", "pt_PT", "pt_BR", "pl_PL", "cs_CZ", "ru_RU", "tr_TR", "ja_JP", "zh_CN",
         "ko_KR", "sv_SE", "hu_HU", "da_DK", "nb_NO", "fi_FI", "el_GR", "he_IL"]
missing = [m for m in major if m not in set(frame.locale)]
bad = [m for m in major if m in EXCEPTIONS]
checks.true("the large markets are present and agree with glibc", not missing and not bad,
            f"missing {missing}, exceptions {bad}")

checks.finish()
