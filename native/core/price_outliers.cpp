#include "price_outliers.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <unordered_map>

#include <fmt/format.h>

#include "diagnostics.hpp"

namespace lintel {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Local median (even count: mean of the two middle values). To be replaced by the shared
// statistics helper when the core's statistics file lands.
double medianOf(std::vector<double> v) {
    const std::size_t n = v.size();
    const std::size_t mid = n / 2;
    std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(mid), v.end());
    const double upper = v[mid];
    if (n % 2 == 1) return upper;
    const double lower = *std::max_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(mid));
    return 0.5 * (lower + upper);
}

}  // namespace

void OutlierOptions::validate() const {
    if (!(threshold > 0) || !std::isfinite(threshold))
        throw InputError(fmt::format("the outlier threshold must be a positive number, got {}", threshold));
    if (minGroup < 3)
        throw InputError(fmt::format("the smallest group tested for outliers must have at least 3 "
                                     "sales, got {}",
                                     minGroup));
}

std::vector<double> modifiedZScores(const std::vector<double>& x) {
    std::vector<double> z(x.size(), 0.0);
    if (x.empty()) return z;
    const double med = medianOf(x);
    std::vector<double> dev(x.size());
    for (std::size_t i = 0; i < x.size(); ++i) dev[i] = std::fabs(x[i] - med);
    const double mad = medianOf(dev);
    if (mad > 0) {
        for (std::size_t i = 0; i < x.size(); ++i) z[i] = 0.6745 * (x[i] - med) / mad;
        return z;
    }
    double meanAD = 0;
    for (double d : dev) meanAD += d;
    meanAD /= static_cast<double>(dev.size());
    if (meanAD > 0)
        for (std::size_t i = 0; i < x.size(); ++i) z[i] = (x[i] - med) / (1.253314 * meanAD);
    return z;
}

std::vector<double> logPrices(const std::vector<double>& prices) {
    std::vector<double> out(prices.size(), kNaN);
    for (std::size_t i = 0; i < prices.size(); ++i)
        if (prices[i] > 0 && std::isfinite(prices[i])) out[i] = std::log(prices[i]);
    return out;
}

OutlierCheck findPriceOutliers(const std::vector<double>& prices, const std::vector<long>& group,
                               const OutlierOptions& options) {
    options.validate();
    if (group.size() != prices.size())
        throw InputError(fmt::format("prices has {} rows, groups has {}", prices.size(), group.size()));
    OutlierCheck r;
    r.z.assign(prices.size(), kNaN);
    r.outlier.assign(prices.size(), 0);
    const std::vector<double> x = logPrices(prices);
    // Rows of each group, groups in order of first appearance (deterministic).
    std::unordered_map<long, std::size_t> slot;
    std::vector<std::vector<std::size_t>> members;
    for (std::size_t i = 0; i < prices.size(); ++i) {
        if (group[i] < 0 || std::isnan(x[i])) continue;
        auto [it, added] = slot.emplace(group[i], members.size());
        if (added) members.emplace_back();
        members[it->second].push_back(i);
    }
    for (const auto& rows : members) {
        if (rows.size() < options.minGroup) {
            ++r.groupsTooSmall;
            r.rowsNotTested += rows.size();
            continue;
        }
        ++r.groupsTested;
        std::vector<double> v;
        v.reserve(rows.size());
        for (std::size_t i : rows) v.push_back(x[i]);
        std::vector<double> dev(v.size());
        const double med = medianOf(v);
        for (std::size_t k = 0; k < v.size(); ++k) dev[k] = std::fabs(v[k] - med);
        if (medianOf(dev) == 0) ++r.groupsMeanAD;
        const std::vector<double> z = modifiedZScores(v);
        for (std::size_t k = 0; k < rows.size(); ++k) {
            r.z[rows[k]] = z[k];
            if (std::fabs(z[k]) > options.threshold) {
                r.outlier[rows[k]] = 1;
                ++r.outliers;
            }
        }
    }
    return r;
}

}  // namespace lintel
