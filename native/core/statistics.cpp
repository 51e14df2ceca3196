#include "statistics.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

#include <boost/math/distributions/binomial.hpp>
#include <boost/math/distributions/students_t.hpp>

namespace lintel::stats {

double mulDiv(double x, double num, double den) {
    if (!std::isfinite(x) || !std::isfinite(num) || !std::isfinite(den) || x == 0 || num == 0 ||
        den == 0)
        return x * num / den;
    int ex = 0, en = 0, ed = 0;
    const double mx = std::frexp(x, &ex), mn = std::frexp(num, &en), md = std::frexp(den, &ed);
    return std::ldexp(mx * mn / md, ex + en - ed);
}

double logRatio(double b, double a) {
    const double q = b / a;
    if (std::isnormal(q)) return std::log(q);
    return std::log(b) - std::log(a);
}

double rangeScale(double largestAbs) {
    if (!std::isfinite(largestAbs) || !(largestAbs > 0)) return 1.0;
    if (largestAbs < 0x1p500 && largestAbs > 0x1p-500) return 1.0;
    return std::ldexp(1.0, std::min(-std::ilogb(largestAbs), 1023));  // 2^1024 is inf
}

double median(std::vector<double> v) {
    if (v.empty()) return kNoValue;
    const std::size_t n = v.size(), h = n / 2;
    const auto mid = v.begin() + static_cast<std::ptrdiff_t>(h);
    std::nth_element(v.begin(), mid, v.end());
    const double hi = *mid;
    if (n % 2) return hi;
    const double lo = *std::max_element(v.begin(), mid);
    const double sum = lo + hi;
    if (std::isfinite(sum)) return 0.5 * sum;
    return 0.5 * lo + 0.5 * hi;  // two values near the largest double: no overflow
}

namespace {
// floor(trim * n): the values cut from each end.
std::size_t trimCount(double trim, std::size_t n) {
    return static_cast<std::size_t>(std::floor(trim * static_cast<double>(n)));
}
}  // namespace

double trimmedMean(std::vector<double> v, double trim) {
    if (v.empty()) return kNoValue;
    std::sort(v.begin(), v.end());
    const std::size_t g = trimCount(trim, v.size());
    if (2 * g >= v.size()) return kNoValue;
    const double nKept = static_cast<double>(v.size() - 2 * g);
    double s = 0;
    for (std::size_t i = g; i < v.size() - g; ++i) s += v[i];
    if (std::isfinite(s)) return s / nKept;
    // The sum of values near the largest double overflows; their mean does not: sum scaled.
    const double scale = std::ldexp(1.0, -std::ilogb(std::max(std::fabs(v[g]),
                                                              std::fabs(v[v.size() - 1 - g]))));
    s = 0;
    for (std::size_t i = g; i < v.size() - g; ++i) s += v[i] * scale;
    return s / nKept / scale;
}

double quantile(const std::vector<double>& sorted, double p) {
    const double h = static_cast<double>(sorted.size() - 1) * p;
    const std::size_t lo = static_cast<std::size_t>(std::floor(h));
    const std::size_t hi = std::min(lo + 1, sorted.size() - 1);
    return sorted[lo] + (h - static_cast<double>(lo)) * (sorted[hi] - sorted[lo]);
}

double studentTQuantile(double p, double df) {
    boost::math::students_t dist(df);
    return boost::math::quantile(dist, p);
}

double tCritical(double level, double df) { return studentTQuantile(0.5 + level / 2, df); }

Interval meanInterval(const std::vector<double>& values, double trim, double level) {
    std::vector<double> v(values);
    std::sort(v.begin(), v.end());
    const std::size_t n = v.size();
    const std::size_t g = trimCount(trim, n);
    if (n < 2 || n <= 2 * g + 1) return {};
    // Winsorize g values at each end (g = 0: the plain sample).
    for (std::size_t i = 0; i < g; ++i) {
        v[i] = v[g];
        v[n - 1 - i] = v[n - 1 - g];
    }
    const double nd = static_cast<double>(n);
    const double mw = std::accumulate(v.begin(), v.end(), 0.0) / nd;
    double ss = 0;
    for (double x : v) ss += (x - mw) * (x - mw);
    const double sw = std::sqrt(ss / (nd - 1));
    const double h = static_cast<double>(n - 2 * g);
    const double se = sw * std::sqrt(nd) / h;  // = s_w/((1-2g/n) sqrt n)
    const double df = h - 1;
    const double centre = trimmedMean(values, trim);
    const double t = tCritical(level, df);
    return {centre - t * se, centre + t * se};
}

Interval medianInterval(const std::vector<double>& sorted, double level) {
    const std::size_t n = sorted.size();
    if (n < 2) return {};
    // Coverage of [x_(j), x_(n+1-j)] is 1 - 2 P(B <= j-1), B ~ binomial(n, 1/2).
    boost::math::binomial dist(static_cast<double>(n), 0.5);
    const double alphaHalf = (1 - level) / 2;
    // The largest j in 1 .. (n + 1) / 2 with P(B <= j - 1) <= alpha / 2; the CDF rises with j,
    // so a bisection finds it (0 when even j = 1 fails).
    std::size_t best = 0, hi = (n + 1) / 2;
    while (best < hi) {
        const std::size_t j = best + (hi - best + 1) / 2;
        if (boost::math::cdf(dist, static_cast<double>(j - 1)) <= alphaHalf + 1e-12) best = j;
        else hi = j - 1;
    }
    if (best == 0) return {};
    return {sorted[best - 1], sorted[n - best]};
}

double sampleSd(const std::vector<double>& v, std::size_t* count) {
    double s = 0;
    std::size_t k = 0;
    for (double x : v)
        if (hasValue(x)) {
            s += x;
            ++k;
        }
    if (count) *count = k;
    if (k < 2) return kNoValue;
    const double kd = static_cast<double>(k);
    const double m = s / kd;
    double ss = 0;
    for (double x : v)
        if (hasValue(x)) ss += (x - m) * (x - m);
    return std::sqrt(ss / (kd - 1));
}

double pearson(const std::vector<double>& x, const std::vector<double>& y, std::size_t* pairs) {
    const std::size_t n = std::min(x.size(), y.size());
    double sx = 0, sy = 0;
    std::size_t k = 0;
    for (std::size_t i = 0; i < n; ++i)
        if (hasValue(x[i]) && hasValue(y[i])) {
            sx += x[i];
            sy += y[i];
            ++k;
        }
    if (pairs) *pairs = k;
    if (k < 2) return kNoValue;
    const double mx = sx / static_cast<double>(k), my = sy / static_cast<double>(k);
    double sxx = 0, syy = 0, sxy = 0;
    for (std::size_t i = 0; i < n; ++i)
        if (hasValue(x[i]) && hasValue(y[i])) {
            const double dx = x[i] - mx, dy = y[i] - my;
            sxx += dx * dx;
            syy += dy * dy;
            sxy += dx * dy;
        }
    if (!(sxx > 0) || !(syy > 0)) return kNoValue;
    const double r = sxy / std::sqrt(sxx * syy);
    return std::max(-1.0, std::min(1.0, r));
}

}  // namespace lintel::stats
