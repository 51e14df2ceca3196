#include "sale_duplicates.hpp"

#include <algorithm>
#include <cmath>
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
    // The usable rows sorted by (id, day, row): each run of one (id, day) is a group, its
    // rows in input order. (A sort of row numbers: a map of a million keys cost seconds.)
    std::vector<long long> day(n, 0);
    std::vector<std::size_t> order;
    order.reserve(n);
    for (std::size_t i = 0; i < n; ++i) {
        if (idKeys[i].empty() || !std::isfinite(dates[i]) || !(prices[i] > 0) ||
            !std::isfinite(prices[i]) || (usable && !(*usable)[i]))
            continue;
        day[i] = static_cast<long long>(std::floor(dates[i]));
        order.push_back(i);
    }
    std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
        const int c = idKeys[a].compare(idKeys[b]);
        if (c != 0) return c < 0;
        if (day[a] != day[b]) return day[a] < day[b];
        return a < b;
    });
    std::vector<std::size_t> rows;
    for (std::size_t g = 0; g < order.size();) {
        std::size_t e = g + 1;
        while (e < order.size() && day[order[e]] == day[order[g]] &&
               idKeys[order[e]] == idKeys[order[g]])
            ++e;
        if (e - g >= 2) {
            rows.assign(order.begin() + static_cast<std::ptrdiff_t>(g),
                        order.begin() + static_cast<std::ptrdiff_t>(e));
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
        g = e;
    }
    return r;
}

}  // namespace lintel
