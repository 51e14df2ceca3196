// refcli helpers for the smoothed indexes (smoothed_index.hpp), used by refcli_hedonic.cpp and
// refcli_repeat_sales.cpp:
//   options smooth=none|level|trend seasonal=0|1 realtime=0|1 borrow=0|1 (read through the
//   functions' specs, as the add-in reads them)
//   <estimator>_smooth  -> period, index, count, lower, upper, log, se, then constant columns
//        v_level, v_slope, v_seasonal, v_deviation, ll, q, evaluations, boundary, t0
//        (realtime: the last period published from the first vintage, else empty),
//        last_estimate, filled (periods without an effect), market_rows
//   <estimator>_effects -> period, value, variance, count, then loadings x1..xk and the
//        shared covariance c1..ck in the first k rows (hedonic, classical)
#pragma once

#include "refcli.hpp"
#include "smoothed_index.hpp"

namespace refcli {

int printSmoothed(const lintel::SmoothedIndexResult& r);
int printEffects(const lintel::PeriodEffectSeries& e);

}  // namespace refcli
