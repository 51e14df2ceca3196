// The work limits (native/core/work_limits.hpp): the cases that used to take minutes, timed on
// the core (no Calc), each either computed or refused with its message. Synthetic market:
// 1,000 sales over 60 months from 2023-01 (day 1 + i mod 28), 12 strata ("s0" .. "s11",
// i mod 12), size ~ 40 + (i * 37) mod 200, ln price = 12 + 0.004 t + 0.5 ln size; one date
// mistyped as year 2995 (the last sale: 2995-03-01), as in issue 10; ids "P<i mod 400>".
#include <chrono>
#include <cmath>
#include <cstdio>
#include <functional>
#include <utility>
#include <string>

#include "bench.hpp"
#include "diagnostics.hpp"
#include "hedonic.hpp"
#include "mix_adjusted.hpp"
#include "periods.hpp"
#include "repeat_sales.hpp"

namespace {

struct Market {
    lintel::MixInput mix;
    lintel::HedonicInput hedonic;
    lintel::RepeatSalesInput repeat;
};

Market market(std::size_t n, bool mistyped) {
    Market m;
    m.mix.strata.resize(1);
    lintel::CharacteristicColumn size{"size", {}, {}};
    for (std::size_t i = 0; i < n; ++i) {
        const int t = static_cast<int>(i * 60 / n);
        double date = lintel::serialFromCivil({2023 + t / 12, t % 12 + 1, 1 + int(i % 28)});
        if (mistyped && i + 1 == n) date = lintel::serialFromCivil({2995, 3, 1});
        const double s = 40.0 + static_cast<double>((i * 37) % 200);
        const double price = std::exp(12 + 0.004 * t + 0.5 * std::log(s));
        m.mix.sales.date.push_back(date);
        m.mix.sales.price.push_back(price);
        m.mix.strata[0].push_back("s" + std::to_string(i % 12));
        size.numeric.push_back(s);
        m.repeat.id.push_back("P" + std::to_string(i % 400));
    }
    m.hedonic.sales = m.mix.sales;
    m.hedonic.characteristics.push_back(size);
    m.repeat.sales = m.mix.sales;
    return m;
}

// Runs f once, prints its time or its refusal.
void timeOne(const std::string& what, const std::function<void()>& f) {
    const auto t0 = std::chrono::steady_clock::now();
    std::string outcome = "computed";
    try {
        f();
    } catch (const lintel::InputError& e) {
        outcome = std::string("refused: ") + e.what();
    }
    const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    std::printf("  %-52s %8.3f s  %s\n", what.c_str(), s, outcome.c_str());
    std::fflush(stdout);
}

const bench::Register mixSpan("limits.mix_bootstrap_span", [] {
    const Market m = market(1000, true);
    for (int reps : {200, 354, 355, 10000}) {
        lintel::MixOptions o;
        o.chain = true;
        o.bootstrap = true;
        o.reps = reps;
        timeOne("INDEXMIX chain, bootstrap, year 2995, reps " + std::to_string(reps),
                [&] { lintel::indexMix(m.mix, o); });
    }
    const Market ok = market(1000, false);
    lintel::MixOptions o;
    o.chain = true;
    o.bootstrap = true;
    o.reps = 10000;
    timeOne("INDEXMIX chain, bootstrap, 60 months, reps 10000", [&] { lintel::indexMix(ok.mix, o); });
});

const bench::Register hedonicSpan("limits.hedonic_span", [] {
    const Market m = market(1000, true);
    lintel::HedonicOptions o;
    o.logColumns = {1};
    timeOne("INDEXHEDONIC pooled, year 2995", [&] { lintel::hedonicIndex(m.hedonic, o); });
    o.window = 12;
    timeOne("INDEXHEDONIC window=12, year 2995", [&] { lintel::hedonicIndex(m.hedonic, o); });
    o.window = 0;
    o.smooth = lintel::SmoothKind::Trend;
    timeOne("INDEXHEDONIC smooth=trend, year 2995", [&] { lintel::hedonicIndex(m.hedonic, o); });
    o.realtime = true;
    timeOne("INDEXHEDONIC smooth=trend realtime, year 2995", [&] { lintel::hedonicIndex(m.hedonic, o); });
});

const bench::Register repeatSpan("limits.repeat_span", [] {
    const Market m = market(1000, true);
    lintel::RepeatSalesOptions o;
    timeOne("CHAINRS, year 2995", [&] { lintel::repeatSalesIndex(m.repeat, o); });
    o.smooth = lintel::SmoothKind::Trend;
    o.realtime = true;
    timeOne("CHAINRS smooth=trend realtime, year 2995", [&] { lintel::repeatSalesIndex(m.repeat, o); });
});

}  // namespace

// A categorical column of `levels` levels ("d<i mod levels>") beside size, n sales over 60
// months: the fit's cross-products cost n x terms^2.
lintel::HedonicInput levelsMarket(std::size_t n, std::size_t levels) {
    lintel::HedonicInput h = market(n, false).hedonic;
    lintel::CharacteristicColumn d{"district", {}, {}};
    for (std::size_t i = 0; i < n; ++i) d.text.push_back("d" + std::to_string((i * 7919) % levels));
    h.characteristics.push_back(d);
    return h;
}

const bench::Register hedonicLevels("limits.hedonic_levels", [] {
    for (auto [n, levels] : {std::pair<std::size_t, std::size_t>{20000, 1000}, {100000, 300},
                             {1000000, 30}, {5000, 1000}}) {
        const lintel::HedonicInput h = levelsMarket(n, levels);
        lintel::HedonicOptions o;
        o.logColumns = {1};
        timeOne("INDEXHEDONIC " + std::to_string(n) + " sales, " + std::to_string(levels) + " levels",
                [&] { lintel::hedonicIndex(h, o); });
        o.se = lintel::HedonicStdErr::HC1;
        timeOne("  the same, se=hc1", [&] { lintel::hedonicIndex(h, o); });
        o.se = lintel::HedonicStdErr::Classical;
        o.window = 12;
        timeOne("  the same, window=12", [&] { lintel::hedonicIndex(h, o); });
    }
});

// Repeat sales near kMaxPeriods (3,000): the last sale's date typed as 2271-10 (2,990 months).
const bench::Register repeatLong("limits.repeat_long", [] {
    Market m = market(1000, false);
    m.repeat.sales.date.back() = lintel::serialFromCivil({2271, 10, 1});
    for (auto method : {lintel::RepeatSalesMethod::CaseShiller, lintel::RepeatSalesMethod::BaileyMuthNourse}) {
        lintel::RepeatSalesOptions o;
        o.method = method;
        o.maxRate = 0;
        timeOne(std::string("CHAINRS 2,990 months, method ") + lintel::repeatSalesMethodCode(method),
                [&] { lintel::repeatSalesIndex(m.repeat, o); });
    }
    lintel::RepeatSalesOptions o;
    o.maxRate = 0;
    o.chain = true;
    timeOne("CHAINRS 2,990 months, chain=1", [&] { lintel::repeatSalesIndex(m.repeat, o); });
    o.chain = false;
    o.smooth = lintel::SmoothKind::Trend;
    timeOne("CHAINRS 2,990 months, smooth=trend", [&] { lintel::repeatSalesIndex(m.repeat, o); });
});
