// Speed of the smoothed INDEXHEDONIC and CHAINRS from raw sales (smoothed_index.hpp): the
// estimator's period effects, maximum likelihood and the smoother (issue 13 target for the
// smoothing: 192 months well under 50 ms in the core). Synthetic thin segment: 192 months,
// n_t sales a month uniform on 10..25; ln price = 12 + level_t + 0.8 ln size + 0.1 [flat] +
// 0.1 [district A] - 0.002 age + N(0, 0.2^2), level_t a local linear trend (level sd 0.004,
// slope sd 0.0004) plus a fixed seasonal of amplitude 0.01; size uniform 40..160 m^2, age
// uniform 0..80; repeat sales: 600 properties, each sold in 2..5 distinct random months. The
// borrow case: a whole range with five times the sales, the segment its district A.
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "bench.hpp"
#include "smoothed_index.hpp"

namespace {

struct Lcg {
    unsigned long long s = 4242;
    double next() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
    double normal() {
        const double u = next() + 1e-300, v = next();
        return std::sqrt(-2 * std::log(u)) * std::cos(6.283185307179586 * v);
    }
};

constexpr int kMonths = 192;

std::vector<double> levels(Lcg& g) {
    std::vector<double> out;
    double level = 0, slope = 0.003;
    for (int t = 0; t < kMonths; ++t) {
        out.push_back(level + 0.01 * std::sin(6.283185307179586 * t / 12.0));
        level += slope + 0.004 * g.normal();
        slope += 0.0004 * g.normal();
    }
    return out;
}

double dateOf(int t, double u) {
    return lintel::serialFromCivil({2008 + t / 12, 1 + t % 12, 1 + static_cast<int>(27 * u)});
}

// Thin segment (scale 1) or a whole range with `scale` times the sales, a fifth in district A.
lintel::HedonicInput hedonic(int scale) {
    Lcg g;
    const std::vector<double> level = levels(g);
    lintel::HedonicInput in;
    lintel::CharacteristicColumn size{"size", {}, {}}, type{"type", {}, {}}, age{"age", {}, {}},
        district{"district", {}, {}};
    for (int t = 0; t < kMonths; ++t) {
        const int n = scale * (10 + static_cast<int>(16 * g.next()));
        for (int i = 0; i < n; ++i) {
            const double s = 40 + 120 * g.next(), a = 80 * g.next();
            const bool flat = g.next() < 0.5, inA = scale == 1 || g.next() < 0.2;
            in.sales.date.push_back(dateOf(t, g.next()));
            in.sales.price.push_back(std::exp(12 + level[t] + 0.8 * std::log(s) + (flat ? 0.1 : 0) +
                                              (inA ? 0.1 : 0) - 0.002 * a + 0.2 * g.normal()));
            size.numeric.push_back(s);
            type.text.push_back(flat ? "flat" : "house");
            age.numeric.push_back(a);
            district.text.push_back(inA ? "A" : "B");
            if (scale > 1) in.sales.include.push_back(inA ? 1 : 0);
        }
    }
    in.characteristics = {size, type, age};
    if (scale > 1) in.characteristics.push_back(district);
    return in;
}

lintel::RepeatSalesInput repeatSales() {
    Lcg g;
    const std::vector<double> level = levels(g);
    lintel::RepeatSalesInput in;
    for (int p = 0; p < 600; ++p) {
        const double effect = 0.3 * g.normal();
        const int k = 2 + static_cast<int>(4 * g.next());
        for (int j = 0; j < k; ++j) {
            const int t = static_cast<int>(kMonths * g.next());
            in.id.push_back("p" + std::to_string(p));
            in.sales.date.push_back(dateOf(t, g.next()));
            in.sales.price.push_back(std::exp(12 + level[t] + effect + 0.08 * g.normal()));
        }
    }
    return in;
}

void runHedonic(const char* name, int scale, bool seasonal, bool realtime, bool borrow,
                double target) {
    static const lintel::HedonicInput thin = hedonic(1), wide = hedonic(5);
    const lintel::HedonicInput& in = scale == 1 ? thin : wide;
    lintel::HedonicOptions o;
    o.smooth = lintel::SmoothKind::Trend;
    o.seasonal = seasonal;
    o.realtime = realtime;
    o.borrow = borrow;
    int evaluations = 0;
    const double ms = bench::medianMillis([&] {
        evaluations = lintel::smoothedHedonicIndex(in, o).model.evaluations;
    });
    const std::string what = std::string(name) + " (" + std::to_string(in.sales.date.size()) +
                             " sales, " + std::to_string(evaluations) + " evaluations)";
    if (target > 0) {
        bench::report(what, ms, target);
    } else {
        std::printf("%-60s %9.1f ms  (no stated target)\n", what.c_str(), ms);
        std::fflush(stdout);
    }
}

const bench::Register trendSeasonal("smoothed_index.hedonic_trend_seasonal_192", [] {
    runHedonic("INDEXHEDONIC smooth=trend seasonal=1, 192 months", 1, true, false, false, 50);
});
const bench::Register trend("smoothed_index.hedonic_trend_192", [] {
    runHedonic("INDEXHEDONIC smooth=trend, 192 months", 1, false, false, false, 50);
});
const bench::Register realtime("smoothed_index.hedonic_realtime_192", [] {
    runHedonic("INDEXHEDONIC smooth=trend seasonal=1 realtime=1, 192 months", 1, true, true, false,
               0);
});
const bench::Register borrow("smoothed_index.hedonic_borrow_192", [] {
    runHedonic("INDEXHEDONIC smooth=trend seasonal=1 borrow=1, 192 months", 5, true, false, true,
               0);
});
const bench::Register chain("smoothed_index.chainrs_trend_seasonal_192", [] {
    static const lintel::RepeatSalesInput in = repeatSales();
    lintel::RepeatSalesOptions o;
    o.smooth = lintel::SmoothKind::Trend;
    o.seasonal = true;
    const double ms = bench::medianMillis([&] { lintel::smoothedRepeatSalesIndex(in, o); });
    bench::report("CHAINRS smooth=trend seasonal=1, 192 months (" +
                      std::to_string(in.sales.date.size()) + " sales)",
                  ms, 50);
});

}  // namespace
