#include "seasonal.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "statistics.hpp"

namespace lintel {

void SeasonalOptions::validate() const {
    if (freq == Frequency::Year)
        throw InputError("seasonal factors need a monthly or quarterly index (freq M or Q)");
}

SeasonalResult seasonalFactors(const std::vector<double>& index, const SeasonalOptions& o) {
    o.validate();
    const int p = periodsPerYear(o.freq);
    const int n = static_cast<int>(index.size());
    SeasonalResult r;
    analytics::countValues(index, true, r.diag);
    if (n < 2 * p)
        throw InputError(fmt::format(
            "seasonal factors need at least 2 years of rows ({}), the index has {}", 2 * p, n));
    // Multiplicative factors are ratios of positive values: a value of 0 or less is refused
    // by name (left out, it would only show up later as 'too many missing values').
    double largest = 0;
    for (int t = 0; t < n; ++t) {
        if (!hasValue(index[t])) continue;
        if (index[t] <= 0)
            throw InputError(fmt::format(
                "seasonal factors need index values above 0: row {} holds {}", t + 1, index[t]));
        largest = std::max(largest, index[t]);
    }
    auto ok = [&](int t) { return hasValue(index[t]); };
    // Values near the largest double: the moving average sums them scaled by a power of two.
    const double scale = stats::rangeScale(largest);

    r.trend.assign(n, kNoValue);
    const int h = p / 2;
    for (int t = h; t + h < n; ++t) {
        bool full = true;
        double s = 0;
        for (int j = -h; j <= h && full; ++j) {
            if (!ok(t + j)) full = false;
            else s += (j == -h || j == h ? 0.5 : 1.0) * (index[t + j] * scale);
        }
        if (full) r.trend[t] = s / p / scale;
    }

    std::vector<double> sum(p, 0.0);
    r.ratios.assign(p, 0);
    for (int t = 0; t < n; ++t)
        if (ok(t) && hasValue(r.trend[t])) {
            const double ratio = index[t] / r.trend[t];
            if (!std::isfinite(ratio) || ratio == 0)
                throw InputError(fmt::format(
                    "seasonal factors: row {} ({}) against its moving average ({}) is beyond "
                    "the range of numbers; the index spans too far",
                    t + 1, index[t], r.trend[t]));
            sum[t % p] += ratio;
            ++r.ratios[t % p];
        }
    r.periodFactors.assign(p, kNoValue);
    double mean = 0;
    for (int k = 0; k < p; ++k) {
        if (r.ratios[k] == 0)
            throw InputError(fmt::format(
                "seasonal factors: position {} of the year (rows {}, {}, ...) has no complete "
                "moving average; too many missing values", k + 1, k + 1, k + 1 + p));
        r.periodFactors[k] = sum[k] / static_cast<double>(r.ratios[k]);
        mean += r.periodFactors[k] / p;
    }
    for (double& f : r.periodFactors) f /= mean;

    r.factor.assign(n, kNoValue);
    r.adjusted.assign(n, kNoValue);
    for (int t = 0; t < n; ++t) {
        r.factor[t] = r.periodFactors[t % p];
        if (ok(t)) r.adjusted[t] = index[t] / r.factor[t];
    }
    return r;
}

}  // namespace lintel
