// Repeat-sales estimators: BMN (OLS), Case-Shiller three-stage WLS (cs, cs2), the joint
// (chain 0) and the frozen-history (chain 1) index. Formulas and sources in
// repeat_sales.hpp; rules and edge cases in docs/methods/repeat_sales.md.
#include <algorithm>
#include <cmath>
#include <numeric>

#include <Eigen/Dense>
#include <fmt/format.h>

#include "statistics.hpp"
#include "repeat_sales_internal.hpp"

namespace lintel {

namespace {

using rs_detail::BuiltPairs;

// Largest number of periods on the axis (250 years of months): the normal equations and the
// covariance are dense T x T.
constexpr int kMaxPeriods = 3000;
// Fitted stage-2 variances are raised to at least this fraction of the mean squared stage-1
// residual, so no pair weighs more than 20 times a pair of average variance.
constexpr double kVarianceFloorFraction = 0.05;

// One pair as the estimator sees it: periods as axis positions s < t.
struct Obs {
    int s = 0, t = 0;
    double y = 0;      // ln(P2 / P1)
    double years = 0;  // (t - s) / periods per year
    std::size_t pair = 0;  // index into the BuiltPairs columns
};

// Union-find over periods; the root of a part is its earliest period.
struct Components {
    std::vector<int> parent;
    explicit Components(int n) : parent(static_cast<std::size_t>(n)) {
        std::iota(parent.begin(), parent.end(), 0);
    }
    int find(int x) {
        while (parent[x] != x) {
            parent[x] = parent[parent[x]];
            x = parent[x];
        }
        return x;
    }
    void join(int a, int b) {
        a = find(a);
        b = find(b);
        if (a != b) parent[std::max(a, b)] = std::min(a, b);
    }
};

// Stage 2 of Case & Shiller: OLS of squared stage-1 residuals on 1, years (and years^2 for
// cs2). Sums are accumulated so the chained index can extend them period by period.
struct VarianceAccumulator {
    int terms = 2;  // 2: cs, 3: cs2
    Eigen::Matrix3d zz = Eigen::Matrix3d::Zero();
    Eigen::Vector3d ze = Eigen::Vector3d::Zero();
    double sumE2 = 0, sumY2 = 0;
    std::size_t n = 0;
    std::vector<char> gapSeen;
    int distinctGaps = 0;

    VarianceAccumulator(int terms_, int periods) : terms(terms_), gapSeen(periods + 1, 0) {}

    void add(int gap, double years, double e, double y) {
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

    // Fits the model. Returns the number of terms actually fitted: 0 when the stage-1
    // residuals are all zero (equal weights), 1 when every pair spans the same number of
    // periods (constant variance: equal weights in variance units).
    int fit(RepeatSalesVarianceModel& m) const {
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
};

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

// Weighted least squares on the +1/-1 dummies, the normal equations accumulated pair by pair.
// col maps an axis position to its coefficient (-1: the reference period, b = 0).
struct Wls {
    Eigen::VectorXd b;
    Eigen::MatrixXd inv;      // (X'WX)^-1
    std::vector<double> res;  // residual per observation
    double sumWr2 = 0;
};

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

// Warnings of the stage-2 fallbacks, each given once.
struct StageTwoNotes {
    bool zeroResiduals = false, sameGap = false, noSquare = false;
    void note(int fitted, int wanted, Diagnostics& diag) {
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
};

// The joint estimate (all periods together) of one connected part of the pair graph.
struct JointFit {
    std::vector<int> col;
    Wls fin;
    double s2 = kNoValue;
    std::size_t n = 0, k = 0;
    std::vector<double> w;   // final-stage weight per observation
    std::vector<double> e1;  // stage-1 residual per observation
    RepeatSalesVarianceModel model;
    double level(int pos) const { return col[pos] < 0 ? 0.0 : fin.b[col[pos]]; }
};

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

// Why a period has no value (for the warnings and the base error).
enum class NoValue { None, NoPair, NotLinked, Thin, NoPairEnds, Unreached };

std::string periodList(const PeriodAxis& axis, const std::vector<int>& pos) {
    std::string s;
    std::size_t runs = 0, i = 0;
    while (i < pos.size()) {
        std::size_t j = i;
        while (j + 1 < pos.size() && pos[j + 1] == pos[j] + 1) ++j;
        if (runs == 8) {
            s += fmt::format(" and {} more", pos.size() - i);
            break;
        }
        if (runs) s += ", ";
        s += j > i ? axis.label(pos[i]) + " .. " + axis.label(pos[j]) : axis.label(pos[i]);
        ++runs;
        i = j + 1;
    }
    return s;
}

std::string noValueText(NoValue why, const RepeatSalesOptions& o) {
    switch (why) {
        case NoValue::NoPair: return "no usable pair has a sale in it";
        case NoValue::NotLinked: return "its pairs are not linked to the base period";
        case NoValue::Thin: return fmt::format("fewer than {} pairs inform it (minsales)", o.minSales);
        case NoValue::NoPairEnds: return "no usable pair ends in it";
        case NoValue::Unreached: return "its pairs start in periods without a value";
        case NoValue::None: return "";
    }
    return "";
}

// What both estimators hand to the table assembly.
struct Levels {
    std::vector<double> level;   // log level per period (any reference); kNoValue = none
    Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor> cov;  // T x T
    std::vector<double> df;      // residual df behind each period's value
    std::vector<NoValue> why;
    double scale = kNoValue;
    RepeatSalesVarianceModel model;
};

class Estimator {
public:
    Estimator(BuiltPairs& bp, const RepeatSalesOptions& o, RepeatSalesResult& r)
        : bp_(bp), o_(o), r_(r) {}

    void run() {
        std::size_t candidates = 0;
        for (PairStatus st : bp_.status) candidates += st == PairStatus::Used;
        if (candidates == 0 || !bp_.axis)
            throw InputError("no usable pair of sales: " + pairSummaryNow());
        axis_ = *bp_.axis;
        T_ = axis_.count;
        if (T_ > kMaxPeriods)
            throw InputError(fmt::format(
                "the sales span {} periods ({}); a repeat-sales index takes at most {} "
                "(use a coarser freq)", T_, axis_.rangeText(), kMaxPeriods));
        ppy_ = periodsPerYear(o_.freq);
        obs_.reserve(candidates);
        for (std::size_t i = 0; i < bp_.size(); ++i) {
            if (bp_.status[i] != PairStatus::Used) continue;
            Obs ob;
            ob.s = static_cast<int>(bp_.key1[i] - axis_.firstKey);
            ob.t = static_cast<int>(bp_.key2[i] - axis_.firstKey);
            ob.y = bp_.y[i];
            ob.years = static_cast<double>(ob.t - ob.s) / ppy_;
            ob.pair = i;
            obs_.push_back(ob);
        }
        weight_.assign(bp_.size(), 0.0);
        Levels lv = o_.chain ? chained() : joint();
        assemble(lv);
    }

private:
    BuiltPairs& bp_;
    const RepeatSalesOptions& o_;
    RepeatSalesResult& r_;
    PeriodAxis axis_;
    int T_ = 0;
    int ppy_ = 12;
    std::vector<Obs> obs_;
    std::vector<double> weight_;  // raw final-stage weight per pair (0 = not used)
    StageTwoNotes notes_;

    std::string pairSummaryNow() const {
        if (bp_.size() == 0) return "no property has two sales with a usable date and id";
        return rs_detail::countPairs(bp_).summary();
    }

    int explicitBase() const {
        if (!o_.baseDate) return -1;
        return axis_.positionOf(*o_.baseDate);
    }

    void drop(const Obs& ob, PairStatus s) { bp_.status[ob.pair] = s; }

    // The connected part to estimate among `obs`: the base period's part when a base is
    // given and a pair reaches it, else the part with the most pairs (ties: the earliest).
    // Returns its root; obs outside it are marked NotLinked and removed.
    int choosePart(std::vector<Obs>& obs, Components& cc, int basePos) {
        for (const Obs& ob : obs) cc.join(ob.s, ob.t);
        std::vector<std::size_t> count(T_, 0);
        for (const Obs& ob : obs) ++count[cc.find(ob.s)];
        int root = -1;
        if (basePos >= 0 && basePos < T_ && count[cc.find(basePos)] > 0) root = cc.find(basePos);
        if (root < 0)
            for (int p = 0; p < T_; ++p)
                if (count[p] > 0 && (root < 0 || count[p] > count[root])) root = p;
        std::size_t j = 0;  // compact in place, keeping the order
        for (std::size_t i = 0; i < obs.size(); ++i) {
            if (cc.find(obs[i].s) == root) obs[j++] = obs[i];
            else drop(obs[i], PairStatus::NotLinked);
        }
        obs.resize(j);
        return root;
    }

    Levels emptyLevels() const {
        Levels lv;
        lv.level.assign(T_, kNoValue);
        lv.cov = decltype(lv.cov)::Zero(T_, T_);
        lv.df.assign(T_, kNoValue);
        lv.why.assign(T_, NoValue::None);
        return lv;
    }

    // Jointly estimated periods: touching counts, the reference, the fit. Fills lv for the
    // periods of the part. Returns the fit.
    JointFit fitPart(std::vector<Obs>& obs, int basePos, Levels& lv, VarianceAccumulator* acc,
                     std::vector<char>& inPart) {
        Components cc(T_);
        const int root = choosePart(obs, cc, basePos);
        std::vector<std::size_t> touching(T_, 0);
        for (const Obs& ob : obs) {
            ++touching[ob.s];
            ++touching[ob.t];
        }
        inPart.assign(T_, 0);
        for (int p = 0; p < T_; ++p) inPart[p] = touching[p] > 0 && cc.find(p) == root;
        // Reference: the base when it is in the part, else the first period that will show a
        // value (so the coefficients are b_t - b_base directly in the common case).
        int ref = -1;
        if (basePos >= 0 && basePos < T_ && inPart[basePos]) ref = basePos;
        for (int p = 0; p < T_ && ref < 0; ++p)
            if (inPart[p] && touching[p] >= o_.minSales) ref = p;
        if (ref < 0) ref = root;
        std::vector<int> col(T_, -1);
        int k = 0;
        for (int p = 0; p < T_; ++p)
            if (inPart[p] && p != ref) col[p] = k++;
        JointFit f = fitJoint(obs, col, k, o_.method, T_, acc, notes_, r_.diag);
        for (int p = 0; p < T_; ++p) {
            if (!inPart[p]) continue;
            if (touching[p] < o_.minSales) {
                lv.why[p] = NoValue::Thin;
                continue;
            }
            lv.level[p] = f.level(p);
        }
        for (int p = 0; p < T_; ++p) {
            if (!inPart[p] || f.col[p] < 0) continue;
            for (int q = 0; q < T_; ++q)
                if (inPart[q] && f.col[q] >= 0)
                    lv.cov(p, q) = f.s2 * f.fin.inv(f.col[p], f.col[q]);
        }
        const double dof = static_cast<double>(f.n) - static_cast<double>(f.k);
        for (int p = 0; p < T_; ++p)
            if (inPart[p]) lv.df[p] = dof;
        for (std::size_t i = 0; i < obs.size(); ++i) weight_[obs[i].pair] = f.w[i];
        return f;
    }

    std::vector<char> touchedPeriods(const std::vector<Obs>& obs) const {
        std::vector<char> touched(T_, 0);
        for (const Obs& ob : obs) touched[ob.s] = touched[ob.t] = 1;
        return touched;
    }

    void markNoValueJoint(Levels& lv, const std::vector<char>& touched, int upTo) {
        for (int p = 0; p < upTo; ++p)
            if (!hasValue(lv.level[p]) && lv.why[p] == NoValue::None)
                lv.why[p] = touched[p] ? NoValue::NotLinked : NoValue::NoPair;
    }

    Levels joint() {
        Levels lv = emptyLevels();
        std::vector<char> touched = touchedPeriods(obs_);
        std::vector<char> inPart;
        // obs_ keeps only the pairs of the estimated part from here on.
        JointFit f = fitPart(obs_, explicitBase(), lv, nullptr, inPart);
        markNoValueJoint(lv, touched, T_);
        lv.scale = f.s2;
        lv.model = f.model;
        return lv;
    }

    // chain = 1: the first `init` periods jointly, then one period at a time from the pairs
    // ending in it, given the frozen values where they start.
    Levels chained() {
        Levels lv = emptyLevels();
        const int init = std::min(T_, o_.initialPeriods());
        std::vector<Obs> window;
        std::vector<std::vector<Obs>> ending(T_);
        for (const Obs& ob : obs_) {
            if (ob.t < init) window.push_back(ob);
            else ending[ob.t].push_back(ob);
        }
        const bool cs = o_.method != RepeatSalesMethod::BaileyMuthNourse;
        VarianceAccumulator acc(varianceTerms(o_.method), T_);
        double sumWr2 = 0;
        double nObs = 0, nPar = 0;
        if (!window.empty()) {
            const int b = explicitBase();
            const std::vector<char> touched = touchedPeriods(window);
            std::vector<char> inPart;
            JointFit f = fitPart(window, b < init ? b : -1, lv, cs ? &acc : nullptr, inPart);
            markNoValueJoint(lv, touched, init);
            sumWr2 = f.fin.sumWr2;
            nObs = static_cast<double>(f.n);
            nPar = static_cast<double>(f.k);
            r_.variance = f.model;
        } else {
            // No pair within the window: the chain starts at the first period, level 0.
            lv.level[0] = 0.0;
            lv.df[0] = 0;
            for (int p = 1; p < init; ++p) lv.why[p] = NoValue::NoPairEnds;
        }
        std::size_t unreached = 0;
        std::vector<double> aS(T_, 0.0);
        std::vector<int> starts;
        for (int t = init; t < T_; ++t) {
            std::vector<Obs>& cand = ending[t];
            std::vector<Obs> use;
            for (const Obs& ob : cand) {
                if (hasValue(lv.level[ob.s])) use.push_back(ob);
                else {
                    drop(ob, PairStatus::ChainUnreached);
                    ++unreached;
                }
            }
            if (use.empty()) {
                lv.why[t] = cand.empty() ? NoValue::NoPairEnds : NoValue::Unreached;
                continue;
            }
            if (use.size() < o_.minSales) {
                for (const Obs& ob : use) drop(ob, PairStatus::ThinPeriod);
                lv.why[t] = NoValue::Thin;
                continue;
            }
            // Weights: the stage-2 model fitted on every pair used so far, this period's
            // stage-1 residuals included (cs, cs2); 1 for bmn.
            std::vector<double> w(use.size(), 1.0);
            if (cs) {
                double m = 0;
                for (const Obs& ob : use) m += ob.y + lv.level[ob.s];
                m /= static_cast<double>(use.size());
                for (const Obs& ob : use)
                    acc.add(ob.t - ob.s, ob.years, ob.y + lv.level[ob.s] - m, ob.y);
                RepeatSalesVarianceModel model;
                const int q = acc.fit(model);
                notes_.note(q, acc.terms, r_.diag);
                if (q > 0) {
                    std::size_t floored = 0;
                    for (std::size_t i = 0; i < use.size(); ++i)
                        w[i] = 1.0 / fittedVariance(model, use[i].years, &floored);
                    model.floored = r_.variance.floored + floored;
                    r_.variance = model;
                }
            }
            double W = 0, sum = 0;
            for (std::size_t i = 0; i < use.size(); ++i) {
                W += w[i];
                sum += w[i] * (use[i].y + lv.level[use[i].s]);
            }
            const double bt = sum / W;
            for (std::size_t i = 0; i < use.size(); ++i) {
                const double res = use[i].y + lv.level[use[i].s] - bt;
                sumWr2 += w[i] * res * res;
                weight_[use[i].pair] = w[i];
            }
            nObs += static_cast<double>(use.size());
            nPar += 1;
            const double s2 = nObs > nPar ? sumWr2 / (nObs - nPar) : kNoValue;
            // Covariance with the frozen past: b_t = sum_i w_i (y_i + b_s(i)) / W, the new
            // pairs' errors independent of those behind the past values.
            starts.clear();
            for (std::size_t i = 0; i < use.size(); ++i) {
                if (aS[use[i].s] == 0.0) starts.push_back(use[i].s);
                aS[use[i].s] += w[i] / W;
            }
            auto row = lv.cov.row(t);
            for (int s : starts) row.head(t) += aS[s] * lv.cov.row(s).head(t);
            double aVa = 0;
            for (int s : starts) aVa += aS[s] * row[s];
            for (int u = 0; u < t; ++u) lv.cov(u, t) = row[u];
            lv.cov(t, t) = s2 / W + aVa;
            for (int s : starts) aS[s] = 0.0;
            lv.level[t] = bt;
            lv.df[t] = nObs - nPar;
        }
        if (unreached)
            r_.diag.warn(fmt::format(
                "chain: {} pair(s) not used because their first sale lies in a period "
                "without a value", unreached));
        lv.scale = nObs > nPar ? sumWr2 / (nObs - nPar) : kNoValue;
        lv.model = r_.variance;
        return lv;
    }

    void assemble(const Levels& lv) {
        const int eb = explicitBase();
        if (eb >= 0 && !hasValue(lv.level[eb]))
            throw InputError(fmt::format("the base period {} has no value: {}", axis_.label(eb),
                                         noValueText(lv.why[eb], o_)));
        const int b = resolveBase(axis_, lv.level, o_);
        IndexTable& tb = r_.table;
        tb.axis = axis_;
        tb.basePosition = b;
        tb.index.assign(T_, kNoValue);
        tb.lower.assign(T_, kNoValue);
        tb.upper.assign(T_, kNoValue);
        tb.count.assign(T_, 0);
        r_.logIndex.assign(T_, kNoValue);
        r_.logSe.assign(T_, kNoValue);
        r_.df.assign(T_, kNoValue);
        for (int t = 0; t < T_; ++t) {
            if (!hasValue(lv.level[t])) continue;
            const double d = lv.level[t] - lv.level[b];
            const double var = t == b ? 0.0 : lv.cov(t, t) + lv.cov(b, b) - 2 * lv.cov(t, b);
            const double se = std::sqrt(std::max(var, 0.0));
            const double dof = lv.df[std::max(t, b)];
            r_.logIndex[t] = d;
            r_.logSe[t] = hasValue(var) ? se : kNoValue;
            r_.df[t] = dof;
            tb.index[t] = 100.0 * std::exp(d);
            if (t == b) {  // the change from the base to itself is known exactly
                tb.lower[t] = tb.upper[t] = 100.0;
            } else if (hasValue(var) && dof > 0) {
                const double q = stats::tCritical(o_.level, dof);
                tb.lower[t] = 100.0 * std::exp(d - q * se);
                tb.upper[t] = 100.0 * std::exp(d + q * se);
            }
        }
        // Used pairs: counts per period, weights normalised to mean 1.
        double sumW = 0;
        std::size_t used = 0;
        for (const Obs& ob : obs_)
            if (bp_.status[ob.pair] == PairStatus::Used) {
                ++tb.count[ob.t];
                sumW += weight_[ob.pair];
                ++used;
            }
        const double norm = static_cast<double>(used) / sumW;
        for (const Obs& ob : obs_)
            if (bp_.status[ob.pair] == PairStatus::Used) bp_.weight[ob.pair] = weight_[ob.pair] * norm;
        r_.scale = lv.scale;
        r_.variance = lv.model;
        // Warnings naming the periods without a value, one per cause.
        for (NoValue why : {NoValue::NoPair, NoValue::NotLinked, NoValue::NoPairEnds,
                            NoValue::Unreached, NoValue::Thin}) {
            std::vector<int> pos;
            for (int t = 0; t < T_; ++t)
                if (!hasValue(lv.level[t]) && lv.why[t] == why) pos.push_back(t);
            if (pos.empty()) continue;
            r_.diag.warn(fmt::format("no value for {} period(s) ({}): {}", pos.size(),
                                     periodList(axis_, pos), noValueText(why, o_)));
        }
        if (r_.variance.floored)
            r_.diag.warn(fmt::format("{} pair(s) with a fitted variance below the floor {:.3g} "
                                     "(5 % of the mean squared first-stage residual)",
                                     r_.variance.floored, r_.variance.floor));
    }
};

// Pair counts and the rows used (r.diag already holds the screening's row drops).
void finish(const BuiltPairs& bp, RepeatSalesResult& r) {
    r.pairCounts = rs_detail::countPairs(bp);
    if (bp.sales) {
        const std::size_t n = bp.rowUsable.size();
        std::vector<char> inReal(n, 0), inUsed(n, 0);
        for (std::size_t i = 0; i < bp.size(); ++i) {
            if (!bp.realPair[i]) continue;
            const std::size_t a = bp.firstRow[i], b = bp.secondRow[i];
            inReal[a] = inReal[b] = 1;
            if (bp.status[i] == PairStatus::Used) inUsed[a] = inUsed[b] = 1;
        }
        std::size_t used = 0, single = 0, none = 0;
        for (std::size_t i = 0; i < n; ++i) {
            if (!bp.rowUsable[i]) continue;
            if (inUsed[i]) ++used;
            else if (inReal[i]) ++none;
            else ++single;
        }
        r.diag.rowsUsed = used;
        r.diag.drop(DropReason::SingleSale, single);
        r.diag.drop(DropReason::NoUsedPair, none);
    } else {
        // Pairs given directly: each pair is a row (its reasons are in the pair counts).
        r.diag.rowsIn = bp.size();
        r.diag.rowsUsed = r.pairCounts.used;
        r.diag.drop(DropReason::PairNotUsed, bp.size() - r.pairCounts.used);
    }
}

RepeatSalesResult runEstimate(BuiltPairs bp, const RepeatSalesOptions& o, bool forAudit,
                              PairAudit* audit) {
    RepeatSalesResult r;
    r.diag = bp.diag;  // the row drops of the screening and of duplicate sales
    std::optional<std::string> notEstimated;
    try {
        Estimator(bp, o, r).run();
    } catch (const InputError& e) {
        if (!forAudit) throw;
        r = RepeatSalesResult{};
        r.diag = bp.diag;
        notEstimated = e.what();
        // Pairs that passed the filters (or were judged by the failed estimate).
        for (std::size_t i = 0; i < bp.size(); ++i) {
            bp.weight[i] = 0;
            switch (bp.status[i]) {
                case PairStatus::Used:
                case PairStatus::NotLinked:
                case PairStatus::ChainUnreached:
                case PairStatus::ThinPeriod: bp.status[i] = PairStatus::NotEstimated; break;
                default: break;
            }
        }
        r.diag.warn(std::string("index not estimated: ") + e.what());
    }
    finish(bp, r);
    if (audit) {
        audit->pairs = rs_detail::auditRows(bp);
        audit->counts = r.pairCounts;
        audit->diag = r.diag;
        audit->notEstimated = std::move(notEstimated);
    }
    return r;
}

}  // namespace

std::string PairCounts::summary() const {
    std::vector<std::pair<std::string, std::size_t>> texts;
    texts.reserve(dropped.size());
    for (const auto& [r, c] : dropped) texts.emplace_back(pairReasonText(r), c);
    return fmt::format("{} of {} pairs used", used, formed) + droppedText(texts);
}

std::string RepeatSalesResult::summary() const {
    return diag.summary() + "; " + pairCounts.summary();
}

RepeatSalesResult repeatSalesIndex(const RepeatSalesInput& input,
                                   const RepeatSalesOptions& options, PairAudit* audit) {
    options.validate();
    return runEstimate(rs_detail::buildPairsFromSales(input, options), options, false, audit);
}

PairAudit repeatSalesPairs(const RepeatSalesInput& input, const RepeatSalesOptions& options) {
    options.validate();
    PairAudit a;
    runEstimate(rs_detail::buildPairsFromSales(input, options), options, true, &a);
    return a;
}

RepeatSalesResult repeatSalesFromPairs(const RepeatSalesPairInput& input,
                                       const RepeatSalesOptions& options, PairAudit* audit) {
    options.validate();
    return runEstimate(rs_detail::buildPairsFromPairInput(input, options), options, false,
                       audit);
}

}  // namespace lintel
