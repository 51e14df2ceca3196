// Speed of the structural time series smoother (issue 13 target: maximum-likelihood smoothing
// of 192 months well under 50 ms in the core). Synthetic thin segment: 192 months, n_t sales a
// month uniform on 10..25, true log level a local linear trend (level sd 0.004, slope sd
// 0.0004 a month) plus a fixed seasonal of amplitude 0.01, period effect = truth + N(0, h_t)
// with h_t = 0.2^2 / n_t (a hedonic residual sd of 0.2); the market series (borrow) has 8
// times the sales.
#include <cmath>
#include <vector>

#include "bench.hpp"
#include "structural_smoother.hpp"

namespace {

struct Lcg {
    unsigned long long s = 1313;
    double next() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
    double normal() {  // Box-Muller
        const double u = next() + 1e-300, v = next();
        return std::sqrt(-2 * std::log(u)) * std::cos(6.283185307179586 * v);
    }
};

struct Series {
    lintel::PeriodEffects segment, market;
};

const Series& thin() {
    static Series s = [] {
        Series out;
        Lcg g;
        const int n = 192;
        double level = 0, slope = 0.003;
        for (int t = 0; t < n; ++t) {
            const double truth = level + 0.01 * std::sin(6.283185307179586 * t / 12.0);
            const int sales = 10 + static_cast<int>(16 * g.next());
            const double h = 0.04 / sales, hm = h / 8;
            out.segment.value.push_back(truth + 0.02 + std::sqrt(h) * g.normal());
            out.segment.variance.push_back(h);
            out.market.value.push_back(truth + std::sqrt(hm) * g.normal());
            out.market.variance.push_back(hm);
            level += slope + 0.004 * g.normal();
            slope += 0.0004 * g.normal();
        }
        return out;
    }();
    return s;
}

void run(const char* name, lintel::TrendKind trend, bool seasonal, bool irregular) {
    lintel::SmootherOptions o;
    o.trend = trend;
    o.seasonal = seasonal;
    o.irregular = irregular;
    int evaluations = 0;
    const double ms = bench::medianMillis([&] {
        evaluations = lintel::smoothPeriodEffects(thin().segment, o).evaluations;
    });
    bench::report(std::string(name) + " (" + std::to_string(evaluations) + " evaluations)", ms, 50);
}

const bench::Register level("smoothing.level_192", [] {
    run("smooth ML, local level, 192 months", lintel::TrendKind::Level, false, false);
});
const bench::Register trend("smoothing.trend_192", [] {
    run("smooth ML, local linear trend, 192 months", lintel::TrendKind::Trend, false, false);
});
const bench::Register seasonal("smoothing.trend_seasonal_192", [] {
    run("smooth ML, trend + seasonal(12), 192 months", lintel::TrendKind::Trend, true, false);
});
const bench::Register seasonalIrr("smoothing.trend_seasonal_irregular_192", [] {
    run("smooth ML, trend + seasonal + irregular, 192 months", lintel::TrendKind::Trend, true, true);
});
const bench::Register borrow("smoothing.borrow_192", [] {
    lintel::BorrowInput in{thin().market, thin().segment, {}};
    lintel::SmootherOptions o;
    int evaluations = 0;
    const double ms = bench::medianMillis([&] { evaluations = lintel::borrowStrength(in, o).evaluations; });
    bench::report("borrow ML, common trend + deviation, 192 months (" +
                      std::to_string(evaluations) + " evaluations)", ms, 50);
});

}  // namespace
