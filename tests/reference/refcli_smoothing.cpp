// refcli commands for the structural time series smoother (structural_smoother.hpp).
//   smooth  <value, variance[, x1..xk, c1..ck]> trend=level|trend seasonal=0|1 freq=M
//           irregular=0|1 realtime=0 base=<position, 0-based; default first> level=0.95
//           v_level= v_slope= v_seasonal= v_irregular=   (all given: no estimation)
//           Columns x1..xk are the loadings of a shared sampling error; its covariance is
//           given in c1..ck of the first k rows.
//   borrow  <mvalue, mvariance, svalue, svariance[, cov]> the same keys, plus v_deviation=
//           v_irrseg=
// Output, one row per period: level, levelvar, filtered, filteredvar, trend, slope, seasonal,
// deviation, covbase (Cov(level_t, level_base)), index, lower, upper, the smoothed and
// filtered states and their variances (s<i>, sv<i>, f<i>, fv<i>), and constant columns with
// the scalars: ll, v_level, v_slope, v_seasonal, v_deviation, v_irregular, v_irrseg, q,
// evaluations, boundary. Diagnostics go to stderr.
#include <cmath>
#include <cstdio>
#include <string>

#include "refcli.hpp"
#include "state_space.hpp"
#include "structural_smoother.hpp"

namespace {

using namespace lintel;

SmootherOptions optionsFrom(const refcli::Args& a) {
    SmootherOptions o;
    const auto trend = parseTrendKind(refcli::text(a, "trend", "trend"));
    if (!trend) throw InputError("bad trend");
    o.trend = *trend;
    o.seasonal = refcli::number(a, "seasonal", 0) != 0;
    const auto f = parseFrequency(refcli::text(a, "freq", "M"));
    if (!f) throw InputError("bad freq");
    o.freq = *f;
    o.irregular = refcli::number(a, "irregular", 0) != 0;
    o.realtime = refcli::number(a, "realtime", 0) != 0;
    const double seasonLen = refcli::number(a, "season", NAN);
    if (std::isfinite(seasonLen)) o.seasonPeriods = static_cast<int>(seasonLen);
    SmootherVariances v;
    bool any = false;
    auto given = [&](const char* key, double SmootherVariances::*field) {
        const double x = refcli::number(a, key, NAN);
        if (std::isfinite(x)) {
            v.*field = x;
            any = true;
        }
    };
    given("v_level", &SmootherVariances::level);
    given("v_slope", &SmootherVariances::slope);
    given("v_seasonal", &SmootherVariances::seasonal);
    given("v_deviation", &SmootherVariances::deviation);
    given("v_irregular", &SmootherVariances::irregular);
    given("v_irrseg", &SmootherVariances::irregularSegment);
    if (any) o.variances = v;
    return o;
}

PeriodEffects effectsFrom(const refcli::Table& t, const std::string& value,
                          const std::string& variance, const std::string& loadingPrefix) {
    PeriodEffects e;
    e.value = t.numbers(value);
    e.variance = t.numbers(variance);
    int k = 0;
    while (t.find(loadingPrefix + "x" + std::to_string(k + 1)) >= 0) ++k;
    if (k > 0) {
        const Eigen::Index n = static_cast<Eigen::Index>(t.rows());
        e.loadings.resize(n, k);
        e.sharedCov.resize(k, k);
        for (int j = 0; j < k; ++j) {
            const auto x = t.numbers(loadingPrefix + "x" + std::to_string(j + 1));
            const auto c = t.numbers(loadingPrefix + "c" + std::to_string(j + 1));
            for (Eigen::Index i = 0; i < n; ++i) e.loadings(i, j) = x[static_cast<std::size_t>(i)];
            for (int i = 0; i < k; ++i) e.sharedCov(i, j) = c[static_cast<std::size_t>(i)];
        }
    }
    return e;
}

int print(const SmootherResult& r, const refcli::Args& a) {
    std::fprintf(stderr, "%s\n%s\n", r.diag.summary().c_str(), r.summary().c_str());
    for (const auto& w : r.diag.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());
    const int n = r.periods;
    const auto axis = PeriodAxis::spanning(2000L * 12, 2000L * 12 + n - 1, Frequency::Month);
    IndexOptions io;
    io.level = refcli::number(a, "level", 0.95);
    const double base = refcli::number(a, "base", NAN);
    if (std::isfinite(base)) io.baseDate = axis.start(static_cast<int>(base));
    const IndexResult idx = smoothedIndex(r, axis, std::vector<std::size_t>(static_cast<std::size_t>(n), 0), io);
    const std::vector<double> covBase = r.levelCovarianceWith(idx.table.basePosition);

    std::vector<std::string> names{"level", "levelvar", "filtered", "filteredvar", "trend",
                                   "slope", "seasonal", "deviation", "covbase", "index",
                                   "lower", "upper"};
    auto orNaN = [n](const std::vector<double>& v) {
        return v.empty() ? std::vector<double>(static_cast<std::size_t>(n), NAN) : v;
    };
    std::vector<std::vector<double>> cols{r.level, r.levelVariance, r.filtered, r.filteredVariance,
                                          r.trend, orNaN(r.slope), orNaN(r.seasonal),
                                          orNaN(r.deviation), covBase, idx.table.index,
                                          idx.table.lower, idx.table.upper};
    const int m = r.run->states();
    for (const char* kind : {"s", "sv", "f", "fv"}) {
        for (int i = 0; i < m; ++i) {
            std::vector<double> col(static_cast<std::size_t>(n));
            for (int t = 0; t < n; ++t) {
                const std::string k = kind;
                double x;
                if (k == "s") x = r.run->smoothedState(t)(i);
                else if (k == "sv") x = r.run->smoothedStateCov(t)(i, i);
                else if (k == "f") x = r.run->filteredState(t)(i);
                else x = r.run->filteredStateCov(t)(i, i);
                col[static_cast<std::size_t>(t)] = x;
            }
            names.push_back(kind + std::to_string(i));
            cols.push_back(col);
        }
    }
    auto scalar = [&](const char* name, double x) {
        names.push_back(name);
        cols.emplace_back(static_cast<std::size_t>(n), x);
    };
    scalar("ll", r.logLikelihood);
    scalar("v_level", r.variances.level);
    scalar("v_slope", r.variances.slope);
    scalar("v_seasonal", r.variances.seasonal);
    scalar("v_deviation", r.variances.deviation);
    scalar("v_irregular", r.variances.irregular);
    scalar("v_irrseg", r.variances.irregularSegment);
    scalar("q", r.signalToNoise);
    scalar("evaluations", r.evaluations);
    scalar("boundary", r.boundary ? 1 : 0);
    refcli::printColumns(names, cols);
    return 0;
}

const refcli::Register regSmooth("smooth", [](const refcli::Table& t, const refcli::Args& a) {
    return print(smoothPeriodEffects(effectsFrom(t, "value", "variance", ""), optionsFrom(a)), a);
});

const refcli::Register regBorrow("borrow", [](const refcli::Table& t, const refcli::Args& a) {
    BorrowInput in;
    in.market = effectsFrom(t, "mvalue", "mvariance", "m");
    in.segment = effectsFrom(t, "svalue", "svariance", "s");
    if (t.find("cov") >= 0) in.covariance = t.numbers("cov");
    return print(borrowStrength(in, optionsFrom(a)), a);
});

}  // namespace
