#include "raw_index.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

#include <boost/math/distributions/binomial.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <fmt/format.h>

namespace lintel {

namespace stats {

double median(std::vector<double> v) {
    if (v.empty()) return kNoValue;
    const std::size_t n = v.size(), h = n / 2;
    std::nth_element(v.begin(), v.begin() + h, v.end());
    const double hi = v[h];
    if (n % 2) return hi;
    const double lo = *std::max_element(v.begin(), v.begin() + h);
    return 0.5 * (lo + hi);
}

double trimmedMean(std::vector<double> v, double trim) {
    if (v.empty()) return kNoValue;
    std::sort(v.begin(), v.end());
    const std::size_t g = static_cast<std::size_t>(std::floor(trim * v.size()));
    if (2 * g >= v.size()) return kNoValue;
    double s = 0;
    for (std::size_t i = g; i < v.size() - g; ++i) s += v[i];
    return s / static_cast<double>(v.size() - 2 * g);
}

double studentTQuantile(double p, double df) {
    boost::math::students_t dist(df);
    return boost::math::quantile(dist, p);
}

Interval meanInterval(const std::vector<double>& values, double trim, double level) {
    std::vector<double> v(values);
    std::sort(v.begin(), v.end());
    const std::size_t n = v.size();
    const std::size_t g = static_cast<std::size_t>(std::floor(trim * n));
    if (n < 2 || n <= 2 * g + 1) return {};
    // Winsorize g values at each end (g = 0: the plain sample).
    for (std::size_t i = 0; i < g; ++i) {
        v[i] = v[g];
        v[n - 1 - i] = v[n - 1 - g];
    }
    const double mw = std::accumulate(v.begin(), v.end(), 0.0) / n;
    double ss = 0;
    for (double x : v) ss += (x - mw) * (x - mw);
    const double sw = std::sqrt(ss / (n - 1));
    const double h = static_cast<double>(n - 2 * g);
    const double se = sw * std::sqrt(static_cast<double>(n)) / h;  // = s_w/((1-2g/n) sqrt n)
    const double df = h - 1;
    const double centre = trimmedMean(values, trim);
    const double t = studentTQuantile(0.5 + level / 2, df);
    return {centre - t * se, centre + t * se};
}

Interval medianInterval(const std::vector<double>& sorted, double level) {
    const std::size_t n = sorted.size();
    if (n < 2) return {};
    // Coverage of [x_(j), x_(n+1-j)] is 1 - 2 P(B <= j-1), B ~ binomial(n, 1/2).
    boost::math::binomial dist(static_cast<double>(n), 0.5);
    const double alphaHalf = (1 - level) / 2;
    std::size_t best = 0;
    for (std::size_t j = 1; 2 * j <= n + 1; ++j) {
        if (boost::math::cdf(dist, static_cast<double>(j - 1)) <= alphaHalf + 1e-12)
            best = j;
        else
            break;
    }
    if (best == 0) return {};
    return {sorted[best - 1], sorted[n - best]};
}

}  // namespace stats

namespace {

enum class Statistic { Mean, Median };

IndexResult rawIndex(const SalesInput& sales, const RawIndexOptions& o, Statistic stat) {
    validateCommon(o);
    if (!(o.trim >= 0.0 && o.trim < 0.5))
        throw InputError(fmt::format("trim must lie in [0, 0.5), got {}", o.trim));
    IndexResult r;
    const ScreenedSales s = screenSales(sales, o.freq, r.diag);
    const int T = s.axis.count;
    std::vector<std::vector<double>> byPeriod(T);
    for (std::size_t j = 0; j < s.rows.size(); ++j)
        byPeriod[s.period[j]].push_back(sales.price[s.rows[j]]);

    std::vector<double> level(T, kNoValue), lo(T, kNoValue), hi(T, kNoValue);
    r.table.axis = s.axis;
    r.table.count.assign(T, 0);
    std::size_t thin = 0, empty = 0;
    for (int t = 0; t < T; ++t) {
        auto& v = byPeriod[t];
        r.table.count[t] = v.size();
        if (v.empty()) ++empty;
        if (v.size() < o.minSales) {
            if (!v.empty()) ++thin;
            continue;
        }
        stats::Interval band;
        if (stat == Statistic::Mean) {
            level[t] = stats::trimmedMean(v, o.trim);
            band = stats::meanInterval(v, o.trim, o.level);
        } else {
            std::sort(v.begin(), v.end());
            level[t] = stats::median(v);
            band = stats::medianInterval(v, o.level);
        }
        lo[t] = band.lower;
        hi[t] = band.upper;
    }
    if (empty) r.diag.warn(fmt::format("{} period(s) without sales", empty));
    if (thin) r.diag.warn(fmt::format("{} period(s) with fewer than {} sales", thin, o.minSales));
    scaleToBase(r.table, level, lo, hi, o);
    return r;
}

}  // namespace

IndexResult indexMean(const SalesInput& sales, const RawIndexOptions& o) {
    return rawIndex(sales, o, Statistic::Mean);
}

IndexResult indexMedian(const SalesInput& sales, const RawIndexOptions& o) {
    return rawIndex(sales, o, Statistic::Median);
}

}  // namespace lintel
