#include "raw_index.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "statistics.hpp"

namespace lintel {

void RawIndexOptions::validate() const {
    IndexOptions::validate();
    if (!(trim >= 0.0 && trim < 0.5))
        throw InputError(fmt::format("trim must lie in [0, 0.5), got {}", trim));
}

namespace {

enum class Statistic { Mean, Median };

IndexResult rawIndex(const SalesInput& sales, const RawIndexOptions& o, Statistic stat) {
    o.validate();
    IndexResult r;
    const ScreenedSales s = screenSales(sales, o.freq, r.diag);
    const int T = s.axis.count;
    // Prices near the largest (or smallest) double are brought near 1 by a power of two first:
    // sums and squares then stay finite, and the index, a ratio, is the same.
    const std::vector<double> price = scaledPrices(sales, s);
    std::vector<std::vector<double>> byPeriod(T);
    for (std::size_t j = 0; j < s.rows.size(); ++j) byPeriod[s.period[j]].push_back(price[j]);

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
