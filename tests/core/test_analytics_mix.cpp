// Mix-adjusted (stratified) index (native/core/mix_adjusted.hpp) on small hand-computed
// examples; the formula is the Handbook's (Eurostat RPPI Handbook 2013, ch. 4):
// P_t = sum_h w_h m_h^t / m_h^0. The comparison with a direct pandas computation on generated
// data is tests/reference/test_analytics_mix_pandas.py.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "mix_adjusted.hpp"

using namespace lintel;

namespace {

struct Builder {
    MixInput in;
    Builder() { in.strata.resize(1); }
    void add(CivilDate d, double price, const std::string& stratum, int times = 1) {
        for (int i = 0; i < times; ++i) {
            in.sales.date.push_back(serialFromCivil(d) + 0.25);
            in.sales.price.push_back(price);
            in.strata[0].push_back(stratum);
        }
    }
};

// Monthly example. Jan: A 100, 200, 300 (median 200), B 1000, 1000 (median 1000);
// Feb: A 220, B 1100, 1300 (median 1200); Mar: B 1500 only; plus one row with a blank stratum.
MixInput monthlyExample() {
    Builder b;
    b.add({2024, 1, 3}, 100, "A");
    b.add({2024, 1, 9}, 200, "A");
    b.add({2024, 1, 20}, 300, "A");
    b.add({2024, 1, 5}, 1000, "B", 2);
    b.add({2024, 2, 14}, 220, "A");
    b.add({2024, 2, 2}, 1100, "B");
    b.add({2024, 2, 28}, 1300, "B");
    b.add({2024, 3, 8}, 1500, "B");
    b.add({2024, 3, 9}, 999, " ");
    return b.in;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(analytics)

BOOST_AUTO_TEST_CASE(mix_fixed_base_sales_weights) {
    // Weights from January counts: A 3/5, B 2/5.
    // Feb: 0.6 * 220/200 + 0.4 * 1200/1000 = 0.66 + 0.48 = 1.14 -> 114.
    // Mar, reweight (default): only B priced: 1500/1000 -> 150.
    const MixResult r = indexMix(monthlyExample(), MixOptions{});
    BOOST_REQUIRE(r.table.index.size() == 3u);
    BOOST_TEST(std::fabs(r.table.index[0] - 100) < 1e-12);
    BOOST_TEST(std::fabs(r.table.index[1] - 114) < 1e-12);
    BOOST_TEST(std::fabs(r.table.index[2] - 150) < 1e-12);
    BOOST_TEST(r.table.count[0] == 5u);
    BOOST_TEST(r.table.count[1] == 3u);
    BOOST_TEST(r.table.count[2] == 1u);
    BOOST_TEST(!hasValue(r.table.lower[1]));  // no bands, by design
    BOOST_TEST(r.strata == 2u);
    BOOST_TEST(r.emptyCells == 1u);  // A in March
    BOOST_TEST(r.diag.droppedFor(DropReason::BlankStratum) == 1u);
    BOOST_TEST(r.diag.rowsUsed == 9u);
}

BOOST_AUTO_TEST_CASE(mix_carry_value_weights_mean) {
    // carry: March A keeps its February relative 1.1: 0.6 * 1.1 + 0.4 * 1.5 = 1.26 -> 126.
    MixOptions o;
    o.empty = EmptyStratumRule::Carry;
    MixResult r = indexMix(monthlyExample(), o);
    BOOST_TEST(std::fabs(r.table.index[2] - 126) < 1e-12);
    BOOST_TEST(r.table.count[2] == 1u);  // only the sales actually priced count
    // value weights: January values A 600, B 2000.
    // Feb: (600 * 1.1 + 2000 * 1.2) / 2600 = 3060 / 2600 -> 117.6923...
    o = MixOptions{};
    o.weights = MixWeights::Value;
    r = indexMix(monthlyExample(), o);
    BOOST_TEST(std::fabs(r.table.index[1] - 100.0 * 3060 / 2600) < 1e-10);
    // mean: January means A 200, B 1000 (same as the medians here); February A 220,
    // B 1200: same as the medians, so the sales-weighted index is again 114.
    o = MixOptions{};
    o.stat = MixStatistic::Mean;
    r = indexMix(monthlyExample(), o);
    BOOST_TEST(std::fabs(r.table.index[1] - 114) < 1e-12);
}

BOOST_AUTO_TEST_CASE(mix_base_in_the_middle_and_minsales) {
    // Base February: weights from February counts A 1/3, B 2/3; price reference February.
    // Jan: 1/3 * 200/220 + 2/3 * 1000/1200 = 0.30303 + 0.55556 = 0.858586 -> 85.8586.
    // Mar (reweight): B only, 1500/1200 -> 125.
    MixOptions o;
    o.baseDate = serialFromCivil({2024, 2, 10});
    MixResult r = indexMix(monthlyExample(), o);
    BOOST_TEST(r.table.basePosition == 1);
    BOOST_TEST(std::fabs(r.table.index[0] - 100 * (200.0 / 220 / 3 + 2 * 1000.0 / 1200 / 3)) < 1e-10);
    BOOST_TEST(std::fabs(r.table.index[2] - 125) < 1e-12);
    // carry for a period before the base: the nearest later relative, here A's at the base = 1.
    // minsales 2: A in Feb (1 sale) and B in Mar (1 sale) have no price. Base January,
    // weights A 3/5, B 2/5. Feb: B only (reweight): 1.2 -> 120; Mar: nothing priced -> none.
    o = MixOptions{};
    o.minSales = 2;
    r = indexMix(monthlyExample(), o);
    BOOST_TEST(std::fabs(r.table.index[1] - 120) < 1e-12);
    BOOST_TEST(!hasValue(r.table.index[2]));
    BOOST_TEST(r.thinCells == 2u);
    BOOST_TEST(r.diag.droppedFor(DropReason::ThinStratumPeriod) == 2u);
    // A base with nothing priced is an input error in the user's words.
    o.baseDate = serialFromCivil({2024, 3, 1});
    BOOST_CHECK_THROW(indexMix(monthlyExample(), o), InputError);
}

BOOST_AUTO_TEST_CASE(mix_all_weights_leave_out_unpriced_strata) {
    // weights=all: whole-sample counts A 4, B 5 (C has one sale, in February only, so no
    // price at the base: left out). Feb: (4 * 1.1 + 5 * 1.2) / 9 = 10.4 / 9 -> 115.555...
    MixInput in = monthlyExample();
    in.sales.date.push_back(serialFromCivil({2024, 2, 5}));
    in.sales.price.push_back(5000);
    in.strata[0].push_back("C");
    MixOptions o;
    o.weights = MixWeights::All;
    const MixResult r = indexMix(in, o);
    BOOST_TEST(std::fabs(r.table.index[1] - 100 * 10.4 / 9) < 1e-10);
    BOOST_TEST(r.unpricedAtReference == 1u);
    BOOST_TEST(r.strata == 3u);
    BOOST_TEST(r.strataWeighted == 2u);
    BOOST_TEST(r.diag.droppedFor(DropReason::UnpricedStratum) == 1u);
}

BOOST_AUTO_TEST_CASE(mix_two_strata_columns) {
    // Strata = combinations of two columns: (A, x) and (A, y) are different strata.
    Builder b;
    b.in.strata.resize(2);
    auto add = [&](CivilDate d, double p, const char* s1, const char* s2) {
        b.in.sales.date.push_back(serialFromCivil(d));
        b.in.sales.price.push_back(p);
        b.in.strata[0].push_back(s1);
        b.in.strata[1].push_back(s2);
    };
    add({2023, 1, 10}, 100, "A", "x");
    add({2023, 1, 11}, 300, "A", "y");
    add({2023, 2, 10}, 110, "A", "x");
    add({2023, 2, 11}, 360, "A", "y");
    add({2023, 2, 12}, 999, "A", "");  // blank in the second column: dropped
    const MixResult r = indexMix(b.in, MixOptions{});
    BOOST_TEST(r.strata == 2u);
    BOOST_TEST(std::fabs(r.table.index[1] - 100 * (0.5 * 1.1 + 0.5 * 1.2)) < 1e-12);
    BOOST_TEST(r.diag.droppedFor(DropReason::BlankStratum) == 1u);
    // Column lengths must agree.
    b.in.strata[1].pop_back();
    BOOST_CHECK_THROW(indexMix(b.in, MixOptions{}), InputError);
    MixInput none = b.in;
    none.strata.clear();
    BOOST_CHECK_THROW(indexMix(none, MixOptions{}), InputError);
}

BOOST_AUTO_TEST_CASE(mix_refuses_an_id_column_as_strata) {
    // 25,000 sales, each its own stratum, over 100 months: 2.5 million cells, above the
    // 2,000,000-cell guard: a clear input error instead of gigabytes of memory.
    Builder b;
    for (int i = 0; i < 25000; ++i)
        b.add({2010 + (i % 100) / 12, (i % 100) % 12 + 1, 1}, 1000.0 + i, std::to_string(i));
    BOOST_CHECK_THROW(indexMix(b.in, MixOptions{}), InputError);
}

BOOST_AUTO_TEST_CASE(mix_chain_links_at_q4) {
    // Quarterly, strata A and B, median = the single price of each cell (repeated sales give
    // the counts). Year 1 counts: A 2+1+1+1 = 5, B 2+1+3+1 = 7; year 2: A 1+3+1+1 = 6,
    // B 2+1+1+1 = 5.
    //   Y1: Q1 A 100 B 200 | Q2 A 110 B 210 | Q3 A 120 B 220 | Q4 A 130 B 240
    //   Y2: Q1 A 143 B 252 | Q2 A 150 B 260 | Q3 A 155 B 270 | Q4 A 160 B 280
    //   Y3: Q1 A 176 B 294
    // Link 1 (year 1, its own weights 5/12, 7/12, reference Y1Q1).
    // Link 2 (year 2, year-1 weights 5/12, 7/12, reference Y1Q4).
    // Link 3 (year 3, year-2 weights 6/11, 5/11, reference Y2Q4).
    Builder b;
    auto cell = [&](int y, int q, double a, int na, double bb, int nb) {
        b.add({y, 3 * q - 2, 15}, a, "A", na);
        b.add({y, 3 * q - 2, 16}, bb, "B", nb);
    };
    cell(2021, 1, 100, 2, 200, 2);
    cell(2021, 2, 110, 1, 210, 1);
    cell(2021, 3, 120, 1, 220, 3);
    cell(2021, 4, 130, 1, 240, 1);
    cell(2022, 1, 143, 1, 252, 2);
    cell(2022, 2, 150, 3, 260, 1);
    cell(2022, 3, 155, 1, 270, 1);
    cell(2022, 4, 160, 1, 280, 1);
    cell(2023, 1, 176, 1, 294, 1);
    MixOptions o;
    o.freq = Frequency::Quarter;
    o.chain = true;
    const MixResult r = indexMix(b.in, o);
    BOOST_REQUIRE(r.table.index.size() == 9u);
    BOOST_TEST(r.links == 3u);
    const double a1 = 5.0 / 12, b1 = 7.0 / 12, a2 = 6.0 / 11, b2 = 5.0 / 11;
    const double y1q4 = a1 * 130 / 100 + b1 * 240 / 200;
    const double y2q1 = y1q4 * (a1 * 143 / 130 + b1 * 252 / 240);
    const double y2q4 = y1q4 * (a1 * 160 / 130 + b1 * 280 / 240);
    const double y3q1 = y2q4 * (a2 * 176 / 160 + b2 * 294 / 280);
    BOOST_TEST(std::fabs(r.table.index[1] - 100 * (a1 * 1.1 + b1 * 1.05)) < 1e-10);
    BOOST_TEST(std::fabs(r.table.index[3] - 100 * y1q4) < 1e-10);
    BOOST_TEST(std::fabs(r.table.index[4] - 100 * y2q1) < 1e-10);
    BOOST_TEST(std::fabs(r.table.index[7] - 100 * y2q4) < 1e-10);
    BOOST_TEST(std::fabs(r.table.index[8] - 100 * y3q1) < 1e-10);
    // Without chain the same data give the fixed-base Laspeyres-type index with Y1Q1 weights
    // (counts 2, 2): Y3Q1 = 0.5 * 1.76 + 0.5 * 1.47.
    o.chain = false;
    const MixResult f = indexMix(b.in, o);
    BOOST_TEST(std::fabs(f.table.index[8] - 100 * (0.5 * 1.76 + 0.5 * 1.47)) < 1e-10);
    // Base moved to year 2 Q1 in the chain: the same chained series scaled to 100 there.
    o.chain = true;
    o.baseDate = serialFromCivil({2022, 2, 1});
    const MixResult c = indexMix(b.in, o);
    BOOST_TEST(std::fabs(c.table.index[8] - 100 * y3q1 / y2q1) < 1e-10);
    BOOST_TEST(std::fabs(c.table.index[4] - 100) < 1e-12);
}

BOOST_AUTO_TEST_CASE(mix_chain_link_falls_back_to_last_period_with_a_value) {
    // Quarterly, one stratum; no sale in Y1Q4, so year 2 links at Y1Q3.
    Builder b;
    b.add({2021, 1, 10}, 100, "A");
    b.add({2021, 7, 10}, 120, "A");
    b.add({2022, 1, 10}, 132, "A");
    MixOptions o;
    o.freq = Frequency::Quarter;
    o.chain = true;
    const MixResult r = indexMix(b.in, o);
    BOOST_TEST(std::fabs(r.table.index[2] - 120) < 1e-12);
    BOOST_TEST(!hasValue(r.table.index[3]));
    BOOST_TEST(std::fabs(r.table.index[4] - 132) < 1e-12);
}

BOOST_AUTO_TEST_CASE(mix_bootstrap_bands) {
    // Bands are off by default; bands=bootstrap fills them deterministically for a seed. In
    // the monthly example March has one priced sale (B 1500) under reweight: its cell never
    // varies, but its relative does through B's January median (1000, 1000: fixed too), so
    // March's band is the single value 150. February varies (A 1 sale fixed; B 1100/1300
    // redrawn: medians 1100, 1200, 1300), so its band is wider than a point.
    MixOptions o;
    o.bootstrap = true;
    o.reps = 400;
    const MixResult r = indexMix(monthlyExample(), o);
    BOOST_TEST(r.table.lower[0] == 100.0);
    BOOST_TEST(r.table.upper[0] == 100.0);
    BOOST_TEST(std::fabs(r.table.lower[2] - 150) < 1e-12);
    BOOST_TEST(std::fabs(r.table.upper[2] - 150) < 1e-12);
    BOOST_TEST(r.table.lower[1] < r.table.index[1]);
    BOOST_TEST(r.table.upper[1] >= r.table.index[1]);
    // Feb replicates: 0.6 * 220/m_A(Jan) + 0.4 * m_B(Feb)/1000 with m_A(Jan) in {100..300}:
    // the lowest possible value is 0.6 * 220/300 + 0.4 * 1.1 = 0.88, the highest
    // 0.6 * 2.2 + 0.4 * 1.3 = 1.84.
    BOOST_TEST(r.table.lower[1] >= 88.0 - 1e-9);
    BOOST_TEST(r.table.upper[1] <= 184.0 + 1e-9);
    const MixResult again = indexMix(monthlyExample(), o);
    BOOST_TEST(again.table.lower[1] == r.table.lower[1]);
    BOOST_TEST(again.table.upper[1] == r.table.upper[1]);
    o.reps = 5;
    BOOST_CHECK_THROW(indexMix(monthlyExample(), o), InputError);
}

BOOST_AUTO_TEST_SUITE_END()
