// The hedonic index over periods: one pooled fit, or rolling windows chained period to
// period (Hill, Scholz, Shimizu & Steurer 2022), their degrees of freedom and the variances
// of the chained index; the warnings about the fits. Formulas and sources in hedonic.hpp.
#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include <fmt/format.h>

#include "hedonic_internal.hpp"

namespace lintel::hedonic_detail {

namespace {
constexpr double kInf = std::numeric_limits<double>::infinity();
}  // namespace

void warnDropped(Diagnostics& diag, const std::vector<DroppedTerm>& dropped,
                 const std::string& where) {
    if (dropped.empty()) return;
    std::string s;
    for (const auto& t : dropped) s += fmt::format("{}{} ({})", s.empty() ? "" : ", ", t.name, t.why);
    diag.warn(fmt::format("dropped term(s){}: {}", where, s));
}

void warnPeriods(Diagnostics& diag, const Design& D, std::size_t minSales) {
    std::size_t empty = 0, thin = 0;
    for (int t = 0; t < D.T; ++t) {
        const std::size_t c = D.count(t);
        if (c == 0) ++empty;
        else if (c < minSales) ++thin;
    }
    if (empty) diag.warn(fmt::format("{} period(s) without sales", empty));
    if (thin)
        diag.warn(fmt::format("{} period(s) with fewer than {} sales", thin, minSales));
}

std::vector<DroppedTerm> allDropped(const Design& D, const WindowFit& F) {
    std::vector<DroppedTerm> v = D.singleLevel;
    v.insert(v.end(), F.dropped.begin(), F.dropped.end());
    return v;
}

namespace {

// One pooled fit over all periods.
void pooledChain(const Design& D, const HedonicOptions& o, bool wantSmear, Diagnostics& diag,
                 Chain& C) {
    const int T = D.T;
    if (o.window >= T && T > 1)
        diag.warn(fmt::format("window {} covers all {} periods: the pooled fit is used",
                              o.window, T));
    C.fits.push_back(fitWindow(D, 0, T - 1, o, wantSmear));
    for (int p = 0; p < T; ++p)
        if (D.count(p) >= o.minSales) {
            C.L[p] = C.fits[0].d(p);
            C.anchor[p] = p;
            C.window[p] = 0;
        }
    warnDropped(diag, allDropped(D, C.fits[0]), "");
    if (!(C.fits[0].df > 0)) diag.warn("no residual degrees of freedom: no bands");
}

// What the rolling windows report: terms dropped (name -> why, windows), windows without
// residual df, windows stretched over a gap.
struct RollingNotes {
    std::map<std::string, std::pair<std::string, int>> droppedCount;
    std::size_t noDf = 0, stretched = 0;
};

void warnRolling(const Design& D, const Chain& C, const RollingNotes& n, Diagnostics& diag) {
    if (n.stretched)
        diag.warn(fmt::format("{} window(s) stretched back over a gap to the latest period with "
                              "a value", n.stretched));
    if (!D.singleLevel.empty()) warnDropped(diag, D.singleLevel, "");
    if (!n.droppedCount.empty()) {
        std::string s;
        for (const auto& [name, w] : n.droppedCount)
            s += fmt::format("{}{} ({}, {} window(s))", s.empty() ? "" : ", ", name, w.first,
                             w.second);
        diag.warn(fmt::format("dropped term(s) in some of {} windows: {}", C.fits.size(), s));
    }
    if (n.noDf)
        diag.warn(fmt::format("{} window(s) without residual degrees of freedom: no bands there",
                              n.noDf));
}

// Rolling windows of k periods: the root window publishes its periods, each later window
// links its last period e to the latest earlier period s with a value.
void rollingChain(const Design& D, const HedonicOptions& o, bool wantSmear, Diagnostics& diag,
                  Chain& C) {
    const int T = D.T;
    auto eligible = [&](int p) { return D.count(p) >= o.minSales; };
    C.pooled = false;
    const int k = o.window;
    bool rooted = false;
    RollingNotes notes;
    for (int e = k - 1; e < T; ++e) {
        if (rooted && !eligible(e)) continue;
        if (!rooted) {
            // The root: the first window holding a period with at least minsales sales.
            const int p0 = e - k + 1;
            bool any = false;
            for (int p = p0; p <= e; ++p) any = any || eligible(p);
            if (!any) continue;
            C.fits.push_back(fitWindow(D, p0, e, o, wantSmear));
            const WindowFit& F = C.fits.back();
            for (int p = p0; p <= e; ++p)
                if (eligible(p)) {
                    C.L[p] = F.d(p);
                    C.anchor[p] = p;
                    C.window[p] = static_cast<int>(C.fits.size()) - 1;
                }
            rooted = true;
        } else {
            // Link e to the latest earlier period s with a value; the window stretches back
            // to s when s lies before its k periods (a gap of k - 1 or more periods).
            int s = e - 1;
            while (!hasValue(C.L[s])) --s;  // exists: the root published one
            const int p0 = std::min(e - k + 1, s);
            if (p0 < e - k + 1) ++notes.stretched;
            C.fits.push_back(fitWindow(D, p0, e, o, wantSmear));
            const WindowFit& F = C.fits.back();
            C.L[e] = C.L[s] + (F.d(e) - F.d(s));
            C.anchor[e] = C.anchor[s];
            C.linkDf[e] = F.df;
            C.parent[e] = s;
            C.window[e] = static_cast<int>(C.fits.size()) - 1;
        }
        const WindowFit& F = C.fits.back();
        if (!(F.df > 0)) ++notes.noDf;
        for (const auto& t : F.dropped) {
            auto& entry = notes.droppedCount[t.name];
            entry.first = t.why;
            ++entry.second;
        }
    }
    warnRolling(D, C, notes, diag);
}

}  // namespace

Chain buildChain(const Design& D, const HedonicOptions& o, bool wantSmear,
                 Diagnostics& diag) {
    Chain C;
    const auto T = static_cast<std::size_t>(D.T);
    C.L.assign(T, kNoValue);
    C.anchor.assign(T, -1);
    C.linkDf.assign(T, kInf);
    C.parent.assign(T, -1);
    C.window.assign(T, -1);
    if (o.window == 0 || o.window >= D.T) pooledChain(D, o, wantSmear, diag, C);
    else rollingChain(D, o, wantSmear, diag, C);
    return C;
}

// The smallest residual df among the windows whose estimates enter L_t - L_b: the first
// window when t and b reach it through different periods, and the links between them.
double chainDf(const Chain& C, int t, int b) {
    if (t == b) return kInf;
    const WindowFit& root = C.fits[0];
    if (C.pooled) return root.df;
    const int at = C.anchor[t], ab = C.anchor[b];
    auto linkDfMin = [&](int from, int to) {  // links from `from` back to its ancestor `to`
        double m = kInf;
        for (int p = from; p != to && p >= 0; p = C.parent[p]) m = std::min(m, C.linkDf[p]);
        return m;
    };
    if (at != ab) return std::min({root.df, linkDfMin(t, at), linkDfMin(b, ab)});
    return linkDfMin(std::max(t, b), std::min(t, b));
}

// var(L_t - L_b) for every t, for the chained (rolling) index. L_t - L_b is a linear
// combination of the log prices collecting the weights of every window estimate it uses (the
// first window's d_t - d_r and each link's d_e - d_s), so its variance is ||w||^2 with
// w_i = sum over those estimates of r_i c_i (addContrast): sales shared by overlapping windows
// are counted once, with their weights from all the windows. Classical: r = the window's s;
// HC1: r_i = sqrt(n/df) e_i with the window's residual. In the pooled case this is the
// exact OLS variance.
std::vector<double> chainVariances(const Design& D, const Chain& C, int b) {
    const int T = D.T;
    std::vector<double> var(T, kNoValue);
    const WindowFit& root = C.fits[0];
    int rstar = -1;  // the last period the first window published: u(rstar) = 0
    for (int p = 0; p < T; ++p)
        if (C.window[p] == 0) rstar = p;
    const std::size_t n = D.y.size();
    // u(b): weights of L_b - L_rstar.
    std::vector<double> ub(n, 0.0);
    if (C.window[b] == 0) {
        addContrast(D, root, b, rstar, ub);
    } else {
        for (int q = b; C.window[q] != 0; q = C.parent[q])
            addContrast(D, C.fits[C.window[q]], q, C.parent[q], ub);
    }
    double ubNorm = 0;
    for (double x : ub) ubNorm += x * x;
    std::vector<double> w(n);
    // Periods of the first window: w = u(t) - u(b).
    for (int t = 0; t < T; ++t) {
        if (C.window[t] != 0) continue;
        for (std::size_t i = 0; i < n; ++i) w[i] = -ub[i];
        var[t] = ubNorm + addContrast(D, root, t, rstar, w);
    }
    // Later periods, in chain order: u(t) = u(parent) + link.
    for (std::size_t i = 0; i < n; ++i) w[i] = -ub[i];
    double v = ubNorm;
    for (int t = rstar + 1; t < T; ++t) {
        if (C.window[t] <= 0) continue;
        v += addContrast(D, C.fits[C.window[t]], t, C.parent[t], w);
        var[t] = v;
    }
    var[b] = 0.0;
    for (auto& x : var)
        if (!std::isnan(x)) x = std::max(x, 0.0);
    return var;
}

}  // namespace lintel::hedonic_detail
