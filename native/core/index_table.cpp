#include "index_table.hpp"

#include <fmt/format.h>

#include "statistics.hpp"

namespace lintel {

void IndexOptions::validate() const {
    if (!(level > 0.0 && level < 1.0))
        throw InputError(fmt::format("level must lie between 0 and 1, got {}", level));
    if (minSales < 1) throw InputError("minsales must be at least 1");
}

int resolveBase(const PeriodAxis& axis, const std::vector<double>& level,
                const IndexOptions& o) {
    if (o.baseDate) {
        const int b = axis.positionOf(*o.baseDate);
        if (b < 0)
            throw InputError(fmt::format("base {} lies outside the data ({})",
                                         isoDate(*o.baseDate), axis.rangeText()));
        if (!hasValue(level[b]))
            throw InputError(fmt::format(
                "the base period {} has no value (too few sales; minsales {})", axis.label(b),
                o.minSales));
        return b;
    }
    for (int i = 0; i < axis.count; ++i)
        if (hasValue(level[i])) return i;
    throw InputError(fmt::format("no period has a value (minsales {})", o.minSales));
}

void scaleToBase(IndexTable& t, const std::vector<double>& level,
                 const std::vector<double>& lo, const std::vector<double>& hi,
                 const IndexOptions& o) {
    const std::size_t n = static_cast<std::size_t>(t.axis.count);
    // An infinite level is a value that exists but overflowed: never a silent gap.
    for (std::size_t i = 0; i < n; ++i)
        if (std::isinf(level[i]))
            throw InputError(fmt::format(
                "the price level of period {} is beyond the largest number (about 1.8e308)",
                t.axis.label(static_cast<int>(i))));
    const int b = resolveBase(t.axis, level, o);
    t.basePosition = b;
    const double baseLevel = level[b];  // 100 * x / base keeps the base row exactly 100
    if (!(baseLevel > 0))
        throw InputError(fmt::format("the base period {} has a price level of {}: no index",
                                     t.axis.label(b), baseLevel));
    t.index.assign(n, kNoValue);
    t.lower.assign(n, kNoValue);
    t.upper.assign(n, kNoValue);
    auto ratio = [&](double x, std::size_t i, const char* what) {
        const double v = stats::mulDiv(100.0, x, baseLevel);
        if (std::isinf(v) || (v == 0 && x != 0))
            throw InputError(fmt::format(
                "the {} of period {} is {} times the base period's: beyond the range of "
                "numbers (about 1e-308 to 1e308)",
                what, t.axis.label(static_cast<int>(i)),
                std::isinf(v) ? "over 1e306" : "below 1e-310"));
        return v;
    };
    for (std::size_t i = 0; i < n; ++i) {
        if (!hasValue(level[i])) continue;
        t.index[i] = ratio(level[i], i, "index");
        if (hasValue(lo[i]) && hasValue(hi[i])) {
            t.lower[i] = ratio(lo[i], i, "band");
            t.upper[i] = ratio(hi[i], i, "band");
        }
    }
}

}  // namespace lintel
