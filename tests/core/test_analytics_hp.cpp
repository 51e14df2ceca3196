// Hodrick-Prescott trend (native/core/hodrick_prescott.hpp).
// Check values: Stata's hpfilter on statsmodels' macrodata realgdp (US real GDP 1959Q1-2009Q3,
// 203 quarters), lambda 1600, as used in statsmodels' own tests
// (statsmodels/tsa/filters/tests/test_filters.py); quoted in ../shared/notes/methods.md.
// The data below are macrodata.csv's realgdp column as shipped in python3-statsmodels.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <vector>

#include "hodrick_prescott.hpp"
#include "index_table.hpp"

using namespace lintel;

namespace {
const std::vector<double> kRealGdp = {
    2710.349, 2778.801, 2775.488, 2785.204, 2847.699, 2834.39, 2839.022, 2802.616,
    2819.264, 2872.005, 2918.419, 2977.83, 3031.241, 3064.709, 3093.047, 3100.563,
    3141.087, 3180.447, 3240.332, 3264.967, 3338.246, 3376.587, 3422.469, 3431.957,
    3516.251, 3563.96, 3636.285, 3724.014, 3815.423, 3828.124, 3853.301, 3884.52,
    3918.74, 3919.556, 3950.826, 3980.97, 4063.013, 4131.998, 4160.267, 4178.293,
    4244.1, 4256.46, 4283.378, 4263.261, 4256.573, 4264.289, 4302.259, 4256.637,
    4374.016, 4398.829, 4433.943, 4446.264, 4525.769, 4633.101, 4677.503, 4754.546,
    4876.166, 4932.571, 4906.252, 4953.05, 4909.617, 4922.188, 4873.52, 4854.34,
    4795.295, 4831.942, 4913.328, 4977.511, 5090.663, 5128.947, 5154.072, 5191.499,
    5251.762, 5356.131, 5451.921, 5450.793, 5469.405, 5684.569, 5740.3, 5816.222,
    5825.949, 5831.418, 5873.335, 5889.495, 5908.467, 5787.373, 5776.617, 5883.46,
    6005.717, 5957.795, 6030.184, 5955.062, 5857.333, 5889.074, 5866.37, 5871.001,
    5944.02, 6077.619, 6197.468, 6325.574, 6448.264, 6559.594, 6623.343, 6677.264,
    6740.275, 6797.344, 6903.523, 6955.918, 7022.757, 7050.969, 7118.95, 7153.359,
    7193.019, 7269.51, 7332.558, 7458.022, 7496.6, 7592.881, 7632.082, 7733.991,
    7806.603, 7865.016, 7927.393, 7944.697, 8027.693, 8059.598, 8059.476, 7988.864,
    7950.164, 8003.822, 8037.538, 8069.046, 8157.616, 8244.294, 8329.361, 8417.016,
    8432.485, 8486.435, 8531.108, 8643.769, 8727.919, 8847.303, 8904.289, 9003.18,
    9025.267, 9044.668, 9120.684, 9184.275, 9247.188, 9407.052, 9488.879, 9592.458,
    9666.235, 9809.551, 9932.672, 10008.874, 10103.425, 10194.277, 10328.787, 10507.575,
    10601.179, 10684.049, 10819.914, 11014.254, 11043.044, 11258.454, 11267.867, 11334.544,
    11297.171, 11371.251, 11340.075, 11380.128, 11477.868, 11538.77, 11596.43, 11598.824,
    11645.819, 11738.706, 11935.461, 12042.817, 12127.623, 12213.818, 12303.533, 12410.282,
    12534.113, 12587.535, 12683.153, 12748.699, 12915.938, 12962.462, 12965.916, 13060.679,
    13099.901, 13203.977, 13321.109, 13391.249, 13366.865, 13415.266, 13324.6, 13141.92,
    12925.41, 12901.504, 12990.341,
};
}  // namespace

BOOST_AUTO_TEST_SUITE(analytics)

BOOST_AUTO_TEST_CASE(hp_stata_check_values_realgdp) {
    BOOST_REQUIRE_EQUAL(kRealGdp.size(), 203u);
    HpOptions o;
    o.freq = Frequency::Quarter;  // default lambda 1600
    const HpResult r = hodrickPrescott(kRealGdp, o);
    BOOST_TEST(r.lambda == 1600.0);
    // Stata values (statsmodels' tests): first cycle 39.51191484, first trend 2670.83708516,
    // last cycle -333.11524280, last trend 13323.45624280.
    BOOST_TEST(std::fabs(r.cycle.front() - 39.51191484) < 1e-6);
    BOOST_TEST(std::fabs(r.trend.front() - 2670.83708516) < 1e-6);
    BOOST_TEST(std::fabs(r.cycle.back() - -333.11524280) < 1e-6);
    BOOST_TEST(std::fabs(r.trend.back() - 13323.45624280) < 1e-6);
    BOOST_TEST(r.diag.rowsUsed == 203u);
}

BOOST_AUTO_TEST_CASE(hp_default_lambda_ravn_uhlig) {
    // Ravn & Uhlig (2002): 129600 monthly, 1600 quarterly, 6.25 yearly.
    BOOST_TEST(defaultHpLambda(Frequency::Month) == 129600.0);
    BOOST_TEST(defaultHpLambda(Frequency::Quarter) == 1600.0);
    BOOST_TEST(defaultHpLambda(Frequency::Year) == 6.25);
}

BOOST_AUTO_TEST_CASE(hp_keeps_a_straight_line_and_bridges_gaps_linearly) {
    // A straight line has zero second differences, so it is its own HP trend (exact property
    // of the objective); a gap inside it is bridged by the same line, and rows before the
    // first or after the last value get no trend.
    std::vector<double> y(40);
    for (int t = 0; t < 40; ++t) y[t] = 50.0 + 1.5 * t;
    for (int t : {0, 1, 17, 18, 19, 39}) y[t] = kNoValue;
    HpOptions o;
    o.lambda = 1e5;
    const HpResult r = hodrickPrescott(y, o);
    BOOST_TEST(r.first == 2);
    BOOST_TEST(r.last == 38);
    BOOST_TEST(!hasValue(r.trend[0]));
    BOOST_TEST(!hasValue(r.trend[1]));
    BOOST_TEST(!hasValue(r.trend[39]));
    for (int t = 2; t <= 38; ++t) BOOST_TEST(std::fabs(r.trend[t] - (50.0 + 1.5 * t)) < 1e-7);
    BOOST_TEST(!hasValue(r.cycle[18]));  // no value, no cycle
    BOOST_TEST(r.diag.droppedFor(DropReason::BlankValue) == 6u);
    BOOST_TEST(r.diag.warnings.size() == 1u);  // the bridged gap
}

BOOST_AUTO_TEST_CASE(hp_small_lambda_follows_the_data) {
    // As lambda -> 0 the fit term dominates: trend -> data.
    std::vector<double> y = {3, 9, 1, 7, 2, 8, 4};
    HpOptions o;
    o.lambda = 1e-9;
    const HpResult r = hodrickPrescott(y, o);
    for (std::size_t t = 0; t < y.size(); ++t) BOOST_TEST(std::fabs(r.trend[t] - y[t]) < 1e-6);
}

BOOST_AUTO_TEST_CASE(hp_input_errors) {
    HpOptions o;
    BOOST_CHECK_THROW(hodrickPrescott({1.0, kNoValue, 2.0}, o), InputError);
    BOOST_CHECK_THROW(hodrickPrescott({}, o), InputError);
    o.lambda = 0.0;
    BOOST_CHECK_THROW(hodrickPrescott({1.0, 2.0, 4.0}, o), InputError);
    o.lambda = std::nan("");
    BOOST_CHECK_THROW(hodrickPrescott({1.0, 2.0, 4.0}, o), InputError);
    o.lambda = 1e14;  // extreme but valid: still a finite trend (close to the OLS line)
    const HpResult r = hodrickPrescott({1.0, 2.0, 4.0, 3.0, 5.0}, o);
    for (double v : r.trend) BOOST_TEST(std::isfinite(v));
}

BOOST_AUTO_TEST_SUITE_END()
