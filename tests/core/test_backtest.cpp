// The backtest (INDEXBACKTEST's core): hand-worked revisions, exact predictions on a noise-free
// market, the degenerate cases (no resales, one method, every method failing), the cost
// limit, and the ranking rule on made-up errors. The folds, predictions and errors on noisy
// data are recomputed independently with pandas and statsmodels in
// tests/reference/test_backtest_statsmodels.py; agreement with a simulated market's truth is
// measured in tests/reference/test_backtest_simulated.py.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <map>
#include <set>
#include <string>

#include <fmt/format.h>

#include "backtest.hpp"

using namespace lintel;

namespace {

CandidateMethod method(std::string label, IndexMethodKind kind, IndexMethodOptions o) {
    CandidateMethod m;
    m.label = std::move(label);
    m.kind = kind;
    m.options = std::move(o);
    return m;
}

bool contains(const std::string& s, const std::string& part) {
    return s.find(part) != std::string::npos;
}

double serial(int monthsSince2020, int day = 10) {
    return serialFromCivil({2020 + monthsSince2020 / 12, monthsSince2020 % 12 + 1, day});
}

// Noise-free market (generating model): 240 properties "H0".."H239"; property i is "dear"
// (base price 300) when i is even, else "cheap" (100); it sells in month
// m1 = i mod 12 and again in m2 = m1 + 6 + (floor(i / 12) mod 12) (months since 2020-01, day
// 10), so every month 2020-01 .. 2022-05 has sales; price = base * 1.01^month. Each month's
// mix of dear and cheap sales differs, so a raw median jumps with the mix (on all sales two
// thirds of the pairs are mispredicted by ln 1.5 or ln 3); repeat sales and a hedonic fit with the type reproduce 1.01^month exactly.
BacktestInput noiseFreeMarket() {
    BacktestInput in;
    CharacteristicColumn type;
    type.name = "type";
    for (int i = 0; i < 240; ++i) {
        const bool dear = i % 2 == 0;
        const int m1 = i % 12, m2 = m1 + 6 + (i / 12) % 12;
        for (int m : {m1, m2}) {
            in.id.push_back(fmt::format("H{}", i));
            in.sales.date.push_back(serial(m));
            in.sales.price.push_back((dear ? 300.0 : 100.0) * std::pow(1.01, m));
            type.text.push_back(dear ? "dear" : "cheap");
        }
    }
    in.characteristics.push_back(type);
    return in;
}

const BacktestRow& row(const BacktestResult& r, const std::string& label) {
    for (const auto& m : r.methods)
        if (m.label == label) return m;
    throw std::logic_error("no row " + label);
}

}  // namespace

BOOST_AUTO_TEST_SUITE(backtest_core)

BOOST_AUTO_TEST_CASE(folds_are_deterministic_trimmed_and_balanced) {
    BOOST_TEST(propertyFold("  A-17 ", 7, 10) == propertyFold("A-17", 7, 10));
    BOOST_TEST(propertyFold("", 7, 10) == -1);
    BOOST_TEST(propertyFold(" \t", 7, 10) == -1);
    // 20,000 ids over 10 folds: each fold within 5 % of 2,000 (a binomial(20000, 0.1) count
    // has sd 42, so 100 is 2.4 sd; a hash that ignored the seed or the id would fail).
    std::map<int, int> count;
    std::set<int> differ;
    for (int i = 0; i < 20000; ++i) {
        const std::string id = fmt::format("P{:05d}", i);
        const int f = propertyFold(id, 1, 10);
        BOOST_REQUIRE(f >= 0);
        BOOST_REQUIRE(f < 10);
        ++count[f];
        if (f != propertyFold(id, 2, 10)) differ.insert(i);
    }
    BOOST_TEST(count.size() == 10u);
    for (const auto& [f, c] : count) BOOST_TEST(std::abs(c - 2000) <= 100, "fold " << f << ": " << c);
    BOOST_TEST(differ.size() > 16000u);  // another seed moves about 9 in 10 properties
}

BOOST_AUTO_TEST_CASE(noise_free_market_exact_methods_predict_exactly) {
    BacktestInput in = noiseFreeMarket();
    in.methods = {method("median", IndexMethodKind::Median, RawIndexOptions{}),
                  method("hedonic", IndexMethodKind::Hedonic, HedonicOptions{}),
                  method("repeat method=bmn", IndexMethodKind::RepeatSales, [] {
                      RepeatSalesOptions o;
                      o.method = RepeatSalesMethod::BaileyMuthNourse;
                      return o;
                  }())};
    BacktestOptions o;
    BacktestDetail d;
    const BacktestResult r = backtest(in, o, &d);
    BOOST_TEST(r.pairs == 240u);  // every property: one pair, held at least 6 months
    BOOST_TEST(r.properties == 240u);
    BOOST_TEST(r.revisions == 12);
    for (const char* exact : {"hedonic", "repeat method=bmn"}) {
        const BacktestRow& m = row(r, exact);
        BOOST_TEST(m.estimated);
        BOOST_TEST(m.pairsPredicted >= 200u, exact << ": " << m.pairsPredicted);
        BOOST_TEST(m.medianAbsError < 1e-9, exact);
        BOOST_TEST(m.rmsError < 1e-9, exact);
        BOOST_TEST(m.maxRevision < 1e-9, exact);  // exact at every truncation
        BOOST_TEST(m.revisionsCompared > 100u);
        BOOST_TEST(m.volatility < 1e-9);  // 1 % every month: the changes do not vary
        BOOST_TEST(m.missingShare == 0.0);
        BOOST_TEST(m.rank >= 1);
    }
    // The predictions themselves: ln(I(t2)/I(t1)) = ln(P2/P1) = (m2 - m1) ln 1.01.
    for (std::size_t i = 0; i < d.logChange.size(); ++i)
        if (std::isfinite(d.predicted[2][i]))
            BOOST_REQUIRE(std::fabs(d.predicted[2][i] - d.logChange[i]) < 1e-12);
    const BacktestRow& med = row(r, "median");
    BOOST_TEST(med.medianAbsError > 40.0);  // at least 100 ln 1.5
    BOOST_TEST(med.maxRevision == 0.0);     // a period's median never depends on later sales
    BOOST_TEST(med.rank == 3);
    BOOST_TEST(!med.recommended);
    BOOST_TEST(contains(med.reason, "less accurate than"), med.reason);
    const bool exactWins = row(r, "hedonic").recommended || row(r, "repeat method=bmn").recommended;
    BOOST_TEST(exactWins);
    // The same sales and seed give the same folds and figures; another seed other folds.
    const BacktestResult again = backtest(in, o);
    BOOST_TEST(again.methods[0].medianAbsError == med.medianAbsError);
    BacktestOptions o2 = o;
    o2.seed = 99;
    BacktestDetail d2;
    backtest(in, o2, &d2);
    BOOST_TEST(d2.fold != d.fold);
}

BOOST_AUTO_TEST_CASE(revision_of_a_whole_sample_mix_by_hand) {
    // Two strata, three months, no resales. Stratum A: 100, 110, 120 (one sale a month);
    // B: 200, 240 and two sales of 200 in month 3. weights=all: whole-sample counts.
    // All sales: wA = 3/7, wB = 4/7, I_Feb = 3/7 * 1.1 + 4/7 * 1.2 = 8.1/7.
    // March removed: wA = wB = 1/2, I_Feb = 1.15. Revision of February:
    // 100 (1.15 / (8.1/7) - 1) = 100 (8.05/8.1 - 1) = -0.617283950617 %.
    BacktestInput in;
    const std::vector<std::tuple<int, double, const char*>> sales = {
        {0, 100, "A"}, {1, 110, "A"}, {2, 120, "A"}, {0, 200, "B"}, {1, 240, "B"}, {2, 200, "B"}, {2, 200, "B"}};
    in.strata.emplace_back();
    int k = 0;
    for (const auto& [m, p, s] : sales) {
        in.id.push_back(fmt::format("S{}", k++));
        in.sales.date.push_back(serial(m));
        in.sales.price.push_back(p);
        in.strata[0].push_back(s);
    }
    MixOptions mo;
    mo.weights = MixWeights::All;
    in.methods = {method("mix weights=all", IndexMethodKind::Mix, mo),
                  method("mix", IndexMethodKind::Mix, MixOptions{})};
    BacktestDetail d;
    const BacktestResult r = backtest(in, BacktestOptions{}, &d);
    BOOST_TEST(r.revisions == 1);  // three periods: at most one can be removed
    const BacktestRow& all = r.methods[0];
    BOOST_TEST(all.revisionsCompared == 1u);
    BOOST_TEST(all.meanRevision == 0.617283950617, boost::test_tools::tolerance(1e-9));
    BOOST_TEST(all.maxRevision == 0.617283950617, boost::test_tools::tolerance(1e-9));
    BOOST_REQUIRE(d.revisions[0].size() == 1u);
    BOOST_TEST(d.revisions[0][0].percent == -0.617283950617, boost::test_tools::tolerance(1e-9));
    BOOST_TEST(d.revisions[0][0].removed == 1);
    // Base-period weights (the default) do not depend on later periods: no revision.
    BOOST_TEST(r.methods[1].meanRevision == 0.0);
    // No resales: nothing predicted, nothing ranked, the reason says why.
    BOOST_TEST(r.pairs == 0u);
    for (const auto& m : r.methods) {
        BOOST_TEST(m.pairsPredicted == 0u);
        BOOST_TEST(std::isnan(m.medianAbsError));
        BOOST_TEST(m.rank == 0);
        BOOST_TEST(!m.recommended);
        BOOST_TEST(m.reason == "no held-out resales: accuracy cannot be measured");
    }
    BOOST_TEST(contains(r.diag.warnings.back(), "no method is recommended"));
}

BOOST_AUTO_TEST_CASE(one_method_and_every_method_failing) {
    BacktestInput in = noiseFreeMarket();
    in.methods = {method("repeat", IndexMethodKind::RepeatSales, RepeatSalesOptions{})};
    BacktestResult r = backtest(in, BacktestOptions{});
    BOOST_TEST(r.methods.size() == 1u);
    BOOST_TEST(r.methods[0].rank == 1);
    BOOST_TEST(r.methods[0].recommended);
    BOOST_TEST(contains(r.methods[0].reason, "the only method that could be judged"), r.methods[0].reason);

    // Every property sold once: repeat sales cannot be estimated at all.
    for (std::size_t i = 0; i < in.id.size(); ++i) in.id[i] = fmt::format("U{}", i);
    RepeatSalesOptions bmn;
    bmn.method = RepeatSalesMethod::BaileyMuthNourse;
    in.methods = {method("repeat", IndexMethodKind::RepeatSales, RepeatSalesOptions{}),
                  method("repeat method=bmn", IndexMethodKind::RepeatSales, bmn)};
    r = backtest(in, BacktestOptions{});
    for (const auto& m : r.methods) {
        BOOST_TEST(!m.estimated);
        BOOST_TEST(m.rank == 0);
        BOOST_TEST(!m.recommended);
        BOOST_TEST(contains(m.reason, "failed: "), m.reason);
        BOOST_TEST(std::isnan(m.missingShare));
    }
}

BOOST_AUTO_TEST_CASE(bad_input_and_the_cost_limit) {
    BacktestInput in = noiseFreeMarket();
    BacktestOptions o;
    BOOST_CHECK_EXCEPTION(backtest(in, o), InputError, [](const InputError& e) {
        return std::string(e.what()) == "no method to test: give at least one methods row";
    });
    in.methods = {method("mix", IndexMethodKind::Mix, MixOptions{})};
    BOOST_CHECK_EXCEPTION(backtest(in, o), InputError, [](const InputError& e) {
        return std::string(e.what()) == "method \"mix\" needs the strata argument";
    });
    o.folds = 1;
    BOOST_CHECK_EXCEPTION(backtest(in, o), InputError, [](const InputError& e) {
        return std::string(e.what()) == "folds must lie between 2 and 100, got 1";
    });
    o = BacktestOptions{};
    HedonicOptions bad;
    bad.window = 1;
    in.methods = {method("hedonic window=1", IndexMethodKind::Hedonic, bad)};
    BOOST_CHECK_EXCEPTION(backtest(in, o), InputError, [](const InputError& e) {
        return contains(e.what(), "method \"hedonic window=1\": ");
    });

    // A category with 4,000 levels over 8,000 sales: the hedonic design alone is 4,000^2 per
    // sale; refused before any estimate.
    BacktestInput big;
    CharacteristicColumn street;
    for (int i = 0; i < 8000; ++i) {
        big.id.push_back(fmt::format("B{}", i / 2));
        big.sales.date.push_back(serial(i % 24));
        big.sales.price.push_back(100 + i % 7);
        street.text.push_back(fmt::format("street {}", i / 2));
    }
    big.characteristics.push_back(street);
    big.methods = {method("hedonic", IndexMethodKind::Hedonic, HedonicOptions{})};
    BOOST_TEST(backtestWork(big, o) > kMaxBacktestWork);
    BOOST_CHECK_EXCEPTION(backtest(big, o), InputError, [](const InputError& e) {
        return contains(e.what(), "the backtest would take too long");
    });
}

// ---- The rule on made-up errors -------------------------------------------------------------

namespace {
// 200 pairs of 100 properties (two each); |e| of method "good" = 0.05 + 0.0002 i, of a
// "flat" line = 0.20 + 0.0002 i (it misses the market's move on every pair).
std::vector<std::size_t> clusters(std::size_t n) {
    std::vector<std::size_t> c(n);
    for (std::size_t i = 0; i < n; ++i) c[i] = i / 2;
    return c;
}
MethodScore score(std::string label, double offset, double revision, double missing = 0.0,
                  std::size_t n = 200) {
    MethodScore s;
    s.label = std::move(label);
    s.estimated = true;
    for (std::size_t i = 0; i < n; ++i) s.absError.push_back(offset + 0.0002 * static_cast<double>(i));
    s.meanRevision = revision;
    s.missingShare = missing;
    return s;
}
}  // namespace

BOOST_AUTO_TEST_CASE(rule_a_flat_line_never_wins_on_smoothness) {
    // The flat line revises nothing and has no gaps; it still loses on accuracy.
    const std::vector<MethodScore> ms = {score("flat", 0.20, 0.0), score("good", 0.05, 2.0)};
    const Ranking r = rankMethods(ms, clusters(200), 1);
    BOOST_TEST(r.recommended == 1);
    BOOST_TEST(r.rank[1] == 1);
    BOOST_TEST(r.rank[0] == 2);
    // Median of 0.05 + 0.0002 i over i = 0..199: 0.05 + 0.0002 * 99.5 = 0.0699 -> 7.0 %.
    BOOST_TEST(r.reason[1] == "predicts held-out resales best (median error 7.0 %), revises 2.00 %");
    BOOST_TEST(r.reason[0] == "less accurate than good: median error 22.0 % vs 7.0 %");
}

BOOST_AUTO_TEST_CASE(rule_ties_on_accuracy_go_to_revision_then_missing_periods) {
    // "a" and "b" differ on one pair only (far inside one standard error); "b" revises less.
    std::vector<MethodScore> ms = {score("a", 0.05, 1.0), score("b", 0.05, 0.3)};
    ms[1].absError[0] += 0.001;
    Ranking r = rankMethods(ms, clusters(200), 1);
    BOOST_TEST(r.recommended == 1);
    BOOST_TEST(r.reason[1] ==
               "as accurate as a within noise (median error 7.0 % vs 7.0 %) and revises less "
               "(0.30 % vs 1.00 %)");
    BOOST_TEST(r.reason[0] == "as accurate within noise, but revises more than b (1.00 % vs 0.30 %)");
    // Revisions within 0.5 points count as equal: the fewer periods without a value decide.
    ms = {score("a", 0.05, 0.30, 0.10), score("b", 0.05, 0.35, 0.0)};
    ms[1].absError[0] += 0.001;
    r = rankMethods(ms, clusters(200), 1);
    BOOST_TEST(r.recommended == 1);
    BOOST_TEST(contains(r.reason[1], "fewer periods without a value (0 % vs 10 %)"), r.reason[1]);
    // Identical on every measure: the smaller median error decides; same input, same answer.
    ms = {score("a", 0.05, 0.3), score("b", 0.05, 0.3)};
    ms[0].absError[150] += 0.001;  // above the median: the medians stay equal -> first listed
    r = rankMethods(ms, clusters(200), 1);
    BOOST_TEST(r.recommended == 0);
    BOOST_TEST(r.reason[1] == "as good as a within noise; median error 7.0 % vs 7.0 %");
    BOOST_TEST(rankMethods(ms, clusters(200), 1).reason == r.reason);
}

BOOST_AUTO_TEST_CASE(rule_a_clear_accuracy_gap_beats_revision) {
    // "b" is 1 point worse on every pair: far beyond the bootstrap standard error of the
    // median difference (which is 0 for a constant shift), so revision does not come in.
    const std::vector<MethodScore> ms = {score("a", 0.05, 3.0), score("b", 0.06, 0.0)};
    const Ranking r = rankMethods(ms, clusters(200), 1);
    BOOST_TEST(r.recommended == 0);
    BOOST_TEST(r.reason[1] == "less accurate than a: median error 8.0 % vs 7.0 %");
}

BOOST_AUTO_TEST_CASE(rule_who_is_not_ranked) {
    std::vector<MethodScore> ms = {score("full", 0.05, 0.0), score("gappy", 0.01, 0.0),
                                   score("few", 0.01, 0.0), score("broken", 0.0, 0.0)};
    for (std::size_t i = 0; i < 200; ++i) {
        if (i % 2) ms[1].absError[i] = NAN;  // predicts half the pairs: below 80 %
        if (i >= 20) ms[2].absError[i] = NAN;  // 20 pairs: below 30
    }
    ms[3].estimated = false;
    ms[3].failure = "no usable pair";
    const Ranking r = rankMethods(ms, clusters(200), 1);
    BOOST_TEST(r.recommended == 0);
    BOOST_TEST(r.rank == std::vector<int>({1, 0, 0, 0}));
    BOOST_TEST(r.reason[0] == "the only method that could be judged: median error 7.0 %, revises 0.00 %");
    BOOST_TEST(r.reason[1] ==
               "predicted only 50 % of the held-out resales another method predicted (periods "
               "without a value)");
    BOOST_TEST(r.reason[2] == "only 20 held-out resales predicted (30 needed)");
    BOOST_TEST(r.reason[3] == "failed: no usable pair");
}

BOOST_AUTO_TEST_SUITE_END()
