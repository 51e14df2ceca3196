// INDEXHEDONIC and HEDONICCOEFS: the index and the fitted model (formulas and sources in
// hedonic.hpp; the design, the fit and the windows are in hedonic_design.cpp, hedonic_fit.cpp
// and hedonic_windows.cpp).
#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "hedonic_internal.hpp"
#include "smoothed_index.hpp"

namespace lintel {

using namespace hedonic_detail;

IndexResult hedonicIndex(const HedonicInput& input, const HedonicOptions& o) {
    if (o.smoothed()) return smoothedHedonicIndex(input, o);
    Design D = buildDesign(input, o);
    IndexResult r;
    r.diag = std::move(D.diag);
    warnPeriods(r.diag, D, o.minSales);
    const Chain C = buildChain(D, o, false, r.diag);
    const int T = D.T;
    IndexTable& tb = r.table;
    tb.axis = D.axis;
    tb.count.resize(T);
    for (int t = 0; t < T; ++t) tb.count[t] = D.count(t);
    const int b = resolveBase(D.axis, C.L, o);
    tb.basePosition = b;
    tb.index.assign(T, kNoValue);
    tb.lower.assign(T, kNoValue);
    tb.upper.assign(T, kNoValue);
    const std::vector<double> rollingVar =
        C.pooled ? std::vector<double>() : chainVariances(D, C, b);
    for (int t = 0; t < T; ++t) {
        if (!hasValue(C.L[t])) continue;
        const double delta = C.L[t] - C.L[b];
        const double v = C.pooled ? C.fits[0].varDiff(t, b) : rollingVar[t];
        const double df = chainDf(C, t, b);
        const bool kennedy = o.bias == HedonicBias::Kennedy && std::isfinite(v);
        tb.index[t] = 100.0 * std::exp(kennedy ? delta - v / 2 : delta);
        // The base's band is [100, 100] when its fit has residual df, else none.
        const bool bandable = t != b || C.fits[C.window[b]].df > 0;
        if (bandable && std::isfinite(v) && df > 0) {
            const double q =
                std::isinf(df) ? 0.0 : stats::tCritical(o.level, df);
            const double h = q * std::sqrt(v);
            tb.lower[t] = 100.0 * std::exp(delta - h);
            tb.upper[t] = 100.0 * std::exp(delta + h);
        }
    }
    return r;
}

PeriodEffectSeries hedonicPeriodEffects(const HedonicInput& input, const HedonicOptions& o) {
    if (o.window != 0)
        throw InputError("period effects for smoothing come from the pooled fit (window=0)");
    Design D = buildDesign(input, o);
    PeriodEffectSeries out;
    out.diag = std::move(D.diag);
    warnPeriods(out.diag, D, o.minSales);
    const int T = D.T;
    const WindowFit F = fitWindow(D, 0, T - 1, o, false);
    warnDropped(out.diag, allDropped(D, F), "");
    if (!(F.df > 0))
        throw InputError(fmt::format(
            "the hedonic fit has no residual degrees of freedom ({} sales, {} periods with sales "
            "and {} characteristic terms): its period effects have no standard errors to smooth "
            "with", F.n, F.groups, static_cast<long>(F.kept)));
    // The mean home: the characteristic terms averaged over every sale in the fit.
    const Index K = D.K();
    VectorXd zmean = VectorXd::Zero(K);
    for (int t = 0; t < T; ++t)
        if (F.cnt[t] > 0 && K > 0) zmean += static_cast<double>(F.cnt[t]) * F.zbar.row(t).transpose();
    zmean /= static_cast<double>(F.n);
    const double shift = zmean.dot(F.b);
    out.axis = D.axis;
    out.count.resize(T);
    PeriodEffects& e = out.effects;
    e.value.assign(T, kNoValue);
    e.variance.assign(T, kNoValue);
    if (!F.hc) {
        e.loadings = MatrixXd::Zero(T, K);
        e.sharedCov = F.s2 * F.Ainv;
    }
    const MatrixXd Vb = F.Vb();
    int zeroHc = 0;
    for (int t = 0; t < T; ++t) {
        out.count[t] = D.count(t);
        if (!F.has(t) || D.count(t) < o.minSales) continue;
        e.value[t] = F.d(t) + shift;
        if (!F.hc) {
            // Independent part s^2 / n_t; shared part through the loadings Zbar_t - zbar.
            e.variance[t] = F.s2 / static_cast<double>(F.cnt[t]);
            if (K > 0) e.loadings.row(t) = F.zbar.row(t) - zmean.transpose();
        } else {
            // HC1: the marginal variance of d_t + zbar'b.
            const double v = F.covD(t, t) + 2 * zmean.dot(F.covDB(t)) + zmean.dot(Vb * zmean);
            if (v > 0) {
                e.variance[t] = v;
            } else {  // a period fitted exactly (one sale): HC1 sees no noise in it
                e.value[t] = kNoValue;
                ++zeroHc;
            }
        }
    }
    if (zeroHc)
        out.diag.warn(fmt::format("{} period(s) with an HC1 variance of 0 (fitted exactly, "
                                  "e.g. a single sale) enter the smoother without a value",
                                  zeroHc));
    return out;
}

HedonicFit hedonicFit(const HedonicInput& input, const HedonicOptions& o) {
    Design D = buildDesign(input, o);
    HedonicFit out;
    out.diag = std::move(D.diag);
    warnPeriods(out.diag, D, o.minSales);
    const int T = D.T;
    WindowFit F;
    int ref = 0;
    if (o.window == 0 || o.window >= T) {
        F = fitWindow(D, 0, T - 1, o, false);
        std::vector<double> level(T, kNoValue);
        for (int t = 0; t < T; ++t)
            if (D.count(t) >= o.minSales) level[t] = F.d(t);
        ref = resolveBase(D.axis, level, o);
    } else {
        // The latest window, stretched back as in the index when none of its earlier periods
        // has a value.
        int p0 = T - o.window;
        bool any = false;
        for (int p = p0; p < T - 1; ++p) any = any || D.count(p) >= o.minSales;
        if (!any)
            for (int p = p0 - 1; p >= 0; --p)
                if (D.count(p) >= o.minSales) { p0 = p; break; }
        F = fitWindow(D, p0, T - 1, o, false);
        ref = -1;
        if (o.baseDate) {
            const int b = D.axis.positionOf(*o.baseDate);
            if (b < 0)
                throw InputError(fmt::format("base lies outside the data ({})",
                                             D.axis.rangeText()));
            if (F.has(b)) ref = b;
        }
        for (int p = F.p0; p <= F.p1 && ref < 0; ++p)
            if (D.count(p) >= o.minSales) ref = p;
        for (int p = F.p0; p <= F.p1 && ref < 0; ++p)
            if (F.has(p)) ref = p;
    }
    out.axis = D.axis;
    out.referencePosition = ref;
    out.firstPosition = F.p0;
    out.lastPosition = F.p1;
    out.observations = F.n;
    out.rowsDropped = out.diag.rowsDropped();
    out.droppedTerms = allDropped(D, F);
    warnDropped(out.diag, out.droppedTerms, "");
    if (!(F.df > 0)) out.diag.warn("no residual degrees of freedom: no standard errors");
    out.dfResidual = F.df;
    out.residualSE = F.df > 0 ? std::sqrt(F.s2) : kNoValue;
    if (F.tss > 0) {
        out.rSquared = 1.0 - F.rss / F.tss;
        out.adjRSquared =
            F.df > 0 ? 1.0 - (1.0 - out.rSquared) * (static_cast<double>(F.n) - 1) / F.df
                     : kNoValue;
    }
    auto term = [](std::string name, TermKind kind, double coef, double var) {
        HedonicTerm t;
        t.name = std::move(name);
        t.kind = kind;
        t.coefficient = coef;
        t.stdError = std::isfinite(var) ? std::sqrt(std::max(var, 0.0)) : kNoValue;
        t.tValue = t.stdError > 0 ? coef / t.stdError : kNoValue;
        return t;
    };
    out.terms.push_back(term("(Intercept)", TermKind::Intercept, F.d(ref), F.covD(ref, ref)));
    const MatrixXd Vb = F.Vb();
    for (Index j = 0; j < D.K(); ++j)
        if (F.keep[j])
            out.terms.push_back(
                term(D.terms[j].name, TermKind::Characteristic, F.b(j), Vb(j, j)));
    for (int p = F.p0; p <= F.p1; ++p)
        if (p != ref && F.has(p))
            out.terms.push_back(term("period " + D.axis.label(p), TermKind::Period,
                                     F.d(p) - F.d(ref), F.varDiff(p, ref)));
    return out;
}

}  // namespace lintel
