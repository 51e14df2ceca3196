// Speed of the repeat-sales estimators (targets from the repeat-sales issue: 500,000 pairs
// over 192 months under 100 ms in the core; 1,000,000 raw sales to an index under 0.5 s).
// Synthetic market over 2009-01 .. 2024-12 (192 months): sale days uniform, ln price =
// 12 + 0.004 month + house effect + 0.02 * (sum of two uniforms - 1) per sale, so the usual
// filters drop a realistic share of pairs (same month, holds under 6 months).
#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "bench.hpp"
#include "repeat_sales.hpp"

namespace {

struct Lcg {
    unsigned long long s = 20240611;
    double next() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
};

const double kFirstDay = lintel::serialFromCivil({2009, 1, 1});
const double kDays = lintel::serialFromCivil({2025, 1, 1}) - kFirstDay;

double logPrice(double serial, double house, Lcg& g) {
    const double month = (serial - kFirstDay) / 30.436875;
    return 12 + 0.004 * month + house + 0.02 * (g.next() + g.next() - 1);
}

lintel::RepeatSalesPairInput pairs(std::size_t n) {
    lintel::RepeatSalesPairInput in;
    Lcg g;
    in.firstDate.reserve(n);
    in.firstPrice.reserve(n);
    in.secondDate.reserve(n);
    in.secondPrice.reserve(n);
    for (std::size_t i = 0; i < n; ++i) {
        double a = kFirstDay + std::floor(g.next() * kDays);
        double b = kFirstDay + std::floor(g.next() * kDays);
        if (b < a) std::swap(a, b);
        const double house = 0.3 * (g.next() - 0.5);
        in.firstDate.push_back(a);
        in.firstPrice.push_back(std::exp(logPrice(a, house, g)));
        in.secondDate.push_back(b);
        in.secondPrice.push_back(std::exp(logPrice(b, house, g)));
    }
    return in;
}

// n raw sales of n / 2.5 houses (ids "H0000001".. in shuffled row order).
lintel::RepeatSalesInput sales(std::size_t n) {
    lintel::RepeatSalesInput in;
    Lcg g;
    const std::size_t houses = n * 2 / 5;
    std::vector<double> effect(houses);
    for (double& e : effect) e = 0.3 * (g.next() - 0.5);
    in.id.reserve(n);
    in.sales.date.reserve(n);
    in.sales.price.reserve(n);
    for (std::size_t i = 0; i < n; ++i) {
        const std::size_t h = i < houses ? i : static_cast<std::size_t>(g.next() * static_cast<double>(houses));
        const double d = kFirstDay + std::floor(g.next() * kDays);
        in.id.push_back(fmt::format("H{:07d}", h));
        in.sales.date.push_back(d);
        in.sales.price.push_back(std::exp(logPrice(d, effect[h], g)));
    }
    return in;
}

void report(const std::string& what, const lintel::RepeatSalesResult& r, double ms, double target) {
    bench::report(fmt::format("{} [{} pairs used]", what, r.pairCounts.used), ms, target);
}

const bench::Register pairsCase("repeat_sales_pairs_500k", [] {
    const lintel::RepeatSalesPairInput in = pairs(500000);
    for (auto m : {lintel::RepeatSalesMethod::CaseShiller, lintel::RepeatSalesMethod::BaileyMuthNourse,
                   lintel::RepeatSalesMethod::CaseShillerQuadratic}) {
        lintel::RepeatSalesOptions o;
        o.method = m;
        lintel::RepeatSalesResult r;
        const double ms = bench::medianMillis([&] { r = lintel::repeatSalesFromPairs(in, o); });
        report(fmt::format("repeat sales {}: 500,000 pairs, 192 months", lintel::repeatSalesMethodCode(m)),
               r, ms, 100);
    }
    lintel::RepeatSalesOptions o;
    o.chain = true;
    lintel::RepeatSalesResult r;
    const double ms = bench::medianMillis([&] { r = lintel::repeatSalesFromPairs(in, o); });
    report("repeat sales cs chain=1: 500,000 pairs, 192 months", r, ms, 100);
});

const bench::Register salesCase("repeat_sales_raw_1m", [] {
    const lintel::RepeatSalesInput in = sales(1000000);
    lintel::RepeatSalesOptions o;
    lintel::RepeatSalesResult r;
    const double ms = bench::medianMillis([&] { r = lintel::repeatSalesIndex(in, o); }, 3);
    report("repeat sales cs: 1,000,000 raw sales to index", r, ms, 500);
    lintel::PairAudit a;
    const double ms2 = bench::medianMillis([&] { a = lintel::repeatSalesPairs(in, o); }, 3);
    bench::report(fmt::format("repeat sales audit (RSPAIRS): 1,000,000 raw sales [{} pairs]",
                              a.pairs.size()), ms2, 500);
});

}  // namespace
