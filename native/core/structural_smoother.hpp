// Structural time series smoothing of period effects: price indexes for thin markets.
//
// Measurement: the log period effect y_t of an index estimator (hedonic d_t or repeat-sales
// b_t) with its known sampling variance h_t, plus an optional estimated irregular variance:
//
//     y_t = mu_t + gamma_t + e_t,      e_t ~ N(0, h_t + sigma2_irregular)
//
// State (Harvey 1989, Forecasting, Structural Time Series Models and the Kalman Filter, ch. 2;
// Durbin & Koopman 2012, Time Series Analysis by State Space Methods, 2nd ed., ch. 3):
//     local level:         mu_{t+1} = mu_t + eta_t
//     local linear trend:  mu_{t+1} = mu_t + beta_t + eta_t,   beta_{t+1} = beta_t + zeta_t
//     dummy seasonal (s):  gamma_{t+1} = -(gamma_t + ... + gamma_{t-s+2}) + omega_t
// (the same forms as statsmodels' UnobservedComponents "llevel", "lltrend", seasonal=s).
// Disturbance variances by maximum likelihood over their logs (NLopt's BOBYQA, bounded, from
// the best point of a small grid); initial states exactly diffuse (augmented Kalman filter,
// state_space.hpp). The smoothed level uses all periods; the filtered (real-time) level uses
// the periods up to t only and so never revises. A period without sales gets a value from
// the model, with a wider band.
//
// Borrowing strength (a common trend and a segment deviation; after the hierarchical
// trend models of repeat sales, J. Real Estate Finance and Economics 2017, and Francke 2010):
//     market:  y^m_t = mu_t + gamma_t + e^m_t
//     segment: y^s_t = mu_t + gamma_t + delta_t + e^s_t,   delta_{t+1} = delta_t + kappa_t
// with mu the common trend (level or local linear trend) and delta the segment's deviation
// (a local level). The segment's index is mu + gamma + delta. The two sampling errors are
// correlated because the segment's sales are part of the market; default covariance: the
// market's own sampling variance h^m_t (the covariance of a pooled period mean with the mean of
// a subset of its sales when every sale has the same noise variance), capped below a
// correlation of 0.99. A caller with better knowledge passes the covariance.
//
// The sampling covariance of hedonic period effects is not diagonal: the d_t share the error
// of the characteristic coefficients. Its form diag(h_t) + X Sigma X' (X: the period means of
// the characteristic terms, Sigma = s^2 A^-1) enters exactly through `loadings`/`sharedCov`;
// with only the diagonal given, the model uses the marginal variances (docs/methods/smoothing.md
// shows how far that is from the exact solution).
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "index_table.hpp"

namespace lintel {

namespace statespace {
class Run;
}

enum class TrendKind { Level, Trend };

// "level", "trend" (any case); nullopt otherwise.
std::optional<TrendKind> parseTrendKind(const std::string& text);
const char* trendKindCode(TrendKind k);

// Disturbance variances (log-price units squared, per period). kNoValue: not in the model.
struct SmootherVariances {
    double level = kNoValue;             // sigma2_eta, level disturbance
    double slope = kNoValue;             // sigma2_zeta, slope disturbance (trend model)
    double seasonal = kNoValue;          // sigma2_omega (seasonal model)
    double deviation = kNoValue;         // borrow: the segment deviation's disturbance
    double irregular = kNoValue;         // extra noise beyond the sampling variance (irregular
                                         // option); borrow: of the market series
    double irregularSegment = kNoValue;  // borrow with irregular: of the segment series
};

struct SmootherOptions {
    TrendKind trend = TrendKind::Trend;  // smooth: "level" (local level) or "trend" (local
                                         // linear trend, default)
    bool seasonal = false;               // seasonal: false (default); true adds a stochastic
                                         // dummy seasonal of freq's season length
    Frequency freq = Frequency::Month;   // freq: season length 12 (M), 4 (Q); Y has none
    std::optional<int> seasonPeriods;    // (no key) season length; default from freq
    bool irregular = false;              // irregular: false (default): the sampling variances
                                         // are the whole measurement noise; true: estimate an
                                         // extra irregular variance
    bool realtime = false;               // realtime: false (default) the index is the smoothed
                                         // level (all data, revises); true the filtered level
                                         // (data up to each period, never revises)
    std::optional<SmootherVariances> variances;  // (no key) given variances: no estimation
    int maxEvaluations = 3000;           // (no key) likelihood evaluations for the optimiser

    void validate() const;  // throws InputError
    int seasonLength() const;  // 0 without seasonal
};

// Period effects with their sampling covariance: an independent part per period, plus an
// optional part shared by all periods, loadings (periods x k) times xi ~ N(0, sharedCov).
struct PeriodEffects {
    std::vector<double> value;     // log period effect; kNoValue: a period without sales
    std::vector<double> variance;  // independent sampling variance of value (>= 0; 0 only
                                   // with irregular); ignored where value has none
    Eigen::MatrixXd loadings;      // empty, or periods x k
    Eigen::MatrixXd sharedCov;     // k x k, positive semi-definite (zero rows allowed)
};

struct BorrowInput {
    PeriodEffects market;             // the whole range's period effects
    PeriodEffects segment;            // the segment's period effects (same periods)
    std::vector<double> covariance;   // covariance of the two sampling errors per period;
                                      // empty: min(h^m, 0.99 sqrt(h^m h^s)) (see above)
};

struct SmootherResult {
    int periods = 0;
    std::vector<double> level, levelVariance;        // smoothed log level (the index's)
    std::vector<double> filtered, filteredVariance;  // real-time; kNoValue until identified
    std::vector<double> trend;      // smoothed mu_t (borrow: the common trend)
    std::vector<double> slope;      // smoothed beta_t (trend model), else empty
    std::vector<double> seasonal;   // smoothed gamma_t (seasonal model), else empty
    std::vector<double> deviation;  // smoothed delta_t (borrow), else empty
    SmootherVariances variances;
    double noiseVariance = kNoValue;  // mean over periods with a value of the target series'
                                      // measurement variance (sampling + irregular)
    double signalToNoise = kNoValue;  // q = (level + slope variance) / noiseVariance
    double logLikelihood = kNoValue;  // diffuse log-likelihood at the variances
    int evaluations = 0;              // likelihood evaluations of the optimiser
    bool estimated = false;           // variances by maximum likelihood (false: given)
    bool realtime = false;            // the options' realtime: which level the index uses
    bool boundary = false;            // a variance ended at a bound of the search
    std::string model;                // "local linear trend + seasonal (12)"
    Diagnostics diag;                 // rowsIn = periods, rowsUsed = periods with a value;
                                      // warnings (boundary, optimiser)
    std::string summary() const;

    // Cov(level_t, level_base | all data) for every t (smoothed covariance, D&K 4.7).
    std::vector<double> levelCovarianceWith(int base) const;

    std::shared_ptr<const statespace::Run> run;  // the final filter/smoother run
    Eigen::VectorXd signal;                      // the level as a combination of the states
};

// Smooths one series of period effects. Throws InputError for bad input or options.
SmootherResult smoothPeriodEffects(const PeriodEffects& input, const SmootherOptions& options);
// The segment's level from market and segment period effects (borrowing strength).
SmootherResult borrowStrength(const BorrowInput& input, const SmootherOptions& options);

// The index table of a smoothed result on the axis the period effects came from:
// index_t = 100 exp(L_t - L_base), L the smoothed level (result.realtime: the filtered level), band
// 100 exp(L_t - L_base -/+ z sd), with
//   smoothed: sd^2 = Var(L_t) + Var(L_base) - 2 Cov(L_t, L_base | all data);
//   realtime: sd^2 = Var(e_t) + Var(e_base) - 2 Cov(e_t, e_base), e_t the error of the
//             filtered level of period t (Cov from the data up to the later of t and base).
// counts: sales (or pairs) per period, shown in the table. options: base, level; minSales
// is not applied (a period without sales has a value).
IndexResult smoothedIndex(const SmootherResult& result, const PeriodAxis& axis,
                          const std::vector<std::size_t>& counts, const IndexOptions& options);

}  // namespace lintel
