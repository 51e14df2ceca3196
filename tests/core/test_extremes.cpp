// Extreme values (issue 10): prices and index values near the largest double (1.8e308), near the
// smallest normal one (2.2e-308), 0 and negative. Every function either computes the value
// that exists or refuses with a message that names what cannot be held; none gives a silent
// blank or a wrong number.
// Reference values: exact arithmetic (median of two = their mean; 616 ln 10 = ln(1e308/1e-308)
// from Python's decimal module at 40 digits: 1418.392417284332141355...), and invariances of
// the definitions: an index is a ratio of price levels, so multiplying every price by one
// factor leaves it unchanged (Eurostat RPPI Handbook 2013, ch. 4), and the HP filter is linear
// and passes a constant through unchanged (Hodrick & Prescott 1997, the penalty of a constant
// is 0).
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "hodrick_prescott.hpp"
#include "index_analytics.hpp"
#include "index_arithmetic.hpp"
#include "mix_adjusted.hpp"
#include "raw_index.hpp"
#include "seasonal.hpp"
#include "statistics.hpp"

using namespace lintel;
namespace tt = boost::test_tools;

namespace {

constexpr double kLn1e616 = 1418.392417284332;  // 616 ln 10, Python decimal (see above)

SalesInput sales(const std::vector<std::pair<CivilDate, double>>& rows) {
    SalesInput in;
    for (const auto& [d, p] : rows) {
        in.date.push_back(serialFromCivil(d));
        in.price.push_back(p);
    }
    return in;
}

// The same sales with every price times f (f a power of ten: not exact in binary, so the
// comparison allows a few ulps).
SalesInput timesPrices(SalesInput in, double f) {
    for (double& p : in.price) p *= f;
    return in;
}

bool says(const InputError& e, const std::string& text) {
    return std::string(e.what()).find(text) != std::string::npos;
}

// Monthly period starts from January 2020.
std::vector<double> monthStarts(std::size_t n) {
    std::vector<double> s;
    for (std::size_t i = 0; i < n; ++i)
        s.push_back(serialFromCivil({2020 + static_cast<int>(i / 12), static_cast<int>(i % 12) + 1, 1}));
    return s;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(extremes)

BOOST_AUTO_TEST_CASE(arithmetic_helpers_do_not_overflow_on_the_way) {
    // Median of two values near the largest double: their mean, 1.1e308 (exact arithmetic).
    BOOST_TEST(stats::median({1e308, 1.2e308}) == 1.1e308, tt::tolerance(1e-15));
    BOOST_TEST(stats::median({1.7e308, 1.79e308, 1.0, 1.0}) == 0.5 * 1.0 + 0.5 * 1.7e308);
    // Mean of three values whose sum overflows: 1.2e308.
    BOOST_TEST(stats::trimmedMean({1e308, 1.2e308, 1.4e308}, 0.0) == 1.2e308, tt::tolerance(1e-15));
    // x * num / den: 1e308 * 110 / 100 = 1.1e308; beyond the range: inf (the caller refuses).
    BOOST_TEST(stats::mulDiv(1e308, 110.0, 100.0) == 1.1e308, tt::tolerance(1e-15));
    BOOST_TEST(std::isinf(stats::mulDiv(1e308, 200.0, 100.0)));
    BOOST_TEST(stats::mulDiv(1e-308, 100.0, 50.0) == 2e-308, tt::tolerance(1e-15));
    // In the normal range the same double as the plain formula.
    for (double x : {123456.0, 0.1, 3e5, 7.25e-3})
        BOOST_TEST(stats::mulDiv(x, 117.3, 99.1) == x * 117.3 / 99.1);
    BOOST_TEST(stats::logRatio(1e308, 1e-308) == kLn1e616, tt::tolerance(1e-14));
    BOOST_TEST(stats::logRatio(1e-308, 1e308) == -kLn1e616, tt::tolerance(1e-14));
    BOOST_TEST(stats::logRatio(110.0, 100.0) == std::log(110.0 / 100.0));
}

BOOST_AUTO_TEST_CASE(raw_indexes_of_prices_near_the_largest_double) {
    // Jan: 1e308, 1.2e308 (median and mean 1.1e308); Feb: 1.21e308, 1.43e308 (1.32e308);
    // Mar: 0.55e308. Index: 100, 120, 50 (exact arithmetic on the decimal values).
    const SalesInput huge = sales({{{2024, 1, 5}, 1e308}, {{2024, 1, 9}, 1.2e308},
                                   {{2024, 2, 3}, 1.21e308}, {{2024, 2, 4}, 1.43e308},
                                   {{2024, 3, 1}, 0.55e308}});
    RawIndexOptions o;
    for (const IndexResult& r : {indexMedian(huge, o), indexMean(huge, o)}) {
        BOOST_REQUIRE(r.table.index.size() == 3u);
        BOOST_TEST(r.table.index[0] == 100.0);
        BOOST_TEST(r.table.index[1] == 120.0, tt::tolerance(1e-13));
        BOOST_TEST(r.table.index[2] == 50.0, tt::tolerance(1e-13));
        BOOST_TEST(r.table.count[1] == 2u);
    }
    // Scale invariance: the bands of the huge prices equal those of the same prices / 1e300.
    const IndexResult big = indexMean(huge, o), small = indexMean(timesPrices(huge, 1e-300), o);
    for (std::size_t t = 0; t < 2; ++t) {
        BOOST_TEST(hasValue(big.table.lower[t]));
        BOOST_TEST(big.table.lower[t] == small.table.lower[t], tt::tolerance(1e-12));
        BOOST_TEST(big.table.upper[t] == small.table.upper[t], tt::tolerance(1e-12));
    }
    // Prices near the smallest normal double: the same index.
    const IndexResult tiny = indexMedian(timesPrices(timesPrices(huge, 1e-308), 1e-307), o);
    BOOST_TEST(tiny.table.index[1] == 120.0, tt::tolerance(1e-12));
    BOOST_TEST(tiny.table.index[2] == 50.0, tt::tolerance(1e-12));
}

BOOST_AUTO_TEST_CASE(raw_index_refuses_prices_too_far_apart_by_row) {
    // 1e308 and 1e-308: a ratio of 1e616 that no double holds; the message names both rows.
    const SalesInput in = sales({{{2024, 1, 5}, 1e-308}, {{2024, 2, 3}, 1e308}, {{2024, 2, 4}, 5.0}});
    BOOST_CHECK_EXCEPTION(indexMedian(in, RawIndexOptions{}), InputError, [](const InputError& e) {
        return says(e, "prices span too far to compare: row 1 holds 1e-308 and row 2 holds 1e+308");
    });
}

BOOST_AUTO_TEST_CASE(mix_index_of_prices_near_the_largest_double) {
    // Two strata, two sales per cell (an even count: the median is a mean of two). The index
    // of the prices equals the index of the same prices / 4e299 (scale invariance), for
    // sales, value and all weights, median and mean; counts equal.
    MixInput normal;
    normal.sales = sales({{{2024, 1, 2}, 1.0e8}, {{2024, 1, 3}, 1.2e8}, {{2024, 1, 4}, 3.0e8},
                          {{2024, 1, 5}, 3.4e8}, {{2024, 2, 2}, 1.1e8}, {{2024, 2, 3}, 1.5e8},
                          {{2024, 2, 4}, 3.3e8}, {{2024, 2, 5}, 3.9e8}, {{2024, 2, 6}, 4.1e8}});
    normal.strata = {{"a", "a", "b", "b", "a", "a", "b", "b", "b"}};
    MixInput huge = normal;
    huge.sales = timesPrices(normal.sales, 4e299);  // up to 1.64e308; cell sums overflow
    for (MixWeights w : {MixWeights::Sales, MixWeights::Value, MixWeights::All})
        for (MixStatistic st : {MixStatistic::Median, MixStatistic::Mean}) {
            MixOptions o;
            o.weights = w;
            o.stat = st;
            const MixResult a = indexMix(normal, o), b = indexMix(huge, o);
            BOOST_REQUIRE(b.table.index.size() == 2u);
            BOOST_TEST(b.table.index[0] == 100.0);
            BOOST_TEST(hasValue(b.table.index[1]));
            BOOST_TEST(b.table.index[1] == a.table.index[1], tt::tolerance(1e-12));
            BOOST_TEST(b.table.count == a.table.count, tt::per_element());
            BOOST_TEST(b.diag.rowsUsed == 9u);
            BOOST_TEST(b.strataWeighted == 2u);
        }
    // Hand check of one: sales weights 2/4 each, median relatives a 1.3/1.1, b 3.9/3.2.
    MixOptions o;
    BOOST_TEST(indexMix(huge, o).table.index[1] == 100.0 * (0.5 * 1.3 / 1.1 + 0.5 * 3.9 / 3.2),
               tt::tolerance(1e-12));
}

BOOST_AUTO_TEST_CASE(price_adjust_with_huge_and_tiny_prices) {
    const IndexSeries s = IndexSeries::fromColumns(monthStarts(3), {100.0, 110.0, 200.0});
    const double jan = serialFromCivil({2020, 1, 15}), feb = serialFromCivil({2020, 2, 15}),
                 mar = serialFromCivil({2020, 3, 15});
    // 1e308 * 110 / 100 = 1.1e308: representable, computed.
    BOOST_TEST(adjustPrice(s, 1e308, jan, feb).price == 1.1e308, tt::tolerance(1e-15));
    // 1e-308 * 100 / 200 = 5e-309 (below the smallest normal double, still a value).
    BOOST_TEST(adjustPrice(s, 1e-308, mar, jan).price == 5e-309, tt::tolerance(1e-12));
    // 1e308 * 200 / 100 = 2e308: beyond the largest double, refused with the numbers.
    BOOST_CHECK_EXCEPTION(adjustPrice(s, 1e308, jan, mar), InputError, [](const InputError& e) {
        return says(e, "the adjusted price 1e+308 x 200 / 100 is beyond the range of numbers");
    });
}

BOOST_AUTO_TEST_CASE(rebase_and_change_near_the_largest_double) {
    // Rebase to the first row: 100 * 2e307 / 1e308 = 20 (exact arithmetic).
    RebaseOptions ro;
    ro.baseDate = serialFromCivil({2020, 1, 1});
    const IndexSeries s = IndexSeries::fromColumns(monthStarts(3), {1e308, 2e307, 1.5e308});
    const SeriesResult rb = rebaseIndex(s, ro);
    BOOST_TEST(rb.values[0] == 100.0);
    BOOST_TEST(rb.values[1] == 20.0, tt::tolerance(1e-14));
    BOOST_TEST(rb.values[2] == 150.0, tt::tolerance(1e-14));
    // Rebasing 1e308 on 1e-308: 1e618, beyond the range: refused, naming the period.
    ro.baseDate = serialFromCivil({2020, 2, 1});
    const IndexSeries far = IndexSeries::fromColumns(monthStarts(3), {1e308, 1e-308, 1.0});
    BOOST_CHECK_EXCEPTION(rebaseIndex(far, ro), InputError, [](const InputError& e) {
        return says(e, "the rebased value of period 2020-01-01");
    });
    // Log change of 1e308 after 1e-308: 100 * 616 ln 10, computed.
    ChangeOptions co;
    co.kind = ChangeKind::Log;
    const SeriesResult lc = indexChange({1e-308, 1e308, 1e-308}, co);
    BOOST_TEST(lc.values[1] == 100.0 * kLn1e616, tt::tolerance(1e-14));
    BOOST_TEST(lc.values[2] == -100.0 * kLn1e616, tt::tolerance(1e-14));
    // As a percentage it is 1e618 %: refused, naming the row.
    co.kind = ChangeKind::Percent;
    BOOST_CHECK_EXCEPTION(indexChange({1e-308, 1e308}, co), InputError, [](const InputError& e) {
        return says(e, "the change at row 2 (1e+308 after 1e-308) is beyond the largest number");
    });
}

BOOST_AUTO_TEST_CASE(volatility_of_values_alternating_1e308_and_1e_308) {
    // Changes -c, +c, -c, +c with c = 100 * 616 ln 10: mean 0, sd = c sqrt(4/3) (sample sd).
    VolatilityOptions o;
    const VolatilityResult r = indexVolatility({1e308, 1e-308, 1e308, 1e-308, 1e308}, o);
    BOOST_TEST(r.changes == 4u);
    BOOST_TEST(r.volatility == 100.0 * kLn1e616 * std::sqrt(4.0 / 3.0), tt::tolerance(1e-13));
}

BOOST_AUTO_TEST_CASE(seasonal_factors_refuse_a_negative_value_by_row) {
    std::vector<double> v(24, 100.0);
    v[4] = -5;
    BOOST_CHECK_EXCEPTION(seasonalFactors(v, SeasonalOptions{}), InputError, [](const InputError& e) {
        return std::string(e.what()) == "seasonal factors need index values above 0: row 5 holds -5";
    });
    v[4] = 0;
    BOOST_CHECK_EXCEPTION(seasonalFactors(v, SeasonalOptions{}), InputError, [](const InputError& e) {
        return std::string(e.what()) == "seasonal factors need index values above 0: row 5 holds 0";
    });
    // Values near the largest double: the factors of x and of x * 1e-300 are the same
    // (the decomposition is scale invariant), the moving average is finite.
    std::vector<double> normal(36), huge(36);
    for (std::size_t t = 0; t < 36; ++t) {
        normal[t] = 1.0e8 * (1.0 + 0.1 * static_cast<double>(t % 12) / 11.0);
        huge[t] = normal[t] * 1e300;
    }
    const SeasonalResult a = seasonalFactors(normal, SeasonalOptions{}),
                         b = seasonalFactors(huge, SeasonalOptions{});
    for (std::size_t t = 0; t < 36; ++t) {
        BOOST_TEST(b.factor[t] == a.factor[t], tt::tolerance(1e-12));
        BOOST_TEST(b.adjusted[t] == a.adjusted[t] * 1e300, tt::tolerance(1e-12));
    }
    BOOST_TEST(b.trend[6] == a.trend[6] * 1e300, tt::tolerance(1e-12));
}

BOOST_AUTO_TEST_CASE(hp_trend_of_a_constant_is_the_constant_exactly) {
    HpOptions o;
    const std::vector<double> five(24, 5.0);
    const HpResult r = hodrickPrescott(five, o);
    for (std::size_t t = 0; t < five.size(); ++t) {
        BOOST_TEST(r.trend[t] == 5.0);  // exactly: no 5.000000000055
        BOOST_TEST(r.cycle[t] == 0.0);
    }
    // Values near the largest double: the trend of y * 1e300 is 1e300 times the trend of y
    // (linearity), and nothing overflows.
    std::vector<double> y, big;
    for (int t = 0; t < 24; ++t) {
        y.push_back(1.0 + 0.05 * t + 0.2 * std::sin(t));
        big.push_back(y.back() * 1.5e307);
    }
    const HpResult a = hodrickPrescott(y, o), b = hodrickPrescott(big, o);
    for (std::size_t t = 0; t < y.size(); ++t) {
        BOOST_TEST(b.trend[t] == a.trend[t] * 1.5e307, tt::tolerance(1e-9));
        BOOST_TEST(std::isfinite(b.cycle[t]));
    }
    // A constant of -1e308: its own trend, exactly.
    const HpResult c = hodrickPrescott(std::vector<double>(12, -1e308), o);
    BOOST_TEST(c.trend[5] == -1e308);
}

BOOST_AUTO_TEST_SUITE_END()
