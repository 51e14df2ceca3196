// INDEXHEDONIC, HEDONICCOEFS, REFHOMEVALUE: the hedonic time-dummy functions. Table entries,
// cell conversion and layout only; the statistics live in native/core/hedonic.{hpp,cpp}
// (method: docs/methods/hedonic.md).
#include <climits>
#include <cmath>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "bind.hpp"
#include "function_table.hpp"
#include "hedonic.hpp"
#include "inputs.hpp"
#include "label_text.hpp"
#include "text_keys.hpp"
#include "smoothing_options.hpp"

namespace lintel::addin {

namespace {

// A text that is only digits ("101", "0042"): in a column without number cells it is taken
// for a code (a category level), not a quantity.
bool plainDigits(const std::string& t) {
    const std::string_view v = trimBlanks(t);
    if (v.empty()) return false;
    for (char ch : v)
        if (ch < '0' || ch > '9') return false;
    return true;
}

// characteristics -> one CharacteristicColumn per column, classified by the core's rule
// (classifyColumn). With header=1 the first row holds the column names. A text that reads as a
// number with the document's separators ("1,250", "85.5") counts as that number; a text of
// digits only does so where the column also holds number cells. With labels=clean the texts
// of a category column are compared cleaned (each group written as its most frequent
// spelling); `levels` then gets, per column, each label key with its spelling (for the home).
std::vector<CharacteristicColumn> readCharacteristics(
    const Range& chars, std::size_t header, const NumberFormat& format, LabelMode labels,
    std::vector<std::vector<std::pair<std::string, std::string>>>* levels = nullptr) {
    std::vector<CharacteristicColumn> out;
    out.reserve(chars.cols);
    const std::size_t n = chars.rows > header ? chars.rows - header : 0;
    std::vector<double> numbers;
    std::vector<std::string> texts;
    if (levels) levels->assign(chars.cols, {});
    for (std::size_t c = 0; c < chars.cols; ++c) {
        std::string name = header ? cellKey(chars.at(0, c)) : std::string();
        numbers.clear();
        texts.clear();
        numbers.reserve(n);
        texts.reserve(n);
        bool numberCells = false;
        for (std::size_t i = header; i < chars.rows && !numberCells; ++i) numberCells = chars.at(i, c).isNumber();
        for (std::size_t i = header; i < chars.rows; ++i) {
            const Cell& cell = chars.at(i, c);
            double x = cellNumber(cell);
            if (cell.isText() && (numberCells || !plainDigits(cell.text))) x = cellNumber(cell, format);
            numbers.push_back(x);
            texts.push_back(cell.isText() && std::isnan(x) ? cell.text : std::string());  // a number gives ""
        }
        if (labels == LabelMode::Clean) {
            const LabelGroups g = groupLabels(texts);
            for (std::size_t i = 0; i < texts.size(); ++i)
                texts[i] = g.groupOfRow[i] < 0 ? std::string() : g.groups[static_cast<std::size_t>(g.groupOfRow[i])].display;
            if (levels)
                for (const LabelGroup& l : g.groups) (*levels)[c].emplace_back(l.key, l.display);
        }
        out.push_back(classifyColumn(std::move(name), numbers, texts));
    }
    return out;
}

HedonicInput readInput(const Call& call,
                       std::vector<std::vector<std::pair<std::string, std::string>>>* levels = nullptr) {
    const Range& chars = call.required("characteristics");
    HedonicInput in;
    // Checks that dates, prices, include and characteristics have the same rows.
    in.sales = readSales(call, {{"characteristics", &chars}});
    in.characteristics = readCharacteristics(chars, call.headerRows(), call.ctx().numbers,
                                             call.options<ReadOptions>().labels, levels);
    return in;
}

// home -> HomeInput: one row, a cell per characteristics column (with header=1 a header row
// above it may be included). Omitted, or a single blank cell: the base period's median home (both vectors
// empty). The core checks the number of cells against the characteristics. Numbers written as
// text are read as in the characteristics; with labels=clean a category is matched cleaned
// (`levels` from readCharacteristics).
HomeInput readHome(const Arg& arg, std::size_t header, const NumberFormat& format,
                   const std::vector<std::vector<std::pair<std::string, std::string>>>& levels) {
    HomeInput home;
    if (!arg) return home;
    const Range& r = *arg;
    if (r.rows * r.cols == 1 && r.at(0, 0).isEmpty()) return home;
    std::size_t row = 0;
    if (header && r.rows == 2) row = 1;
    else if (r.rows != 1)
        throw InputError(fmt::format(
            "home must be one row with a cell per characteristics column, got {} rows{}", r.rows,
            header ? " (with header=1: one row, or a header row and one row)" : ""));
    home.numbers.reserve(r.cols);
    home.texts.reserve(r.cols);
    for (std::size_t c = 0; c < r.cols; ++c) {
        const Cell& cell = r.at(row, c);
        const double x = cell.isText() && !plainDigits(cell.text) ? cellNumber(cell, format) : cellNumber(cell);
        home.numbers.push_back(x);
        std::string text = cell.isText() && std::isnan(x) ? cell.text : std::string();
        if (!text.empty() && c < levels.size() && !levels[c].empty()) {
            const std::string key = labelKey(text);
            for (const auto& [k, display] : levels[c])
                if (k == key) text = display;
        }
        home.texts.push_back(std::move(text));
    }
    return home;
}

OutTable indexHedonic(const Call& call) {
    const HedonicOptions o = call.options<HedonicOptions>();
    if (o.smoothed()) return smoothedIndexCells(smoothedHedonicIndex(readInput(call), o), call, false);
    return indexTableCells(hedonicIndex(readInput(call), o), call);
}

OutTable hedonicCoefs(const Call& call) {
    const HedonicOptions o = call.options<HedonicOptions>();
    const HedonicFit fit = hedonicFit(readInput(call), o);
    const std::size_t kWidth = call.spec().width();
    OutTable out;
    titleRow(out, call);
    for (const auto& t : fit.terms) {
        out.addRow();
        out.text(t.name);
        out.num(t.coefficient);
        out.num(t.stdError);
        out.num(t.tValue);
    }
    labelRow(out, "observations", static_cast<double>(fit.observations), kWidth);
    labelRow(out, "dropped", static_cast<double>(fit.rowsDropped), kWidth);
    labelRow(out, "R-squared", fit.rSquared, kWidth);
    labelRow(out, "adjusted R-squared", fit.adjRSquared, kWidth);
    labelRow(out, "residual standard error", fit.residualSE, kWidth);
    labelRow(out, "residual df", fit.dfResidual, kWidth);
    std::string dropped;
    for (const auto& d : fit.droppedTerms)
        dropped += fmt::format("{}{} ({})", dropped.empty() ? "" : ", ", d.name, d.why);
    out.addRow();
    out.text("dropped terms");
    if (dropped.empty()) out.none(); else out.text(dropped);
    for (std::size_t i = 2; i < kWidth; ++i) out.none();
    if (call.layout().notes) appendNotes(out, fit.diag, kWidth);
    return out;
}

OutTable refHomeValue(const Call& call) {
    const HedonicOptions o = call.options<HedonicOptions>();
    std::vector<std::vector<std::pair<std::string, std::string>>> levels;
    const HedonicInput in = readInput(call, &levels);
    const HomeInput home = readHome(call.arg("home"), call.headerRows(), call.ctx().numbers, levels);
    const RefHomeResult r = referenceHomeValue(in, home, o);
    const std::size_t kWidth = call.spec().width();
    OutTable out;
    titleRow(out, call);
    const IndexTable& tb = r.table;
    for (int i = 0; i < tb.axis.count; ++i) {
        out.addRow();
        out.num(tb.axis.start(i) - call.ctx().dateOffset);
        out.num(tb.index[i]);  // the home's value
        out.num(tb.lower[i]);
        out.num(tb.upper[i]);
    }
    if (call.layout().notes) {
        for (const auto& c : r.home) {
            out.addRow();
            out.text("home: " + c.column);
            if (c.categorical) out.text(c.level); else out.num(c.number);
            if (c.typical) out.text("base-period median home"); else out.none();
            out.none();
        }
        labelRow(out, "retransformation factor", r.retransformFactor, kWidth);
        appendNotes(out, r.diag, kWidth);
    }
    return out;
}

// Arguments and options, each described once.
ArgSpec characteristicsArg() {
    return {"characteristics", ArgKind::Column,
            "Characteristics of each sold home, one column per characteristic (floor area, "
            "rooms, district ...), rows aligned with dates. Number columns enter as numbers "
            "(also numbers written as text, such as 1,250), text columns as categories (one "
            "term per level except the most frequent)."};
}
ArgSpec homeArg() {
    return {"home", ArgKind::Optional,
            "The reference home: one row with a value per characteristics column, in the same "
            "order. Left empty (or a blank cell): the base period's median home, i.e. the base "
            "period's median of each number column and most frequent level of each category "
            "column; a blank cell takes that column's base-period value. With header=1 the "
            "range may include its header row."};
}
using O = HedonicOptions;

OptionSpec logOption() {
    return option("log", columns<O>(&O::logColumns),
                  "Characteristics columns (1 = leftmost) that enter as natural logs, e.g. "
                  "\"log=1,3\" for floor area and lot size. Zero or negative values drop the row.");
}
OptionSpec categoricalOption() {
    return option("categorical", columns<O>(&O::categoricalColumns),
                  "Number columns to treat as categories, e.g. \"categorical=2\" for bedrooms or "
                  "a district code. Text columns always are.");
}
OptionSpec windowOption() {
    return option("window", whole<O>(&O::window, 0, 1000000),
                  "0: one pooled fit over all periods (past values revise as sales are added). k "
                  ">= 2: rolling window of k periods chained period to period, published values "
                  "never revise; 2 is the adjacent-period method.");
}
OptionSpec seOption() {
    return option("se",
                  choice<O>(&O::se, std::vector<std::pair<std::string, HedonicStdErr>>{
                                        {"classical", HedonicStdErr::Classical},
                                        {"hc1", HedonicStdErr::HC1}}),
                  "Standard errors and bands: \"classical\" OLS, or \"hc1\" "
                  "heteroskedasticity-robust (White, HC1).");
}
OptionSpec biasOption() {
    return option("bias",
                  choice<O>(&O::bias, std::vector<std::pair<std::string, HedonicBias>>{
                                          {"none", HedonicBias::None},
                                          {"kennedy", HedonicBias::Kennedy}}),
                  "\"kennedy\": Kennedy's (1981) correction 100 exp(d - var(d)/2) of the index; "
                  "\"none\": 100 exp(d).");
}
OptionSpec headerOption() {
    OptionSpec h = spec::header();
    h.description =
        "1 when every input range starts with a header row: it is skipped, and the "
        "characteristics' header gives the term names (else x1, x2 ...).";
    return h;
}
OptionSpec minsalesOption() {
    return spec::minsales<O>(
        "Periods with fewer sales than this show no value (blank cells); their sales still "
        "enter the fit.");
}
OptionSpec coefsMinsalesOption() {
    return spec::minsales<O>(
        "Periods with fewer sales than this are not taken as the reference period (as in "
        "INDEXHEDONIC they show no index value there); their sales still enter the fit.");
}
ArgSpec referenceArg() {
    ArgSpec a = spec::base<O>();
    a.description =
        "A date; the period that contains it is the reference period: the intercept is its "
        "log price level and each period term the difference to it. Empty: the first period "
        "with a value.";
    return a;
}
OptionSpec retransformOption() {
    return option("retransform",
                  choice<O>(&O::retransform, std::vector<std::pair<std::string, Retransform>>{
                                                 {"smearing", Retransform::Smearing},
                                                 {"lognormal", Retransform::Lognormal}}),
                  "Back-transformation of the log price: \"smearing\" (Duan 1983, mean of "
                  "exp(residual)) or \"lognormal\" (exp(s^2/2), normal errors).");
}

std::vector<OptionSpec> indexOptions() {
    std::vector<OptionSpec> v = {logOption(), categoricalOption(), windowOption(), seOption(),
                                 biasOption()};
    for (OptionSpec& s : smoothingOptions<O>(
             "Without smooth, window=k gives values that never revise."))
        v.push_back(std::move(s));
    OptionSpec minsales = minsalesOption();
    minsales.description += " With smooth they get a value from the model instead.";
    for (OptionSpec s : {minsales, spec::level<O>(), spec::dateorder(),
                         spec::labels("text characteristics (categories)"), headerOption(), spec::titles(),
                         smoothingNotesOption()})
        v.push_back(std::move(s));
    return v;
}

}  // namespace

std::vector<FunctionSpec> hedonicFunctions() {
    const std::vector<ArgSpec> fitArgs = {spec::dates(), spec::prices(), characteristicsArg(),
                                          spec::include(), spec::freq<O>(), spec::base<O>(),
                                          spec::options()};
    const std::vector<ArgSpec> coefsArgs = {spec::dates(), spec::prices(), characteristicsArg(),
                                            spec::include(), spec::freq<O>(), referenceArg(),
                                            spec::options()};
    const std::vector<ArgSpec> homeArgs = {spec::dates(),   spec::prices(),  characteristicsArg(),
                                           homeArg(),       spec::include(), spec::freq<O>(),
                                           spec::base<O>(), spec::options()};
    FunctionSpec index{
        "indexHedonic",
        "INDEXHEDONIC",
        "Hedonic time-dummy index: log price explained by the homes' characteristics and the "
        "period of sale (OLS), the index is 100 exp(period effect - base effect). Adjusts for "
        "the mix of homes sold.",
        fitArgs,
        indexOptions(),
        spec::indexColumns(),
        spec::indexOutput() +
            " Bands: the confidence interval of the change from the base period (the base row "
            "is 100 | 100). With smooth: the smoothed index and its band (normal quantiles); "
            "every period of the range has a value.",
        "=INDEXHEDONIC(A2:A5001;B2:B5001;C2:F5001;;\"Q\";;\"log=1; categorical=2\")",
        indexHedonic};

    FunctionSpec coefs{
        "hedonicCoefs",
        "HEDONICCOEFS",
        "The fitted hedonic model behind INDEXHEDONIC: coefficient, standard error and t of "
        "each term (intercept = the reference period, characteristics, other periods), then "
        "the fit statistics.",
        coefsArgs,
        {logOption(), categoricalOption(), windowOption(), seOption(), coefsMinsalesOption(),
         spec::dateorder(), spec::labels("text characteristics (categories)"), headerOption(),
         spec::titles(), spec::notes()},
        {{"term", ""}, {"coefficient", "0.0000"}, {"std error", "0.0000"}, {"t", "0.00"}},
        "4 columns: term | coefficient | std error | t, one row per term: (Intercept) (the "
        "reference period's log level), the characteristic terms (named from the header row "
        "with header=1, else x1, x2 ...; a category as name=level), then \"period 2024-03\" "
        "rows (difference to the reference period). Then label | value rows: observations, "
        "dropped (rows), R-squared, adjusted R-squared, residual standard error, residual df, "
        "dropped terms (aliased terms with the reason). With window=k: the latest window's fit.",
        "=HEDONICCOEFS(A2:A5001;B2:B5001;C2:F5001;;;;\"log=1; categorical=2\")",
        hedonicCoefs};

    FunctionSpec home{
        "refHomeValue",
        "REFHOMEVALUE",
        "Estimated price of one fixed reference home in every period, from the hedonic model "
        "(retransformed from logs), with a confidence band for the model's price of that home.",
        homeArgs,
        {logOption(), categoricalOption(), windowOption(), seOption(), retransformOption(),
         minsalesOption(), spec::level<O>(), spec::dateorder(), spec::labels("text characteristics (categories)"), headerOption(),
         spec::titles(), spec::notes()},
        {{"period", "YYYY-MM-DD"}, {"value", "#,##0"}, {"lower", "#,##0"}, {"upper", "#,##0"}},
        "4 columns, one row per period: period start date | value | lower band | upper band. "
        "Periods without enough sales show blank cells. With notes=1: the home used (one row "
        "per characteristic, \"base-period median home\" where that home filled it in), the "
        "retransformation factor and the diagnostics.",
        "=REFHOMEVALUE(A2:A5001;B2:B5001;C2:F5001;H2:K2;;\"Q\";;\"log=1\")",
        refHomeValue};
    return {index, coefs, home};
}

}  // namespace lintel::addin
