// Statistics shared by the estimators: quantiles, Student-t quantiles, the median, the
// trimmed mean, their confidence intervals, and the moments of series with missing values.
// Values marked kNoValue (NaN) are "no value" where a function says it skips them.
//
// Intervals (documented in docs/methods.md):
// - mean: Student-t interval mean +/- t(df) * se; with trimming, the Tukey-McLaughlin
//   interval of the trimmed mean (winsorized variance, se = s_w / ((1 - 2g) sqrt n),
//   df = n - 2 floor(g n) - 1; Tukey & McLaughlin 1963, Sankhya A 25; Wilcox, Introduction to
//   Robust Estimation, 2012, sec. 4.4);
// - median: the distribution-free order-statistic interval [x_(j), x_(n+1-j)] with the
//   largest j whose binomial(n, 1/2) coverage is at least the level (e.g. Conover, Practical
//   Nonparametric Statistics, 3rd ed., 1999, sec. 3.2). Too few values for the level: none.
#pragma once

#include <cstddef>
#include <vector>

#include "index_table.hpp"

namespace lintel::stats {

// x * num / den without overflow or underflow on the way (the three split into mantissa and
// exponent): the same double as x * num / den whenever that is a normal number; +-inf only
// when the result itself is beyond the largest double, 0 or subnormal only when it is that
// small.
double mulDiv(double x, double num, double den);
// ln(b / a) for positive a and b, by the logs of each when b / a itself is beyond the range
// of a double (b = 1e308, a = 1e-308: 1418.3); ln(b / a) itself otherwise.
double logRatio(double b, double a);
// The power of two 2^-k that brings the largest |value| of a set near 1 when it lies beyond
// 2^500 or below 2^-500 (squares and sums of such values overflow or underflow); 1 otherwise.
// Scaling by a power of two is exact, and ratios do not change.
double rangeScale(double largestAbs);

// Median; an even count gives the mean of the two middle values; kNoValue when empty.
double median(std::vector<double> values);
// Mean after cutting floor(trim * n) values from each end (scipy.stats.trim_mean's rule);
// kNoValue when nothing is left.
double trimmedMean(std::vector<double> values, double trim);
// Quantile p of sorted values by linear interpolation between order statistics (numpy's
// default rule, "linear"). `sorted` must not be empty.
double quantile(const std::vector<double>& sorted, double p);

// Quantile p of Student's t distribution with df degrees of freedom (Boost.Math).
double studentTQuantile(double p, double df);
// The two-sided critical value of a confidence level: studentTQuantile(0.5 + level / 2, df).
double tCritical(double level, double df);

struct Interval {
    double lower = kNoValue, upper = kNoValue;
};
// Interval of the (trimmed) mean; none below 2 values or when trimming leaves < 2.
Interval meanInterval(const std::vector<double>& values, double trim, double level);
// Order-statistic interval of the median of sorted values; none below 2 values.
Interval medianInterval(const std::vector<double>& sorted, double level);

// Sample standard deviation (n - 1) of the values present; kNoValue when fewer than 2.
// `count` receives the number of values present.
double sampleSd(const std::vector<double>& values, std::size_t* count);
// Pearson correlation of the pairs (x_i, y_i) where both have a value; kNoValue when fewer
// than 2 pairs or a side has no variation. `pairs` receives the number of pairs used.
double pearson(const std::vector<double>& x, const std::vector<double>& y, std::size_t* pairs);

}  // namespace lintel::stats
