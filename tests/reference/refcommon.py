"""Shared helpers for the reference checks.

Each check script generates data from a stated model (or loads a published data set), runs
the Lintel core through the lintel_refcli driver, computes the same quantity with a
general-purpose reference library (pandas, statsmodels, numpy, R), and compares.
A script exits non-zero when any comparison fails and prints one line per check.
"""
import argparse
import math
import os
import subprocess
import sys
import tempfile

import numpy as np
import pandas as pd


class Checks:
    """Collects named comparisons; `finish()` prints the tally and exits."""

    def __init__(self, name):
        self.name = name
        self.passed = 0
        self.failed = 0

    def close(self, what, got, want, rel=1e-8, abs_=0.0, source=""):
        got = np.asarray(got, dtype=float)
        want = np.asarray(want, dtype=float)
        ok = got.shape == want.shape
        worst = float("nan")
        if ok:
            both_nan = np.isnan(got) & np.isnan(want)
            diff = np.abs(got - want)
            tol = abs_ + rel * np.abs(want)
            good = both_nan | (diff <= tol)
            ok = bool(np.all(good))
            finite = ~both_nan
            if finite.any():
                with np.errstate(invalid="ignore", divide="ignore"):
                    worst = float(np.nanmax(np.where(finite, diff / np.maximum(np.abs(want), 1e-300), 0)))
        self._report(ok, what, f"shape {got.shape} vs {want.shape}, worst rel diff {worst:.3g}"
                     + (f" [{source}]" if source else ""))
        if not ok and got.shape == want.shape:
            bad = np.where(~(np.isnan(got) & np.isnan(want)) & ~(np.abs(got - want) <= abs_ + rel * np.abs(want)))
            idx = tuple(b[:5] for b in bad)
            print(f"    got  {got[idx]}\n    want {want[idx]}")
        return ok

    def true(self, what, cond, detail=""):
        self._report(bool(cond), what, detail)
        return bool(cond)

    def _report(self, ok, what, detail):
        if ok:
            self.passed += 1
        else:
            self.failed += 1
        print(f"{'PASS' if ok else 'FAIL'} {what}: {detail}")

    def finish(self):
        print(f"{self.name}: {self.passed} passed, {self.failed} failed")
        sys.exit(1 if self.failed or not self.passed else 0)


def parse_args():
    p = argparse.ArgumentParser()
    p.add_argument("--refcli", required=True, help="path to the lintel_refcli executable")
    return p.parse_args()


def run_refcli(refcli, command, frame, **options):
    """Writes `frame` to a CSV file, runs `lintel_refcli command file key=value...` and
    returns its CSV output as a DataFrame (empty fields become NaN)."""
    with tempfile.TemporaryDirectory() as d:
        path = os.path.join(d, "input.csv")
        frame.to_csv(path, index=False, float_format="%.17g")
        args = [refcli, command, path] + [f"{k}={v}" for k, v in options.items()]
        out = subprocess.run(args, capture_output=True, text=True)
        if out.returncode != 0:
            raise RuntimeError(f"{' '.join(args)} failed ({out.returncode}): {out.stderr}")
        from io import StringIO
        return pd.read_csv(StringIO(out.stdout))


def serial_from_timestamp(ts):
    """Calc / ODF date serial (day 0 = 1899-12-30) of a pandas Timestamp or DatetimeIndex."""
    epoch = pd.Timestamp("1899-12-30")
    return (pd.to_datetime(ts) - epoch) / pd.Timedelta(days=1)


def timestamp_from_serial(s):
    return pd.Timestamp("1899-12-30") + pd.to_timedelta(np.asarray(s, dtype=float), unit="D")
