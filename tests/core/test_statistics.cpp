// The statistics building blocks (statistics.hpp). Expected values are worked by hand in the
// comments; binomial tail sums are exact fractions. The t quantiles are the standard t-table
// values (t(0.975; 4) = 2.776, t(0.975; 7) = 2.365, t(0.95; 30) = 1.697), quoted from memory
// of any statistics text's table and checked to its 3 decimals; the pandas/scipy reference
// check (tests/reference/test_raw_pandas.py) checks the bands to 1e-10.
#include <boost/test/unit_test.hpp>

#include <cmath>

#include "statistics.hpp"

using namespace lintel;

BOOST_AUTO_TEST_SUITE(statistics)

BOOST_AUTO_TEST_CASE(even_and_odd_medians) {
    BOOST_TEST(stats::median({3, 1, 2}) == 2.0);
    BOOST_TEST(stats::median({4, 1, 3, 2}) == 2.5);  // mean of the two middle values
    BOOST_TEST(stats::median({7}) == 7.0);
    BOOST_TEST(std::isnan(stats::median({})));
}

BOOST_AUTO_TEST_CASE(trimmed_means) {
    // 1..10, trim 0.1: floor(1) cut from each end -> mean of 2..9 = 5.5
    BOOST_TEST(stats::trimmedMean({10, 9, 8, 7, 6, 5, 4, 3, 2, 1}, 0.1) == 5.5);
    // 1,2,3,4,100, trim 0.2: cut 1 each end -> mean(2,3,4) = 3; the outlier is gone
    BOOST_TEST(stats::trimmedMean({1, 2, 3, 4, 100}, 0.2) == 3.0);
    // trim 0.15 of 5 values: floor(0.75) = 0 cut -> the plain mean 22
    BOOST_TEST(stats::trimmedMean({1, 2, 3, 4, 100}, 0.15) == 22.0);
}

BOOST_AUTO_TEST_CASE(student_t_quantiles_match_the_table) {
    BOOST_TEST(std::abs(stats::studentTQuantile(0.975, 4) - 2.776) < 5e-4);
    BOOST_TEST(std::abs(stats::studentTQuantile(0.975, 7) - 2.365) < 5e-4);
    BOOST_TEST(std::abs(stats::studentTQuantile(0.95, 30) - 1.697) < 5e-4);
}

BOOST_AUTO_TEST_CASE(mean_band_t_interval) {
    // 1..5: mean 3, s = sqrt(2.5), se = sqrt(2.5/5) = 0.70711; t(0.975; 4) = 2.77645
    // -> 3 +/- 1.96324
    const auto b = stats::meanInterval({1, 2, 3, 4, 5}, 0.0, 0.95);
    const double half = stats::studentTQuantile(0.975, 4) * std::sqrt(0.5);
    BOOST_TEST(b.lower == 3.0 - half, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(b.upper == 3.0 + half, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(std::abs(b.lower - 1.0368) < 1e-3);
    BOOST_TEST(std::isnan(stats::meanInterval({5}, 0.0, 0.95).lower));  // one sale: no band
}

BOOST_AUTO_TEST_CASE(trimmed_mean_band_tukey_mclaughlin) {
    // 1..10, trim 0.1, g = 1: winsorized 2,2,3,...,9,9 (mean 5.5), squared deviations sum
    // 66.5, s_w = sqrt(66.5/9) = 2.71825; se = s_w sqrt(10) / 8 = 1.07448; df = 10 - 2 - 1 = 7;
    // centre = trimmed mean 5.5 -> 5.5 +/- t(0.975; 7) * 1.07448 = 5.5 +/- 2.5408
    const auto b = stats::meanInterval({1, 2, 3, 4, 5, 6, 7, 8, 9, 10}, 0.1, 0.95);
    const double se = std::sqrt(66.5 / 9) * std::sqrt(10.0) / 8;
    const double half = stats::studentTQuantile(0.975, 7) * se;
    BOOST_TEST(b.lower == 5.5 - half, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(b.upper == 5.5 + half, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(std::abs(half - 2.5408) < 1e-3);
}

BOOST_AUTO_TEST_CASE(median_band_order_statistics) {
    // n = 6: P(B <= 0) = 1/64 <= 0.025, P(B <= 1) = 7/64 > 0.025 -> [x(1), x(6)], coverage 62/64
    BOOST_TEST(stats::medianInterval({10, 20, 30, 40, 50, 60}, 0.95).lower == 10.0);
    BOOST_TEST(stats::medianInterval({10, 20, 30, 40, 50, 60}, 0.95).upper == 60.0);
    // n = 5: P(B <= 0) = 1/32 > 0.025 -> no band at 95 %, but [x(1), x(5)] at 90 %
    BOOST_TEST(std::isnan(stats::medianInterval({1, 2, 3, 4, 5}, 0.95).lower));
    BOOST_TEST(stats::medianInterval({1, 2, 3, 4, 5}, 0.90).upper == 5.0);
    // n = 10: P(B <= 1) = 11/1024 <= 0.025, P(B <= 2) = 56/1024 > 0.025 -> [x(2), x(9)]
    const auto b = stats::medianInterval({1, 2, 3, 4, 5, 6, 7, 8, 9, 10}, 0.95);
    BOOST_TEST(b.lower == 2.0);
    BOOST_TEST(b.upper == 9.0);
}

BOOST_AUTO_TEST_CASE(t_critical_is_the_two_sided_quantile) {
    BOOST_TEST(stats::tCritical(0.95, 4) == stats::studentTQuantile(0.975, 4));
    BOOST_TEST(std::abs(stats::tCritical(0.90, 30) - 1.697) < 5e-4);  // t(0.95; 30), table
}

BOOST_AUTO_TEST_CASE(linear_interpolation_quantiles) {
    // numpy's default rule ("linear"): h = (n - 1) p, x(floor h) + frac(h) (x(floor h + 1) -
    // x(floor h)). [1, 2, 3, 4]: p 0.25 -> h 0.75 -> 1.75; p 0.5 -> 2.5; p 1 -> 4.
    const std::vector<double> v = {1, 2, 3, 4};
    BOOST_TEST(stats::quantile(v, 0.25) == 1.75);
    BOOST_TEST(stats::quantile(v, 0.5) == 2.5);
    BOOST_TEST(stats::quantile(v, 0.0) == 1.0);
    BOOST_TEST(stats::quantile(v, 1.0) == 4.0);
    BOOST_TEST(stats::quantile({7}, 0.3) == 7.0);
}

BOOST_AUTO_TEST_CASE(moments_skip_missing_values) {
    // 1, 2, 3, 4 (NaN skipped): mean 2.5, squared deviations 5, s = sqrt(5 / 3).
    std::size_t k = 0;
    BOOST_TEST(stats::sampleSd({1, NAN, 2, 3, 4}, &k) == std::sqrt(5.0 / 3.0),
               boost::test_tools::tolerance(1e-15));
    BOOST_TEST(k == 4u);
    BOOST_TEST(std::isnan(stats::sampleSd({NAN, 5}, &k)));
    // y = 2x + 1 exactly: r = 1; y = -x: r = -1; the pair with a NaN is skipped.
    std::size_t pairs = 0;
    BOOST_TEST(stats::pearson({1, 2, 3, NAN}, {3, 5, 7, 1}, &pairs) == 1.0,
               boost::test_tools::tolerance(1e-15));
    BOOST_TEST(pairs == 3u);
    BOOST_TEST(stats::pearson({1, 2, 3}, {-1, -2, -3}, nullptr) == -1.0,
               boost::test_tools::tolerance(1e-15));
    BOOST_TEST(std::isnan(stats::pearson({1, 2, 3}, {4, 4, 4}, nullptr)));  // no variation
}

BOOST_AUTO_TEST_SUITE_END()
