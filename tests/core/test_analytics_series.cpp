// Index-series measures: volatility, signal-to-noise, lead-lag, seasonal factors, compare
// (native/core/index_analytics.hpp, lead_lag.hpp, seasonal.hpp, index_compare.hpp).
// Hand-computed values say how they were computed; generated series state their model.
// The reference checks against numpy / pandas / statsmodels are in
// tests/reference/test_analytics_*.py.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <cstdint>
#include <random>
#include <vector>

#include "index_analytics.hpp"
#include "index_compare.hpp"
#include "lead_lag.hpp"
#include "seasonal.hpp"

using namespace lintel;

namespace {

// Standard normal draws from mt19937_64 (whose output the C++ standard fixes) by Box-Muller,
// so the test data are the same with every standard library.
class Normal {
public:
    explicit Normal(std::uint64_t seed) : g_(seed) {}
    double operator()() {
        const double u1 = (double(g_() >> 11) + 0.5) / 9007199254740992.0;
        const double u2 = (double(g_() >> 11) + 0.5) / 9007199254740992.0;
        return std::sqrt(-2 * std::log(u1)) * std::cos(6.283185307179586 * u2);
    }

private:
    std::mt19937_64 g_;
};

// Model: ln I_t = 0.1 sin(2 pi t / 60) + 0.003 t + sigma e_t, e_t iid N(0, 1), monthly,
// 180 months; the same draws e_t for every sigma. Returns I_t = 100 exp(...).
std::vector<double> cycleWithNoise(double sigma, std::uint64_t seed = 7) {
    Normal z(seed);
    std::vector<double> v(180);
    for (int t = 0; t < 180; ++t)
        v[t] = 100 * std::exp(0.1 * std::sin(6.283185307179586 * t / 60) + 0.003 * t + sigma * z());
    return v;
}

// The SNR of the same definition computed on the true components: signal = 100 ln of the
// noiseless index, noise = 100 sigma e.
double trueSnr(double sigma, std::uint64_t seed = 7) {
    Normal z(seed);
    double ss = 0, nn = 0, prevS = 0, prevN = 0;
    for (int t = 0; t < 180; ++t) {
        const double s = 100 * (0.1 * std::sin(6.283185307179586 * t / 60) + 0.003 * t);
        const double n = 100 * sigma * z();
        if (t > 0) {
            ss += (s - prevS) * (s - prevS);
            nn += (n - prevN) * (n - prevN);
        }
        prevS = s;
        prevN = n;
    }
    return ss / nn;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(analytics)

BOOST_AUTO_TEST_CASE(volatility_hand_computed) {
    // Index 100, 110, 99, 108.9, (blank), 120: log changes 100 ln 1.1, 100 ln 0.9, 100 ln 1.1
    // (the blank breaks the last two pairs). By hand: mean m = (2 a + b) / 3 with
    // a = 100 ln 1.1, b = 100 ln 0.9; sd = sqrt(((a-m)^2 * 2 + (b-m)^2) / 2);
    // numpy: np.std(100*np.log([1.1, .9, 1.1]), ddof=1) = 11.585728004354243.
    const std::vector<double> idx = {100, 110, 99, 108.9, kNoValue, 120};
    VolatilityOptions o;
    const VolatilityResult r = indexVolatility(idx, o);
    BOOST_TEST(r.changes == 3u);
    const double a = 100 * std::log(1.1), b = 100 * std::log(0.9), m = (2 * a + b) / 3;
    const double sd = std::sqrt(((a - m) * (a - m) * 2 + (b - m) * (b - m)) / 2);
    BOOST_TEST(std::fabs(r.volatility - sd) < 1e-12);
    BOOST_TEST(std::fabs(r.volatility - 11.585728004354243) < 1e-11);
    BOOST_TEST(r.diag.droppedFor(DropReason::BlankValue) == 1u);
    // Annualised monthly: times sqrt(12).
    o.annual = true;
    BOOST_TEST(std::fabs(indexVolatility(idx, o).volatility - sd * std::sqrt(12.0)) < 1e-10);
    // Too few changes, bad lag.
    BOOST_CHECK_THROW(indexVolatility({100, kNoValue, 101, kNoValue}, VolatilityOptions{}), InputError);
    VolatilityOptions bad;
    bad.lag = 0;
    BOOST_CHECK_THROW(indexVolatility(idx, bad), InputError);
    // Non-positive values count as no value.
    const VolatilityResult z = indexVolatility({100, 0, -3, 100, 101, 103}, VolatilityOptions{});
    BOOST_TEST(z.changes == 2u);
    BOOST_TEST(z.diag.droppedFor(DropReason::NonPositiveValue) == 2u);
}

BOOST_AUTO_TEST_CASE(volatility_of_a_steady_index_is_zero) {
    // Constant growth of 1 % a period: every log change equal, sd 0.
    std::vector<double> idx(30);
    for (int t = 0; t < 30; ++t) idx[t] = 100 * std::pow(1.01, t);
    BOOST_TEST(indexVolatility(idx, VolatilityOptions{}).volatility < 1e-10);
}

BOOST_AUTO_TEST_CASE(snr_lambda_two_year_half_gain) {
    // lambda = 1 / (4 (1 - cos(2 pi / P))^2): P = 24 months -> 215.3..., P = 8 quarters -> 2.914...
    // (Python: 1/(4*(1-math.cos(2*math.pi/24))**2) = 215.32246474604304, P = 8: 2.914213562373096).
    BOOST_TEST(std::fabs(snrLambda(Frequency::Month) - 215.32246474604304) < 1e-9);
    BOOST_TEST(std::fabs(snrLambda(Frequency::Quarter) - 2.914213562373096) < 1e-12);
    BOOST_TEST(std::fabs(snrLambda(Frequency::Year) - 0.0625) < 1e-12);
}

BOOST_AUTO_TEST_CASE(snr_ranks_known_signal_and_noise) {
    // Model in cycleWithNoise: a 5-year cycle with drift plus white noise in logs of sd sigma.
    // More noise must give a strictly lower ratio, and the estimate must be near the ratio of
    // the true components (within 25 %: the HP split is not perfect).
    const double sigmas[] = {0.002, 0.005, 0.01, 0.02, 0.04};
    double prev = INFINITY;
    for (double s : sigmas) {
        const SnrResult r = indexSnr(cycleWithNoise(s), SnrOptions{});
        BOOST_TEST_INFO("sigma " << s);
        BOOST_TEST(r.snr < prev);
        const double truth = trueSnr(s);
        BOOST_TEST(std::fabs(r.snr / truth - 1) < 0.25);
        BOOST_TEST(r.pairs == 179u);
        prev = r.snr;
    }
}

BOOST_AUTO_TEST_CASE(snr_smooth_beats_jumpy_on_the_same_market) {
    // Same market (the cycle above): a "modelled" index = the signal with tiny noise
    // (sigma 0.001) against a "raw median" = signal with sigma 0.03.
    const double smooth = indexSnr(cycleWithNoise(0.001), SnrOptions{}).snr;
    const double jumpy = indexSnr(cycleWithNoise(0.03, 11), SnrOptions{}).snr;
    BOOST_TEST(smooth > 10 * jumpy);
}

BOOST_AUTO_TEST_CASE(snr_missing_values_and_errors) {
    std::vector<double> idx = cycleWithNoise(0.01);
    idx[50] = kNoValue;
    idx[120] = -1;  // non-positive: no value
    const SnrResult r = indexSnr(idx, SnrOptions{});
    BOOST_TEST(r.pairs == 179u - 4u);  // four pairs lose an end
    BOOST_TEST(std::isfinite(r.snr));
    BOOST_TEST(r.diag.droppedFor(DropReason::NonPositiveValue) == 1u);
    BOOST_CHECK_THROW(indexSnr({100, kNoValue, 102}, SnrOptions{}), InputError);
    BOOST_CHECK_THROW(indexSnr({100, kNoValue, 102, kNoValue, 104}, SnrOptions{}), InputError);
    // A straight line in logs is its own trend: no noise, no ratio, a warning, no crash.
    std::vector<double> steady(40);
    for (int t = 0; t < 40; ++t) steady[t] = 100 * std::exp(0.01 * t);
    const SnrResult s = indexSnr(steady, SnrOptions{});
    BOOST_TEST(s.noise < 1e-6);
}

BOOST_AUTO_TEST_CASE(leadlag_sign_convention_on_shifted_series) {
    // b is a copied 3 periods later: b_t = a_{t-3}. "Positive lag k means a leads b by k":
    // the best lag must be +3 with correlation 1; swapping the roles gives -3.
    Normal z(3);
    std::vector<double> a(80), b(80, kNoValue);
    double level = 100;
    for (int t = 0; t < 80; ++t) {
        level *= std::exp(0.01 * z());
        a[t] = level;
    }
    for (int t = 3; t < 80; ++t) b[t] = a[t - 3];
    LeadLagOptions o;
    o.changeLag = 1;
    o.maxLag = 6;
    const LeadLagResult r = indexLeadLag({a, b}, o);
    BOOST_TEST(r.rows.size() == 13u);
    BOOST_TEST(r.rows.front().lag == -6);
    BOOST_TEST(r.bestLag == 3);
    BOOST_TEST(std::fabs(r.bestCorr - 1) < 1e-12);
    BOOST_TEST(r.rows[9].lag == 3);
    BOOST_TEST(r.rows[9].pairs == 76u);  // changes of a at t=1..76 paired with b at t+3 (b from 4)
    const LeadLagResult back = indexLeadLag({b, a}, o);
    BOOST_TEST(back.bestLag == -3);
    // Default: year-over-year changes (12 monthly), maxlag 12.
    const LeadLagResult yoy = indexLeadLag({a, b}, LeadLagOptions{});
    BOOST_TEST(yoy.changeLag == 12);
    BOOST_TEST(yoy.rows.size() == 25u);
    BOOST_TEST(yoy.bestLag == 3);
}

BOOST_AUTO_TEST_CASE(leadlag_hand_computed_and_errors) {
    // Changes (lag 1) of a: 100 ln(2), 100 ln(1/2), ... Use a = b: lag 0 correlation 1.
    const std::vector<double> a = {100, 104, 101, 107, 103, 110, 108, 115};
    LeadLagOptions o;
    o.changeLag = 1;
    o.maxLag = 2;
    const LeadLagResult r = indexLeadLag({a, a}, o);
    BOOST_TEST(r.bestLag == 0);
    BOOST_TEST(std::fabs(r.bestCorr - 1) < 1e-12);
    // Alternating changes: lag +-1 strongly negative.
    BOOST_TEST(r.rows[1].corr < -0.5);
    BOOST_CHECK_THROW(indexLeadLag({a, {1, 2}}, o), InputError);
    BOOST_CHECK_THROW(indexLeadLag({{100, 101, 102}, {100, 101, 102}}, o), InputError);
    o.minPairs = 2;
    BOOST_CHECK_THROW(indexLeadLag({a, a}, o), InputError);
    // maxlag beyond the rows is an input error; the default shrinks to the rows there are.
    LeadLagOptions big;
    big.changeLag = 1;
    big.maxLag = 8;
    BOOST_CHECK_THROW(indexLeadLag({a, a}, big), InputError);
    big.maxLag.reset();
    const LeadLagResult shrunk = indexLeadLag({a, a}, big);
    BOOST_TEST(shrunk.rows.size() == 15u);  // lags -7 .. 7
}

BOOST_AUTO_TEST_CASE(seasonal_recovers_exact_factors) {
    // x_t = 100 f_{t mod 12}, factors averaging 1: the 2x12 moving average of a periodic
    // series is its mean (100), so every ratio is the factor itself.
    const double f[12] = {0.94, 0.96, 1.0, 1.02, 1.05, 1.07, 1.06, 1.03, 1.0, 0.98, 0.95, 0.94};
    double mean = 0;
    for (double v : f) mean += v / 12;
    std::vector<double> x(60);
    for (int t = 0; t < 60; ++t) x[t] = 100 * f[t % 12] / mean;
    const SeasonalResult r = seasonalFactors(x, SeasonalOptions{});
    for (int k = 0; k < 12; ++k) BOOST_TEST(std::fabs(r.periodFactors[k] - f[k] / mean) < 1e-12);
    for (int t = 0; t < 60; ++t) BOOST_TEST(std::fabs(r.adjusted[t] - 100) < 1e-9);
    BOOST_TEST(!hasValue(r.trend[5]));
    BOOST_TEST(hasValue(r.trend[6]));
    BOOST_TEST(!hasValue(r.trend[54]));
    BOOST_TEST(r.ratios[0] == 4u);  // rows 12, 24, 36, 48
    // A gap removes the moving averages that touch it, not the factors.
    x[30] = kNoValue;
    const SeasonalResult g = seasonalFactors(x, SeasonalOptions{});
    BOOST_TEST(!hasValue(g.adjusted[30]));
    BOOST_TEST(hasValue(g.factor[30]));
    for (int t = 24; t <= 36; ++t) BOOST_TEST(!hasValue(g.trend[t]));
    for (int k = 0; k < 12; ++k) BOOST_TEST(std::fabs(g.periodFactors[k] - f[k] / mean) < 1e-12);
    // Errors: yearly, too short.
    SeasonalOptions y;
    y.freq = Frequency::Year;
    BOOST_CHECK_THROW(seasonalFactors(x, y), InputError);
    BOOST_CHECK_THROW(seasonalFactors(std::vector<double>(23, 100.0), SeasonalOptions{}), InputError);
}

BOOST_AUTO_TEST_CASE(compare_ranks_and_leads) {
    // Column 1: the smooth index; column 2: the same market 2 months later with more noise;
    // column 3: mostly blank. Model: cycleWithNoise (see above).
    const std::vector<double> smooth = cycleWithNoise(0.001);
    const std::vector<double> noisy0 = cycleWithNoise(0.02, 5);
    std::vector<double> late(180, kNoValue);
    for (int t = 2; t < 180; ++t) late[t] = noisy0[t - 2];
    std::vector<double> sparse(180, kNoValue);
    sparse[10] = 100;
    sparse[11] = 101;
    CompareInput in;
    in.columns = {smooth, late, sparse};
    in.names = {"model", "", "thin"};
    const CompareResult r = indexCompare(in, CompareOptions{});
    BOOST_REQUIRE(r.rows.size() == 3u);
    BOOST_TEST(r.rows[0].name == "model");
    BOOST_TEST(r.rows[1].name == "column 2");
    BOOST_TEST(r.rows[0].snr > r.rows[1].snr);
    BOOST_TEST(r.rows[0].volatility < r.rows[1].volatility);
    BOOST_TEST(r.rows[0].lag == 0.0);
    BOOST_TEST(r.rows[0].corr == 1.0);
    BOOST_TEST(r.rows[1].lag == -2.0);  // column 2 lags the first column by 2 months
    BOOST_TEST(r.rows[1].missing == 2u);
    BOOST_TEST(r.rows[2].missing == 178u);
    BOOST_TEST(!hasValue(r.rows[2].snr));
    BOOST_TEST(!hasValue(r.rows[2].volatility));
    BOOST_TEST(std::fabs(r.rows[2].maxAbsChange - 1.0) < 1e-12);
    BOOST_TEST(!r.diag.warnings.empty());
    // Largest period change: hand check on a tiny column.
    CompareInput tiny;
    tiny.columns = {{100, 103, 97.85, 99}};
    const CompareResult t = indexCompare(tiny, CompareOptions{});
    BOOST_TEST(std::fabs(t.rows[0].maxAbsChange - 5.0) < 1e-9);  // 103 -> 97.85 is -5 %
    CompareInput ragged;
    ragged.columns = {{100, 101}, {100}};
    BOOST_CHECK_THROW(indexCompare(ragged, CompareOptions{}), InputError);
}

// A constant index and a straight line in logs have no noise: the ratio is left empty with a
// warning rather than a number made of rounding errors (definition in docs/methods/analytics.md).
BOOST_AUTO_TEST_CASE(snr_of_noise_free_series_is_empty) {
    std::vector<double> constant(40, 100.0), line;
    for (int t = 0; t < 40; ++t) line.push_back(100.0 * std::pow(1.01, t));
    for (const auto& s : {constant, line}) {
        const lintel::SnrResult r = lintel::indexSnr(s, lintel::SnrOptions{});
        BOOST_TEST(!lintel::hasValue(r.snr));
        BOOST_TEST(r.diag.warnings.size() == 1u);
    }
}

BOOST_AUTO_TEST_SUITE_END()
