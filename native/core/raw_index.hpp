// Raw price indexes: the mean or the median sale price of each period, relative to the base
// period (Eurostat et al., Handbook on Residential Property Prices Indices, 2013, ch. 4:
// "central tendency" methods). No adjustment for the mix of homes sold.
//
// Bands (documented in docs/methods.md):
// - mean: Student-t interval mean +/- t(df) * se; with trimming, the Tukey-McLaughlin
//   interval of the trimmed mean (winsorized variance, se = s_w / ((1 - 2g) sqrt n),
//   df = n - 2 floor(g n) - 1; Tukey & McLaughlin 1963, Sankhya A 25; Wilcox, Introduction to
//   Robust Estimation, 2012, sec. 4.4);
// - median: the distribution-free order-statistic interval [x_(j), x_(n+1-j)] with the
//   largest j whose binomial(n, 1/2) coverage is at least the level (e.g. Conover, Practical
//   Nonparametric Statistics, 3rd ed., 1999, sec. 3.2). Too few sales for the level: no band.
#pragma once

#include <vector>

#include "index_table.hpp"
#include "sales.hpp"

namespace lintel {

struct RawIndexOptions : IndexOptions {
    double trim = 0.0;  // trim (mean only): fraction cut from each tail, 0 <= trim < 0.5
};

IndexResult indexMean(const SalesInput& sales, const RawIndexOptions& options);
IndexResult indexMedian(const SalesInput& sales, const RawIndexOptions& options);

// Building blocks, exposed for tests and for other estimators (mix-adjusted medians).
namespace stats {
double median(std::vector<double> values);  // even count: mean of the two middle values
// Mean after cutting floor(trim * n) values from each end (scipy.stats.trim_mean's rule).
double trimmedMean(std::vector<double> values, double trim);
struct Interval { double lower = kNoValue, upper = kNoValue; };
Interval meanInterval(const std::vector<double>& values, double trim, double level);
// Order-statistic interval of the median of sorted values.
Interval medianInterval(const std::vector<double>& sorted, double level);
double studentTQuantile(double p, double df);
}  // namespace stats

}  // namespace lintel
