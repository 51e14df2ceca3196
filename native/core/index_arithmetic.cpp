#include "index_arithmetic.hpp"

#include <cmath>

#include <fmt/format.h>

#include "index_analytics.hpp"
#include "statistics.hpp"

namespace lintel {

IndexSeries IndexSeries::fromColumns(std::vector<double> start, std::vector<double> value) {
    if (start.size() != value.size())
        throw InputError(fmt::format("periods has {} rows, index has {}", start.size(),
                                     value.size()));
    if (start.empty()) throw InputError("periods holds no dates");
    const auto f = inferFrequency(start.data(), start.size());
    if (!f)
        throw InputError(
            "periods must be period start dates (first of a month, quarter or year) in "
            "increasing order, as the index functions write them");
    IndexSeries s;
    s.start = std::move(start);
    s.value = std::move(value);
    s.freq = *f;
    return s;
}

int IndexSeries::rowOf(double serial) const {
    if (!isUsableSerial(serial)) return -1;
    const long k = periodKey(serial, freq);
    // Rows are increasing period starts; binary search on keys.
    std::size_t lo = 0, hi = start.size();
    while (lo < hi) {
        const std::size_t mid = (lo + hi) / 2;
        const long km = periodKey(start[mid], freq);
        if (km == k) return static_cast<int>(mid);
        if (km < k) lo = mid + 1; else hi = mid;
    }
    return -1;
}

void RebaseOptions::validate() const {
    if (!baseDate) throw InputError("base is required: a date in the new base period");
}

SeriesResult rebaseIndex(const IndexSeries& s, const RebaseOptions& o) {
    o.validate();
    const double baseDate = *o.baseDate;
    const int b = s.rowOf(baseDate);
    if (b < 0)
        throw InputError(fmt::format("base {} lies outside the periods ({} .. {})",
                                     isoDate(baseDate), isoDate(s.start.front()),
                                     isoDate(s.start.back())));
    if (!hasValue(s.value[b]))
        throw InputError(fmt::format("the base period {} has no index value",
                                     isoDate(s.start[b])));
    if (s.value[b] <= 0)
        throw InputError(fmt::format("the base period {} holds {}: an index value must be above 0",
                                     isoDate(s.start[b]), s.value[b]));
    SeriesResult r;
    analytics::countValues(s.value, false, r.diag);
    r.values.assign(s.value.size(), kNoValue);
    for (std::size_t i = 0; i < r.values.size(); ++i)
        if (hasValue(s.value[i])) {
            r.values[i] = stats::mulDiv(100.0, s.value[i], s.value[b]);
            if (std::isinf(r.values[i]) || (r.values[i] == 0 && s.value[i] != 0))
                throw InputError(fmt::format(
                    "the rebased value of period {} ({} x 100 / {}) is beyond the range of "
                    "numbers (about 1e-308 to 1e308)",
                    isoDate(s.start[i]), s.value[i], s.value[b]));
        }
    return r;
}

void ChangeOptions::validate() const {
    if (lag < 1) throw InputError(fmt::format("lag must be 1 or more, got {}", lag));
}

SeriesResult indexChange(const std::vector<double>& index, const ChangeOptions& o) {
    o.validate();
    SeriesResult r;
    analytics::countValues(index, true, r.diag);
    r.values.assign(index.size(), kNoValue);
    // A change is a ratio of two index values: an index value of 0 or less has none, and a
    // blank in its place would pass in silence (issue 10).
    for (std::size_t t = 0; t < index.size(); ++t)
        if (hasValue(index[t]) && index[t] <= 0)
            throw InputError(fmt::format("changes need index values above 0: row {} holds {}", t + 1, index[t]));
    const auto lag = static_cast<std::size_t>(o.lag);
    for (std::size_t t = lag; t < index.size(); ++t) {
        const double a = index[t - lag], b = index[t];
        if (!hasValue(a) || !hasValue(b) || a <= 0 || b <= 0) continue;
        const double ratio = b / a;
        const double years = double(periodsPerYear(o.freq)) / o.lag;
        switch (o.kind) {
            case ChangeKind::Percent: r.values[t] = 100.0 * (ratio - 1.0); break;
            case ChangeKind::Log: r.values[t] = 100.0 * stats::logRatio(b, a); break;
            case ChangeKind::Annual:
                r.values[t] = std::isnormal(ratio)
                                  ? 100.0 * (std::pow(ratio, years) - 1.0)
                                  : 100.0 * std::expm1(years * stats::logRatio(b, a));
                break;
        }
        // A change beyond the range of numbers (1e308 after 1e-308) exists: say so.
        if (std::isinf(r.values[t]))
            throw InputError(fmt::format(
                "the change at row {} ({} after {}) is beyond the largest number (about "
                "1.8e308); kind=log gives it in log points",
                t + 1, b, a));
    }
    return r;
}

PriceAdjustment adjustPrice(const IndexSeries& s, double price, double saleDate,
                            double targetDate) {
    if (!std::isfinite(price)) throw InputError("price is not a number");
    if (!(price > 0)) throw InputError(fmt::format("price must be above 0, got {}", price));
    const auto lookup = [&](double date, const char* what) {
        if (!isUsableSerial(date)) throw InputError(fmt::format("{} is not a date", what));
        const int r = s.rowOf(date);
        if (r < 0)
            throw InputError(fmt::format("{} {} lies outside the index ({} .. {})", what,
                                         isoDate(date), isoDate(s.start.front()),
                                         isoDate(s.start.back())));
        if (!hasValue(s.value[r]))
            throw InputError(fmt::format("{} {} falls on period {} without an index value",
                                         what, isoDate(date), isoDate(s.start[r])));
        if (s.value[r] <= 0)
            throw InputError(fmt::format(
                "{} {} falls on period {}, which holds {}: an index value must be above 0", what,
                isoDate(date), isoDate(s.start[r]), s.value[r]));
        return s.value[r];
    };
    PriceAdjustment r;
    r.saleIndex = lookup(saleDate, "saledate");
    r.targetIndex = lookup(targetDate, "targetdate");
    r.price = stats::mulDiv(price, r.targetIndex, r.saleIndex);
    if (std::isinf(r.price) || (r.price == 0 && price != 0))
        throw InputError(fmt::format(
            "the adjusted price {} x {} / {} is beyond the range of numbers (about 1e-308 to "
            "1e308)",
            price, r.targetIndex, r.saleIndex));
    r.diag.rowsIn = r.diag.rowsUsed = 1;
    return r;
}

}  // namespace lintel
