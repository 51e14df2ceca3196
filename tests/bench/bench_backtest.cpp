// Speed of the backtest (INDEXBACKTEST's core; target from the backtest issue: 10 folds x 6
// methods over 35,000 sales within a few seconds). Also prints one estimate of each method
// and the work estimate (backtestWork) beside the measured time, which is how the per-row
// costs in backtest_methods.cpp were calibrated.
//
// Synthetic market (generating model): 14,000 properties in 4 districts and 4 types (text),
// floor area 60 * exp(U(0, 1.2)) m2, age U(0, 80) years; 35,000 sales over 2014-01 .. 2024-12
// (132 months; the first 14,000 are one sale of each property, the rest of properties drawn
// at random), sale day uniform; ln price = 11 + 0.004 month + 0.1 district + 0.05 type
// + 0.8 ln(area / 60) - 0.003 age + house effect U(-0.15, 0.15) + 0.1 (U + U - 1).
#include <cmath>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "backtest.hpp"
#include "bench.hpp"

namespace {

struct Lcg {
    unsigned long long s = 20251202;
    double next() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
};

lintel::BacktestInput market(std::size_t n, std::size_t houses) {
    using namespace lintel;
    Lcg g;
    const double first = serialFromCivil({2014, 1, 1});
    const double days = serialFromCivil({2025, 1, 1}) - first;
    std::vector<int> district(houses), type(houses);
    std::vector<double> area(houses), age(houses), effect(houses);
    for (std::size_t h = 0; h < houses; ++h) {
        district[h] = static_cast<int>(g.next() * 4);
        type[h] = static_cast<int>(g.next() * 4);
        area[h] = std::round(60 * std::exp(1.2 * g.next()));
        age[h] = std::floor(80 * g.next());
        effect[h] = 0.3 * (g.next() - 0.5);
    }
    BacktestInput in;
    CharacteristicColumn cd{"district", {}, {}}, ct{"type", {}, {}}, ca{"area", {}, {}}, cg{"age", {}, {}};
    in.strata.resize(2);
    for (std::size_t i = 0; i < n; ++i) {
        const std::size_t h = i < houses ? i : static_cast<std::size_t>(g.next() * static_cast<double>(houses));
        const double d = first + std::floor(g.next() * days);
        const double month = (d - first) / 30.436875;
        in.id.push_back(fmt::format("H{:06d}", h));
        in.sales.date.push_back(d);
        in.sales.price.push_back(std::exp(11 + 0.004 * month + 0.1 * district[h] + 0.05 * type[h] +
                                          0.8 * std::log(area[h] / 60) - 0.003 * age[h] +
                                          effect[h] + 0.1 * (g.next() + g.next() - 1)));
        const std::string dn = fmt::format("district {}", district[h]), tn = fmt::format("type {}", type[h]);
        cd.text.push_back(dn);
        ct.text.push_back(tn);
        ca.numeric.push_back(area[h]);
        cg.numeric.push_back(age[h]);
        in.strata[0].push_back(dn);
        in.strata[1].push_back(tn);
    }
    in.characteristics = {cd, ct, ca, cg};
    return in;
}

std::vector<lintel::CandidateMethod> sixMethods() {
    using namespace lintel;
    auto m = [](std::string label, IndexMethodKind kind, IndexMethodOptions o) {
        CandidateMethod c;
        c.label = std::move(label);
        c.kind = kind;
        c.options = std::move(o);
        return c;
    };
    HedonicOptions hed;
    hed.logColumns = {3};
    RepeatSalesOptions bmn;
    bmn.method = RepeatSalesMethod::BaileyMuthNourse;
    return {m("median", IndexMethodKind::Median, RawIndexOptions{}),
            m("mean", IndexMethodKind::Mean, RawIndexOptions{}),
            m("mix", IndexMethodKind::Mix, MixOptions{}),
            m("hedonic log=3", IndexMethodKind::Hedonic, hed),
            m("repeat", IndexMethodKind::RepeatSales, RepeatSalesOptions{}),
            m("repeat method=bmn", IndexMethodKind::RepeatSales, bmn)};
}

const bench::Register backtestCase("backtest_35k", [] {
    lintel::BacktestInput in = market(35000, 14000);
    const std::vector<lintel::CandidateMethod> all = sixMethods();
    // One estimate of each method (k = 0 folds + 0 revisions + 1 would not validate: time the
    // whole run of each method alone and divide by its estimates).
    lintel::BacktestOptions o;
    o.revisions = 6;
    const int estimates = o.folds + *o.revisions + 1;
    for (const auto& m : all) {
        in.methods = {m};
        const double work = lintel::backtestWork(in, o);
        const double ms = bench::medianMillis([&] { lintel::backtest(in, o); }, 3);
        bench::report(fmt::format("backtest {}: {} estimates, estimated {:.0f} ms", m.label,
                                  estimates, work / 1e6),
                      ms, 2000);
    }
    in.methods = all;
    for (int revisions : {6, 12}) {
        o.revisions = revisions;
        lintel::BacktestResult r;
        const double ms = bench::medianMillis([&] { r = lintel::backtest(in, o); }, 3);
        bench::report(fmt::format("backtest 35,000 sales, 6 methods, 10 folds, {} revisions "
                                  "[{} resales; estimated {:.0f} ms]",
                                  revisions, r.pairs, lintel::backtestWork(in, o) / 1e6),
                      ms, 4000);
    }
});

}  // namespace
