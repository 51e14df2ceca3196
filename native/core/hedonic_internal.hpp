// Internals of the hedonic estimators, shared by hedonic_design.cpp (terms, screening, the
// design), hedonic_fit.cpp (the Frisch-Waugh-Lovell fit of one window and its covariance),
// hedonic_windows.cpp (pooled or rolling-window chains), hedonic.cpp (INDEXHEDONIC,
// HEDONICCOEFS) and hedonic_reference_home.cpp (REFHOMEVALUE). Formulas and sources in
// hedonic.hpp. Not part of the public API.
#pragma once

#include <cmath>
#include <cstddef>
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "hedonic.hpp"
#include "statistics.hpp"

namespace lintel::hedonic_detail {

using Eigen::Index;
using Eigen::MatrixXd;
using Eigen::VectorXd;

// ---------------------------------------------------------------------------------------
// The design: screened sales sorted by period, with their characteristic terms encoded.

struct Column {
    std::string name;
    bool categorical = false;
    bool logged = false;
    bool numericLevels = false;  // a numeric column treated as categories
    std::vector<double> value;   // numeric: term value per sorted row (logged if `logged`)
    std::vector<int> code;       // categorical: level code per sorted row
    std::vector<std::string> levels;    // code -> level text (sorted order)
    std::vector<double> levelNumbers;   // numericLevels: code -> number
    std::vector<std::size_t> levelCount;
    int reference = -1;                 // code of the reference level
    std::vector<int> termOfLevel;       // code -> term, -1 for the reference
    int firstTerm = 0, termCount = 0;
};

struct Term {
    std::string name;
    int column = 0;
};

struct Design {
    PeriodAxis axis;
    int T = 0;
    std::vector<std::size_t> start;     // T + 1 offsets of each period's rows
    std::vector<std::size_t> inputRow;  // sorted row -> input row
    std::vector<int> period;            // sorted row -> axis position
    std::vector<double> y;              // ln price
    std::vector<Column> cols;
    std::vector<Term> terms;
    std::vector<DroppedTerm> singleLevel;  // categorical columns with one level only
    Diagnostics diag;
    Index K() const { return static_cast<Index>(terms.size()); }
    std::size_t count(int p) const { return start[p + 1] - start[p]; }
};

Design buildDesign(const HedonicInput& in, const HedonicOptions& o);

// Writes rows [a, a + m) of the raw term matrix into X (m x K).
void fillRaw(const Design& D, std::size_t a, std::size_t m, MatrixXd& X);

// Calls f(p, first, length) for each period's run of rows inside [a, a + m), first relative
// to a.
template <class F>
void forRuns(const Design& D, std::size_t a, std::size_t m, F&& f) {
    const int p0 = D.period[a], p1 = D.period[a + m - 1];
    for (int p = p0; p <= p1; ++p) {
        const std::size_t lo = std::max(a, D.start[p]), hi = std::min(a + m, D.start[p + 1]);
        if (hi > lo) f(p, static_cast<Index>(lo - a), static_cast<Index>(hi - lo));
    }
}

// ---------------------------------------------------------------------------------------
// One fit of the time-dummy model on the sales of periods p0..p1.

struct WindowFit {
    int p0 = 0, p1 = 0;
    std::size_t n = 0;
    int groups = 0;  // periods with sales
    Index kept = 0;  // terms kept
    bool hc = false;
    std::vector<std::size_t> cnt;  // per local period
    MatrixXd zbar;                 // local period x K
    VectorXd ybar;
    VectorXd b;      // K; 0 for dropped terms
    MatrixXd Ainv;   // K x K; 0 rows / columns for dropped terms
    std::vector<char> keep;
    std::vector<DroppedTerm> dropped;
    double rss = 0, tss = 0, df = 0, s2 = kNoValue, smear = kNoValue;
    // Covariance pieces: Az = zbar Ainv; HC1: S (sum e^2 by period), Q = U Ainv (U: sum
    // e^2 z~ by period), Vm = Ainv M Ainv (M = sum e^2 z~ z~'), scale n / df.
    MatrixXd Az, Q, Vm;
    VectorXd S;
    double hcScale = kNoValue;

    bool has(int p) const { return p >= p0 && p <= p1 && cnt[p - p0] > 0; }
    double d(int p) const {
        // K = 0 (every characteristic term dropped): Eigen would form a row of a matrix
        // without columns from its null data pointer, so no row is taken.
        return has(p) ? ybar(p - p0) - (zbar.cols() > 0 ? zbar.row(p - p0).dot(b) : 0.0) : kNoValue;
    }
    double covD(int t, int s) const {
        const int i = t - p0, j = s - p0;
        if (!hc) {
            double v = zbar.cols() > 0 ? zbar.row(i).dot(Az.row(j)) : 0.0;
            if (i == j) v += 1.0 / static_cast<double>(cnt[i]);
            return s2 * v;
        }
        const double ni = static_cast<double>(cnt[i]), nj = static_cast<double>(cnt[j]);
        double v = 0.0;
        if (zbar.cols() > 0) {
            v = zbar.row(i).dot(Vm * zbar.row(j).transpose());
            v -= Q.row(i).dot(zbar.row(j)) / ni + Q.row(j).dot(zbar.row(i)) / nj;
        }
        if (i == j) v += S(i) / (ni * ni);
        return hcScale * v;
    }
    double varDiff(int t, int s) const {
        if (t == s) return 0.0;
        const double v = covD(t, t) + covD(s, s) - 2 * covD(t, s);
        return std::isnan(v) ? v : std::max(0.0, v);  // NaN: no residual df
    }
    VectorXd covDB(int t) const {
        const int i = t - p0;
        if (zbar.cols() == 0) return VectorXd();
        if (!hc) return -s2 * Az.row(i).transpose();
        return hcScale * (Q.row(i).transpose() / static_cast<double>(cnt[i]) -
                          Vm * zbar.row(i).transpose());
    }
    MatrixXd Vb() const { return hc ? MatrixXd(hcScale * Vm) : MatrixXd(s2 * Ainv); }
    double quantile(double level) const {
        return df > 0 ? stats::tCritical(level, df) : kNoValue;
    }
};

// Rows [a, a + m) of the within-period deviations z~ (into X) and y~ (into yt), with the
// period means of F (the same in every window: they are means over one period's sales).
void demeanedRows(const Design& D, const WindowFit& F, std::size_t a, std::size_t m,
                  MatrixXd& X, VectorXd& yt);
WindowFit fitWindow(const Design& D, int p0, int p1, const HedonicOptions& o, bool wantSmear);
// The estimate d_e - d_s of fit F is a linear combination sum_i c_i ln p_i of the sales of
// its window, c_i = [i in e]/n_e - [i in s]/n_s - z~_i' A^-1 (zbar_e - zbar_s). Adds r_i c_i
// to w (indexed by sorted row), r_i = s (classical) or sqrt(n / df) e_i (HC1, e_i the fit's
// residual), so that ||w||^2 is the variance of the combination; returns the change of ||w||^2.
double addContrast(const Design& D, const WindowFit& F, int e, int s, std::vector<double>& w);

// ---------------------------------------------------------------------------------------
// The index, pooled or chained over rolling windows, and the warnings of the fits.

struct Chain {
    std::vector<double> L;          // log level (arbitrary origin), kNoValue: no value
    std::vector<int> anchor;        // root-window period the chain reaches p through
    std::vector<double> linkDf;     // residual df of the window that published p (links)
    std::vector<int> parent;        // previous chain period, -1 in the root window
    std::vector<int> window;        // index into fits of the window that published p
    std::vector<WindowFit> fits;    // fits[0]: the root (or pooled) fit
    bool pooled = true;
};

Chain buildChain(const Design& D, const HedonicOptions& o, bool wantSmear, Diagnostics& diag);
// The smallest residual df among the windows whose estimates enter L_t - L_b.
double chainDf(const Chain& C, int t, int b);
// var(L_t - L_b) for every t, for the chained (rolling) index.
std::vector<double> chainVariances(const Design& D, const Chain& C, int b);

void warnDropped(Diagnostics& diag, const std::vector<DroppedTerm>& dropped,
                 const std::string& where);
void warnPeriods(Diagnostics& diag, const Design& D, std::size_t minSales);
std::vector<DroppedTerm> allDropped(const Design& D, const WindowFit& F);

}  // namespace lintel::hedonic_detail
