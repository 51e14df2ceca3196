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
// Other limits kept where they belong: hedonic levels and terms (hedonic_design.cpp: 1,000
// levels of one categorical column, 1,500 terms), repeat-sales periods (kMaxPeriods,
// repeat_sales_internal.hpp: 3,000), the backtest's work (kMaxBacktestWork, backtest.hpp),
// the mix's stratum-period cells (2,000,000, mix_adjusted.cpp) and the cost of a result to
// Calc (native/addin/result_cost.hpp).
#pragma once

#include <string>

#include "periods.hpp"

namespace lintel::limits {

// INDEXMIX bands=bootstrap: replicates x (sales + strata x periods) — each replicate redraws
// every sale and recomputes every stratum-period cell. 1,000 sales over 11,631 months x 12
// strata x 200 replicates (a mistyped date, default reps) is 2.8e7; the same at 10,000 reps
// 1.4e9. At the limit: about 3 s here.
inline constexpr double kMaxMixBootstrapWork = 1.5e8;

// INDEXHEDONIC, HEDONICCOEFS, REFHOMEVALUE: the fit's cross-products, sum over the fits of
// rows x terms^2 (terms = characteristic terms, levels of a categorical column counted one
// each; a rolling window fits each sale once per window it lies in), plus periods x terms^2
// for the period means and periods x terms^3 for the solves of the windows. 1,048,575 sales
// x 12 terms is 1.5e8; 20,000 sales with a categorical column of 1,000 levels is 2e10. At
// the limit: about 4 s here.
inline constexpr double kMaxHedonicWork = 1.0e10;

// Smoothing with realtime=1 (INDEXHEDONIC, CHAINRS): one smoother per vintage, each over the
// periods up to it: periods^2 / 2 smoother steps (and the estimator's effects per vintage).
// 120 months: 7,200; 11,631 months: 6.8e7. At the limit: about 3 s here.
inline constexpr double kMaxRealtimeSmoothingWork = 2.0e6;

// Smoothing without realtime: one model over all periods, its likelihood maximised over a
// few parameters: periods. At the limit: about 2 s here.
inline constexpr double kMaxSmoothedPeriods = 3000;

// Throws InputError: "too much work: <what> = <work> <unit>; at most <limit> (about <seconds>
// here): <advice>", the figures with thousands separators. `what` names the sizes that were
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

// The advice about a long span of periods, shared by the estimators: "check for a mistyped
// date (SALESCHECK lists implausible dates)".
inline constexpr const char* kMistypedDateAdvice =
    "check for a mistyped date (SALESCHECK lists implausible dates)";

}  // namespace lintel::limits
