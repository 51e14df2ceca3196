// Structural time series smoother (native/core/structural_smoother.hpp, state_space.hpp).
// Check values are derived by hand from the model (the derivation is beside each test);
// the comparisons with statsmodels and a dense GLS are in tests/reference/test_smoothing_*.py.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "state_space.hpp"
#include "structural_smoother.hpp"

using namespace lintel;

namespace {

bool close(double a, double b, double tol) { return std::fabs(a - b) <= tol; }

bool anyWarningContains(const Diagnostics& d, const std::string& text) {
    for (const auto& w : d.warnings)
        if (w.find(text) != std::string::npos) return true;
    return false;
}

SmootherVariances levelOnly(double v) {
    SmootherVariances s;
    s.level = v;
    return s;
}

// Deterministic pseudo-random series (LCG + Box-Muller) for property tests.
struct Lcg {
    unsigned long long s;
    double uniform() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
    double normal() {
        const double u = uniform() + 1e-300, v = uniform();
        return std::sqrt(-2 * std::log(u)) * std::cos(6.283185307179586 * v);
    }
};

PeriodEffects simulated(int n, unsigned long long seed, double h = 0.002) {
    Lcg g{seed};
    PeriodEffects e;
    double level = 0, slope = 0.003;
    for (int t = 0; t < n; ++t) {
        e.value.push_back(level + 0.01 * std::sin(t * 0.5236) + std::sqrt(h) * g.normal());
        e.variance.push_back(h * (0.6 + 0.8 * g.uniform()));
        level += slope + 0.004 * g.normal();
        slope += 0.0004 * g.normal();
    }
    return e;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(structural_smoother)

BOOST_AUTO_TEST_CASE(local_level_with_a_gap_matches_the_hand_solution) {
    // Local level, y = (0, -, 1), h = 1, sigma2_eta = 1. Unknowns (mu1, eta1, eta2) with a flat
    // prior on mu1: precision X'X + diag(0, 1, 1) = [[2,1,1],[1,2,1],[1,1,2]], inverse
    // [[3,-1,-1],[-1,3,-1],[-1,-1,3]] / 4, X'y = (1, 1, 1): mu = (0.25, 0.5, 0.75);
    // Var(mu1) = 3/4, Var(mu2) = 1, Var(mu3) = 3/4, Cov(mu1, mu2) = 1/2, Cov(mu1, mu3) = 1/4.
    // Filtered: mu1 | y1 ~ N(0, 1); mu2 | y1 ~ N(0, 2); mu3 | y1, y3: prior N(0, 3), obs var 1:
    // N(0.75, 0.75). Diffuse log-likelihood: y3 - y1 ~ N(0, 4): -1/2 (2 log 2 pi + log 4 + 1/4).
    PeriodEffects in;
    in.value = {0.0, kNoValue, 1.0};
    in.variance = {1.0, 0.0, 1.0};
    SmootherOptions o;
    o.trend = TrendKind::Level;
    o.variances = levelOnly(1.0);
    const SmootherResult r = smoothPeriodEffects(in, o);
    const std::vector<double> mean{0.25, 0.5, 0.75}, var{0.75, 1.0, 0.75};
    for (int t = 0; t < 3; ++t) {
        BOOST_TEST(close(r.level[t], mean[t], 1e-14));
        BOOST_TEST(close(r.levelVariance[t], var[t], 1e-14));
    }
    const std::vector<double> cov = r.levelCovarianceWith(0);
    BOOST_TEST(close(cov[0], 0.75, 1e-14));
    BOOST_TEST(close(cov[1], 0.5, 1e-14));
    BOOST_TEST(close(cov[2], 0.25, 1e-14));
    const std::vector<double> fm{0, 0, 0.75}, fv{1, 2, 0.75};
    for (int t = 0; t < 3; ++t) {
        BOOST_TEST(close(r.filtered[t], fm[t], 1e-14));
        BOOST_TEST(close(r.filteredVariance[t], fv[t], 1e-14));
    }
    const double twoPi = 6.283185307179586;
    BOOST_TEST(close(r.logLikelihood, -0.5 * (2 * std::log(twoPi) + std::log(4.0) + 0.25), 1e-12));
    BOOST_TEST(!r.estimated);
    BOOST_TEST(r.diag.rowsIn == 3u);
    BOOST_TEST(r.diag.rowsUsed == 2u);

    // The index with base period 0: 100 exp(mu_t - mu_1), sd^2 = Var(mu_t - mu_1):
    // 1 + 3/4 - 2 (1/2) = 3/4 for the gap, 3/4 + 3/4 - 2 (1/4) = 1 for the last period.
    const PeriodAxis axis = PeriodAxis::spanning(2020L * 12, 2020L * 12 + 2, Frequency::Month);
    IndexOptions io;
    const IndexResult idx = smoothedIndex(r, axis, {3, 0, 4}, io);
    BOOST_TEST(idx.table.basePosition == 0);
    BOOST_TEST(idx.table.index[0] == 100.0);
    BOOST_TEST(idx.table.lower[0] == 100.0);
    BOOST_TEST(idx.table.upper[0] == 100.0);
    const double z = 1.959963984540054;
    BOOST_TEST(close(idx.table.index[1], 100 * std::exp(0.25), 1e-12));
    BOOST_TEST(close(idx.table.upper[1], 100 * std::exp(0.25 + z * std::sqrt(0.75)), 1e-9));
    BOOST_TEST(close(idx.table.lower[2], 100 * std::exp(0.5 - z * 1.0), 1e-9));
    BOOST_TEST(idx.table.count[2] == 4u);
}

BOOST_AUTO_TEST_CASE(single_observation_spreads_with_the_random_walk) {
    // Local level, one value 0.3 (h = 0.01) in period 2 of 5, sigma2_eta = 0.001: the smoothed
    // level is 0.3 everywhere with variance h + |t - 2| sigma2_eta.
    PeriodEffects in;
    in.value = {kNoValue, kNoValue, 0.3, kNoValue, kNoValue};
    in.variance = {0, 0, 0.01, 0, 0};
    SmootherOptions o;
    o.trend = TrendKind::Level;
    o.variances = levelOnly(0.001);
    const SmootherResult r = smoothPeriodEffects(in, o);
    for (int t = 0; t < 5; ++t) {
        BOOST_TEST(close(r.level[t], 0.3, 1e-14));
        BOOST_TEST(close(r.levelVariance[t], 0.01 + std::abs(t - 2) * 0.001, 1e-14));
    }
    // Real time: nothing is known before the value; afterwards the forecast.
    BOOST_TEST(!hasValue(r.filtered[0]));
    BOOST_TEST(!hasValue(r.filtered[1]));
    BOOST_TEST(close(r.filtered[4], 0.3, 1e-14));
    BOOST_TEST(close(r.filteredVariance[4], 0.012, 1e-14));

    // Maximum likelihood needs more values than the model has diffuse states and variances.
    SmootherOptions ml;
    ml.trend = TrendKind::Level;
    BOOST_CHECK_THROW(smoothPeriodEffects(in, ml), InputError);
    // A local linear trend cannot be pinned down by one value even with given variances.
    SmootherOptions trend;
    trend.variances = SmootherVariances{};
    trend.variances->level = 0.001;
    trend.variances->slope = 1e-6;
    BOOST_CHECK_THROW(smoothPeriodEffects(in, trend), InputError);
}

BOOST_AUTO_TEST_CASE(constant_series_ends_at_the_boundary_with_a_warning) {
    // Constant period effects with positive sampling variances: no movement stands out from
    // the noise, so every disturbance variance is estimated at zero; the smoothed level is the
    // constant (GLS of a constant with a flat prior) and the index is 100 throughout.
    PeriodEffects in;
    for (int t = 0; t < 30; ++t) {
        in.value.push_back(0.1);
        in.variance.push_back(0.001 * (1 + t % 3));
    }
    for (TrendKind k : {TrendKind::Level, TrendKind::Trend}) {
        SmootherOptions o;
        o.trend = k;
        const SmootherResult r = smoothPeriodEffects(in, o);
        BOOST_TEST(r.estimated);
        BOOST_TEST(r.boundary);
        BOOST_TEST(r.variances.level == 0.0);
        BOOST_TEST(anyWarningContains(r.diag, "level variance is estimated at zero"));
        if (k == TrendKind::Trend) BOOST_TEST(r.variances.slope == 0.0);
        for (int t = 0; t < 30; ++t) BOOST_TEST(close(r.level[t], 0.1, 1e-12));
        BOOST_TEST(r.signalToNoise == 0.0);
        const PeriodAxis axis = PeriodAxis::spanning(2020L * 12, 2020L * 12 + 29, Frequency::Month);
        const IndexResult idx = smoothedIndex(r, axis, std::vector<std::size_t>(30, 5), IndexOptions{});
        for (int t = 0; t < 30; ++t) BOOST_TEST(close(idx.table.index[t], 100.0, 1e-9));
    }
}

BOOST_AUTO_TEST_CASE(missing_periods_get_a_value_with_a_wider_band) {
    PeriodEffects in = simulated(60, 11);
    for (int t : {20, 21, 22}) in.value[t] = kNoValue;
    SmootherOptions o;
    o.variances = SmootherVariances{};
    o.variances->level = 1.6e-5;
    o.variances->slope = 1.6e-7;
    const SmootherResult r = smoothPeriodEffects(in, o);
    for (int t = 0; t < 60; ++t) BOOST_TEST(hasValue(r.level[t]));
    BOOST_TEST(r.levelVariance[21] > r.levelVariance[18]);
    BOOST_TEST(r.levelVariance[21] > r.levelVariance[25]);
    BOOST_TEST(r.levelVariance[21] > r.levelVariance[20]);
    BOOST_TEST(r.diag.rowsUsed == 57u);
}

BOOST_AUTO_TEST_CASE(real_time_values_never_revise) {
    // The filtered level of period t uses periods up to t only: the same with the whole
    // series as with the series cut after period 40 (same variances).
    const PeriodEffects full = simulated(72, 5);
    PeriodEffects cut = full;
    cut.value.resize(41);
    cut.variance.resize(41);
    SmootherOptions o;
    o.seasonal = true;
    o.realtime = true;
    o.variances = SmootherVariances{};
    o.variances->level = 1.6e-5;
    o.variances->slope = 1.6e-7;
    o.variances->seasonal = 1e-6;
    const SmootherResult a = smoothPeriodEffects(full, o), b = smoothPeriodEffects(cut, o);
    int compared = 0;
    for (int t = 0; t <= 40; ++t) {
        BOOST_TEST(hasValue(a.filtered[t]) == hasValue(b.filtered[t]));
        if (!hasValue(a.filtered[t])) continue;
        BOOST_TEST(close(a.filtered[t], b.filtered[t], 1e-12));
        BOOST_TEST(close(a.filteredVariance[t], b.filteredVariance[t], 1e-14));
        ++compared;
    }
    BOOST_TEST(compared == 41);  // the published level is observed from period 0 on
    // The smoothed values do revise.
    BOOST_TEST(std::fabs(a.level[40] - b.level[40]) > 1e-6);
    // The real-time index uses the filtered level.
    const PeriodAxis axis = PeriodAxis::spanning(2018L * 12, 2018L * 12 + 71, Frequency::Month);
    const IndexResult idx = smoothedIndex(a, axis, std::vector<std::size_t>(72, 1), IndexOptions{});
    BOOST_TEST(close(idx.table.index[30], 100 * std::exp(a.filtered[30] - a.filtered[0]), 1e-9));
}

BOOST_AUTO_TEST_CASE(real_time_band_uses_the_covariance_up_to_the_later_period) {
    // Cov(e_t, e_base) of the filtered errors equals the smoothed cross-covariance of a run on
    // the data cut after max(t, base) (the definition, computed the long way), here with a
    // seasonal model (states identified only after a year) and gaps.
    PeriodEffects full = simulated(48, 17);
    full.value[5] = full.value[30] = kNoValue;
    SmootherOptions o;
    o.seasonal = true;
    o.realtime = true;
    o.variances = SmootherVariances{};
    o.variances->level = 1.6e-5;
    o.variances->slope = 1.6e-7;
    o.variances->seasonal = 1e-6;
    const SmootherResult r = smoothPeriodEffects(full, o);
    const int base = 20;
    const std::vector<double> fast = r.run->filteredCovarianceWith(r.signal, base);
    for (int t = 0; t < 48; ++t) {
        const int last = std::max(t, base);
        PeriodEffects cut = full;
        cut.value.resize(static_cast<std::size_t>(last + 1));
        cut.variance.resize(static_cast<std::size_t>(last + 1));
        const SmootherResult c = smoothPeriodEffects(cut, o);
        const double slow = c.levelCovarianceWith(base)[static_cast<std::size_t>(t)];
        BOOST_TEST(close(fast[t], slow, 1e-12 + 1e-9 * std::fabs(slow)));
    }
    // The index band: Var(e_t) + Var(e_base) - 2 Cov, zero at the base.
    const PeriodAxis axis = PeriodAxis::spanning(2019L * 12, 2019L * 12 + 47, Frequency::Month);
    IndexOptions io;
    io.baseDate = axis.start(base);
    const IndexResult idx = smoothedIndex(r, axis, std::vector<std::size_t>(48, 1), io);
    BOOST_TEST(idx.table.lower[base] == 100.0);
    const double sd = std::sqrt(r.filteredVariance[40] + r.filteredVariance[base] - 2 * fast[40]);
    BOOST_TEST(close(idx.table.upper[40],
                     100 * std::exp(r.filtered[40] - r.filtered[base] + 1.959963984540054 * sd), 1e-8));
}

BOOST_AUTO_TEST_CASE(fast_likelihood_equals_the_full_run) {
    // The likelihood-only pass (univariate, collapsed) and the full run compute the same
    // diffuse log-likelihood: with a shared error, two correlated series and gaps.
    using namespace statespace;
    const PeriodEffects e = simulated(50, 9);
    Model M;
    M.states = 3;  // level, slope, deviation
    M.transition = {{0, 0, 1}, {0, 1, 1}, {1, 1, 1}, {2, 2, 1}};
    M.design = Eigen::MatrixXd::Zero(2, 3);
    M.design << 1, 0, 0, 1, 0, 1;
    M.disturbance = Eigen::Vector3d(1.6e-5, 1.6e-7, 4e-6);
    M.irregular = Eigen::Vector2d(1e-5, 2e-5);
    Observations obs;
    obs.y.resize(50, 2);
    obs.variance.resize(50, 2);
    obs.covariance.resize(50);
    obs.loadings.resize(100, 1);
    obs.factorCov = Eigen::MatrixXd::Constant(1, 1, 1e-4);
    for (int t = 0; t < 50; ++t) {
        obs.y(t, 0) = e.value[t];
        obs.y(t, 1) = t % 7 == 3 ? kNoValue : e.value[t] + 0.05 + 0.01 * std::sin(t);
        obs.variance(t, 0) = e.variance[t] / 8;
        obs.variance(t, 1) = e.variance[t];
        obs.covariance(t) = e.variance[t] / 8;
        obs.loadings(2 * t, 0) = 1;
        obs.loadings(2 * t + 1, 0) = 0.5 + 0.01 * t;
    }
    obs.y(10, 0) = obs.y(10, 1) = kNoValue;
    for (bool shared : {true, false}) {
        Observations o2 = obs;
        if (!shared) {
            o2.loadings.resize(0, 0);
            o2.factorCov.resize(0, 0);
        }
        double fast = 0;
        BOOST_TEST(logLikelihood(M, o2, fast));
        const auto run = Run::run(M, o2);
        BOOST_TEST((run->failure() == Failure::None));
        BOOST_TEST(close(fast, run->logLikelihood(), 1e-9 * std::fabs(fast)));
    }
}

BOOST_AUTO_TEST_CASE(borrowing_strength_follows_the_market) {
    // A segment with every second period missing. Under the borrowing model the segment's
    // level mu + delta is itself a local linear trend with level disturbance variance
    // sigma2_eta + sigma2_delta: smoothing the segment alone with that variance is the same
    // model without the market's data, so the borrowed level's variance can only be smaller.
    const PeriodEffects market0 = simulated(60, 21, 0.0005);
    BorrowInput in;
    in.market = market0;
    in.segment = market0;
    Lcg g{77};
    for (int t = 0; t < 60; ++t) {
        in.segment.variance[t] = 4 * market0.variance[t];
        in.segment.value[t] = t % 2 ? kNoValue : market0.value[t] + 0.08 + 0.03 * g.normal();
    }
    SmootherOptions o;
    o.variances = SmootherVariances{};
    o.variances->level = 1.6e-5;
    o.variances->slope = 1.6e-7;
    o.variances->deviation = 1e-6;
    const SmootherResult r = borrowStrength(in, o);
    SmootherOptions a = o;
    a.variances->level = 1.6e-5 + 1e-6;
    const SmootherResult alone = smoothPeriodEffects(in.segment, a);
    BOOST_TEST(r.model == "local linear trend + segment deviation");
    BOOST_TEST(r.deviation.size() == 60u);
    for (int t = 0; t < 60; ++t) {
        BOOST_TEST(r.levelVariance[t] < alone.levelVariance[t]);
        BOOST_TEST(close(r.level[t], r.trend[t] + r.deviation[t], 1e-12));
    }
    // With maximum likelihood as well every period has a value.
    const SmootherResult ml = borrowStrength(in, SmootherOptions{});
    for (int t = 0; t < 60; ++t) BOOST_TEST(hasValue(ml.level[t]));
    BOOST_TEST(hasValue(ml.variances.deviation));
}

BOOST_AUTO_TEST_CASE(invalid_options_and_input_are_input_errors) {
    const PeriodEffects e = simulated(30, 3);
    SmootherOptions yearly;
    yearly.seasonal = true;
    yearly.freq = Frequency::Year;
    BOOST_CHECK_THROW(yearly.validate(), InputError);
    BOOST_CHECK_THROW(smoothPeriodEffects(e, yearly), InputError);
    SmootherOptions shortSeason;
    shortSeason.seasonal = true;
    shortSeason.seasonPeriods = 1;
    BOOST_CHECK_THROW(shortSeason.validate(), InputError);
    SmootherOptions fewEvaluations;
    fewEvaluations.maxEvaluations = 5;
    BOOST_CHECK_THROW(smoothPeriodEffects(e, fewEvaluations), InputError);
    SmootherOptions negative;
    negative.variances = SmootherVariances{};
    negative.variances->level = -1;
    negative.variances->slope = 0;
    BOOST_CHECK_THROW(smoothPeriodEffects(e, negative), InputError);
    SmootherOptions missingSlope;
    missingSlope.variances = levelOnly(1e-5);  // a trend model needs the slope variance too
    BOOST_CHECK_THROW(smoothPeriodEffects(e, missingSlope), InputError);

    PeriodEffects bad = e;
    bad.variance.pop_back();
    BOOST_CHECK_THROW(smoothPeriodEffects(bad, SmootherOptions{}), InputError);
    bad = e;
    bad.variance[4] = 0;  // zero sampling variance without an irregular
    BOOST_CHECK_THROW(smoothPeriodEffects(bad, SmootherOptions{}), InputError);
    SmootherOptions irregular;
    irregular.irregular = true;
    BOOST_CHECK_NO_THROW(smoothPeriodEffects(bad, irregular));
    bad = e;
    bad.variance[4] = kNoValue;
    BOOST_CHECK_THROW(smoothPeriodEffects(bad, SmootherOptions{}), InputError);
    bad = e;
    for (double& v : bad.value) v = kNoValue;
    BOOST_CHECK_THROW(smoothPeriodEffects(bad, SmootherOptions{}), InputError);
    BOOST_CHECK_THROW(smoothPeriodEffects(PeriodEffects{}, SmootherOptions{}), InputError);
    bad = e;
    bad.loadings = Eigen::MatrixXd::Ones(30, 1);
    bad.sharedCov = Eigen::MatrixXd::Constant(1, 1, -1e-4);  // not positive semi-definite
    BOOST_CHECK_THROW(smoothPeriodEffects(bad, SmootherOptions{}), InputError);

    BorrowInput b{e, e, std::vector<double>(30, 0.0)};
    b.covariance[3] = 2 * e.variance[3];  // correlation above 1
    BOOST_CHECK_THROW(borrowStrength(b, SmootherOptions{}), InputError);
    BorrowInput noSegment{e, e, {}};
    for (double& v : noSegment.segment.value) v = kNoValue;
    BOOST_CHECK_THROW(borrowStrength(noSegment, SmootherOptions{}), InputError);

    SmootherOptions given;
    given.variances = SmootherVariances{};
    given.variances->level = 1e-5;
    given.variances->slope = 1e-7;
    const SmootherResult r = smoothPeriodEffects(e, given);
    const PeriodAxis wrong = PeriodAxis::spanning(2020L * 12, 2020L * 12 + 10, Frequency::Month);
    BOOST_CHECK_THROW(smoothedIndex(r, wrong, std::vector<std::size_t>(11, 1), IndexOptions{}), InputError);
    const PeriodAxis axis = PeriodAxis::spanning(2020L * 12, 2020L * 12 + 29, Frequency::Month);
    IndexOptions outside;
    outside.baseDate = serialFromCivil({2030, 1, 1});
    BOOST_CHECK_THROW(smoothedIndex(r, axis, std::vector<std::size_t>(30, 1), outside), InputError);
}

BOOST_AUTO_TEST_CASE(shared_error_with_a_dropped_term_equals_the_reduced_form) {
    // A shared covariance with a zero row and column (a term the hedonic fit dropped) is the
    // same model as the one without that term.
    PeriodEffects reduced = simulated(40, 31);
    reduced.loadings.resize(40, 2);
    for (int t = 0; t < 40; ++t) {
        reduced.loadings(t, 0) = 1;
        reduced.loadings(t, 1) = std::sin(0.3 * t);
    }
    reduced.sharedCov.resize(2, 2);
    reduced.sharedCov << 1e-4, 2e-5, 2e-5, 5e-5;
    PeriodEffects padded = reduced;
    padded.loadings.conservativeResize(40, 3);
    padded.loadings.col(2).setConstant(0.7);
    padded.sharedCov = Eigen::MatrixXd::Zero(3, 3);
    padded.sharedCov.topLeftCorner(2, 2) = reduced.sharedCov;
    SmootherOptions o;
    o.variances = SmootherVariances{};
    o.variances->level = 1.6e-5;
    o.variances->slope = 1.6e-7;
    const SmootherResult a = smoothPeriodEffects(reduced, o), b = smoothPeriodEffects(padded, o);
    BOOST_TEST(close(a.logLikelihood, b.logLikelihood, 1e-9));
    for (int t = 0; t < 40; ++t) {
        BOOST_TEST(close(a.level[t], b.level[t], 1e-11));
        BOOST_TEST(close(a.levelVariance[t], b.levelVariance[t], 1e-14));
    }
}

BOOST_AUTO_TEST_CASE(summary_names_the_model_and_the_variances) {
    SmootherOptions o;
    o.seasonal = true;
    const SmootherResult r = smoothPeriodEffects(simulated(48, 4), o);
    const std::string s = r.summary();
    BOOST_TEST(s.find("local linear trend + seasonal (12)") == 0u);
    BOOST_TEST(s.find("log-likelihood") != std::string::npos);
    BOOST_TEST(s.find("maximum likelihood") != std::string::npos);
    BOOST_TEST(r.evaluations > 0);
    BOOST_TEST(hasValue(r.signalToNoise));
    BOOST_TEST(close(r.signalToNoise, (r.variances.level + r.variances.slope) / r.noiseVariance, 1e-15));
}

BOOST_AUTO_TEST_SUITE_END()
