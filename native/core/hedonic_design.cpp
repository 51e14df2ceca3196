// Hedonic design: the characteristic columns as terms (numeric, logged, categorical with a
// reference level), the row screening, and the sales sorted by period (see hedonic.hpp).
#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <unordered_map>

#include <fmt/format.h>

#include "hedonic_internal.hpp"
#include "text_keys.hpp"
#include "work_limits.hpp"

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
    validateSmoothing(*this);
    if (smoothed() && window != 0)
        throw InputError(fmt::format(
            "smooth works on the pooled fit, not on rolling windows: use window=0 with "
            "smooth={} (for values that never revise add realtime=1)",
            smooth == SmoothKind::Level ? "level" : "trend"));
    if (smoothed() && bias == HedonicBias::Kennedy)
        throw InputError("bias=kennedy corrects the free period effects of the plain index; it "
                         "does not apply with smooth (use bias=none)");
}

namespace hedonic_detail {

namespace {
// Limits that keep the k x k system within reason (a column of ids or addresses would
// otherwise make one term per sale); the time is bounded by checkWork below.
constexpr std::size_t kMaxLevels = limits::kMaxHedonicLevels;
constexpr std::size_t kMaxTerms = limits::kMaxHedonicTerms;

// The fits' cost (limits::kMaxHedonicWork says how it is counted), refused past the limit.
void checkWork(const Design& D, const HedonicOptions& o) {
    const double n = static_cast<double>(D.y.size()), K = static_cast<double>(D.terms.size());
    const double T = static_cast<double>(D.T);
    const bool rolling = o.window > 0 && o.window < D.T;
    const double fits = rolling ? T - o.window + 1 : 1.0;
    const double rowsFitted = rolling ? n * o.window : n;
    const double hc1 = o.se == HedonicStdErr::HC1 ? 4.0 : 1.0;
    const double vintages = o.smoothed() && o.realtime ? T : 1.0;
    const double work = vintages * (fits * K * K * K + hc1 * rowsFitted * K * K);
    if (work <= limits::kMaxHedonicWork) return;
    std::string what = fmt::format("{} sales x {} terms^2", limits::grouped(n), limits::grouped(K));
    if (rolling)
        what = fmt::format("{} sales x {} windows each x {} terms^2 + {} windows x {} terms^3",
                           limits::grouped(n), o.window, limits::grouped(K),
                           limits::grouped(fits), limits::grouped(K));
    else
        what += fmt::format(" + {} terms^3", limits::grouped(K));
    if (hc1 > 1) what = "(" + what + ", x 4 for se=hc1)";
    if (vintages > 1)
        what = fmt::format("realtime: {} vintages x ({})", limits::grouped(vintages), what);
    limits::refuseWork(
        "the hedonic fit: " + what, work, "steps", limits::kMaxHedonicWork,
        "group rare levels of a categorical column (its levels are terms), use fewer "
        "characteristics, an include mask" +
            std::string(rolling ? ", a shorter window" : "") +
            (hc1 > 1 ? ", se=classical" : "") + (vintages > 1 ? ", realtime=0" : "") +
            (limits::longSpan(D.axis) ? std::string(", or ") + limits::kMistypedDateAdvice
                                      : std::string()));
}

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

}  // namespace

namespace {

// The characteristics against the dates (row counts, log of a text column).
void checkCharacteristics(const HedonicInput& in, const HedonicOptions& o) {
    const auto& chars = in.characteristics;
    const std::size_t n = in.sales.date.size();
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
}

// Row check of the characteristics: blank or invalid, or the log of a non-positive value
// (the first failing column decides).
RowProblems characteristicProblems(const HedonicInput& in, const HedonicOptions& o) {
    const std::size_t n = in.sales.date.size();
    RowProblems problem(n);
    for (std::size_t j = 0; j < in.characteristics.size(); ++j) {
        const auto& c = in.characteristics[j];
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
    return problem;
}

// The used rows sorted by period (counting sort, stable in input order), with ln price.
void sortByPeriod(const ScreenedSales& s, const SalesInput& sales, Design& D) {
    D.axis = s.axis;
    D.T = s.axis.count;
    const std::size_t m = s.rows.size();
    const auto T = static_cast<std::size_t>(D.T);
    D.start.assign(T + 1, 0);
    for (int p : s.period) ++D.start[static_cast<std::size_t>(p) + 1];
    for (std::size_t t = 0; t < T; ++t) D.start[t + 1] += D.start[t];
    std::vector<std::size_t> fillPos(D.start.begin(), D.start.end() - 1);
    D.inputRow.resize(m);
    D.period.resize(m);
    for (std::size_t j = 0; j < m; ++j) {
        const std::size_t at = fillPos[static_cast<std::size_t>(s.period[j])]++;
        D.inputRow[at] = s.rows[j];
        D.period[at] = s.period[j];
    }
    D.y.resize(m);
    for (std::size_t r = 0; r < m; ++r) D.y[r] = std::log(sales.price[D.inputRow[r]]);
}

// Level codes of a text column: levels in sorted order.
void textLevels(const CharacteristicColumn& c, const Design& D, Column& col) {
    std::unordered_map<std::string, int> seen;
    std::vector<std::string> names;
    for (std::size_t r = 0; r < col.code.size(); ++r) {
        auto [it, fresh] = seen.emplace(c.text[D.inputRow[r]], static_cast<int>(names.size()));
        if (fresh) names.push_back(it->first);
        col.code[r] = it->second;
    }
    std::vector<int> order(names.size());
    for (std::size_t k = 0; k < order.size(); ++k) order[k] = static_cast<int>(k);
    std::sort(order.begin(), order.end(), [&](int a, int b) {
        return names[static_cast<std::size_t>(a)] < names[static_cast<std::size_t>(b)];
    });
    std::vector<int> rank(order.size());
    for (std::size_t k = 0; k < order.size(); ++k) {
        const auto at = static_cast<std::size_t>(order[k]);
        rank[at] = static_cast<int>(k);
        col.levels.push_back(names[at]);
    }
    for (auto& x : col.code) x = rank[static_cast<std::size_t>(x)];
}

// Level codes of a numeric column treated as categories: levels in numeric order, written
// with keyText.
void numberLevels(const CharacteristicColumn& c, const Design& D, Column& col) {
    col.numericLevels = true;
    std::map<double, int> seen;
    for (std::size_t r = 0; r < col.code.size(); ++r) seen.emplace(c.numeric[D.inputRow[r]], 0);
    int k = 0;
    for (auto& [v, idx] : seen) {
        idx = k++;
        col.levelNumbers.push_back(v);
        col.levels.push_back(keyText(v));
    }
    for (std::size_t r = 0; r < col.code.size(); ++r)
        col.code[r] = seen.at(c.numeric[D.inputRow[r]]);
}

// A categorical column: its levels, the reference level (the most frequent; ties: the
// first in sorted order) and one term per other level.
void addCategorical(const CharacteristicColumn& c, std::size_t j, bool isText, Design& D,
                    Column& col) {
    col.code.resize(D.inputRow.size());
    if (isText) textLevels(c, D, col);
    else numberLevels(c, D, col);
    if (col.levels.size() > kMaxLevels)
        throw InputError(fmt::format(
            "characteristics column {} ({}) has {} different values; a categorical "
            "column may have at most {} (is it an id or an address?)",
            j + 1, col.name, col.levels.size(), kMaxLevels));
    col.levelCount.assign(col.levels.size(), 0);
    for (int x : col.code) ++col.levelCount[static_cast<std::size_t>(x)];
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
    if (col.levels.size() == 1) D.singleLevel.push_back({col.name, "single level"});
}

// A numeric column: one term, its values (logged when asked) per sorted row.
void addNumeric(const CharacteristicColumn& c, std::size_t j, Design& D, Column& col) {
    const std::size_t m = D.inputRow.size();
    col.value.resize(m);
    for (std::size_t r = 0; r < m; ++r) {
        const double v = c.numeric[D.inputRow[r]];
        col.value[r] = col.logged ? std::log(v) : v;
    }
    D.terms.push_back({col.logged ? "log(" + col.name + ")" : col.name, static_cast<int>(j)});
    col.termCount = 1;
}

}  // namespace

Design buildDesign(const HedonicInput& in, const HedonicOptions& o) {
    o.validate();
    checkCharacteristics(in, o);
    const RowProblems problem = characteristicProblems(in, o);
    Design D;
    const ScreenedSales s = screenSales(in.sales, o.freq, D.diag, &problem);
    sortByPeriod(s, in.sales, D);

    // Columns and terms.
    const std::size_t n = in.sales.date.size();
    for (std::size_t j = 0; j < in.characteristics.size(); ++j) {
        const auto& c = in.characteristics[j];
        Column col;
        col.name = columnName(c, j);
        const int number = static_cast<int>(j + 1);
        const bool isText = c.numeric.size() != n;
        col.categorical = isText || contains(o.categoricalColumns, number);
        col.logged = contains(o.logColumns, number);
        col.firstTerm = static_cast<int>(D.terms.size());
        if (col.categorical) addCategorical(c, j, isText, D, col);
        else addNumeric(c, j, D, col);
        D.cols.push_back(std::move(col));
    }
    if (D.terms.size() > kMaxTerms)
        throw InputError(fmt::format("the characteristics make {} terms; at most {} are allowed",
                                     D.terms.size(), kMaxTerms));
    checkWork(D, o);
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

}  // namespace hedonic_detail

}  // namespace lintel
