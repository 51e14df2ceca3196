// One fit of the hedonic time-dummy model (Frisch-Waugh-Lovell: the period block eliminated
// by demeaning within periods), its aliased terms and its covariance pieces; the contrast
// weights the chained bands are built from. Formulas and sources in hedonic.hpp.
#include <algorithm>
#include <cmath>

#include "hedonic_internal.hpp"

namespace lintel::hedonic_detail {

namespace {
constexpr double kConstantTol2 = 1e-14;  // (1e-7)^2: R's lm tolerance on column norms
constexpr std::size_t kChunk = 1024;     // rows per block of the demeaned design
}  // namespace

// Rows [a, a + m) of the within-period deviations z~ (into X) and y~ (into yt), with the
// period means of F (the same in every window: they are means over one period's sales).
void demeanedRows(const Design& D, const WindowFit& F, std::size_t a, std::size_t m,
                  MatrixXd& X, VectorXd& yt) {
    fillRaw(D, a, m, X);
    yt.resize(static_cast<Index>(m));
    forRuns(D, a, m, [&](int p, Index s, Index len) {
        if (X.cols() > 0) X.middleRows(s, len).rowwise() -= F.zbar.row(p - F.p0);
        yt.segment(s, len) =
            Eigen::Map<const VectorXd>(D.y.data() + a + s, len).array() - F.ybar(p - F.p0);
    });
}

namespace {

// What the first pass leaves besides the period means: the raw sums of squares of the terms
// and the grand means of ln p and of the terms.
struct GrandMeans {
    VectorXd rawSS, zgrand;
    double grand = 0;
};

// Pass 1: the counts and the period means of ln p and of every term (F.cnt, F.groups,
// F.zbar, F.ybar) over the rows [r0, r1) of the window.
GrandMeans periodMeans(const Design& D, WindowFit& F, std::size_t r0, std::size_t r1) {
    const int p0 = F.p0, P = F.p1 - F.p0 + 1;
    const Index K = D.K();
    F.cnt.resize(static_cast<std::size_t>(P));
    for (int p = p0; p <= F.p1; ++p) {
        F.cnt[p - p0] = D.count(p);
        if (F.cnt[p - p0]) ++F.groups;
    }
    F.zbar = MatrixXd::Zero(P, K);
    F.ybar = VectorXd::Zero(P);
    GrandMeans g;
    g.rawSS = VectorXd::Zero(K);
    MatrixXd X;
    for (std::size_t a = r0; a < r1; a += kChunk) {
        const std::size_t m = std::min(kChunk, r1 - a);
        fillRaw(D, a, m, X);
        g.rawSS += X.colwise().squaredNorm().transpose();
        forRuns(D, a, m, [&](int p, Index s, Index len) {
            if (K > 0) F.zbar.row(p - p0) += X.middleRows(s, len).colwise().sum();
            F.ybar(p - p0) += Eigen::Map<const VectorXd>(D.y.data() + a + s, len).sum();
        });
    }
    g.zgrand = VectorXd::Zero(K);
    for (int i = 0; i < P; ++i) {
        if (!F.cnt[i]) continue;
        g.grand += F.ybar(i);
        if (K > 0) {
            g.zgrand += F.zbar.row(i).transpose();
            F.zbar.row(i) /= static_cast<double>(F.cnt[i]);
        }
        F.ybar(i) /= static_cast<double>(F.cnt[i]);
    }
    g.grand /= static_cast<double>(F.n);
    g.zgrand /= static_cast<double>(F.n);
    return g;
}

// Pass 2: A = Z~'Z~ and c = Z~'y~ of the within-period deviations; F.tss (within plus between
// sums of squares of ln p).
void crossProducts(const Design& D, WindowFit& F, std::size_t r0, std::size_t r1, double grand,
                   MatrixXd& A, VectorXd& c) {
    const Index K = D.K();
    A = MatrixXd::Zero(K, K);
    c = VectorXd::Zero(K);
    MatrixXd X;
    VectorXd yt;
    double yWithin = 0;
    for (std::size_t a = r0; a < r1; a += kChunk) {
        const std::size_t m = std::min(kChunk, r1 - a);
        demeanedRows(D, F, a, m, X, yt);
        if (K > 0) {  // no terms left (all dropped): Eigen's products of empty matrices are UB
            A.selfadjointView<Eigen::Lower>().rankUpdate(X.transpose());
            c.noalias() += X.transpose() * yt;
        }
        yWithin += yt.squaredNorm();
    }
    A = A.selfadjointView<Eigen::Lower>();
    F.tss = yWithin;
    for (std::size_t i = 0; i < F.cnt.size(); ++i)
        if (F.cnt[i]) {
            const auto at = static_cast<Index>(i);
            F.tss += static_cast<double>(F.cnt[i]) * (F.ybar(at) - grand) * (F.ybar(at) - grand);
        }
}

// Aliased terms. (1) No variation within periods: constant, or a function of the period.
// (2) Sequentially, in column order, on the Jacobi-scaled A: a pivot below the tolerance
// means the term's within-period variation is (nearly) a combination of the earlier kept
// terms'. The pivots come from the Cholesky factor of the kept block, extended one row at a
// time with Eigen's triangular solve. Sets F.keep and F.dropped; returns the kept terms and
// their scale 1 / sqrt(A_jj).
std::vector<Index> keptTerms(const Design& D, WindowFit& F, const MatrixXd& A,
                             const GrandMeans& g, double tolerance, VectorXd& scale) {
    const Index K = D.K();
    F.keep.assign(static_cast<std::size_t>(K), 0);
    scale = VectorXd::Zero(K);
    std::vector<Index> idx;
    MatrixXd L = MatrixXd::Zero(K, K);
    for (Index j = 0; j < K; ++j) {
        const double within = A(j, j);
        if (!(within > kConstantTol2 * g.rawSS(j))) {
            double between = 0;
            for (std::size_t i = 0; i < F.cnt.size(); ++i)
                if (F.cnt[i])
                    between += static_cast<double>(F.cnt[i]) *
                               std::pow(F.zbar(static_cast<Index>(i), j) - g.zgrand(j), 2);
            const bool constant = F.groups == 1 || !(between > kConstantTol2 * g.rawSS(j));
            F.dropped.push_back({D.terms[static_cast<std::size_t>(j)].name,
                                 constant ? "constant" : "constant within periods"});
            continue;
        }
        scale(j) = 1.0 / std::sqrt(within);
        const Index m = static_cast<Index>(idx.size());
        double pivot = 1.0;
        VectorXd l;
        if (m > 0) {
            VectorXd v(m);
            for (Index i = 0; i < m; ++i) v(i) = A(idx[i], j) * scale(idx[i]) * scale(j);
            l = L.topLeftCorner(m, m).triangularView<Eigen::Lower>().solve(v);
            pivot = 1.0 - l.squaredNorm();
        }
        if (!(pivot > tolerance)) {
            F.dropped.push_back(
                {D.terms[static_cast<std::size_t>(j)].name, "collinear with earlier terms"});
            continue;
        }
        if (m > 0) L.row(m).head(m) = l.transpose();
        L(m, m) = std::sqrt(pivot);
        idx.push_back(j);
        F.keep[static_cast<std::size_t>(j)] = 1;
    }
    return idx;
}

// b and A^-1 of the kept terms from Eigen's LDLT of the Jacobi-scaled block (zero for the
// dropped terms).
void solveKept(WindowFit& F, const MatrixXd& A, const VectorXd& c, const std::vector<Index>& idx,
               const VectorXd& scale) {
    const Index K = A.rows();
    F.kept = static_cast<Index>(idx.size());
    F.b = VectorXd::Zero(K);
    F.Ainv = MatrixXd::Zero(K, K);
    if (F.kept == 0) return;
    const Index m = F.kept;
    MatrixXd As(m, m);
    VectorXd cs(m);
    for (Index i = 0; i < m; ++i) {
        cs(i) = c(idx[i]) * scale(idx[i]);
        for (Index k = 0; k < m; ++k) As(i, k) = A(idx[i], idx[k]) * scale(idx[i]) * scale(idx[k]);
    }
    const Eigen::LDLT<MatrixXd> ldlt = As.ldlt();
    const VectorXd bs = ldlt.solve(cs);
    const MatrixXd inv = ldlt.solve(MatrixXd::Identity(m, m));
    for (Index i = 0; i < m; ++i) {
        F.b(idx[i]) = bs(i) * scale(idx[i]);
        for (Index k = 0; k < m; ++k)
            F.Ainv(idx[i], idx[k]) = inv(i, k) * scale(idx[i]) * scale(idx[k]);
    }
}

// Pass 3: residuals e = y~ - Z~ b, with up to two steps of iterative refinement
// (b += A^-1 Z~'e) when Z~'e is not negligible; F.rss, F.smear and the HC1 sums (F.S, U by
// period, M = sum e^2 z~ z~').
void residualPass(const Design& D, WindowFit& F, std::size_t r0, std::size_t r1, bool wantSmear,
                  MatrixXd& M, MatrixXd& U) {
    const int p0 = F.p0, P = F.p1 - F.p0 + 1;
    const Index K = D.K();
    MatrixXd X;
    VectorXd yt;
    for (int iter = 0;; ++iter) {
        F.rss = 0;
        double smear = 0;
        VectorXd r = VectorXd::Zero(K);
        if (F.hc) {
            F.S = VectorXd::Zero(P);
            U = MatrixXd::Zero(P, K);
            M = MatrixXd::Zero(K, K);
        }
        VectorXd e;
        for (std::size_t a = r0; a < r1; a += kChunk) {
            const std::size_t m = std::min(kChunk, r1 - a);
            demeanedRows(D, F, a, m, X, yt);
            e = yt;
            if (K > 0) e.noalias() -= X * F.b;
            F.rss += e.squaredNorm();
            if (K > 0) r.noalias() += X.transpose() * e;
            if (wantSmear) smear += e.array().exp().sum();
            if (F.hc) {
                const VectorXd w = e.array().square();
                forRuns(D, a, m, [&](int p, Index s, Index len) {
                    F.S(p - p0) += w.segment(s, len).sum();
                    if (K > 0)
                        U.row(p - p0) +=
                            (X.middleRows(s, len).transpose() * w.segment(s, len)).transpose();
                });
                if (K > 0) {
                    const MatrixXd Xe = X.array().colwise() * e.array();
                    M.selfadjointView<Eigen::Lower>().rankUpdate(Xe.transpose());
                }
            }
        }
        F.smear = wantSmear ? smear / static_cast<double>(F.n) : kNoValue;
        if (K == 0 || iter == 2) break;
        const VectorXd delta = F.Ainv * r;
        if (!(delta.norm() > 1e-12 * std::max(F.b.norm(), 1e-300))) break;
        F.b += delta;
    }
    if (F.hc) M = M.selfadjointView<Eigen::Lower>();
}

}  // namespace

WindowFit fitWindow(const Design& D, int p0, int p1, const HedonicOptions& o, bool wantSmear) {
    WindowFit F;
    F.p0 = p0;
    F.p1 = p1;
    F.hc = o.se == HedonicStdErr::HC1;
    const std::size_t r0 = D.start[static_cast<std::size_t>(p0)];
    const std::size_t r1 = D.start[static_cast<std::size_t>(p1) + 1];
    F.n = r1 - r0;
    const GrandMeans g = periodMeans(D, F, r0, r1);
    MatrixXd A;
    VectorXd c;
    crossProducts(D, F, r0, r1, g.grand, A, c);
    VectorXd scale;
    const std::vector<Index> idx = keptTerms(D, F, A, g, o.collinearTolerance, scale);
    solveKept(F, A, c, idx, scale);
    MatrixXd M, U;
    residualPass(D, F, r0, r1, wantSmear, M, U);

    F.df = static_cast<double>(F.n) - F.groups - static_cast<double>(F.kept);
    F.s2 = F.df > 0 ? F.rss / F.df : kNoValue;
    F.Az = F.zbar * F.Ainv;
    if (F.hc) {
        F.hcScale = F.df > 0 ? static_cast<double>(F.n) / F.df : kNoValue;
        F.Q = U * F.Ainv;
        F.Vm = F.Ainv * M * F.Ainv;
    }
    return F;
}

// The estimate d_e - d_s of fit F is a linear combination sum_i c_i ln p_i of the sales of
// its window, c_i = [i in e]/n_e - [i in s]/n_s - z~_i' A^-1 (zbar_e - zbar_s). Adds r_i c_i
// to w (indexed by sorted row), r_i = s (classical) or sqrt(n / df) e_i (HC1, e_i the fit's
// residual), so that ||w||^2 is the variance of the combination; returns the change of ||w||^2.
double addContrast(const Design& D, const WindowFit& F, int e, int s, std::vector<double>& w) {
    if (e == s) return 0.0;
    const double scale = F.df > 0 ? (F.hc ? std::sqrt(static_cast<double>(F.n) / F.df)
                                          : std::sqrt(F.s2))
                                  : kNoValue;
    const VectorXd g = F.zbar.cols() > 0
                           ? VectorXd(F.Ainv * (F.zbar.row(e - F.p0) - F.zbar.row(s - F.p0)).transpose())
                           : VectorXd();
    const double ne = static_cast<double>(F.cnt[e - F.p0]);
    const double ns = static_cast<double>(F.cnt[s - F.p0]);
    const std::size_t r0 = D.start[F.p0], r1 = D.start[F.p1 + 1];
    MatrixXd X;
    VectorXd yt, c;
    double change = 0;
    for (std::size_t a = r0; a < r1; a += kChunk) {
        const std::size_t m = std::min(kChunk, r1 - a);
        demeanedRows(D, F, a, m, X, yt);
        c = -(X * g);
        forRuns(D, a, m, [&](int p, Index st, Index len) {
            if (p == e) c.segment(st, len).array() += 1.0 / ne;
            if (p == s) c.segment(st, len).array() -= 1.0 / ns;
        });
        if (F.hc) c.array() *= (yt - X * F.b).array();
        c *= scale;
        for (std::size_t r = 0; r < m; ++r) {
            const double delta = c(static_cast<Index>(r));
            change += delta * (2 * w[a + r] + delta);
            w[a + r] += delta;
        }
    }
    return change;
}

}  // namespace lintel::hedonic_detail
