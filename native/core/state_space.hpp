// Linear Gaussian state space models with a diffuse initial state: the augmented Kalman
// filter and smoother. The engine behind the structural time series smoother
// (structural_smoother.hpp); not an estimator itself.
//
//     y_t = Z alpha_t + X_t xi + eps_t,       eps_t ~ N(0, H_t)       (p <= 2 series)
//     alpha_{t+1} = T alpha_t + eta_t,        eta_t ~ N(0, diag(q))
//
// Every state of alpha_1 is diffuse (unknown, flat prior: the structural models here have
// only non-stationary states). xi (optional, k entries, constant over time) has a proper
// prior N(0, Sigma_xi): it carries an error component shared by all periods, so that a
// sampling covariance of the form diag(h_t) + X Sigma_xi X' enters exactly (the hedonic
// period effects have this form). A missing y (NaN) is skipped.
//
// Method (augmentation; de Jong 1991, "The diffuse Kalman filter", Annals of Statistics 19;
// Durbin & Koopman 2012, Time Series Analysis by State Space Methods, 2nd ed., the augmented
// filter and smoother of chapter 5 (section number from memory)): gamma = (alpha_1, xi) is
// treated as a fixed vector; an ordinary Kalman filter started at a_1 = 0, P_1 = 0 carries,
// besides the state mean a_t, a matrix W_t with a_t(gamma) = a_t + W_t gamma. The innovations
// are v_t - V_t gamma; S = sum V' F^-1 V and s = sum V' F^-1 v collect the information on
// gamma. With the prior precision Pi = diag(0, Sigma_xi^-1) the posterior of gamma is
// N(Sp^-1 s, Sp^-1), Sp = S + Pi. Results are conditional on gamma and then averaged over
// that posterior, e.g. the smoothed state
//     E(alpha_t | y) = a_t + P_t r_{t-1} + G_t Sp^-1 s,   G_t = W_t - P_t R_{t-1},
//     Var(alpha_t | y) = P_t - P_t N_{t-1} P_t + G_t Sp^-1 G_t',
// where r, N are the usual smoothing recursions (D&K 2012, 4.4) and R is r's gamma part.
// The diffuse log-likelihood (the limit of log L + (d/2) log kappa as the prior variance
// kappa of the d diffuse states grows; D&K's definition) is
//     -1/2 sum_t (p_t log 2 pi + log|F_t| + v_t' F_t^-1 v_t) + 1/2 s' Sp^-1 s
//     - 1/2 log|Sp| - 1/2 log|Sigma_xi|.
// These equal the exact diffuse filter and smoother of D&K ch. 5 (checked against
// statsmodels' use_exact_diffuse=True in tests/reference/test_smoothing_statsmodels.py).
//
// Cost: the transition is applied as a sparse matrix, so a likelihood pass is
// O(n (nnz(T) m + m (m + k))) for n periods and m states.
#pragma once

#include <memory>
#include <vector>

#include <Eigen/Dense>

namespace lintel::statespace {

constexpr int kMaxSeries = 2;

// One non-zero entry of the transition matrix T.
struct Transition {
    int row = 0, col = 0;
    double value = 0;
};

struct Model {
    int states = 0;                      // m
    std::vector<Transition> transition;  // non-zero entries of T (m x m)
    Eigen::MatrixXd design;              // Z: p x m
    Eigen::VectorXd disturbance;         // diagonal of Var(eta_t), m entries (0 = fixed)
    Eigen::VectorXd irregular;           // extra variance added to H_t's diagonal, p entries
};

struct Observations {
    Eigen::MatrixXd y;          // n x p; NaN = missing
    Eigen::MatrixXd variance;   // n x p: diagonal of H_t (without Model::irregular)
    Eigen::VectorXd covariance; // n: H_t(0, 1) when p = 2 (empty: 0)
    Eigen::MatrixXd loadings;   // (n p) x k: row t p + i is X_t's row i; empty: no xi
    Eigen::MatrixXd factorCov;  // Sigma_xi, k x k (positive definite)

    int periods() const { return static_cast<int>(y.rows()); }
    int series() const { return static_cast<int>(y.cols()); }
    int factors() const { return static_cast<int>(loadings.cols()); }
};

// Why a likelihood or a run could not be computed.
enum class Failure {
    None,
    NotPositive,   // a prediction-error variance F_t is not positive definite
    NotIdentified  // Sp is singular: too few observations for the diffuse states
};

// The diffuse log-likelihood only (no storage): the fast path for maximum likelihood.
// Returns false (and sets failure) when it cannot be computed.
bool logLikelihood(const Model& model, const Observations& obs, double& value,
                   Failure* failure = nullptr);

// Mean and variance of a linear combination c' alpha_t for every period; NaN where the
// combination is not identified by the data used (filtered values early in the series).
struct Moments {
    std::vector<double> mean, variance;
};

// A full run: filter, smoother and the quantities that later queries need. Build with
// run(); throws nothing, check failure().
class Run {
public:
    static std::shared_ptr<const Run> run(const Model& model, const Observations& obs);

    Failure failure() const { return failure_; }
    double logLikelihood() const { return logLik_; }
    int periods() const { return n_; }
    int states() const { return m_; }

    Eigen::VectorXd smoothedState(int t) const;
    Eigen::MatrixXd smoothedStateCov(int t) const;
    // E(alpha_t | y_1..y_t) and its variance (the real-time estimate); NaN entries where a
    // state is not identified yet.
    Eigen::VectorXd filteredState(int t) const;
    Eigen::MatrixXd filteredStateCov(int t) const;

    Moments smoothed(const Eigen::VectorXd& c) const;
    Moments filtered(const Eigen::VectorXd& c) const;
    // Cov(c' alpha_t, c' alpha_base | all data) for every t (D&K 2012, 4.7: for j > t,
    // Cov(alpha_t, alpha_j | y) = P_t L_t' ... L_{j-1}' (I - N_{j-1} P_j), plus the gamma part
    // G_t Sp^-1 G_j').
    std::vector<double> smoothedCovarianceWith(const Eigen::VectorXd& c, int base) const;
    // For the real-time estimates f_t = E(c' alpha_t | y_1..y_t): Cov(e_t, e_base) of their
    // errors e_t = c' alpha_t - f_t for every t. Since e_t is orthogonal to y_1..y_t, this is
    // Cov(c' alpha_t, c' alpha_base | y_1..y_max(t, base)): the cross-covariance above for a
    // smoother run on the data up to max(t, base). NaN where not identified.
    std::vector<double> filteredCovarianceWith(const Eigen::VectorXd& c, int base) const;

    struct Period {  // per-period filter and smoother quantities (D&K notation)
        Eigen::VectorXd a;         // predicted state mean (gamma = 0)
        Eigen::MatrixXd W, P;      // gamma part of the mean; predicted variance
        std::vector<int> observed; // series observed in this period
        Eigen::MatrixXd Zo;        // rows of Z for the observed series
        Eigen::VectorXd v, Finvv;  // innovations and F^-1 v
        Eigen::MatrixXd V, FinvV, Finv, K, L;  // gamma part, F^-1 V, F^-1, gain T P Z' F^-1, T - K Z
        Eigen::MatrixXd S;         // information on gamma from periods 0..t
        Eigen::VectorXd s;
        Eigen::VectorXd r;         // r_{t-1}, R_{t-1}, N_{t-1}: smoothing recursions
        Eigen::MatrixXd R, N;
        Eigen::MatrixXd G;         // W_t - P_t R_{t-1}: the gamma part of the smoothed state
    };

private:
    Run() = default;
    // Posterior of gamma given Sp and s: mean, covariance (pseudo-inverse when singular) and,
    // for the identification check, Sp scaled to unit diagonal (C = D Sp D, D = diag(scale))
    // and C's null space (columns).
    struct GammaPosterior {
        Eigen::VectorXd mean;
        Eigen::MatrixXd cov;
        Eigen::VectorXd scale;
        Eigen::MatrixXd nullSpace;
        // g' gamma is identified when D g is orthogonal to C's null space.
        bool identifies(const Eigen::VectorXd& g) const;
    };
    static GammaPosterior posterior(const Eigen::MatrixXd& Sp, const Eigen::VectorXd& s);
    void filteredPieces(int t, Eigen::VectorXd& af, Eigen::MatrixXd& Gf, Eigen::MatrixXd& Pf,
                        GammaPosterior& post) const;

    Failure failure_ = Failure::None;
    double logLik_ = 0;
    int n_ = 0, m_ = 0, q_ = 0, k_ = 0;
    std::vector<Period> per_;
    Eigen::MatrixXd prior_;             // Pi: (q + k) square
    GammaPosterior all_;                // posterior of gamma from all data
    Eigen::MatrixXd Tdense_;
};

}  // namespace lintel::statespace
