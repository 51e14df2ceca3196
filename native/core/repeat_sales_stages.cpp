// The stages of one repeat-sales fit: ordinary least squares on the +1/-1 period dummies
// (Bailey, Muth & Nourse 1963) and, for cs and cs2, the Case & Shiller (1987, 1989) stages 2
// (variance model of the stage-1 residuals) and 3 (weighted least squares). Formulas and
// sources in repeat_sales.hpp.
#include <algorithm>
#include <cmath>

#include <Eigen/Dense>

#include "repeat_sales_internal.hpp"

namespace lintel::rs_detail {

namespace {
// Fitted stage-2 variances are raised to at least this fraction of the mean squared stage-1
// residual, so no pair weighs more than 20 times a pair of average variance.
constexpr double kVarianceFloorFraction = 0.05;
}  // namespace

void VarianceAccumulator::add(int gap, double years, double e, double y) {
    const Eigen::Vector3d z(1.0, years, years * years);
    const double e2 = e * e;
    zz.noalias() += z * z.transpose();
    ze += e2 * z;
    sumE2 += e2;
    sumY2 += y * y;
    ++n;
    if (!gapSeen[gap]) {
        gapSeen[gap] = 1;
        ++distinctGaps;
    }
}

int VarianceAccumulator::fit(RepeatSalesVarianceModel& m) const {
    m.coef.clear();
    m.floor = kNoValue;
    if (n == 0) return 0;
    const double meanE2 = sumE2 / static_cast<double>(n);
    if (!(meanE2 > 1e-24 * std::max(sumY2 / static_cast<double>(n), 1e-300))) return 0;
    const int q = std::min(terms, distinctGaps);
    const Eigen::MatrixXd a = zz.topLeftCorner(q, q);
    const Eigen::VectorXd g = a.colPivHouseholderQr().solve(ze.head(q));
    m.coef.assign(static_cast<std::size_t>(terms), 0.0);
    for (int j = 0; j < q; ++j) m.coef[j] = g[j];
    m.floor = kVarianceFloorFraction * meanE2;
    return q;
}

double fittedVariance(const RepeatSalesVarianceModel& m, double years,
                      std::size_t* floored) {
    double v = m.coef[0];
    if (m.coef.size() > 1) v += m.coef[1] * years;
    if (m.coef.size() > 2) v += m.coef[2] * years * years;
    if (!(v >= m.floor)) {
        if (floored) ++*floored;
        v = m.floor;
    }
    return v;
}

Wls solveWls(const std::vector<Obs>& obs, const std::vector<double>* w,
             const std::vector<int>& col, int k) {
    Eigen::MatrixXd a = Eigen::MatrixXd::Zero(k, k);
    Eigen::VectorXd r = Eigen::VectorXd::Zero(k);
    double* A = a.data();
    for (std::size_t i = 0; i < obs.size(); ++i) {
        const Obs& o = obs[i];
        const double wi = w ? (*w)[i] : 1.0;
        const int cs = col[o.s], ct = col[o.t];
        if (ct >= 0) {
            A[static_cast<std::ptrdiff_t>(ct) * k + ct] += wi;
            r[ct] += wi * o.y;
        }
        if (cs >= 0) {
            A[static_cast<std::ptrdiff_t>(cs) * k + cs] += wi;
            r[cs] -= wi * o.y;
        }
        if (cs >= 0 && ct >= 0) {
            A[static_cast<std::ptrdiff_t>(cs) * k + ct] -= wi;
            A[static_cast<std::ptrdiff_t>(ct) * k + cs] -= wi;
        }
    }
    Wls out;
    Eigen::LDLT<Eigen::MatrixXd> ldlt(a);
    if (ldlt.info() != Eigen::Success || !ldlt.isPositive() ||
        !(ldlt.vectorD().minCoeff() > 0))
        // Cannot happen for a connected set of periods; reported in the user's words anyway.
        throw InputError("the pairs do not determine the index (the periods are not linked)");
    out.b = ldlt.solve(r);
    out.inv = ldlt.solve(Eigen::MatrixXd::Identity(k, k));
    out.res.resize(obs.size());
    for (std::size_t i = 0; i < obs.size(); ++i) {
        const Obs& o = obs[i];
        const double bt = col[o.t] >= 0 ? out.b[col[o.t]] : 0.0;
        const double bs = col[o.s] >= 0 ? out.b[col[o.s]] : 0.0;
        out.res[i] = o.y - (bt - bs);
        out.sumWr2 += (w ? (*w)[i] : 1.0) * out.res[i] * out.res[i];
    }
    return out;
}

int varianceTerms(RepeatSalesMethod m) {
    return m == RepeatSalesMethod::CaseShillerQuadratic ? 3 : 2;
}

void StageTwoNotes::note(int fitted, int wanted, Diagnostics& diag) {
    if (fitted == 0 && !zeroResiduals) {
        zeroResiduals = true;
        diag.warn("the first-stage residuals are all zero: equal weights");
    } else if (fitted == 1 && !sameGap) {
        sameGap = true;
        diag.warn("every pair spans the same number of periods: equal weights");
    } else if (fitted == 2 && wanted == 3 && !noSquare) {
        noSquare = true;
        diag.warn("only two distinct intervals between sales: the variance model has no "
                  "squared term");
    }
}

JointFit fitJoint(const std::vector<Obs>& obs, std::vector<int> col, int k,
                  RepeatSalesMethod method, int periods, VarianceAccumulator* acc,
                  StageTwoNotes& notes, Diagnostics& diag) {
    JointFit f;
    f.col = std::move(col);
    f.n = obs.size();
    f.k = static_cast<std::size_t>(k);
    Wls s1 = solveWls(obs, nullptr, f.col, k);
    f.e1 = s1.res;
    if (method == RepeatSalesMethod::BaileyMuthNourse) {
        f.fin = std::move(s1);
        f.w.assign(obs.size(), 1.0);
    } else {
        VarianceAccumulator local(varianceTerms(method), periods);
        VarianceAccumulator& a = acc ? *acc : local;
        for (std::size_t i = 0; i < obs.size(); ++i)
            a.add(obs[i].t - obs[i].s, obs[i].years, f.e1[i], obs[i].y);
        const int q = a.fit(f.model);
        notes.note(q, a.terms, diag);
        if (q == 0) {
            f.model = {};
            f.fin = std::move(s1);
            f.w.assign(obs.size(), 1.0);
        } else {
            f.w.resize(obs.size());
            for (std::size_t i = 0; i < obs.size(); ++i)
                f.w[i] = 1.0 / fittedVariance(f.model, obs[i].years, &f.model.floored);
            f.fin = solveWls(obs, &f.w, f.col, k);
        }
    }
    if (f.n > f.k) f.s2 = f.fin.sumWr2 / static_cast<double>(f.n - f.k);
    return f;
}

}  // namespace lintel::rs_detail
