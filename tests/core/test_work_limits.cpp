// The work limits (native/core/work_limits.hpp): each refused just over its limit with the
// message (what is too large, the figure, the limit, what to do), computed just under it.
// The cases are the ones of issue 10: one date mistyped as year 2995 among sales of 2023-2027.
// The figures in the expected messages are the products the limits are defined by
// (work_limits.hpp), worked out by hand in the comments.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "diagnostics.hpp"
#include "hedonic.hpp"
#include "hodrick_prescott.hpp"
#include "index_analytics.hpp"
#include "mix_adjusted.hpp"
#include "periods.hpp"
#include "work_limits.hpp"

using namespace lintel;

namespace {

// 1,000 sales, month i * 60 / 1000 from 2023-01 (day 1 + i mod 28), stratum "s<i mod 12>",
// price 100,000 * (1 + (i mod 7) / 10) * 1.004^t; the last date typed as 2995-03-01.
// Periods: 2023-01 .. 2995-03 is 972 * 12 + 3 = 11,667 months.
MixInput mistypedMarket() {
    MixInput in;
    in.strata.resize(1);
    for (int i = 0; i < 1000; ++i) {
        const int t = i * 60 / 1000;
        in.sales.date.push_back(serialFromCivil({2023 + t / 12, t % 12 + 1, 1 + i % 28}));
        in.sales.price.push_back(100000.0 * (1 + (i % 7) / 10.0) * std::pow(1.004, t));
        in.strata[0].push_back("s" + std::to_string(i % 12));
    }
    in.sales.date.back() = serialFromCivil({2995, 3, 1});
    return in;
}

std::string messageOf(const std::function<void()>& f) {
    try {
        f();
    } catch (const InputError& e) {
        return e.what();
    }
    return "";
}

}  // namespace

BOOST_AUTO_TEST_SUITE(work_limits)

BOOST_AUTO_TEST_CASE(grouped_figures_and_the_message) {
    BOOST_TEST(limits::grouped(0) == "0");
    BOOST_TEST(limits::grouped(999) == "999");
    BOOST_TEST(limits::grouped(11631) == "11,631");
    BOOST_TEST(limits::grouped(1395720000) == "1,395,720,000");
    BOOST_TEST(limits::grouped(-1234.4) == "-1,234");
    const std::string m = messageOf([] { limits::checkWork(11, 10, "a x b", "steps", "do less"); });
    BOOST_TEST(m == "too much work: a x b = 11 steps; at most 10 (a few seconds): do less");
    BOOST_TEST(messageOf([] { limits::checkWork(10, 10, "a x b", "steps", "do less"); }).empty());
    BOOST_TEST(limits::spanText(PeriodAxis::spanning(periodKey(serialFromCivil({2023, 1, 1}),
                                                               Frequency::Month),
                                                     periodKey(serialFromCivil({2995, 3, 1}),
                                                               Frequency::Month),
                                                     Frequency::Month)) ==
               "the dates span 2023-01 .. 2995-03 (11,667 months)");
}

BOOST_AUTO_TEST_CASE(mix_bootstrap_refused_just_over_the_limit) {
    // 355 replicates x (1,000 sales + 12 strata x 11,667 periods = 141,004) = 50,056,420
    // > 50,000,000 (kMaxMixBootstrapWork). Before the limit the case (reps=10000)
    // ran 122 s in Calc.
    MixOptions o;
    o.chain = true;
    o.bootstrap = true;
    o.reps = 355;
    const MixInput in = mistypedMarket();
    BOOST_TEST(limits::kMaxMixBootstrapWork == 5e7);
    const std::string m = messageOf([&] { indexMix(in, o); });
    BOOST_TEST(m ==
               "too much work: bands=bootstrap: 355 replicates x (1,000 sales + 12 strata x "
               "11,667 periods; the dates span 2023-01 .. 2995-03 (11,667 months)) = 50,056,420 "
               "sales and stratum-periods redrawn; at most 50,000,000 (a few seconds): check for "
               "a mistyped date (SALESCHECK lists implausible dates), or use fewer replicates "
               "(reps), fewer strata or an include mask");
    o.reps = 10000;  // the case of the issue
    BOOST_TEST(messageOf([&] { indexMix(in, o); }).find("10,000 replicates") != std::string::npos);
}

BOOST_AUTO_TEST_CASE(mix_bootstrap_over_the_limit_on_a_normal_span) {
    // 5,000 sales over 60 months (the market above, repeated five times, the 2995 date set
    // back to 2027-12-28) x 10,000 replicates: 10,000 x (5,000 + 12 x 60) = 57,200,000 >
    // 50,000,000. Five years of dates: no word of a mistyped date.
    MixInput one = mistypedMarket();
    one.sales.date.back() = serialFromCivil({2027, 12, 28});
    MixInput in = one;
    for (int k = 0; k < 4; ++k) {
        in.sales.date.insert(in.sales.date.end(), one.sales.date.begin(), one.sales.date.end());
        in.sales.price.insert(in.sales.price.end(), one.sales.price.begin(), one.sales.price.end());
        in.strata[0].insert(in.strata[0].end(), one.strata[0].begin(), one.strata[0].end());
    }
    MixOptions o;
    o.bootstrap = true;
    o.reps = 10000;
    BOOST_TEST(messageOf([&] { indexMix(in, o); }) ==
               "too much work: bands=bootstrap: 10,000 replicates x (5,000 sales + 12 strata x 60 "
               "periods; the dates span 2023-01 .. 2027-12 (60 months)) = 57,200,000 sales and "
               "stratum-periods redrawn; at most 50,000,000 (a few seconds): use fewer replicates "
               "(reps), fewer strata or an include mask");
}

BOOST_AUTO_TEST_CASE(mix_bootstrap_computed_just_under_the_limit) {
    // 354 replicates x 141,004 = 49,915,416 <= 50,000,000: computed (about 0.1 s here).
    MixOptions o;
    o.chain = true;
    o.bootstrap = true;
    o.reps = 354;
    const MixResult r = indexMix(mistypedMarket(), o);
    BOOST_REQUIRE(r.table.index.size() == 11667u);
    // 2995-03 holds one sale of stratum s3 (i = 999: 999 mod 12 = 3, 999 mod 7 = 5), so its
    // value is the link period's level times that sale over s3's price at the link period.
    BOOST_TEST(hasValue(r.table.index.back()));
    BOOST_TEST(hasValue(r.table.lower[59]));
    BOOST_TEST(r.table.lower[59] <= r.table.index[59]);
    BOOST_TEST(r.table.upper[59] >= r.table.index[59]);
    // No period between 2028 and 2995-02 has a value.
    BOOST_TEST(!hasValue(r.table.index[60]));
    BOOST_TEST(!hasValue(r.table.index[11665]));
}

BOOST_AUTO_TEST_CASE(mix_chain_skips_years_without_a_price) {
    // Two years of sales and one in 2030: the chain links 2023 (its own), 2024 (weights of
    // 2023) and 2030 (no sales in 2029: weights of the link period, 2024-12); the empty years
    // 2025 .. 2029 are no links (they used to be counted, each with a fallback, and each cost
    // a pass from the last value: quadratic in a long gap).
    MixInput in;
    in.strata.resize(1);
    auto add = [&](CivilDate d, double p, const char* h) {
        in.sales.date.push_back(serialFromCivil(d));
        in.sales.price.push_back(p);
        in.strata[0].push_back(h);
    };
    add({2023, 1, 5}, 100, "A");
    add({2023, 1, 6}, 200, "B");
    add({2023, 12, 5}, 110, "A");
    add({2023, 12, 6}, 220, "B");
    add({2024, 6, 5}, 121, "A");
    add({2024, 12, 5}, 121, "A");
    add({2024, 12, 6}, 264, "B");
    add({2030, 3, 5}, 242, "A");
    MixOptions o;
    o.chain = true;
    const MixResult r = indexMix(in, o);
    // 2023: weights 1/2, 1/2 (counts of 2023), relative to 2023-01: Dec = (1.1 + 1.1)/2 = 1.1.
    BOOST_TEST(std::fabs(r.table.index[11] - 110) < 1e-9);
    // 2024: weights of 2023 (2 and 2 sales), link 2023-12: Dec 2024 = 1.1 * (121/110 + 264/220)/2
    // = 1.1 * (1.1 + 1.2) / 2 = 1.265.
    BOOST_TEST(std::fabs(r.table.index[23] - 126.5) < 1e-9);
    // 2030-03: link 2024-12, weights of the link period (A 1, B 1), only A priced
    // (reweight): 1.265 * 242/121 = 2.53.
    BOOST_TEST(std::fabs(r.table.index[86] - 253) < 1e-9);
    BOOST_TEST(r.links == 3u);
    BOOST_TEST(r.fallbackWeights == 1u);
}

// n sales over 60 months from 2023-01, size 40 + (i * 37) mod 200, and a categorical
// "district" of `levels` levels ("d<(i * 7919) mod levels>"); ln price = 12 + 0.004 t + 0.5 ln
// size + 0.01 * level number.
HedonicInput levelsMarket(int n, int levels) {
    HedonicInput in;
    CharacteristicColumn size{"size", {}, {}}, district{"district", {}, {}};
    for (int i = 0; i < n; ++i) {
        const int t = i * 60 / n, d = static_cast<int>((static_cast<long long>(i) * 7919) % levels);
        const double s = 40.0 + (i * 37) % 200;
        in.sales.date.push_back(serialFromCivil({2023 + t / 12, t % 12 + 1, 1 + i % 28}));
        in.sales.price.push_back(std::exp(12 + 0.004 * t + 0.5 * std::log(s) + 0.01 * d));
        size.numeric.push_back(s);
        district.text.push_back("d" + std::to_string(d));
    }
    in.characteristics = {size, district};
    return in;
}

BOOST_AUTO_TEST_CASE(hedonic_fit_refused_just_over_the_limit) {
    // 1,000 levels: 999 district terms + size = 1,000 terms. 14,000 sales: 14,000 x 1,000^2 +
    // 1,000^3 = 1.5e10 steps: computed (the limit is inclusive); 14,002 sales: 1.5002e10:
    // refused. Before the limit 20,000 such sales took 6.8 s, with window=12 78 s.
    BOOST_TEST(limits::kMaxHedonicWork == 1.5e10);
    HedonicOptions o;
    o.logColumns = {1};
    const std::string m = messageOf([&] { hedonicIndex(levelsMarket(14002, 1000), o); });
    BOOST_TEST(m ==
               "too much work: the hedonic fit: 14,002 sales x 1,000 terms^2 + 1,000 terms^3 = "
               "15,002,000,000 steps; at most 15,000,000,000 (a few seconds): group rare levels "
               "of a categorical column (its levels are terms), use fewer characteristics, an "
               "include mask");
    // The same limit for the coefficients (the design is shared).
    BOOST_TEST(messageOf([&] { hedonicFit(levelsMarket(14002, 1000), o); }) == m);
}

BOOST_AUTO_TEST_CASE(hedonic_window_and_hc1_count_more_work) {
    // 2,000 sales x 300 levels (300 terms): pooled 2,000 x 9e4 + 2.7e7 = 2.07e8: computed.
    // window=12: 49 windows x 2.7e7 + 2,000 x 12 x 9e4 = 1.323e9 + 2.16e9 = 3.483e9: computed;
    // window=12 with 5,000 levels is refused by the levels limit instead, so the window's
    // limit is shown with 700 levels and 4,000 sales: 49 x 3.43e8 + 4,000 x 12 x 4.9e5 =
    // 1.6807e10 + 2.352e10 = 4.0327e10: refused, naming the windows.
    HedonicOptions o;
    o.window = 12;
    const IndexResult r = hedonicIndex(levelsMarket(2000, 300), o);
    BOOST_TEST(hasValue(r.table.index[59]));
    const std::string m = messageOf([&] { hedonicIndex(levelsMarket(4000, 700), o); });
    BOOST_TEST(m.find("the hedonic fit: 4,000 sales x 12 windows each x 700 terms^2 + 49 windows "
                      "x 700 terms^3 = 40,327,000,000 steps") != std::string::npos);
    BOOST_TEST(m.find("a shorter window") != std::string::npos);
    // se=hc1 counts the cross-products four times: 2,000 sales x 700 levels pooled is
    // 4 x 2,000 x 4.9e5 + 3.43e8 = 4.263e9 with hc1: computed; 7,500 sales: 4 x 3.675e9 +
    // 3.43e8 = 1.5043e10 with hc1: refused (classical: 3.7093e9, computed).
    o.window = 0;
    o.se = HedonicStdErr::HC1;
    BOOST_TEST(messageOf([&] { hedonicIndex(levelsMarket(2000, 700), o); }).empty());
    const std::string h = messageOf([&] { hedonicIndex(levelsMarket(7500, 700), o); });
    BOOST_TEST(h.find("x 4 for se=hc1) = 15,043,000,000 steps") != std::string::npos);
    BOOST_TEST(h.find("se=classical") != std::string::npos);
}

BOOST_AUTO_TEST_CASE(trend_refused_past_its_rows) {
    // 100,001 rows from the first to the last value > 100,000 (kMaxTrendRows): refused, also
    // through INDEXSNR; 100,000 rows (a blank row in between is counted): computed.
    std::vector<double> y(100001);
    for (std::size_t t = 0; t < y.size(); ++t) y[t] = 100 * std::exp(0.001 * static_cast<double>(t % 500));
    y[50000] = kNoValue;
    const std::string m = messageOf([&] { hodrickPrescott(y, HpOptions{}); });
    BOOST_TEST(m == "too much work: the trend (Hodrick-Prescott): rows from the index's first to "
                    "its last value = 100,001 rows; at most 100,000 (a few seconds): an index has "
                    "one row per period (give the index column of an index table, not a column of "
                    "sales)");
    BOOST_TEST(messageOf([&] { indexSnr(y, SnrOptions{}); }) == m);
    y.pop_back();
    const HpResult r = hodrickPrescott(y, HpOptions{});
    BOOST_TEST(r.trend.size() == 100000u);
    BOOST_TEST(hasValue(r.trend[50000]));  // the gap gets the bridging trend
}

BOOST_AUTO_TEST_SUITE_END()
