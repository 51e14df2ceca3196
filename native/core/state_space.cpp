#include "state_space.hpp"

#include <cmath>
#include <limits>

namespace lintel::statespace {

namespace {

using Eigen::Index;
using Eigen::MatrixXd;
using Eigen::VectorXd;

constexpr double kLog2Pi = 1.8378770664093454836;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::size_t at(int i) { return static_cast<std::size_t>(i); }

// out = T x (x: m x cols), with T given by its non-zero entries.
template <typename In, typename Out>
void applyT(const std::vector<Transition>& T, const In& x, Out& out) {
    out.setZero();
    for (const Transition& e : T) out.row(e.row) += e.value * x.row(e.col);
}

// out = T' x.
template <typename In, typename Out>
void applyTt(const std::vector<Transition>& T, const In& x, Out& out) {
    out.setZero();
    for (const Transition& e : T) out.row(e.col) += e.value * x.row(e.row);
}

// Cholesky of a 1x1 or 2x2 prediction-error variance: inverse and log-determinant.
bool invertSmall(const MatrixXd& F, MatrixXd& Finv, double& logDet) {
    if (F.rows() == 1) {
        const double f = F(0, 0);
        if (!(f > 0) || !std::isfinite(f)) return false;
        Finv.resize(1, 1);
        Finv(0, 0) = 1.0 / f;
        logDet = std::log(f);
        return true;
    }
    const double a = F(0, 0), b = 0.5 * (F(0, 1) + F(1, 0)), d = F(1, 1);
    const double det = a * d - b * b;
    // Relative test: a 2x2 whose determinant is lost in rounding counts as singular.
    if (!(a > 0) || !(d > 0) || !(det > 1e-14 * a * d) || !std::isfinite(det)) return false;
    Finv.resize(2, 2);
    Finv << d / det, -b / det, -b / det, a / det;
    logDet = std::log(det);
    return true;
}

// Prior precision Pi of gamma = (alpha_1, xi) and log|Sigma_xi|.
bool priorPrecision(int q, const Observations& obs, MatrixXd& Pi, double& logDetFactor) {
    const int k = obs.factors();
    Pi = MatrixXd::Zero(q + k, q + k);
    logDetFactor = 0;
    if (k == 0) return true;
    Eigen::LLT<MatrixXd> llt(obs.factorCov);
    if (llt.info() != Eigen::Success) return false;
    Pi.bottomRightCorner(k, k) = llt.solve(MatrixXd::Identity(k, k));
    logDetFactor = 2.0 * llt.matrixLLT().diagonal().array().log().sum();
    return true;
}

// log|Sp| and s' Sp^-1 s; false when Sp is not positive definite to working precision.
bool finishLikelihood(const MatrixXd& Sp, const VectorXd& s, double& logDet, double& quad) {
    if (Sp.rows() == 0) {
        logDet = quad = 0;
        return true;
    }
    // Scale to unit diagonal first: the information on the diffuse states can differ by many
    // orders of magnitude between states (level vs slope).
    const VectorXd d = Sp.diagonal();
    if ((d.array() <= 0).any()) return false;
    const VectorXd scale = d.array().rsqrt();
    const MatrixXd C = scale.asDiagonal() * Sp * scale.asDiagonal();
    Eigen::LDLT<MatrixXd> ldlt(C);
    if (ldlt.info() != Eigen::Success) return false;
    const VectorXd D = ldlt.vectorD();
    if ((D.array() <= 1e-11).any()) return false;
    logDet = D.array().log().sum() - 2.0 * scale.array().log().sum();
    const VectorXd cs = scale.asDiagonal() * s;
    quad = cs.dot(ldlt.solve(cs));
    return true;
}

// The observed series of period t, their rows of Z, y, H (with the irregular) and X.
struct ObservedRows {
    int count = 0;
    int which[kMaxSeries] = {0, 0};
};

ObservedRows observedIn(const Observations& obs, int t) {
    ObservedRows o;
    for (int i = 0; i < obs.series(); ++i)
        if (std::isfinite(obs.y(t, i))) o.which[o.count++] = i;
    return o;
}

}  // namespace

namespace {
// What a forward pass returns: the log-likelihood terms and the information on gamma.
struct Forward {
    double logLik = 0;
    MatrixXd S;
    VectorXd s;
    Failure failure = Failure::None;
    bool collapsed = false;  // S and s already spent (fastForward): logLik is complete
};

// The forward pass of the full run: the Kalman filter in the predicted form of D&K 4.3, storing
// every period's quantities for the smoother and the real-time estimates. One recursion over
// the periods, kept in one piece so that it reads as D&K's equations.
Forward forwardPass(const Model& M, const Observations& obs, std::vector<Run::Period>* store) {
    const int n = obs.periods(), m = M.states, k = obs.factors(), q = m, c = q + k;
    Forward f;
    f.S = MatrixXd::Zero(c, c);
    f.s = VectorXd::Zero(c);
    VectorXd a = VectorXd::Zero(m), a2(m);
    MatrixXd W = MatrixXd::Zero(m, c), W2(m, c);
    W.leftCols(q).setIdentity();
    MatrixXd P = MatrixXd::Zero(m, m), TP(m, m), P2(m, m);
    MatrixXd Zo(kMaxSeries, m), ZP(kMaxSeries, m), F(kMaxSeries, kMaxSeries), Finv, TM(m, kMaxSeries);
    MatrixXd K(m, kMaxSeries), V(kMaxSeries, c), FinvV(kMaxSeries, c);
    VectorXd v(kMaxSeries), Finvv(kMaxSeries);
    const VectorXd& qd = M.disturbance;
    if (store) store->assign(static_cast<std::size_t>(n), Run::Period{});

    for (int t = 0; t < n; ++t) {
        Run::Period* rec = store ? &(*store)[static_cast<std::size_t>(t)] : nullptr;
        if (rec) {
            rec->a = a;
            rec->W = W;
            rec->P = P;
        }
        const ObservedRows o = observedIn(obs, t);
        const int po = o.count;
        if (po > 0) {
            Zo.resize(po, m);
            v.resize(po);
            V.resize(po, c);
            F.resize(po, po);
            for (int i = 0; i < po; ++i) {
                const int sIdx = o.which[i];
                Zo.row(i) = M.design.row(sIdx);
                v(i) = obs.y(t, sIdx) - M.design.row(sIdx).dot(a);
            }
            V.noalias() = Zo * W;
            if (k > 0)
                for (int i = 0; i < po; ++i)
                    V.row(i).tail(k) += obs.loadings.row(Index(t) * obs.series() + o.which[i]);
            ZP.resize(po, m);
            ZP.noalias() = Zo * P;
            F.noalias() = ZP * Zo.transpose();
            for (int i = 0; i < po; ++i) {
                const int si = o.which[i];
                F(i, i) += obs.variance(t, si) + M.irregular(si);
                for (int j = 0; j < po; ++j)
                    if (j != i && obs.covariance.size() > 0) F(i, j) += obs.covariance(t);
            }
            double logDet = 0;
            if (!invertSmall(F, Finv, logDet)) {
                f.failure = Failure::NotPositive;
                return f;
            }
            Finvv.resize(po);
            Finvv.noalias() = Finv * v;
            FinvV.resize(po, c);
            FinvV.noalias() = Finv * V;
            f.logLik -= 0.5 * (po * kLog2Pi + logDet + v.dot(Finvv));
            f.S.noalias() += V.transpose() * FinvV;
            f.s.noalias() += V.transpose() * Finvv;
            // Gain K = T P Z' F^-1 (the "predicted" form of D&K 4.3).
            TM.resize(m, po);
            applyT(M.transition, ZP.transpose(), TM);
            K.resize(m, po);
            K.noalias() = TM * Finv;
            applyT(M.transition, a, a2);
            a2.noalias() += K * v;
            applyT(M.transition, W, W2);
            W2.noalias() -= K * V;
            if (rec) {
                rec->observed.assign(o.which, o.which + po);
                rec->Zo = Zo;
                rec->v = v;
                rec->Finvv = Finvv;
                rec->V = V;
                rec->FinvV = FinvV;
                rec->Finv = Finv;
                rec->K = K;
            }
            // P_{t+1} = T P T' - K F K' + Q = T P T' - TM F^-1 TM' + Q.
            applyT(M.transition, P, TP);
            applyT(M.transition, TP.transpose(), P2);
            P2.noalias() -= K * TM.transpose();
        } else {
            applyT(M.transition, a, a2);
            applyT(M.transition, W, W2);
            applyT(M.transition, P, TP);
            applyT(M.transition, TP.transpose(), P2);
        }
        P2.diagonal() += qd;
        P = 0.5 * (P2 + P2.transpose());
        a.swap(a2);
        W.swap(W2);
        if (rec) {
            rec->S = f.S;
            rec->s = f.s;
        }
    }
    return f;
}
}  // namespace

// The likelihood-only pass, written for speed (it runs a few hundred times per maximum
// likelihood fit): the observations of a period are processed one at a time (the univariate
// treatment of D&K 2012, 6.4; two correlated series are first decorrelated with the unit
// lower-triangular factor of H_t, which leaves the likelihood unchanged), in the filtered
// form a_{t|t} = a_t + M v / F, M = P z, with row-major raw loops and the sparse T.
// Without shared factors the augmentation is collapsed as soon as the data identify the
// diffuse states (de Jong & Chu-Chun-Lin 1994, Biometrika 81, from memory): the predicted
// state becomes a + W gamma_hat with variance P + W S^-1 W', the likelihood gets its diffuse
// term 1/2 s' S^-1 s - 1/2 log|S|, and the filter continues without W and S (the likelihood
// factorises into the diffuse part up to t and the ordinary conditional part after t).
namespace {
// Tries the collapse; false when S is not yet safely positive definite.
bool collapse(int m, int c, std::vector<double>& a, std::vector<double>& W, std::vector<double>& P,
              const std::vector<double>& S, const std::vector<double>& s, double& logLik) {
    MatrixXd Sm(c, c);
    VectorXd sv(c);
    for (int r = 0; r < c; ++r) {
        sv(r) = s[at(r)];
        for (int l = 0; l <= r; ++l) Sm(r, l) = Sm(l, r) = S[at(r * c + l)];
    }
    const VectorXd d = Sm.diagonal();
    if (!((d.array() > 0).all())) return false;
    const VectorXd scale = d.array().rsqrt();
    Eigen::LDLT<MatrixXd> ldlt(scale.asDiagonal() * Sm * scale.asDiagonal());
    // A margin well above the final identification test: collapsing on a barely identified
    // S would put huge variances into P and lose digits later.
    if (ldlt.info() != Eigen::Success || !((ldlt.vectorD().array() > 1e-6).all())) return false;
    const VectorXd g = scale.asDiagonal() * ldlt.solve(scale.asDiagonal() * sv);
    const MatrixXd Wm = Eigen::Map<const Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic,
                                                       Eigen::RowMajor>>(W.data(), m, c);
    const MatrixXd SinvWt = scale.asDiagonal() * ldlt.solve(scale.asDiagonal() * Wm.transpose());
    const VectorXd shift = Wm * g;
    const MatrixXd add = Wm * SinvWt;
    for (int i = 0; i < m; ++i) {
        a[at(i)] += shift(i);
        for (int j = 0; j < m; ++j) P[at(i * m + j)] += 0.5 * (add(i, j) + add(j, i));
    }
    const double logDet = ldlt.vectorD().array().log().sum() - 2.0 * scale.array().log().sum();
    logLik += 0.5 * sv.dot(g) - 0.5 * logDet;
    return true;
}

// One piece on purpose: the inner loop of maximum likelihood (a few hundred calls per fit).
Forward fastForward(const Model& Mo, const Observations& obs) {
    const int n = obs.periods(), m = Mo.states, k = obs.factors(), q = m, c = q + k;
    const int p = obs.series();
    Forward f;
    std::vector<double> a(at(m), 0.0), a2(at(m)), W(at(m * c), 0.0), W2(at(m * c));
    std::vector<double> P(at(m * m), 0.0), TP(at(m * m)), P2(at(m * m));
    std::vector<double> S(at(c * c), 0.0), s(at(c), 0.0), M(at(m)), V(at(c));
    std::vector<double> z[kMaxSeries], x[kMaxSeries];
    for (int i = 0; i < m; ++i) W[at(i * c + i)] = 1.0;  // W_1 = [I, 0]
    const double* q2 = Mo.disturbance.data();
    int cw = c;        // width of the augmentation still carried (0 once collapsed)
    int seen = 0;      // observations so far

    for (int t = 0; t < n; ++t) {
        // Observed elements of this period: rows z, loadings x, value y, variance h.
        int count = 0;
        double yv[kMaxSeries], hv[kMaxSeries];
        int which[kMaxSeries];
        for (int i = 0; i < p; ++i)
            if (std::isfinite(obs.y(t, i))) which[count++] = i;
        for (int e = 0; e < count; ++e) {
            const int si = which[e];
            z[e].assign(at(m), 0.0);
            for (int j = 0; j < m; ++j) z[e][at(j)] = Mo.design(si, j);
            x[e].assign(at(k), 0.0);
            for (int j = 0; j < k; ++j) x[e][at(j)] = obs.loadings(Index(t) * p + si, j);
            yv[e] = obs.y(t, si);
            hv[e] = obs.variance(t, si) + Mo.irregular(si);
        }
        if (count == 2 && obs.covariance.size() > 0 && obs.covariance(t) != 0) {
            const double cv = obs.covariance(t);
            if (!(hv[0] > 0)) {
                f.failure = Failure::NotPositive;
                return f;
            }
            const double l = cv / hv[0];
            for (int j = 0; j < m; ++j) z[1][at(j)] -= l * z[0][at(j)];
            for (int j = 0; j < k; ++j) x[1][at(j)] -= l * x[0][at(j)];
            yv[1] -= l * yv[0];
            hv[1] -= l * cv;
        }
        for (int e = 0; e < count; ++e) {
            const double* ze = z[e].data();
            double F = hv[e], v = yv[e];
            for (int i = 0; i < m; ++i) {
                double mi = 0;
                const double* Pi = &P[at(i * m)];
                for (int j = 0; j < m; ++j) mi += Pi[j] * ze[j];
                M[at(i)] = mi;
            }
            for (int j = 0; j < m; ++j) {
                F += ze[j] * M[at(j)];
                v -= ze[j] * a[at(j)];
            }
            if (!(F > 0) || !std::isfinite(F)) {
                f.failure = Failure::NotPositive;
                return f;
            }
            for (int l = 0; l < cw; ++l) V[at(l)] = l >= q ? x[e][at(l - q)] : 0.0;
            for (int j = 0; j < m && cw > 0; ++j) {
                if (ze[j] == 0) continue;
                const double* Wj = &W[at(j * c)];
                for (int l = 0; l < c; ++l) V[at(l)] += ze[j] * Wj[l];
            }
            const double Finv = 1.0 / F;
            f.logLik -= 0.5 * (kLog2Pi + std::log(F) + v * v * Finv);
            ++seen;
            for (int r = 0; r < cw; ++r) {
                const double vr = V[at(r)] * Finv;
                if (vr == 0) continue;
                s[at(r)] += vr * v;
                double* Sr = &S[at(r * c)];
                for (int l = 0; l <= r; ++l) Sr[l] += vr * V[at(l)];
            }
            for (int i = 0; i < m; ++i) {
                const double g = M[at(i)] * Finv;
                if (g == 0) continue;
                a[at(i)] += g * v;
                double* Wi = &W[at(i * c)];
                for (int l = 0; l < cw; ++l) Wi[l] -= g * V[at(l)];
                double* Pi = &P[at(i * m)];
                for (int j = 0; j < m; ++j) Pi[j] -= g * M[at(j)];
            }
        }
        // Time update: a = T a, W = T W, P = T P T' + Q.
        std::fill(a2.begin(), a2.end(), 0.0);
        std::fill(W2.begin(), W2.end(), 0.0);
        std::fill(TP.begin(), TP.end(), 0.0);
        for (const Transition& e : Mo.transition) {
            a2[at(e.row)] += e.value * a[at(e.col)];
            const double* Wc = &W[at(e.col * c)];
            double* Wr = &W2[at(e.row * c)];
            for (int l = 0; l < cw; ++l) Wr[l] += e.value * Wc[l];
            const double* Pc = &P[at(e.col * m)];
            double* Tr = &TP[at(e.row * m)];
            for (int j = 0; j < m; ++j) Tr[j] += e.value * Pc[j];
        }
        // P2 = (T P) T' = T (T P)': transpose T P, then the same row operations.
        for (int r = 0; r < m; ++r)
            for (int j = 0; j < m; ++j) P[at(j * m + r)] = TP[at(r * m + j)];
        std::fill(P2.begin(), P2.end(), 0.0);
        for (const Transition& e : Mo.transition) {
            const double* Pc = &P[at(e.col * m)];
            double* Pr = &P2[at(e.row * m)];
            for (int j = 0; j < m; ++j) Pr[j] += e.value * Pc[j];
        }
        for (int i = 0; i < m; ++i) {
            P2[at(i * m + i)] += q2[i];
            for (int j = 0; j < i; ++j) {
                const double avg = 0.5 * (P2[at(i * m + j)] + P2[at(j * m + i)]);
                P2[at(i * m + j)] = P2[at(j * m + i)] = avg;
            }
        }
        a.swap(a2);
        W.swap(W2);
        P.swap(P2);
        if (cw > 0 && k == 0 && seen >= q && collapse(m, c, a, W, P, S, s, f.logLik)) {
            cw = 0;
            f.collapsed = true;
        }
    }
    if (f.collapsed) return f;
    f.S = MatrixXd::Zero(c, c);
    f.s = VectorXd::Zero(c);
    for (int r = 0; r < c; ++r) {
        f.s(r) = s[at(r)];
        for (int l = 0; l <= r; ++l) f.S(r, l) = f.S(l, r) = S[at(r * c + l)];
    }
    return f;
}
}  // namespace

bool logLikelihood(const Model& model, const Observations& obs, double& value, Failure* failure) {
    MatrixXd Pi;
    double logDetFactor = 0;
    auto fail = [&](Failure why) {
        if (failure) *failure = why;
        value = -std::numeric_limits<double>::infinity();
        return false;
    };
    if (!priorPrecision(model.states, obs, Pi, logDetFactor)) return fail(Failure::NotPositive);
    Forward f = fastForward(model, obs);
    if (f.failure != Failure::None) return fail(f.failure);
    double logDet = 0, quad = 0;
    if (!f.collapsed && !finishLikelihood(f.S + Pi, f.s, logDet, quad))
        return fail(Failure::NotIdentified);
    value = f.logLik + 0.5 * quad - 0.5 * logDet - 0.5 * logDetFactor;
    if (!std::isfinite(value)) return fail(Failure::NotPositive);
    if (failure) *failure = Failure::None;
    return true;
}

Run::GammaPosterior Run::posterior(const MatrixXd& Sp, const VectorXd& s) {
    GammaPosterior g;
    const Index c = Sp.rows();
    if (c == 0) {
        g.mean = VectorXd();
        g.cov = MatrixXd();
        g.nullSpace = MatrixXd(0, 0);
        g.scale = VectorXd();
        return g;
    }
    // Symmetric scaling to unit diagonal, then an eigen-decomposition: directions whose
    // scaled eigenvalue is below 1e-10 of the largest carry no information (not identified).
    VectorXd d = Sp.diagonal();
    VectorXd scale(c);
    for (Index i = 0; i < c; ++i) scale(i) = d(i) > 0 ? 1.0 / std::sqrt(d(i)) : 1.0;
    const MatrixXd C = scale.asDiagonal() * Sp * scale.asDiagonal();
    Eigen::SelfAdjointEigenSolver<MatrixXd> es(C);
    const VectorXd& ev = es.eigenvalues();
    const double top = ev.size() ? std::max(ev.maxCoeff(), 0.0) : 0.0;
    const double tol = 1e-10 * std::max(top, 1e-300);
    MatrixXd inv = MatrixXd::Zero(c, c);
    std::vector<Index> nulls;
    for (Index i = 0; i < c; ++i) {
        if (ev(i) > tol) inv.noalias() += es.eigenvectors().col(i) * es.eigenvectors().col(i).transpose() / ev(i);
        else nulls.push_back(i);
    }
    g.cov = scale.asDiagonal() * inv * scale.asDiagonal();
    g.mean = g.cov * s;
    g.scale = scale;
    g.nullSpace.resize(c, static_cast<Index>(nulls.size()));
    for (std::size_t j = 0; j < nulls.size(); ++j)
        g.nullSpace.col(static_cast<Index>(j)) = es.eigenvectors().col(nulls[j]);
    return g;
}

std::shared_ptr<const Run> Run::run(const Model& M, const Observations& obs) {
    std::shared_ptr<Run> r(new Run());
    r->n_ = obs.periods();
    r->m_ = M.states;
    r->q_ = M.states;
    r->k_ = obs.factors();
    double logDetFactor = 0;
    if (!priorPrecision(r->q_, obs, r->prior_, logDetFactor)) {
        r->failure_ = Failure::NotPositive;
        return r;
    }
    Forward f = forwardPass(M, obs, &r->per_);
    if (f.failure != Failure::None) {
        r->failure_ = f.failure;
        return r;
    }
    const MatrixXd Sp = f.S + r->prior_;
    double logDet = 0, quad = 0;
    if (!finishLikelihood(Sp, f.s, logDet, quad)) {
        r->failure_ = Failure::NotIdentified;
        return r;
    }
    r->logLik_ = f.logLik + 0.5 * quad - 0.5 * logDet - 0.5 * logDetFactor;
    r->all_ = posterior(Sp, f.s);

    const int m = r->m_, c = r->q_ + r->k_;
    r->Tdense_ = MatrixXd::Zero(m, m);
    for (const Transition& e : M.transition) r->Tdense_(e.row, e.col) += e.value;
    const MatrixXd Tt = r->Tdense_.transpose();

    // Backward smoothing recursions (D&K 2012, 4.4), with R = the gamma part of r.
    VectorXd rr = VectorXd::Zero(m);
    MatrixXd RR = MatrixXd::Zero(m, c), NN = MatrixXd::Zero(m, m);
    for (int t = r->n_ - 1; t >= 0; --t) {
        Period& p = r->per_[static_cast<std::size_t>(t)];
        if (!p.observed.empty()) {
            p.L = r->Tdense_ - p.K * p.Zo;
            const MatrixXd Lt = p.L.transpose();
            rr = p.Zo.transpose() * p.Finvv + Lt * rr;
            RR = p.Zo.transpose() * p.FinvV + Lt * RR;
            NN = p.Zo.transpose() * p.Finv * p.Zo + Lt * NN * p.L;
        } else {
            p.L = r->Tdense_;
            rr = Tt * rr;
            RR = Tt * RR;
            NN = Tt * NN * r->Tdense_;
        }
        NN = 0.5 * (NN + NN.transpose());
        p.r = rr;
        p.R = RR;
        p.N = NN;
        p.G = p.W - p.P * RR;
    }
    return r;
}

VectorXd Run::smoothedState(int t) const {
    const Period& p = per_[static_cast<std::size_t>(t)];
    return p.a + p.P * p.r + p.G * all_.mean;
}

MatrixXd Run::smoothedStateCov(int t) const {
    const Period& p = per_[static_cast<std::size_t>(t)];
    MatrixXd V = p.P - p.P * p.N * p.P + p.G * all_.cov * p.G.transpose();
    return 0.5 * (V + V.transpose());
}

void Run::filteredPieces(int t, VectorXd& af, MatrixXd& Gf, MatrixXd& Pf,
                         GammaPosterior& post) const {
    const Period& p = per_[static_cast<std::size_t>(t)];
    post = posterior(p.S + prior_, p.s);
    if (p.observed.empty()) {
        af = p.a;
        Gf = p.W;
        Pf = p.P;
        return;
    }
    // alpha_{t|t} = a_t + P_t Z' F^-1 v_t (D&K 4.3, "contemporaneous" form).
    const MatrixXd PZ = p.P * p.Zo.transpose();
    af = p.a + PZ * p.Finvv;
    Gf = p.W - PZ * p.FinvV;
    Pf = p.P - PZ * p.Finv * PZ.transpose();
}

bool Run::GammaPosterior::identifies(const VectorXd& g) const {
    if (nullSpace.cols() == 0) return true;
    const VectorXd scaled = scale.asDiagonal() * g;
    const double norm = scaled.norm();
    return norm == 0 || (nullSpace.transpose() * scaled).norm() <= 1e-7 * norm;
}

VectorXd Run::filteredState(int t) const {
    VectorXd af;
    MatrixXd Gf, Pf;
    GammaPosterior post;
    filteredPieces(t, af, Gf, Pf, post);
    VectorXd out = af + Gf * post.mean;
    for (int i = 0; i < m_; ++i)
        if (!post.identifies(Gf.row(i).transpose())) out(i) = kNaN;
    return out;
}

MatrixXd Run::filteredStateCov(int t) const {
    VectorXd af;
    MatrixXd Gf, Pf;
    GammaPosterior post;
    filteredPieces(t, af, Gf, Pf, post);
    MatrixXd V = Pf + Gf * post.cov * Gf.transpose();
    V = 0.5 * (V + V.transpose());
    for (int i = 0; i < m_; ++i)
        if (!post.identifies(Gf.row(i).transpose())) {
            V.row(i).setConstant(kNaN);
            V.col(i).setConstant(kNaN);
        }
    return V;
}

Moments Run::smoothed(const VectorXd& c) const {
    Moments out;
    out.mean.resize(static_cast<std::size_t>(n_));
    out.variance.resize(static_cast<std::size_t>(n_));
    for (int t = 0; t < n_; ++t) {
        const Period& p = per_[static_cast<std::size_t>(t)];
        const VectorXd g = p.G.transpose() * c;
        const VectorXd Pc = p.P * c;
        out.mean[static_cast<std::size_t>(t)] = c.dot(p.a + p.P * p.r) + g.dot(all_.mean);
        out.variance[static_cast<std::size_t>(t)] =
            c.dot(Pc) - Pc.dot(p.N * Pc) + g.dot(all_.cov * g);
    }
    return out;
}

Moments Run::filtered(const VectorXd& c) const {
    Moments out;
    out.mean.assign(static_cast<std::size_t>(n_), kNaN);
    out.variance.assign(static_cast<std::size_t>(n_), kNaN);
    for (int t = 0; t < n_; ++t) {
        const Period& p = per_[static_cast<std::size_t>(t)];
        VectorXd af = p.a;
        VectorXd g = p.W.transpose() * c;
        double pvar = c.dot(p.P * c);
        if (!p.observed.empty()) {
            const MatrixXd PZ = p.P * p.Zo.transpose();
            const VectorXd cPZ = PZ.transpose() * c;
            af += PZ * p.Finvv;
            g -= p.FinvV.transpose() * cPZ;
            pvar -= cPZ.dot(p.Finv * cPZ);
        }
        // g' Sp_t^-1 s_t and g' Sp_t^-1 g: a Cholesky solve once the data identify every
        // diffuse state, else the pseudo-inverse with the identification check.
        const MatrixXd Sp = p.S + prior_;
        const VectorXd d = Sp.diagonal();
        double gm = 0, gv = 0;
        bool done = false;
        if ((d.array() > 0).all()) {
            const VectorXd scale = d.array().rsqrt();
            Eigen::LDLT<MatrixXd> ldlt(scale.asDiagonal() * Sp * scale.asDiagonal());
            if (ldlt.info() == Eigen::Success && (ldlt.vectorD().array() > 1e-10).all()) {
                const VectorXd x = scale.asDiagonal() * ldlt.solve(scale.asDiagonal() * g);
                gm = x.dot(p.s);
                gv = g.dot(x);
                done = true;
            }
        }
        if (!done) {
            const GammaPosterior post = posterior(Sp, p.s);
            if (!post.identifies(g)) continue;
            gm = g.dot(post.mean);
            gv = g.dot(post.cov * g);
        }
        out.mean[static_cast<std::size_t>(t)] = c.dot(af) + gm;
        out.variance[static_cast<std::size_t>(t)] = pvar + gv;
    }
    return out;
}

std::vector<double> Run::smoothedCovarianceWith(const VectorXd& c, int b) const {
    std::vector<double> out(static_cast<std::size_t>(n_), kNaN);
    auto at = [&](int t) -> const Period& { return per_[static_cast<std::size_t>(t)]; };
    const Period& pb = at(b);
    const VectorXd gb = pb.G.transpose() * c;
    const VectorXd covGb = all_.cov * gb;
    auto gammaPart = [&](int t) { return (at(t).G.transpose() * c).dot(covGb); };
    // t = b: the smoothed variance.
    {
        const VectorXd Pc = pb.P * c;
        out[static_cast<std::size_t>(b)] = c.dot(Pc) - Pc.dot(pb.N * Pc) + gb.dot(covGb);
    }
    // t < b: c' P_t L_t' ... L_{b-1}' (I - N_{b-1} P_b) c.
    VectorXd w = c - pb.N * (pb.P * c);
    for (int t = b - 1; t >= 0; --t) {
        const Period& p = at(t);
        w = p.L.transpose() * w;
        out[static_cast<std::size_t>(t)] = c.dot(p.P * w) + gammaPart(t);
    }
    // t > b: c' P_b L_b' ... L_{t-1}' (I - N_{t-1} P_t) c.
    Eigen::RowVectorXd u = c.transpose() * pb.P;
    for (int t = b + 1; t < n_; ++t) {
        u = u * at(t - 1).L.transpose();
        const Period& p = at(t);
        out[static_cast<std::size_t>(t)] = u.dot(c - p.N * (p.P * c)) + gammaPart(t);
    }
    return out;
}

std::vector<double> Run::filteredCovarianceWith(const VectorXd& c, int b) const {
    std::vector<double> out(static_cast<std::size_t>(n_), kNaN);
    auto at = [&](int t) -> const Period& { return per_[static_cast<std::size_t>(t)]; };
    // Pieces of period t's own update: N^(t)_{t-1} = Z' F^-1 Z and the gamma part of the
    // filtered state, G_{t|t} = W_t - P_t Z' F^-1 V_t.
    auto ownN = [&](const Period& p) {
        return p.observed.empty() ? MatrixXd(MatrixXd::Zero(m_, m_))
                                  : MatrixXd(p.Zo.transpose() * p.Finv * p.Zo);
    };
    auto filteredG = [&](const Period& p) {
        return p.observed.empty() ? MatrixXd(p.W)
                                  : MatrixXd(p.W - p.P * p.Zo.transpose() * p.FinvV);
    };
    auto gammaPart = [&](const GammaPosterior& post, const VectorXd& g1, const VectorXd& g2,
                         double& value) {
        if (!post.identifies(g1) || !post.identifies(g2)) return false;
        value = g1.dot(post.cov * g2);
        return true;
    };
    const Period& pb = at(b);
    {  // t = b: the filtered variance.
        const Moments f = filtered(c);
        out[static_cast<std::size_t>(b)] = f.variance[static_cast<std::size_t>(b)];
    }
    // t < b: data up to b. Fixed-gamma part c' P_t L_t' ... L_{b-1}' (I - N^(b)_{b-1} P_b) c;
    // R^(b) runs backwards from b.
    {
        const GammaPosterior post = posterior(pb.S + prior_, pb.s);
        const VectorXd gb = filteredG(pb).transpose() * c;
        VectorXd w = c - ownN(pb) * (pb.P * c);
        MatrixXd R = pb.observed.empty() ? MatrixXd(MatrixXd::Zero(m_, q_ + k_))
                                         : MatrixXd(pb.Zo.transpose() * pb.FinvV);
        for (int t = b - 1; t >= 0; --t) {
            const Period& p = at(t);
            w = p.L.transpose() * w;
            R = p.L.transpose() * R;
            if (!p.observed.empty()) R += p.Zo.transpose() * p.FinvV;
            const VectorXd gt = (p.W - p.P * R).transpose() * c;
            double gp = 0;
            if (gammaPart(post, gt, gb, gp))
                out[static_cast<std::size_t>(t)] = c.dot(p.P * w) + gp;
        }
    }
    // t > b: data up to t. u_t = c' P_b L_b' ... L_{t-1}'; fixed part u_t (I - N^(t)_{t-1} P_t) c;
    // c' G^(t)_b = c' W_b - sum_{j=b..t} u_j Z_j' F_j^-1 V_j.
    {
        Eigen::RowVectorXd u = c.transpose() * pb.P;
        Eigen::RowVectorXd acc = Eigen::RowVectorXd::Zero(q_ + k_);
        if (!pb.observed.empty()) acc += u * pb.Zo.transpose() * pb.FinvV;
        const Eigen::RowVectorXd cWb = c.transpose() * pb.W;
        for (int t = b + 1; t < n_; ++t) {
            const Period& p = at(t);
            u = u * at(t - 1).L.transpose();
            if (!p.observed.empty()) acc += u * p.Zo.transpose() * p.FinvV;
            const GammaPosterior post = posterior(p.S + prior_, p.s);
            const VectorXd gbt = (cWb - acc).transpose();
            const VectorXd gt = filteredG(p).transpose() * c;
            double gp = 0;
            if (gammaPart(post, gbt, gt, gp))
                out[static_cast<std::size_t>(t)] = u.dot(c - ownN(p) * (p.P * c)) + gp;
        }
    }
    return out;
}

}  // namespace lintel::statespace
