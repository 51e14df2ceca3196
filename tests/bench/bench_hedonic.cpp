// Speed of the hedonic time-dummy estimators (targets from the hedonic issue: pooled fit on
// 212,000 sales, 192 months, about 12 characteristic terms under 50 ms; 1,000,000 sales under
// 0.3 s). Synthetic market: size (logged), rooms, bathrooms, age, lot, garage and a text
// district with 7 levels (6 dummies): 12 terms. ln price = 11 + 0.003 t + 0.7 ln size
// + 0.04 rooms + 0.06 bathrooms - 0.003 age + 0.00001 lot + 0.05 garage + district effect
// + N(0, 0.2^2)-like noise (sum of uniforms).
#include <cmath>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "bench.hpp"
#include "hedonic.hpp"

namespace {

struct Lcg {
    unsigned long long s = 12345;
    double next() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
};

lintel::HedonicInput market(std::size_t n, int months) {
    lintel::HedonicInput in;
    Lcg g;
    std::vector<lintel::CharacteristicColumn> c(7);
    const char* names[] = {"size", "rooms", "bathrooms", "age", "lot", "garage", "district"};
    for (int j = 0; j < 7; ++j) {
        c[j].name = names[j];
        if (j < 6) c[j].numeric.reserve(n);
        else c[j].text.reserve(n);
    }
    in.sales.date.reserve(n);
    in.sales.price.reserve(n);
    const double effect[] = {0, 0.1, -0.1, 0.2, 0.05, -0.15, 0.3};
    for (std::size_t i = 0; i < n; ++i) {
        const int t = static_cast<int>(i * months / n);
        const double size = 40 + 200 * g.next();
        const double rooms = 1 + std::floor(5 * g.next());
        const double bath = 1 + std::floor(3 * g.next());
        const double age = std::floor(100 * g.next());
        const double lot = 100 + 900 * g.next();
        const double garage = g.next() < 0.4 ? 1 : 0;
        const int d = static_cast<int>(7 * g.next());
        const double noise = 0.2 * (g.next() + g.next() + g.next() - 1.5) * 2;
        const double lnp = 11 + 0.003 * t + 0.7 * std::log(size) + 0.04 * rooms +
                           0.06 * bath - 0.003 * age + 0.00001 * lot + 0.05 * garage +
                           effect[d] + noise;
        in.sales.date.push_back(
            lintel::serialFromCivil({2009 + t / 12, t % 12 + 1, 1 + static_cast<int>(i % 28)}));
        in.sales.price.push_back(std::exp(lnp));
        c[0].numeric.push_back(size);
        c[1].numeric.push_back(rooms);
        c[2].numeric.push_back(bath);
        c[3].numeric.push_back(age);
        c[4].numeric.push_back(lot);
        c[5].numeric.push_back(garage);
        c[6].text.push_back(std::string("district ") + static_cast<char>('A' + d));
    }
    in.characteristics = std::move(c);
    return in;
}

lintel::HedonicOptions options() {
    lintel::HedonicOptions o;
    o.logColumns = {1};
    return o;
}

void run(const std::string& label, std::size_t n, int months, lintel::HedonicOptions o,
         double target, int repeats, bool fit = false) {
    const lintel::HedonicInput in = market(n, months);
    double sink = 0;
    const double ms = bench::medianMillis(
        [&] {
            if (fit) sink += static_cast<double>(lintel::hedonicFit(in, o).terms.size());
            else sink += lintel::hedonicIndex(in, o).table.index.back();
        },
        repeats);
    bench::report(label, ms, target);
    if (!std::isfinite(sink)) std::printf("(non-finite result)\n");
}

const bench::Register pooled212k("hedonic.pooled_212k", [] {
    run("INDEXHEDONIC pooled, 212k sales, 192 months, 12 terms", 212000, 192, options(), 50, 7);
});
const bench::Register pooled1m("hedonic.pooled_1m", [] {
    run("INDEXHEDONIC pooled, 1M sales, 192 months, 12 terms", 1000000, 192, options(), 300, 5);
});
const bench::Register hc212k("hedonic.hc1_212k", [] {
    lintel::HedonicOptions o = options();
    o.se = lintel::HedonicStdErr::HC1;
    run("INDEXHEDONIC pooled se=hc1, 212k sales (no stated target)", 212000, 192, o, 50, 7);
});
const bench::Register coefs212k("hedonic.coefs_212k", [] {
    run("HEDONICCOEFS pooled, 212k sales (no stated target)", 212000, 192, options(), 50, 7,
        true);
});
const bench::Register rolling212k("hedonic.rolling13_212k", [] {
    lintel::HedonicOptions o = options();
    o.window = 13;
    run("INDEXHEDONIC window=13, 212k sales (no stated target)", 212000, 192, o, 1000, 3);
});

}  // namespace
