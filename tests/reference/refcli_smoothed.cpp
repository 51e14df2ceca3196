#include "refcli_smoothed.hpp"

#include <cmath>
#include <cstdio>
#include <string>

namespace refcli {

int printSmoothed(const lintel::SmoothedIndexResult& r) {
    std::fprintf(stderr, "%s\n%s\n", r.diag.summary().c_str(), r.model.summary().c_str());
    for (const auto& w : r.diag.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());
    const auto& tb = r.table;
    const std::size_t n = tb.index.size();
    auto constant = [n](double x) { return std::vector<double>(n, x); };
    const auto& v = r.model.variances;
    printColumns({"period", "index", "count", "lower", "upper", "log", "se", "v_level", "v_slope",
                  "v_seasonal", "v_deviation", "ll", "q", "evaluations", "boundary", "t0",
                  "last_estimate", "filled", "market_rows"},
                 {periodStarts(tb.axis), tb.index, asNumbers(tb.count), tb.lower, tb.upper,
                  r.logIndex, r.logSe, constant(v.level), constant(v.slope),
                  constant(v.seasonal), constant(v.deviation), constant(r.model.logLikelihood),
                  constant(r.model.signalToNoise), constant(r.model.evaluations),
                  constant(r.model.boundary ? 1 : 0),
                  constant(r.initialPeriods > 0 ? static_cast<double>(r.initialPeriods - 1) : NAN),
                  constant(r.lastEstimate >= 0 ? static_cast<double>(r.lastEstimate) : NAN),
                  constant(r.periodsWithoutEffect), constant(static_cast<double>(r.marketRowsUsed))});
    return 0;
}

int printEffects(const lintel::PeriodEffectSeries& s) {
    std::fprintf(stderr, "%s\n", s.diag.summary().c_str());
    for (const auto& w : s.diag.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());
    const auto& e = s.effects;
    std::vector<std::string> names{"period", "value", "variance", "count"};
    std::vector<std::vector<double>> cols{periodStarts(s.axis), e.value, e.variance,
                                          asNumbers(s.count)};
    const auto n = static_cast<std::size_t>(s.axis.count);
    const auto k = static_cast<std::size_t>(e.loadings.cols());
    for (std::size_t j = 0; j < k; ++j) {
        std::vector<double> x(n), c(n, NAN);
        for (std::size_t i = 0; i < n; ++i) x[i] = e.loadings(static_cast<long>(i), static_cast<long>(j));
        for (std::size_t i = 0; i < k && i < n; ++i) c[i] = e.sharedCov(static_cast<long>(i), static_cast<long>(j));
        names.push_back("x" + std::to_string(j + 1));
        cols.push_back(x);
        names.push_back("c" + std::to_string(j + 1));
        cols.push_back(c);
    }
    printColumns(names, cols);
    return 0;
}

}  // namespace refcli
