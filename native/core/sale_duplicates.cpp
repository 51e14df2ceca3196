#include "sale_duplicates.hpp"

#include <cmath>
#include <map>
#include <utility>

#include <fmt/format.h>

#include "diagnostics.hpp"

namespace lintel {

DuplicateCheck findDuplicateSales(const std::vector<std::string>& idKeys,
                                  const std::vector<double>& dates,
                                  const std::vector<double>& prices,
                                  const std::vector<char>* usable) {
    const std::size_t n = idKeys.size();
    if (dates.size() != n || prices.size() != n || (usable && usable->size() != n))
        throw InputError(fmt::format("ids has {} rows, dates {}, prices {}", n, dates.size(),
                                     prices.size()));
    DuplicateCheck r;
    r.mark.assign(n, DuplicateMark::None);
    r.firstOf.resize(n);
    for (std::size_t i = 0; i < n; ++i) r.firstOf[i] = i;
    // (id, day) -> rows in input order.
    std::map<std::pair<std::string, long long>, std::vector<std::size_t>> groups;
    for (std::size_t i = 0; i < n; ++i) {
        if (idKeys[i].empty() || !std::isfinite(dates[i]) || !(prices[i] > 0) ||
            !std::isfinite(prices[i]) || (usable && !(*usable)[i]))
            continue;
        groups[{idKeys[i], static_cast<long long>(std::floor(dates[i]))}].push_back(i);
    }
    for (const auto& [key, rows] : groups) {
        if (rows.size() < 2) continue;
        bool onePrice = true;
        for (std::size_t i : rows) onePrice = onePrice && prices[i] == prices[rows[0]];
        if (onePrice) {
            for (std::size_t k = 1; k < rows.size(); ++k) {
                r.mark[rows[k]] = DuplicateMark::Duplicate;
                r.firstOf[rows[k]] = rows[0];
                ++r.duplicates;
            }
        } else {
            ++r.conflictGroups;
            for (std::size_t i : rows) {
                r.mark[i] = DuplicateMark::Conflict;
                r.firstOf[i] = rows[0];
                ++r.conflictRows;
            }
        }
    }
    return r;
}

}  // namespace lintel
