#include "lead_lag.hpp"

#include <cstdlib>

#include <fmt/format.h>

#include "statistics.hpp"

namespace lintel {

namespace {

void checkInput(const LeadLagInput& in, const LeadLagOptions& o) {
    if (in.a.size() != in.b.size())
        throw InputError(fmt::format("the two indexes must cover the same periods: {} rows and {} rows",
                                     in.a.size(), in.b.size()));
    const std::size_t n = in.a.size();
    if (o.maxLag && static_cast<std::size_t>(*o.maxLag) >= std::max<std::size_t>(n, 1))
        throw InputError(fmt::format("maxlag must be smaller than the number of rows ({}), got {}",
                                     n, *o.maxLag));
}

}  // namespace

void LeadLagOptions::validate() const {
    if (changeLag && *changeLag < 1)
        throw InputError(fmt::format("lag must be 1 or more, got {}", *changeLag));
    if (maxLag && *maxLag < 0) throw InputError(fmt::format("maxlag must be 0 or more, got {}", *maxLag));
    if (minPairs < 3) throw InputError("minpairs must be at least 3");
}

int LeadLagOptions::changeLagUsed() const {
    return changeLag ? *changeLag : periodsPerYear(freq);
}

LeadLagResult leadLagOrEmpty(const LeadLagInput& in, const LeadLagOptions& o) {
    o.validate();
    checkInput(in, o);
    LeadLagResult r;
    const int p = periodsPerYear(o.freq);
    r.changeLag = o.changeLagUsed();
    const std::size_t n = in.a.size();
    // Default: one year of periods, but never beyond the rows there are.
    const int maxLag =
        o.maxLag ? *o.maxLag : std::min(std::max(p, 2), std::max(0, static_cast<int>(n) - 1));
    r.diag.rowsIn = n;
    std::size_t both = 0, blank = 0, nonPos = 0;
    for (std::size_t i = 0; i < n; ++i) {
        const double x = in.a[i], y = in.b[i];
        if (!hasValue(x) || !hasValue(y)) ++blank;
        else if (x <= 0 || y <= 0) ++nonPos;
        else ++both;
    }
    r.diag.rowsUsed = both;
    r.diag.drop(DropReason::NoCommonValue, blank);
    r.diag.drop(DropReason::NonPositiveValue, nonPos);

    const std::vector<double> ca = analytics::logChanges(in.a, r.changeLag);
    const std::vector<double> cb = analytics::logChanges(in.b, r.changeLag);
    bool any = false;
    for (int lag = -maxLag; lag <= maxLag; ++lag) {
        // Pairs (a_t, b_{t+lag}).
        std::vector<double> x, y;
        for (std::size_t t = 0; t < n; ++t) {
            const long s = static_cast<long>(t) + lag;
            if (s < 0 || s >= static_cast<long>(n)) continue;
            x.push_back(ca[t]);
            y.push_back(cb[static_cast<std::size_t>(s)]);
        }
        LeadLagRow row;
        row.lag = lag;
        const double c = stats::pearson(x, y, &row.pairs);
        if (row.pairs >= o.minPairs) row.corr = c;
        if (hasValue(row.corr)) {
            const bool better =
                !any || row.corr > r.bestCorr ||
                (row.corr == r.bestCorr && std::abs(lag) < std::abs(r.bestLag));
            if (better) {
                r.bestCorr = row.corr;
                r.bestLag = lag;
                any = true;
            }
        }
        r.rows.push_back(row);
    }
    return r;
}

LeadLagResult indexLeadLag(const LeadLagInput& in, const LeadLagOptions& o) {
    LeadLagResult r = leadLagOrEmpty(in, o);
    if (!hasValue(r.bestCorr))
        throw InputError(fmt::format(
            "no lag has {} or more pairs of {}-period changes with variation in both indexes",
            o.minPairs, r.changeLag));
    return r;
}

}  // namespace lintel
