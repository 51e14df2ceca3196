// Speed of the analytics area (our own targets, no issue target: a recalculation in Calc
// should stay well under a second). Synthetic market: 212,000 sales over 192 months, strata
// = 6 regions x 4 types (24 strata), ln price = 12 + 0.1 region + 0.3 type + 0.003 t + noise
// (sum of uniforms); index series of 192 months for the series measures.
#include <cmath>
#include <string>
#include <vector>

#include "bench.hpp"
#include "hodrick_prescott.hpp"
#include "index_compare.hpp"
#include "mix_adjusted.hpp"
#include "turning_points.hpp"

namespace {

struct Lcg {
    unsigned long long s = 4242;
    double next() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
};

const lintel::MixInput& market() {
    static lintel::MixInput in = [] {
        lintel::MixInput m;
        Lcg g;
        const std::size_t n = 212000;
        const int months = 192;
        m.strata.resize(2);
        const char* regions[] = {"north", "south", "east", "west", "centre", "coast"};
        const char* types[] = {"flat", "terrace", "semi", "detached"};
        for (std::size_t i = 0; i < n; ++i) {
            const int t = static_cast<int>(i * months / n);
            const int r = static_cast<int>(6 * g.next()), k = static_cast<int>(4 * g.next());
            const double noise = 0.5 * (g.next() + g.next() + g.next() - 1.5);
            m.sales.date.push_back(lintel::serialFromCivil({2009 + t / 12, t % 12 + 1, 1 + int(i % 28)}));
            m.sales.price.push_back(std::exp(12 + 0.1 * r + 0.3 * k + 0.003 * t + noise));
            m.strata[0].push_back(regions[r]);
            m.strata[1].push_back(types[k]);
        }
        return m;
    }();
    return in;
}

std::vector<double> series(int n, unsigned long long seed) {
    Lcg g;
    g.s = seed;
    std::vector<double> v(n);
    double x = 100;
    for (int t = 0; t < n; ++t) {
        x *= std::exp(0.003 + 0.01 * (g.next() - 0.5));
        v[t] = x;
    }
    return v;
}

const bench::Register mixFixed("analytics.mix_212k", [] {
    lintel::MixOptions o;
    bench::report("INDEXMIX 212k sales, 24 strata, monthly", bench::medianMillis([&] { lintel::indexMix(market(), o); }), 150);
});
const bench::Register mixChain("analytics.mix_chain_212k", [] {
    lintel::MixOptions o;
    o.chain = true;
    bench::report("INDEXMIX chain 212k sales", bench::medianMillis([&] { lintel::indexMix(market(), o); }), 150);
});
const bench::Register mixBoot("analytics.mix_bootstrap_212k", [] {
    lintel::MixOptions o;
    o.bootstrap = true;
    o.reps = 200;
    bench::report("INDEXMIX 212k sales, bootstrap 200 reps", bench::medianMillis([&] { lintel::indexMix(market(), o); }, 3), 3000);
});
const bench::Register hpLong("analytics.hp_10000", [] {
    const auto y = series(10000, 7);
    lintel::HpOptions o;
    bench::report("HP trend, 10,000 periods", bench::medianMillis([&] { lintel::hodrickPrescott(y, o); }), 20);
});
const bench::Register compare10("analytics.compare_10x192", [] {
    lintel::CompareInput in;
    for (int c = 0; c < 10; ++c) in.columns.push_back(series(192, 100 + c));
    bench::report("INDEXCOMPARE 10 columns x 192 months", bench::medianMillis([&] { lintel::indexCompare(in, lintel::CompareOptions{}); }), 20);
});
const bench::Register turns("analytics.turns_600", [] {
    lintel::TurnsInput in;
    for (int t = 0; t < 600; ++t) {
        in.periods.push_back(lintel::serialFromCivil({1970 + t / 12, t % 12 + 1, 1}));
        in.index.push_back(100 + 10 * std::sin(t / 8.0) + 3 * std::sin(t / 2.3));
    }
    bench::report("INDEXTURNS 600 months", bench::medianMillis([&] { lintel::indexTurns(in, lintel::TurnsOptions{}); }), 10);
});

}  // namespace
