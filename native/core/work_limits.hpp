// The limits on work: every estimator counts what it is about to do, once the sizes are known
// and before the long part starts, and answers a clear message past the limit instead of
// keeping Calc busy for minutes (a recalculation cannot be interrupted). The limits are set so
// that the work at the limit takes a few seconds on the development machine (a shared
// two-core virtual machine; the times beside each limit are measured there by
// tests/bench/bench_work_limits.cpp and tests/bench/bench_calc.py --only full span). They are
// far above what a market of real sales needs: the usual way to reach one is a mistyped date
// (year 2995 for 2025 makes a monthly index of some 11,600 periods), an id column given as
// strata or as a categorical characteristic, or many replicates on a large sheet.
//
// Two limits stay where they are, named below: the backtest's work (backtest.hpp) and the
// cost of a result to Calc (native/addin/result_cost.hpp, in the add-in).
#pragma once

#include <cstddef>
#include <string>

#include "periods.hpp"

namespace lintel::limits {

// INDEXMIX bands=bootstrap: replicates x (sales + strata x periods) — each replicate redraws
// every sale and recomputes every stratum-period cell. 1,000 sales over 11,666 months x 12
// strata x 200 replicates (a mistyped date, default reps) is 2.8e7; the same at 10,000 reps
// 1.4e9 (122 s in Calc before this limit). A redrawn sale costs 25 ns (quiet machine:
// 212,000 sales x 200 replicates, 4.3e7, 1.0 s) to 80 ns (busy: 1,048,575 sales x 100
// replicates, 1e8, 8 s beside the 3.6 s Calc takes to hand over the columns); an empty
// stratum-period about 2 ns. At the limit: 1.2 to 4 s here.
inline constexpr double kMaxMixBootstrapWork = 5.0e7;

// INDEXHEDONIC, HEDONICCOEFS, REFHOMEVALUE (also the effects behind smooth, realtime and
// borrow): the fits' cost in steps, fits x terms^3 (the solves) + rows fitted x terms^2 (the
// cross-products; x 4 with se=hc1), where terms are the characteristic terms (each level of a
// categorical column but its reference one term), a pooled fit is one fit of every sale, a
// rolling window of k periods makes periods - k + 1 fits and fits each sale k times, and
// realtime repeats it all for each of the periods (vintages). Measured here
// (tests/bench/bench_work_limits.cpp): 20,000 sales with a column of 1,000 levels, pooled,
// 2.1e10 steps, 6.8 s; the same with window=12, 2.9e11, 78 s; 1,000,000 sales with 30 levels,
// window=12, 1.2e10, 3.4 s: about 0.3 ns a step. At the limit: about 4 s here.
inline constexpr double kMaxHedonicWork = 1.5e10;
// Levels of one categorical column and characteristic terms in all (the k x k system; an id
// or address column would otherwise make one term per sale). Moved here from
// hedonic_design.cpp; the work limit above bounds the time.
inline constexpr std::size_t kMaxHedonicLevels = 1000;
inline constexpr std::size_t kMaxHedonicTerms = 1500;

// INDEXMIX: stratum-period cells held (strata x periods), a memory guard against an id
// column as strata (moved here from mix_adjusted.cpp). The mix without bands at the limit
// takes well under a second.
inline constexpr double kMaxMixCells = 2.0e6;

// Smoothing with realtime=1 (INDEXHEDONIC, CHAINRS): rows x periods (rows counted twice with
// borrow). Each vintage re-runs the estimator, about a microsecond per row and vintage
// (11,500 rows borrowing over 132 months, 3 million, took 3.4 s on a busy two-core machine).
// Moved here from smoothed_index.cpp. At the limit: a few seconds.
inline constexpr double kMaxRealtimeRowVintages = 6.0e6;

// CHAINRS, RSPAIRS (and the repeat methods of INDEXBACKTEST): periods on the axis (250 years
// of months): the normal equations and the covariance are dense periods x periods. Moved here
// from repeat_sales_internal.hpp. At the limit (1,000 sales, one dated 2271-10: 2,990
// months): 1.3 s here.
inline constexpr int kMaxRepeatSalesPeriods = 3000;

// INDEXTREND, INDEXSNR, INDEXCOMPARE (the Hodrick-Prescott trend): rows from the index's first
// to its last value. An index has one row per period (100,000 rows are 8,000 years of
// months); a column of a million sales given as an index took 7 s (INDEXTREND) to 13 s
// (INDEXCOMPARE, three columns) in Calc. At the limit: well under a second of the filter.
inline constexpr double kMaxTrendRows = 1.0e5;

// INDEXBACKTEST: its estimated work in nanoseconds (backtestWork, backtest.cpp: every method's
// estimates, folds + revisions + 1 each, and the rank's bootstrap); folds at most 100. Six
// methods with 10 folds and 12 revisions pass up to about 80,000 sales. Defined in
// backtest.hpp (kMaxBacktestWork, kMaxFolds). At the limit: 6 s on a shared two-core machine.

// The result handed to Calc: its cost to store (native/addin/result_cost.hpp, kMaxStoreCost:
// about two seconds here), past which it is replaced by a message.

// Throws InputError: "too much work: <what> = <work> <unit>; at most <limit> (a few seconds):
// <advice>", the figures with thousands separators. `what` names the sizes that were
// multiplied ("the dates span 2023-01 .. 2995-03 (11,631 months) x 12 strata x 10,000
// replicates"); `advice` says what to do ("check for a mistyped date (SALESCHECK lists
// implausible dates) or use fewer replicates").
[[noreturn]] void refuseWork(const std::string& what, double work, const std::string& unit,
                             double limit, const std::string& advice);

// refuseWork when work > limit.
inline void checkWork(double work, double limit, const std::string& what, const std::string& unit,
                      const std::string& advice) {
    if (work > limit) refuseWork(what, work, unit, limit, advice);
}

// 11631 -> "11,631"; rounds to a whole number.
std::string grouped(double x);

// "the dates span 2023-01 .. 2995-03 (11,631 months)".
std::string spanText(const PeriodAxis& axis);

// A span of more than a century: likely a mistyped date.
inline bool longSpan(const PeriodAxis& axis) { return axis.count > 100 * periodsPerYear(axis.freq); }

// The advice about a long span of periods, shared by the estimators: "check for a mistyped
// date (SALESCHECK lists implausible dates)".
inline constexpr const char* kMistypedDateAdvice =
    "check for a mistyped date (SALESCHECK lists implausible dates)";

}  // namespace lintel::limits
