#include "sales.hpp"

#include <algorithm>
#include <array>
#include <climits>
#include <cmath>

#include <fmt/format.h>

#include "statistics.hpp"

namespace lintel {

std::optional<DropReason> saleProblem(double date, double price) {
    if (!isUsableSerial(date)) return DropReason::BadDate;
    if (!std::isfinite(price)) return DropReason::BadPrice;
    if (price <= 0) return DropReason::NonPositivePrice;
    return std::nullopt;
}

ScreenedSales screenRows(const SalesInput& in, Frequency freq, Diagnostics& diag,
                         const RowProblems* extra) {
    const std::size_t n = in.date.size();
    if (in.price.size() != n || (!in.include.empty() && in.include.size() != n) ||
        (!in.emptyRow.empty() && in.emptyRow.size() != n) || (extra && extra->size() != n) ||
        (!in.readProblem.empty() && in.readProblem.size() != n))
        throw InputError("internal: sales columns differ in length");

    ScreenedSales out;
    diag.rowsIn = n;
    for (const std::string& note : in.notes) diag.warn(note);
    std::vector<long> keys;
    keys.reserve(n);
    out.rows.reserve(n);
    out.problem.assign(n, std::nullopt);
    long minKey = LONG_MAX, maxKey = LONG_MIN;
    std::array<std::size_t, kDropReasonCount> count{};
    for (std::size_t i = 0; i < n; ++i) {
        std::optional<DropReason> why;
        if (!in.emptyRow.empty() && in.emptyRow[i]) why = DropReason::EmptyRow;
        else if (auto p = saleProblem(in.date[i], in.price[i]))
            why = !in.readProblem.empty() && in.readProblem[i] ? in.readProblem[i] : p;
        else if (extra && (*extra)[i]) why = (*extra)[i];
        else if (!in.include.empty() && !in.include[i]) why = DropReason::Excluded;
        if (why) {
            out.problem[i] = why;
            ++count[static_cast<std::size_t>(*why)];
            continue;
        }
        const long k = periodKey(in.date[i], freq);
        minKey = std::min(minKey, k);
        maxKey = std::max(maxKey, k);
        out.rows.push_back(i);
        keys.push_back(k);
    }
    // Counted in enum order, which is the order of the checks above.
    for (std::size_t r = 0; r < kDropReasonCount; ++r)
        diag.drop(static_cast<DropReason>(r), count[r]);
    diag.rowsUsed = out.rows.size();
    if (out.rows.empty()) {
        out.axis = PeriodAxis::spanning(0, -1, freq);
        return out;
    }
    out.axis = PeriodAxis::spanning(minKey, maxKey, freq);
    out.period.resize(keys.size());
    for (std::size_t j = 0; j < keys.size(); ++j)
        out.period[j] = static_cast<int>(keys[j] - minKey);
    return out;
}

ScreenedSales screenSales(const SalesInput& in, Frequency freq, Diagnostics& diag,
                          const RowProblems* extra) {
    ScreenedSales out = screenRows(in, freq, diag, extra);
    if (out.rows.empty()) {
        std::string why = in.date.empty() ? "the ranges hold no rows"
                                          : "no usable sale: " + diag.summary();
        for (const std::string& note : in.notes) why += "; " + note;
        throw InputError(why);
    }
    return out;
}

std::vector<double> scaledPrices(const SalesInput& in, const ScreenedSales& s) {
    std::vector<double> price(s.rows.size());
    std::size_t hi = 0, lo = 0;  // positions of the largest and the smallest price
    for (std::size_t j = 0; j < s.rows.size(); ++j) {
        price[j] = in.price[s.rows[j]];
        if (price[j] > price[hi]) hi = j;
        if (price[j] < price[lo]) lo = j;
    }
    if (price.empty()) return price;
    const double top = price[hi], bottom = price[lo];
    double scale = stats::rangeScale(top);
    // A price below the smallest normal number (1e-308) among ordinary ones is kept as it is
    // (a median or a mean is not disturbed by it); scaling up is only for a table of tiny prices.
    if (scale == 1.0 && !std::isnormal(bottom) && std::isfinite(top * stats::rangeScale(bottom)))
        scale = stats::rangeScale(bottom);
    if (scale == 1.0) return price;
    if (!std::isnormal(bottom * scale) || !std::isfinite(top * scale))
        throw InputError(fmt::format(
            "prices span too far to compare: row {} holds {} and row {} holds {} (a ratio "
            "beyond the range of numbers, about 1e308)",
            s.rows[lo] + 1, bottom, s.rows[hi] + 1, top));
    for (double& p : price) p *= scale;
    return price;
}

}  // namespace lintel
