// The repeat-sales index with frozen history (chain on; our own construction, documented in
// docs/methods/repeat_sales.md): the first `init` periods are estimated jointly, then each
// later period from the pairs that end in it, given the frozen values of the periods where
// they start. Weights (cs, cs2): the stage-2 variance model refitted on every pair used so far.
#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "repeat_sales_internal.hpp"

namespace lintel::rs_detail {

Levels Estimator::chained() {
    Levels lv = emptyLevels();
    const int init = std::min(T_, o_.initialPeriods());
    std::vector<Obs> window;
    std::vector<std::vector<Obs>> ending(static_cast<std::size_t>(T_));
    for (const Obs& ob : obs_) {
        if (ob.t < init) window.push_back(ob);
        else ending[static_cast<std::size_t>(ob.t)].push_back(ob);
    }
    ChainState st{VarianceAccumulator(varianceTerms(o_.method), T_)};
    st.aS.assign(static_cast<std::size_t>(T_), 0.0);
    chainInitialWindow(window, init, lv, st);
    for (int t = init; t < T_; ++t) chainPeriod(t, ending[static_cast<std::size_t>(t)], lv, st);
    if (st.unreached)
        r_.diag.warn(fmt::format(
            "chain: {} pair(s) not used because their first sale lies in a period "
            "without a value", st.unreached));
    lv.scale = st.nObs > st.nPar ? st.sumWr2 / (st.nObs - st.nPar) : kNoValue;
    lv.model = r_.variance;
    return lv;
}

// Periods 0 .. init-1 jointly, as the joint estimate does (with the base when it lies there).
void Estimator::chainInitialWindow(std::vector<Obs>& window, int init, Levels& lv,
                                   ChainState& st) {
    const bool cs = o_.method != RepeatSalesMethod::BaileyMuthNourse;
    if (!window.empty()) {
        const int b = explicitBase();
        const std::vector<char> touched = touchedPeriods(window);
        std::vector<char> inPart;
        JointFit f = fitPart(window, b < init ? b : -1, lv, cs ? &st.acc : nullptr, inPart);
        markNoValueJoint(lv, touched, init);
        st.sumWr2 = f.fin.sumWr2;
        st.nObs = static_cast<double>(f.n);
        st.nPar = static_cast<double>(f.k);
        r_.variance = f.model;
    } else {
        // No pair within the window: the chain starts at the first period, level 0.
        lv.level[0] = 0.0;
        lv.df[0] = 0;
        for (int p = 1; p < init; ++p) lv.why[p] = NoValue::NoPairEnds;
    }
}

// Period t from the pairs ending in it whose first sale has a value:
// b_t = sum_i w_i (y_i + b_s(i)) / W.
void Estimator::chainPeriod(int t, const std::vector<Obs>& candidates, Levels& lv,
                            ChainState& st) {
    std::vector<Obs> use;
    for (const Obs& ob : candidates) {
        if (hasValue(lv.level[ob.s])) use.push_back(ob);
        else {
            drop(ob, PairStatus::ChainUnreached);
            ++st.unreached;
        }
    }
    if (use.empty()) {
        lv.why[t] = candidates.empty() ? NoValue::NoPairEnds : NoValue::Unreached;
        return;
    }
    if (use.size() < o_.minSales) {
        for (const Obs& ob : use) drop(ob, PairStatus::ThinPeriod);
        lv.why[t] = NoValue::Thin;
        return;
    }
    const std::vector<double> w = chainWeights(use, lv, st);
    double W = 0, sum = 0;
    for (std::size_t i = 0; i < use.size(); ++i) {
        W += w[i];
        sum += w[i] * (use[i].y + lv.level[use[i].s]);
    }
    const double bt = sum / W;
    for (std::size_t i = 0; i < use.size(); ++i) {
        const double res = use[i].y + lv.level[use[i].s] - bt;
        st.sumWr2 += w[i] * res * res;
        weight_[use[i].pair] = w[i];
    }
    st.nObs += static_cast<double>(use.size());
    st.nPar += 1;
    const double s2 = st.nObs > st.nPar ? st.sumWr2 / (st.nObs - st.nPar) : kNoValue;
    chainCovariance(t, use, w, W, s2, lv, st);
    lv.level[t] = bt;
    lv.df[t] = st.nObs - st.nPar;
}

// Weights: the stage-2 model fitted on every pair used so far, this period's stage-1
// residuals included (cs, cs2); 1 for bmn.
std::vector<double> Estimator::chainWeights(const std::vector<Obs>& use, const Levels& lv,
                                            ChainState& st) {
    std::vector<double> w(use.size(), 1.0);
    if (o_.method == RepeatSalesMethod::BaileyMuthNourse) return w;
    double m = 0;
    for (const Obs& ob : use) m += ob.y + lv.level[ob.s];
    m /= static_cast<double>(use.size());
    for (const Obs& ob : use) st.acc.add(ob.t - ob.s, ob.years, ob.y + lv.level[ob.s] - m, ob.y);
    RepeatSalesVarianceModel model;
    const int q = st.acc.fit(model);
    notes_.note(q, st.acc.terms, r_.diag);
    if (q > 0) {
        std::size_t floored = 0;
        for (std::size_t i = 0; i < use.size(); ++i)
            w[i] = 1.0 / fittedVariance(model, use[i].years, &floored);
        model.floored = r_.variance.floored + floored;
        r_.variance = model;
    }
    return w;
}

// Covariance of b_t with the frozen past: b_t = sum_i w_i (y_i + b_s(i)) / W, the new pairs'
// errors independent of those behind the past values, so cov(b_t, b_u) = sum_s a_s cov(b_s,
// b_u) with a_s = sum of w_i / W over the pairs starting in s, and var b_t = s^2 / W + a'Va.
void Estimator::chainCovariance(int t, const std::vector<Obs>& use, const std::vector<double>& w,
                                double W, double s2, Levels& lv, ChainState& st) {
    st.starts.clear();
    for (std::size_t i = 0; i < use.size(); ++i) {
        if (st.aS[use[i].s] == 0.0) st.starts.push_back(use[i].s);
        st.aS[use[i].s] += w[i] / W;
    }
    auto row = lv.cov.row(t);
    for (int s : st.starts) row.head(t) += st.aS[s] * lv.cov.row(s).head(t);
    double aVa = 0;
    for (int s : st.starts) aVa += st.aS[s] * row[s];
    for (int u = 0; u < t; ++u) lv.cov(u, t) = row[u];
    lv.cov(t, t) = s2 / W + aVa;
    for (int s : st.starts) st.aS[s] = 0.0;
}

}  // namespace lintel::rs_detail
