#include "hedonic.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <unordered_map>

#include <Eigen/Dense>
#include <fmt/format.h>

#include "statistics.hpp"
#include "text_keys.hpp"

namespace lintel {

// ---------------------------------------------------------------------------------------
// Column conversion helpers (shared with the add-in).

CharacteristicColumn classifyColumn(std::string name, const std::vector<double>& numbers,
                                    const std::vector<std::string>& texts) {
    const std::size_t n = std::max(numbers.size(), texts.size());
    auto num = [&](std::size_t i) {
        return i < numbers.size() ? numbers[i] : std::numeric_limits<double>::quiet_NaN();
    };
    auto txt = [&](std::size_t i) -> const std::string& {
        static const std::string empty;
        return i < texts.size() ? texts[i] : empty;
    };
    std::size_t nNum = 0, nText = 0;
    for (std::size_t i = 0; i < n; ++i) {
        if (std::isfinite(num(i))) ++nNum;
        else if (!txt(i).empty()) ++nText;
    }
    CharacteristicColumn c;
    c.name = std::move(name);
    if (nNum > nText || (nNum == 0 && nText == 0)) {
        c.numeric.resize(n);
        for (std::size_t i = 0; i < n; ++i)
            c.numeric[i] = std::isfinite(num(i)) ? num(i) : kNoValue;
    } else {
        c.text.resize(n);
        for (std::size_t i = 0; i < n; ++i)
            c.text[i] = std::isfinite(num(i)) ? keyText(num(i)) : txt(i);
    }
    return c;
}

namespace {
bool contains(const std::vector<int>& v, int x) {
    return std::find(v.begin(), v.end(), x) != v.end();
}
}  // namespace

void HedonicOptions::validate() const {
    IndexOptions::validate();
    if (window < 0 || window == 1)
        throw InputError(fmt::format(
            "window must be 0 (pooled) or at least 2 periods, got {}", window));
    auto check = [](const std::vector<int>& v, const char* key) {
        for (int c : v)
            if (c < 1)
                throw InputError(fmt::format(
                    "{}: column {} lies outside the characteristics (columns count from 1)",
                    key, c));
    };
    check(logColumns, "log");
    check(categoricalColumns, "categorical");
    for (int c : logColumns)
        if (contains(categoricalColumns, c))
            throw InputError(fmt::format("column {} cannot be both log and categorical", c));
    if (!(collinearTolerance > 0 && collinearTolerance < 1))
        throw InputError("internal: collinearTolerance must lie in (0, 1)");
}

namespace {

using Eigen::Index;
using Eigen::MatrixXd;
using Eigen::VectorXd;

constexpr double kConstantTol2 = 1e-14;  // (1e-7)^2: R's lm tolerance on column norms
constexpr std::size_t kChunk = 1024;     // rows per block of the demeaned design
// Limits that keep the k x k system and its O(n k^2) cost within reason (a column of ids
// or addresses would otherwise make one term per sale).
constexpr std::size_t kMaxLevels = 1000;  // levels of one categorical column
constexpr std::size_t kMaxTerms = 1500;   // characteristic terms in all
constexpr double kInf = std::numeric_limits<double>::infinity();

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

// The log and categorical columns against the characteristics given.
void checkColumns(const HedonicOptions& o, std::size_t nCols) {
    auto check = [&](const std::vector<int>& v, const char* key) {
        for (int c : v)
            if (static_cast<std::size_t>(c) > nCols)
                throw InputError(fmt::format(
                    "{}: column {} lies outside the characteristics (1..{})", key, c, nCols));
    };
    check(o.logColumns, "log");
    check(o.categoricalColumns, "categorical");
}

std::string columnName(const CharacteristicColumn& c, std::size_t j) {
    return c.name.empty() ? fmt::format("x{}", j + 1) : c.name;
}

Design buildDesign(const HedonicInput& in, const HedonicOptions& o) {
    const auto& chars = in.characteristics;
    const std::size_t n = in.sales.date.size();
    o.validate();
    checkColumns(o, chars.size());
    for (std::size_t j = 0; j < chars.size(); ++j) {
        const auto& c = chars[j];
        if (c.numeric.size() != n && c.text.size() != n)
            throw InputError(fmt::format(
                "characteristics column {} has {} rows but the dates have {}", j + 1,
                std::max(c.numeric.size(), c.text.size()), n));
        const bool isText = c.numeric.size() != n;
        if (isText && contains(o.logColumns, static_cast<int>(j + 1)))
            throw InputError(fmt::format("log: column {} ({}) holds text, not numbers", j + 1,
                                         columnName(c, j)));
    }

    // Row check of the characteristics: blank or invalid, or the log of a non-positive value
    // (the first failing column decides).
    RowProblems problem(n);
    for (std::size_t j = 0; j < chars.size(); ++j) {
        const auto& c = chars[j];
        const bool logged = contains(o.logColumns, static_cast<int>(j + 1));
        if (c.numeric.size() == n) {
            for (std::size_t i = 0; i < n; ++i) {
                if (problem[i]) continue;
                const double v = c.numeric[i];
                if (!std::isfinite(v)) problem[i] = DropReason::BadCharacteristic;
                else if (logged && v <= 0) problem[i] = DropReason::LogNonPositive;
            }
        } else {
            for (std::size_t i = 0; i < n; ++i)
                if (!problem[i] && c.text[i].empty()) problem[i] = DropReason::BadCharacteristic;
        }
    }

    Design D;
    ScreenedSales s = screenSales(in.sales, o.freq, D.diag, &problem);

    // Sort the used rows by period (counting sort, stable in input order).
    D.axis = s.axis;
    D.T = s.axis.count;
    const std::size_t m = s.rows.size();
    D.start.assign(D.T + 1, 0);
    for (int p : s.period) ++D.start[p + 1];
    for (int t = 0; t < D.T; ++t) D.start[t + 1] += D.start[t];
    {
        std::vector<std::size_t> fillPos(D.start.begin(), D.start.end() - 1);
        D.inputRow.resize(m);
        D.period.resize(m);
        for (std::size_t j = 0; j < m; ++j) {
            const std::size_t at = fillPos[s.period[j]]++;
            D.inputRow[at] = s.rows[j];
            D.period[at] = s.period[j];
        }
    }
    D.y.resize(m);
    for (std::size_t r = 0; r < m; ++r) D.y[r] = std::log(in.sales.price[D.inputRow[r]]);

    // Columns and terms.
    for (std::size_t j = 0; j < chars.size(); ++j) {
        const auto& c = chars[j];
        Column col;
        col.name = columnName(c, j);
        const int number = static_cast<int>(j + 1);
        const bool isText = c.numeric.size() != n;
        col.categorical = isText || contains(o.categoricalColumns, number);
        col.logged = contains(o.logColumns, number);
        col.firstTerm = static_cast<int>(D.terms.size());
        if (!col.categorical) {
            col.value.resize(m);
            for (std::size_t r = 0; r < m; ++r) {
                const double v = c.numeric[D.inputRow[r]];
                col.value[r] = col.logged ? std::log(v) : v;
            }
            D.terms.push_back({col.logged ? "log(" + col.name + ")" : col.name,
                               static_cast<int>(j)});
            col.termCount = 1;
        } else {
            col.code.resize(m);
            if (isText) {
                std::unordered_map<std::string, int> seen;
                std::vector<std::string> names;
                for (std::size_t r = 0; r < m; ++r) {
                    auto [it, fresh] =
                        seen.emplace(c.text[D.inputRow[r]], static_cast<int>(names.size()));
                    if (fresh) names.push_back(it->first);
                    col.code[r] = it->second;
                }
                std::vector<int> order(names.size());
                for (std::size_t k = 0; k < order.size(); ++k) order[k] = static_cast<int>(k);
                std::sort(order.begin(), order.end(),
                          [&](int a, int b) { return names[a] < names[b]; });
                std::vector<int> rank(order.size());
                for (std::size_t k = 0; k < order.size(); ++k) {
                    rank[order[k]] = static_cast<int>(k);
                    col.levels.push_back(names[order[k]]);
                }
                for (auto& x : col.code) x = rank[x];
            } else {
                col.numericLevels = true;
                std::map<double, int> seen;
                for (std::size_t r = 0; r < m; ++r) seen.emplace(c.numeric[D.inputRow[r]], 0);
                int k = 0;
                for (auto& [v, idx] : seen) {
                    idx = k++;
                    col.levelNumbers.push_back(v);
                    col.levels.push_back(keyText(v));
                }
                for (std::size_t r = 0; r < m; ++r)
                    col.code[r] = seen.at(c.numeric[D.inputRow[r]]);
            }
            if (col.levels.size() > kMaxLevels)
                throw InputError(fmt::format(
                    "characteristics column {} ({}) has {} different values; a categorical "
                    "column may have at most {} (is it an id or an address?)",
                    j + 1, col.name, col.levels.size(), kMaxLevels));
            col.levelCount.assign(col.levels.size(), 0);
            for (int x : col.code) ++col.levelCount[x];
            // Reference: the most frequent level (ties: the first in sorted order).
            col.reference = static_cast<int>(
                std::max_element(col.levelCount.begin(), col.levelCount.end()) -
                col.levelCount.begin());
            col.termOfLevel.assign(col.levels.size(), -1);
            for (std::size_t k = 0; k < col.levels.size(); ++k) {
                if (static_cast<int>(k) == col.reference) continue;
                col.termOfLevel[k] = static_cast<int>(D.terms.size());
                D.terms.push_back({col.name + "=" + col.levels[k], static_cast<int>(j)});
                ++col.termCount;
            }
            if (col.levels.size() == 1)
                D.singleLevel.push_back({col.name, "single level"});
        }
        D.cols.push_back(std::move(col));
    }
    if (D.terms.size() > kMaxTerms)
        throw InputError(fmt::format("the characteristics make {} terms; at most {} are allowed",
                                     D.terms.size(), kMaxTerms));
    return D;
}

// Writes rows [a, a + m) of the raw term matrix into X (m x K).
void fillRaw(const Design& D, std::size_t a, std::size_t m, MatrixXd& X) {
    X.resize(static_cast<Index>(m), D.K());
    for (const Column& c : D.cols) {
        if (!c.categorical) {
            X.col(c.firstTerm) = Eigen::Map<const VectorXd>(c.value.data() + a,
                                                            static_cast<Index>(m));
        } else if (c.termCount > 0) {
            X.middleCols(c.firstTerm, c.termCount).setZero();
            for (std::size_t r = 0; r < m; ++r) {
                const int t = c.termOfLevel[c.code[a + r]];
                if (t >= 0) X(static_cast<Index>(r), t) = 1.0;
            }
        }
    }
}

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
        return has(p) ? ybar(p - p0) - zbar.row(p - p0).dot(b) : kNoValue;
    }
    double covD(int t, int s) const {
        const int i = t - p0, j = s - p0;
        if (!hc) {
            double v = zbar.row(i).dot(Az.row(j));
            if (i == j) v += 1.0 / static_cast<double>(cnt[i]);
            return s2 * v;
        }
        const double ni = static_cast<double>(cnt[i]), nj = static_cast<double>(cnt[j]);
        double v = zbar.row(i).dot(Vm * zbar.row(j).transpose());
        v -= Q.row(i).dot(zbar.row(j)) / ni + Q.row(j).dot(zbar.row(i)) / nj;
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
                  MatrixXd& X, VectorXd& yt) {
    fillRaw(D, a, m, X);
    yt.resize(static_cast<Index>(m));
    forRuns(D, a, m, [&](int p, Index s, Index len) {
        X.middleRows(s, len).rowwise() -= F.zbar.row(p - F.p0);
        yt.segment(s, len) =
            Eigen::Map<const VectorXd>(D.y.data() + a + s, len).array() - F.ybar(p - F.p0);
    });
}

WindowFit fitWindow(const Design& D, int p0, int p1, const HedonicOptions& o, bool wantSmear) {
    WindowFit F;
    F.p0 = p0;
    F.p1 = p1;
    F.hc = o.se == HedonicStdErr::HC1;
    const int P = p1 - p0 + 1;
    const Index K = D.K();
    const std::size_t r0 = D.start[p0], r1 = D.start[p1 + 1];
    F.n = r1 - r0;
    F.cnt.resize(P);
    for (int p = p0; p <= p1; ++p) {
        F.cnt[p - p0] = D.count(p);
        if (F.cnt[p - p0]) ++F.groups;
    }
    F.zbar = MatrixXd::Zero(P, K);
    F.ybar = VectorXd::Zero(P);
    VectorXd rawSS = VectorXd::Zero(K);
    MatrixXd X;

    // Pass 1: period means of ln p and of every term.
    for (std::size_t a = r0; a < r1; a += kChunk) {
        const std::size_t m = std::min(kChunk, r1 - a);
        fillRaw(D, a, m, X);
        rawSS += X.colwise().squaredNorm().transpose();
        forRuns(D, a, m, [&](int p, Index s, Index len) {
            F.zbar.row(p - p0) += X.middleRows(s, len).colwise().sum();
            F.ybar(p - p0) +=
                Eigen::Map<const VectorXd>(D.y.data() + a + s, len).sum();
        });
    }
    double grand = 0;
    VectorXd zgrand = VectorXd::Zero(K);
    for (int i = 0; i < P; ++i) {
        if (!F.cnt[i]) continue;
        grand += F.ybar(i);
        zgrand += F.zbar.row(i).transpose();
        F.zbar.row(i) /= static_cast<double>(F.cnt[i]);
        F.ybar(i) /= static_cast<double>(F.cnt[i]);
    }
    grand /= static_cast<double>(F.n);
    zgrand /= static_cast<double>(F.n);

    auto demeaned = [&](std::size_t a, std::size_t m, VectorXd& yt) {
        demeanedRows(D, F, a, m, X, yt);
    };

    // Pass 2: A = Z~'Z~, c = Z~'y~, within sum of squares of ln p.
    MatrixXd A = MatrixXd::Zero(K, K);
    VectorXd c = VectorXd::Zero(K), yt;
    double yWithin = 0;
    for (std::size_t a = r0; a < r1; a += kChunk) {
        const std::size_t m = std::min(kChunk, r1 - a);
        demeaned(a, m, yt);
        if (K > 0) {  // no terms left (all dropped): Eigen's products of empty matrices are UB
            A.selfadjointView<Eigen::Lower>().rankUpdate(X.transpose());
            c.noalias() += X.transpose() * yt;
        }
        yWithin += yt.squaredNorm();
    }
    A = A.selfadjointView<Eigen::Lower>();
    F.tss = yWithin;
    for (int i = 0; i < P; ++i)
        if (F.cnt[i])
            F.tss += static_cast<double>(F.cnt[i]) * (F.ybar(i) - grand) * (F.ybar(i) - grand);

    // Aliased terms. (1) No variation within periods: constant, or a function of the
    // period. (2) Sequentially, in column order, on the Jacobi-scaled A: a pivot below the
    // tolerance means the term's within-period variation is (nearly) a combination of the
    // earlier kept terms'. The pivots come from the Cholesky factor of the kept block,
    // extended one row at a time with Eigen's triangular solve.
    F.keep.assign(K, 0);
    VectorXd scale = VectorXd::Zero(K);
    std::vector<Index> idx;
    MatrixXd L = MatrixXd::Zero(K, K);
    for (Index j = 0; j < K; ++j) {
        const double within = A(j, j);
        if (!(within > kConstantTol2 * rawSS(j))) {
            double between = 0;
            for (int i = 0; i < P; ++i)
                if (F.cnt[i])
                    between += static_cast<double>(F.cnt[i]) *
                               std::pow(F.zbar(i, j) - zgrand(j), 2);
            const bool constant = F.groups == 1 || !(between > kConstantTol2 * rawSS(j));
            F.dropped.push_back(
                {D.terms[j].name, constant ? "constant" : "constant within periods"});
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
        if (!(pivot > o.collinearTolerance)) {
            F.dropped.push_back({D.terms[j].name, "collinear with earlier terms"});
            continue;
        }
        if (m > 0) L.row(m).head(m) = l.transpose();
        L(m, m) = std::sqrt(pivot);
        idx.push_back(j);
        F.keep[j] = 1;
    }
    F.kept = static_cast<Index>(idx.size());

    F.b = VectorXd::Zero(K);
    F.Ainv = MatrixXd::Zero(K, K);
    if (F.kept > 0) {
        const Index m = F.kept;
        MatrixXd As(m, m);
        VectorXd cs(m);
        for (Index i = 0; i < m; ++i) {
            cs(i) = c(idx[i]) * scale(idx[i]);
            for (Index k = 0; k < m; ++k)
                As(i, k) = A(idx[i], idx[k]) * scale(idx[i]) * scale(idx[k]);
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
    // (b += A^-1 Z~'e) when Z~'e is not negligible.
    MatrixXd M, U;
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
            demeaned(a, m, yt);
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
    const VectorXd g =
        F.Ainv * (F.zbar.row(e - F.p0) - F.zbar.row(s - F.p0)).transpose();
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

// ---------------------------------------------------------------------------------------
// The index, pooled or chained over rolling windows.

struct Chain {
    std::vector<double> L;          // log level (arbitrary origin), kNoValue: no value
    std::vector<int> anchor;        // root-window period the chain reaches p through
    std::vector<double> linkDf;     // residual df of the window that published p (links)
    std::vector<int> parent;        // previous chain period, -1 in the root window
    std::vector<int> window;        // index into fits of the window that published p
    std::vector<WindowFit> fits;    // fits[0]: the root (or pooled) fit
    bool pooled = true;
};

Chain buildChain(const Design& D, const HedonicOptions& o, bool wantSmear,
                 Diagnostics& diag) {
    Chain C;
    const int T = D.T;
    C.L.assign(T, kNoValue);
    C.anchor.assign(T, -1);
    C.linkDf.assign(T, kInf);
    C.parent.assign(T, -1);
    C.window.assign(T, -1);
    auto eligible = [&](int p) { return D.count(p) >= o.minSales; };

    if (o.window == 0 || o.window >= T) {
        if (o.window >= T && T > 1)
            diag.warn(fmt::format("window {} covers all {} periods: the pooled fit is used",
                                  o.window, T));
        C.fits.push_back(fitWindow(D, 0, T - 1, o, wantSmear));
        for (int p = 0; p < T; ++p)
            if (eligible(p)) {
                C.L[p] = C.fits[0].d(p);
                C.anchor[p] = p;
                C.window[p] = 0;
            }
        warnDropped(diag, allDropped(D, C.fits[0]), "");
        if (!(C.fits[0].df > 0)) diag.warn("no residual degrees of freedom: no bands");
        return C;
    }
    C.pooled = false;
    const int k = o.window;
    bool rooted = false;
    std::map<std::string, std::pair<std::string, int>> droppedCount;
    std::size_t noDf = 0, stretched = 0;
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
            if (p0 < e - k + 1) ++stretched;
            C.fits.push_back(fitWindow(D, p0, e, o, wantSmear));
            const WindowFit& F = C.fits.back();
            C.L[e] = C.L[s] + (F.d(e) - F.d(s));
            C.anchor[e] = C.anchor[s];
            C.linkDf[e] = F.df;
            C.parent[e] = s;
            C.window[e] = static_cast<int>(C.fits.size()) - 1;
        }
        const WindowFit& F = C.fits.back();
        if (!(F.df > 0)) ++noDf;
        for (const auto& t : F.dropped) {
            auto& entry = droppedCount[t.name];
            entry.first = t.why;
            ++entry.second;
        }
    }
    if (stretched)
        diag.warn(fmt::format("{} window(s) stretched back over a gap to the latest period with "
                              "a value", stretched));
    if (!D.singleLevel.empty()) warnDropped(diag, D.singleLevel, "");
    if (!droppedCount.empty()) {
        std::string s;
        for (const auto& [name, w] : droppedCount)
            s += fmt::format("{}{} ({}, {} window(s))", s.empty() ? "" : ", ", name, w.first,
                             w.second);
        diag.warn(fmt::format("dropped term(s) in some of {} windows: {}", C.fits.size(), s));
    }
    if (noDf) diag.warn(fmt::format("{} window(s) without residual degrees of freedom: no "
                                    "bands there", noDf));
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

}  // namespace

// ---------------------------------------------------------------------------------------

IndexResult hedonicIndex(const HedonicInput& input, const HedonicOptions& o) {
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

RefHomeResult referenceHomeValue(const HedonicInput& input, const HomeInput& home,
                                 const HedonicOptions& o) {
    Design D = buildDesign(input, o);
    const std::size_t nCols = input.characteristics.size();
    if ((!home.numbers.empty() && home.numbers.size() != nCols) ||
        (!home.texts.empty() && home.texts.size() != nCols))
    {
        const std::size_t cells = std::max(home.numbers.size(), home.texts.size());
        throw InputError(fmt::format("home has {} cell{} but characteristics has {} columns", cells,
                                     cells == 1 ? "" : "s", nCols));
    }
    RefHomeResult out;
    out.diag = std::move(D.diag);
    warnPeriods(out.diag, D, o.minSales);
    const Chain C = buildChain(D, o, o.retransform == Retransform::Smearing, out.diag);
    const int T = D.T;
    const int b = resolveBase(D.axis, C.L, o);
    IndexTable& tb = out.table;
    tb.axis = D.axis;
    tb.basePosition = b;

    // The home: given cells, blanks from the base period's typical home.
    VectorXd x = VectorXd::Zero(D.K());
    const std::size_t b0 = D.start[b], b1 = D.start[b + 1];
    for (std::size_t j = 0; j < nCols; ++j) {
        const Column& col = D.cols[j];
        const double num = j < home.numbers.size() ? home.numbers[j] : kNoValue;
        const std::string txt = j < home.texts.size() ? home.texts[j] : std::string();
        HomeCell cell;
        cell.column = col.name;
        cell.categorical = col.categorical;
        const bool blank = !std::isfinite(num) && txt.empty();
        cell.typical = blank;
        if (!col.categorical) {
            if (blank) {
                std::vector<double> v;
                v.reserve(b1 - b0);
                const auto& raw = input.characteristics[j].numeric;
                for (std::size_t r = b0; r < b1; ++r) v.push_back(raw[D.inputRow[r]]);
                cell.number = stats::median(std::move(v));
            } else if (!std::isfinite(num)) {
                throw InputError(fmt::format("home: column {} ({}) needs a number, got '{}'",
                                             j + 1, col.name, txt));
            } else {
                cell.number = num;
            }
            if (col.logged && !(cell.number > 0))
                throw InputError(fmt::format(
                    "home: column {} ({}) is taken in logs and needs a positive value", j + 1,
                    col.name));
            x(col.firstTerm) = col.logged ? std::log(cell.number) : cell.number;
        } else {
            int level = -1;
            if (blank) {
                std::vector<std::size_t> cnt(col.levels.size(), 0);
                for (std::size_t r = b0; r < b1; ++r) ++cnt[col.code[r]];
                level = static_cast<int>(std::max_element(cnt.begin(), cnt.end()) -
                                         cnt.begin());
            } else {
                std::string key;
                if (col.numericLevels) {
                    if (!std::isfinite(num))
                        throw InputError(fmt::format(
                            "home: column {} ({}) needs a number, got '{}'", j + 1, col.name,
                            txt));
                    for (std::size_t k = 0; k < col.levelNumbers.size(); ++k)
                        if (col.levelNumbers[k] == num) level = static_cast<int>(k);
                    key = keyText(num);
                } else {
                    key = std::isfinite(num) ? keyText(num) : txt;
                    for (std::size_t k = 0; k < col.levels.size(); ++k)
                        if (col.levels[k] == key) level = static_cast<int>(k);
                }
                if (level < 0)
                    throw InputError(fmt::format(
                        "home: {} '{}' does not occur among the sales used", col.name, key));
            }
            cell.level = col.levels[level];
            if (col.numericLevels) cell.number = col.levelNumbers[level];
            const int t = col.termOfLevel[level];
            if (t >= 0) x(t) = 1.0;
        }
        out.home.push_back(std::move(cell));
    }

    tb.index.assign(T, kNoValue);
    tb.lower.assign(T, kNoValue);
    tb.upper.assign(T, kNoValue);
    tb.count.resize(T);
    for (int t = 0; t < T; ++t) tb.count[t] = D.count(t);
    for (int t = 0; t < T; ++t) {
        if (!hasValue(C.L[t])) continue;
        const WindowFit& F = C.fits[C.window[t]];
        const double m = F.d(t) + x.dot(F.b);
        const double v = F.covD(t, t) + x.dot(F.Vb() * x) + 2 * x.dot(F.covDB(t));
        const double factor =
            o.retransform == Retransform::Smearing ? F.smear : std::exp(F.s2 / 2);
        tb.index[t] = std::exp(m) * (std::isfinite(factor) ? factor : 1.0);
        const double q = F.quantile(o.level);
        if (std::isfinite(v) && std::isfinite(q) && std::isfinite(factor)) {
            const double h = q * std::sqrt(std::max(v, 0.0));
            tb.lower[t] = std::exp(m - h) * factor;
            tb.upper[t] = std::exp(m + h) * factor;
        }
    }
    {
        const WindowFit& F = C.fits.back();
        out.retransformFactor =
            o.retransform == Retransform::Smearing ? F.smear : std::exp(F.s2 / 2);
        if (!std::isfinite(out.retransformFactor))
            out.diag.warn("no residual degrees of freedom: values are not retransformed");
    }
    return out;
}

}  // namespace lintel
