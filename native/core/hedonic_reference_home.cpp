// REFHOMEVALUE: the value of a fixed reference home in every period from the hedonic fits
// (formulas and sources in hedonic.hpp).
#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "hedonic_internal.hpp"
#include "text_keys.hpp"

namespace lintel {

using namespace hedonic_detail;

namespace {

// The sorted rows [b0, b1) of the base period, whose median or most frequent level fills a
// blank cell of the home.
struct BaseRows {
    std::size_t b0 = 0, b1 = 0;
};

// One numeric cell of the home: the number given, or the base period's median.
void numericCell(const HedonicInput& input, const Design& D, const BaseRows& base, std::size_t j,
                 double num, const std::string& txt, HomeCell& cell, VectorXd& x) {
    const Column& col = D.cols[j];
    if (cell.typical) {
        std::vector<double> v;
        v.reserve(base.b1 - base.b0);
        const auto& raw = input.characteristics[j].numeric;
        for (std::size_t r = base.b0; r < base.b1; ++r) v.push_back(raw[D.inputRow[r]]);
        cell.number = stats::median(std::move(v));
    } else if (!std::isfinite(num)) {
        throw InputError(fmt::format("home: column {} ({}) needs a number, got '{}'", j + 1,
                                     col.name, txt));
    } else {
        cell.number = num;
    }
    if (col.logged && !(cell.number > 0))
        throw InputError(fmt::format(
            "home: column {} ({}) is taken in logs and needs a positive value", j + 1, col.name));
    x(col.firstTerm) = col.logged ? std::log(cell.number) : cell.number;
}

// One categorical cell of the home: the level given (a number as keyText), or the base
// period's most frequent level.
void categoricalCell(const Design& D, const BaseRows& base, std::size_t j, double num,
                     const std::string& txt, HomeCell& cell, VectorXd& x) {
    const Column& col = D.cols[j];
    int level = -1;
    if (cell.typical) {
        std::vector<std::size_t> cnt(col.levels.size(), 0);
        for (std::size_t r = base.b0; r < base.b1; ++r) ++cnt[static_cast<std::size_t>(col.code[r])];
        level = static_cast<int>(std::max_element(cnt.begin(), cnt.end()) - cnt.begin());
    } else {
        std::string key;
        if (col.numericLevels) {
            if (!std::isfinite(num))
                throw InputError(fmt::format("home: column {} ({}) needs a number, got '{}'",
                                             j + 1, col.name, txt));
            for (std::size_t k = 0; k < col.levelNumbers.size(); ++k)
                if (col.levelNumbers[k] == num) level = static_cast<int>(k);
            key = keyText(num);
        } else {
            key = std::isfinite(num) ? keyText(num) : txt;
            for (std::size_t k = 0; k < col.levels.size(); ++k)
                if (col.levels[k] == key) level = static_cast<int>(k);
        }
        if (level < 0)
            throw InputError(fmt::format("home: {} '{}' does not occur among the sales used",
                                         col.name, key));
    }
    const auto at = static_cast<std::size_t>(level);
    cell.level = col.levels[at];
    if (col.numericLevels) cell.number = col.levelNumbers[at];
    const int t = col.termOfLevel[at];
    if (t >= 0) x(t) = 1.0;
}

// The home's term vector x: given cells, blanks from the base period b's typical home.
VectorXd homeTerms(const HedonicInput& input, const HomeInput& home, const Design& D, int b,
                   std::vector<HomeCell>& cells) {
    VectorXd x = VectorXd::Zero(D.K());
    const BaseRows base{D.start[static_cast<std::size_t>(b)],
                        D.start[static_cast<std::size_t>(b) + 1]};
    for (std::size_t j = 0; j < input.characteristics.size(); ++j) {
        const Column& col = D.cols[j];
        const double num = j < home.numbers.size() ? home.numbers[j] : kNoValue;
        const std::string txt = j < home.texts.size() ? home.texts[j] : std::string();
        HomeCell cell;
        cell.column = col.name;
        cell.categorical = col.categorical;
        cell.typical = !std::isfinite(num) && txt.empty();
        if (col.categorical) categoricalCell(D, base, j, num, txt, cell, x);
        else numericCell(input, D, base, j, num, txt, cell, x);
        cells.push_back(std::move(cell));
    }
    return x;
}

double retransformFactor(const WindowFit& F, Retransform r) {
    return r == Retransform::Smearing ? F.smear : std::exp(F.s2 / 2);
}

}  // namespace

RefHomeResult referenceHomeValue(const HedonicInput& input, const HomeInput& home,
                                 const HedonicOptions& o) {
    Design D = buildDesign(input, o);
    const std::size_t nCols = input.characteristics.size();
    if ((!home.numbers.empty() && home.numbers.size() != nCols) ||
        (!home.texts.empty() && home.texts.size() != nCols)) {
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
    const VectorXd x = homeTerms(input, home, D, b, out.home);

    // exp(d_t + x'b) times the retransformation factor; the band from var(d_t + x'b).
    tb.index.assign(static_cast<std::size_t>(T), kNoValue);
    tb.lower.assign(static_cast<std::size_t>(T), kNoValue);
    tb.upper.assign(static_cast<std::size_t>(T), kNoValue);
    tb.count.resize(static_cast<std::size_t>(T));
    for (int t = 0; t < T; ++t) tb.count[t] = D.count(t);
    for (int t = 0; t < T; ++t) {
        if (!hasValue(C.L[t])) continue;
        const WindowFit& F = C.fits[static_cast<std::size_t>(C.window[t])];
        const double m = F.d(t) + x.dot(F.b);
        const double v = F.covD(t, t) + x.dot(F.Vb() * x) + 2 * x.dot(F.covDB(t));
        const double factor = retransformFactor(F, o.retransform);
        tb.index[t] = std::exp(m) * (std::isfinite(factor) ? factor : 1.0);
        // A home far outside the sales (an area of 1e308) has a value beyond the range of
        // numbers: say so rather than show a blank (issue 10).
        if (!std::isfinite(tb.index[t]) || (tb.index[t] == 0 && std::isfinite(m)))
            throw InputError(fmt::format(
                "the home's value in {} is beyond the range of numbers (its log value is {:.4g}): "
                "check the home's characteristics against the sales'",
                D.axis.label(t), m));
        const double q = F.quantile(o.level);
        if (std::isfinite(v) && std::isfinite(q) && std::isfinite(factor)) {
            const double h = q * std::sqrt(std::max(v, 0.0));
            tb.lower[t] = std::exp(m - h) * factor;
            tb.upper[t] = std::exp(m + h) * factor;
        }
    }
    out.retransformFactor = retransformFactor(C.fits.back(), o.retransform);
    if (!std::isfinite(out.retransformFactor))
        out.diag.warn("no residual degrees of freedom: values are not retransformed");
    return out;
}

}  // namespace lintel
