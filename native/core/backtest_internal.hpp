// Internals of the backtest shared by backtest.cpp (folds, predictions, revisions),
// backtest_methods.cpp (one entry per method kind) and backtest_rank.cpp (the rule).
#pragma once

#include <functional>
#include <vector>

#include "backtest.hpp"

namespace lintel::bt_detail {

// An index estimated from the backtest's sales with a row mask (1 = the row may be used; the
// estimator's own screening still applies). Throws InputError when the method cannot
// estimate an index from those rows.
using MaskedEstimate = std::function<IndexTable(const std::vector<char>& include)>;

// The method with the backtest's settings applied (freq, base cleared, minsales unless its
// own, no bootstrap bands), bound to a copy of the columns it reads. Throws InputError when
// the input lacks a column the kind needs.
MaskedEstimate prepareMethod(const BacktestInput& input, const CandidateMethod& method,
                             const BacktestOptions& options);

// Work of one estimate of the method on n rows over `periods` periods (backtestWork units).
double estimateWork(const BacktestInput& input, const CandidateMethod& method, std::size_t rows,
                    int periods);

}  // namespace lintel::bt_detail
