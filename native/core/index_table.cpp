#include "index_table.hpp"

#include <fmt/format.h>

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
    const int b = resolveBase(t.axis, level, o);
    t.basePosition = b;
    const double baseLevel = level[b];  // 100 * x / base keeps the base row exactly 100
    const std::size_t n = static_cast<std::size_t>(t.axis.count);
    t.index.assign(n, kNoValue);
    t.lower.assign(n, kNoValue);
    t.upper.assign(n, kNoValue);
    for (std::size_t i = 0; i < n; ++i) {
        if (!hasValue(level[i])) continue;
        t.index[i] = 100.0 * level[i] / baseLevel;
        if (hasValue(lo[i]) && hasValue(hi[i])) {
            t.lower[i] = 100.0 * lo[i] / baseLevel;
            t.upper[i] = 100.0 * hi[i] / baseLevel;
        }
    }
}

}  // namespace lintel
