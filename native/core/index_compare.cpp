#include "index_compare.hpp"

#include <cmath>

#include <fmt/format.h>

#include "hodrick_prescott.hpp"
#include "statistics.hpp"

namespace lintel {

void CompareOptions::validate() const {
    if (lag < 1) throw InputError(fmt::format("lag must be 1 or more, got {}", lag));
    validateLambda(lambda);
    if (changeLag && *changeLag < 1)
        throw InputError(fmt::format("leadlag must be 1 or more, got {}", *changeLag));
    if (maxLag && *maxLag < 0)
        throw InputError(fmt::format("maxlag must be 0 or more, got {}", *maxLag));
}

CompareResult indexCompare(const CompareInput& in, const CompareOptions& o) {
    o.validate();
    if (in.columns.empty()) throw InputError("indexes holds no column");
    if (!in.names.empty() && in.names.size() != in.columns.size())
        throw InputError("internal: one name per column expected");
    const std::size_t n = in.columns.front().size();
    for (std::size_t c = 0; c < in.columns.size(); ++c)
        if (in.columns[c].size() != n)
            throw InputError(fmt::format("indexes column {} has {} rows, column 1 has {}", c + 1,
                                         in.columns[c].size(), n));
    CompareResult r;
    r.diag.rowsIn = n;
    for (std::size_t c = 0; c < in.columns.size(); ++c) {
        const auto& col = in.columns[c];
        CompareRow row;
        row.name = !in.names.empty() && !in.names[c].empty() ? in.names[c]
                                                              : fmt::format("column {}", c + 1);
        for (double v : col)
            if (hasValue(v) && v > 0) ++row.values;
        row.missing = n - row.values;
        auto note = [&](const std::string& what, const char* why) {
            r.diag.warn(fmt::format("{}: no {} ({})", row.name, what, why));
        };
        std::size_t changes = 0;
        row.volatility = stats::sampleSd(analytics::logChanges(col, o.lag), &changes);
        if (hasValue(row.volatility) && o.annual)
            row.volatility *= std::sqrt(double(periodsPerYear(o.freq)) / o.lag);
        if (!hasValue(row.volatility)) note("volatility", "fewer than 2 changes");
        try {
            SnrOptions so;
            so.freq = o.freq;
            so.lambda = o.lambda;
            row.snr = indexSnr(col, so).snr;
        } catch (const InputError& e) {
            note("signal-to-noise ratio", e.what());
        }
        bool beyond = false;
        for (std::size_t t = 1; t < n; ++t) {
            const double a = col[t - 1], b = col[t];
            if (!hasValue(a) || !hasValue(b) || a <= 0 || b <= 0) continue;
            const double ch = std::fabs(100.0 * (b / a - 1.0));
            if (std::isinf(ch)) beyond = true;  // 1e308 after 1e-308: exists, not a double
            else if (!hasValue(row.maxAbsChange) || ch > row.maxAbsChange) row.maxAbsChange = ch;
        }
        if (beyond) {
            row.maxAbsChange = kNoValue;
            note("largest change", "a change is beyond the largest number, about 1.8e308 %");
        }
        if (c == 0) {
            row.lag = 0;
            row.corr = 1;
        } else {
            LeadLagOptions lo;
            lo.freq = o.freq;
            lo.changeLag = o.changeLag;
            lo.maxLag = o.maxLag;
            const LeadLagResult ll = leadLagOrEmpty({col, in.columns.front()}, lo);
            if (hasValue(ll.bestCorr)) {
                row.lag = ll.bestLag;
                row.corr = ll.bestCorr;
            } else {
                note("lead-lag", "too few overlapping changes with the first column");
            }
        }
        r.rows.push_back(row);
    }
    r.diag.rowsUsed = r.rows.empty() ? 0 : r.rows.front().values;
    return r;
}

}  // namespace lintel
