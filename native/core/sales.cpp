#include "sales.hpp"

#include <algorithm>
#include <climits>
#include <cmath>

namespace lintel {

ScreenedSales screenSales(const SalesInput& in, Frequency freq, Diagnostics& diag,
                          const std::vector<char>* extraValid, const char* extraReason) {
    const std::size_t n = in.date.size();
    if (in.price.size() != n || (!in.include.empty() && in.include.size() != n) ||
        (!in.emptyRow.empty() && in.emptyRow.size() != n) ||
        (extraValid && extraValid->size() != n))
        throw InputError("internal: sales columns differ in length");

    ScreenedSales out;
    diag.rowsIn = n;
    std::vector<long> keys;
    keys.reserve(n);
    out.rows.reserve(n);
    long minKey = LONG_MAX, maxKey = LONG_MIN;
    std::size_t empty = 0, badDate = 0, badPrice = 0, nonPos = 0, excluded = 0, extra = 0;
    for (std::size_t i = 0; i < n; ++i) {
        if (!in.emptyRow.empty() && in.emptyRow[i]) { ++empty; continue; }
        if (!isUsableSerial(in.date[i])) { ++badDate; continue; }
        const double p = in.price[i];
        if (!std::isfinite(p)) { ++badPrice; continue; }
        if (p <= 0) { ++nonPos; continue; }
        if (extraValid && !(*extraValid)[i]) { ++extra; continue; }
        if (!in.include.empty() && !in.include[i]) { ++excluded; continue; }
        const long k = periodKey(in.date[i], freq);
        minKey = std::min(minKey, k);
        maxKey = std::max(maxKey, k);
        out.rows.push_back(i);
        keys.push_back(k);
    }
    diag.drop(reason::kEmptyRow, empty);
    diag.drop(reason::kBadDate, badDate);
    diag.drop(reason::kBadPrice, badPrice);
    diag.drop(reason::kNonPositivePrice, nonPos);
    if (extraReason) diag.drop(extraReason, extra);
    diag.drop(reason::kExcluded, excluded);
    diag.rowsUsed = out.rows.size();
    if (out.rows.empty()) {
        std::string why = n == 0 ? "the ranges hold no rows" : "no usable sale: " + diag.summary();
        throw InputError(why);
    }
    out.axis = PeriodAxis::spanning(minKey, maxKey, freq);
    out.period.resize(keys.size());
    for (std::size_t j = 0; j < keys.size(); ++j)
        out.period[j] = static_cast<int>(keys[j] - minKey);
    return out;
}

}  // namespace lintel
