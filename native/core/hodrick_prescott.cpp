#include "hodrick_prescott.hpp"

#include <algorithm>
#include <cmath>

#include <Eigen/OrderingMethods>
#include <Eigen/SparseCholesky>
#include <Eigen/SparseCore>
#include <fmt/format.h>

#include "index_table.hpp"
#include "work_limits.hpp"

namespace lintel {

double defaultHpLambda(Frequency f) {
    switch (f) {
        case Frequency::Month: return 129600.0;
        case Frequency::Quarter: return 1600.0;
        case Frequency::Year: return 6.25;
    }
    return 1600.0;
}

void validateLambda(const std::optional<double>& lambda) {
    if (lambda && !(std::isfinite(*lambda) && *lambda > 0))
        throw InputError(fmt::format("lambda must be a positive number, got {}", *lambda));
}

void HpOptions::validate() const { validateLambda(lambda); }

HpResult hodrickPrescott(const std::vector<double>& y, const HpOptions& o) {
    o.validate();
    HpResult r;
    r.lambda = o.lambda ? *o.lambda : defaultHpLambda(o.freq);
    const int n = static_cast<int>(y.size());
    r.diag.rowsIn = y.size();
    std::size_t observed = 0;
    for (int t = 0; t < n; ++t)
        if (hasValue(y[t])) {
            if (r.first < 0) r.first = t;
            r.last = t;
            ++observed;
        }
    r.diag.rowsUsed = observed;
    r.diag.drop(DropReason::BlankValue, y.size() - observed);
    if (observed < 3)
        throw InputError(fmt::format("the trend needs at least 3 values, the index has {}",
                                     observed));
    r.trend.assign(y.size(), kNoValue);
    r.cycle.assign(y.size(), kNoValue);

    const int m = r.last - r.first + 1;  // span length
    limits::checkWork(static_cast<double>(m), limits::kMaxTrendRows,
                      "the trend (Hodrick-Prescott): rows from the index's first to its last value", "rows",
                      "an index has one row per period (give the index column of an index "
                      "table, not a column of sales)");
    // The system is solved for the deviations from the mean of the values, in units of a power
    // of two near the largest |value|: a constant series gives its constant exactly (the
    // deviations are 0), and values near the largest double neither overflow nor lose digits.
    // The filter is linear and passes constants through, so the trend is the same.
    double largest = 0;
    for (int t = r.first; t <= r.last; ++t)
        if (hasValue(y[t])) largest = std::max(largest, std::fabs(y[t]));
    const double scale =
        largest > 0 ? std::ldexp(1.0, std::min(-std::ilogb(largest), 1023)) : 1.0;
    double centre = 0;
    for (int t = r.first; t <= r.last; ++t)
        if (hasValue(y[t])) centre += y[t] * scale;
    centre /= static_cast<double>(observed);
    std::vector<Eigen::Triplet<double>> entries;
    entries.reserve(static_cast<std::size_t>(m) * 9);
    Eigen::VectorXd rhs = Eigen::VectorXd::Zero(m);
    for (int i = 0; i < m; ++i)
        if (hasValue(y[r.first + i])) {
            entries.emplace_back(i, i, 1.0);
            rhs(i) = y[r.first + i] * scale - centre;
        }
    // lambda K'K, accumulated row by row of K: each row is (1, -2, 1) at columns i, i+1, i+2.
    const double c[3] = {1.0, -2.0, 1.0};
    for (int i = 0; i + 2 < m; ++i)
        for (int a = 0; a < 3; ++a)
            for (int b = 0; b < 3; ++b) entries.emplace_back(i + a, i + b, r.lambda * c[a] * c[b]);
    Eigen::SparseMatrix<double> A(m, m);
    A.setFromTriplets(entries.begin(), entries.end());  // duplicates are summed

    Eigen::SimplicialLDLT<Eigen::SparseMatrix<double>, Eigen::Lower, Eigen::NaturalOrdering<int>>
        solver(A);
    if (solver.info() != Eigen::Success)
        throw InputError("the trend could not be computed (the system is singular)");
    const Eigen::VectorXd tau = solver.solve(rhs);
    if (solver.info() != Eigen::Success || !tau.allFinite())
        throw InputError("the trend could not be computed (numerical failure)");
    for (int i = 0; i < m; ++i) {
        const int t = r.first + i;
        r.trend[t] = (tau(i) + centre) / scale;
        if (!std::isfinite(r.trend[t]))
            throw InputError(fmt::format(
                "the trend at row {} is beyond the largest number (about 1.8e308)", t + 1));
        if (hasValue(y[t])) {
            r.cycle[t] = (rhs(i) - tau(i)) / scale;
            if (!std::isfinite(r.cycle[t]))
                throw InputError(fmt::format(
                    "the cycle at row {} is beyond the largest number (about 1.8e308)", t + 1));
        }
    }
    if (observed < static_cast<std::size_t>(m))
        r.diag.warn(fmt::format("{} period(s) without a value inside the series: trend bridged",
                                m - static_cast<int>(observed)));
    return r;
}

}  // namespace lintel
