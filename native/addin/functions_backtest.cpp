// INDEXBACKTEST: which index to quote, measured on the user's own sales. Table entry, cell
// conversion and layout only; folds, predictions, revisions and the rule are in
// native/core/backtest.{hpp,cpp} (method: docs/methods/backtest.md); method rows are read in
// backtest_methods.cpp with the bindings of each method's own function.
#include <string>
#include <vector>

#include <fmt/format.h>

#include "backtest.hpp"
#include "backtest_methods.hpp"
#include "bind.hpp"
#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"

namespace lintel::addin {

namespace {

using O = BacktestOptions;

// A range argument given with a value (omitted, or a single blank cell, is not given).
const Range* givenRange(const Call& call, const char* name) {
    return call.given(name) ? &*call.arg(name) : nullptr;
}

// characteristics -> one column each, classified by the core's rule (classifyColumn), the
// same reading as INDEXHEDONIC's; with header=1 the first row names the columns.
std::vector<CharacteristicColumn> readCharacteristics(const Range& chars, std::size_t header) {
    std::vector<CharacteristicColumn> out;
    std::vector<double> numbers;
    std::vector<std::string> texts;
    for (std::size_t c = 0; c < chars.cols; ++c) {
        numbers.clear();
        texts.clear();
        for (std::size_t i = header; i < chars.rows; ++i) {
            const Cell& cell = chars.at(i, c);
            numbers.push_back(cellNumber(cell));
            texts.push_back(cell.isText() ? cell.text : std::string());
        }
        out.push_back(classifyColumn(header ? cellKey(chars.at(0, c)) : std::string(), numbers, texts));
    }
    return out;
}

// The methods argument: each non-blank cell is a row; a cell may hold several rows on lines.
std::vector<std::string> methodRows(const Call& call, bool characteristics, bool strata) {
    const Range* r = givenRange(call, "methods");
    if (!r) return defaultMethodRows(characteristics, strata);
    std::vector<std::string> rows;
    for (std::size_t i = 0; i < r->rows; ++i)
        for (std::size_t c = 0; c < r->cols; ++c) {
            const Cell& cell = r->at(i, c);
            if (cell.isEmpty()) continue;
            if (!cell.isText())
                throw InputError(fmt::format("methods row {} must be text such as \"median\" or "
                                             "\"hedonic log=1\", got a number",
                                             rows.size() + 1));
            std::size_t pos = 0;
            while (pos <= cell.text.size()) {
                std::size_t end = cell.text.find('\n', pos);
                if (end == std::string::npos) end = cell.text.size();
                rows.push_back(cell.text.substr(pos, end - pos));
                pos = end + 1;
            }
        }
    return rows;
}

BacktestInput readInput(const Call& call) {
    const Range& ids = call.required("ids");
    const Range& dates = call.required("dates");
    const Range& prices = call.required("prices");
    const Range* chars = givenRange(call, "characteristics");
    const Range* strata = givenRange(call, "strata");
    const Range* changed = changedColumn(call, dates);
    std::vector<NamedRange> cols = {{"ids", &ids}, {"dates", &dates}, {"prices", &prices}};
    if (changed) cols.push_back({"changed", changed});
    checkAligned(cols);

    std::vector<NamedRange> extra = {{"ids", &ids}};
    if (chars) extra.push_back({"characteristics", chars});
    if (strata) extra.push_back({"strata", strata});
    BacktestInput in;
    in.sales = readSales(call, extra);
    const std::size_t h = call.headerRows();
    in.id = keyColumn(ids, h);
    if (chars) in.characteristics = readCharacteristics(*chars, h);
    if (strata)
        for (std::size_t c = 0; c < strata->cols; ++c) in.strata.push_back(keyColumn(*strata, h, c));
    if (changed) in.changed = changedFlags(*changed, h);
    in.methods = parseMethodRows(methodRows(call, chars != nullptr, strata != nullptr));
    return in;
}

OutTable indexBacktest(const Call& call) {
    const O o = call.options<O>();
    const BacktestInput in = readInput(call);
    const BacktestResult r = backtest(in, o);
    const std::size_t width = call.spec().width();
    OutTable out;
    titleRow(out, call);
    for (const BacktestRow& m : r.methods) {
        out.addRow();
        out.text(m.label);
        if (m.estimated) out.num(static_cast<double>(m.pairsPredicted)); else out.none();
        out.num(m.medianAbsError);
        out.num(m.rmsError);
        out.num(m.meanRevision);
        out.num(m.maxRevision);
        out.num(m.volatility);
        out.num(m.estimated ? 100 * m.missingShare : kNoValue);
        if (m.rank > 0) out.num(m.rank); else out.none();
        out.num(m.recommended ? 1 : 0);
        out.text(m.reason);
    }
    if (call.layout().notes) {
        labelRow(out, "held-out resales", static_cast<double>(r.pairs), width);
        labelRow(out, "properties with resales", static_cast<double>(r.properties), width);
        labelRow(out, "folds", r.folds, width);
        labelRow(out, "revision periods", r.revisions, width);
        appendNotes(out, r.diag, width);
    }
    return out;
}

std::string nonNegative(double x) { return x >= 0 ? std::string() : std::string("must be 0 or more"); }

}  // namespace

std::vector<FunctionSpec> backtestFunctions() {
    FunctionSpec backtestSpec{
        "indexBacktest",
        "INDEXBACKTEST",
        "Which index to quote: tests candidate index methods on your own sales. Each method "
        "predicts resales it has not seen (k-fold over properties), is re-estimated without "
        "the last periods (revision), and is ranked: accuracy first, then revision, then "
        "periods without a value. One row per method with a one-line reason.",
        {{"ids", ArgKind::Column,
          "Property id of each sale, one column aligned with dates (as CHAINRS: blanks around "
          "an id ignored, case matters, 123 and \"123\" are one id). Folds are drawn over "
          "properties; a sale with a blank id is never held out."},
         spec::dates(), spec::prices(),
         {"characteristics", ArgKind::Optional,
          "Optional characteristics for hedonic methods, one column each, rows aligned with "
          "dates (as INDEXHEDONIC). Give the exact range: a whole column is read to its end."},
         {"strata", ArgKind::Optional,
          "Optional strata columns for mix methods, rows aligned with dates (as INDEXMIX)."},
         {"changed", ArgKind::Optional,
          "Optional column of 1/0: 1 where the property was renovated, extended or rebuilt "
          "before this sale (as CHAINRS): the pair ending there is neither held out nor used."},
         spec::include(), spec::freq<O>(" Every method is estimated at this frequency."),
         {"methods", ArgKind::Optional,
          "Candidate methods, one text row each: median, mean, mix, hedonic or repeat, then "
          "that function's options, e.g. \"hedonic log=1\", \"repeat method=bmn\", \"mix "
          "chain=1\". Empty: median, mean, mix (with strata), hedonic (with characteristics) "
          "and repeat."},
         spec::options()},
        {option("folds", whole<O>(&O::folds, 2, kMaxFolds),
                "Number of folds: the properties are split into this many groups, each held out "
                "once."),
         option("seed", whole<O>(&O::seed, 0),
                "Seed of the fold assignment and of the bootstrap behind the tie rule (a whole "
                "number >= 0); the same seed and sales give the same result."),
         option("revisions", whole<O>(&O::revisions, 0, 120).withDefault("one year (12 M, 4 Q, 2 Y)"),
                "Revision test: the index is re-estimated with the last 1, 2 ... this many "
                "periods removed; 0 turns the test off."),
         spec::minsales<O>(
             "Fewest sales (pairs for repeat) for a period to have a value, for every method "
             "whose row does not set its own minsales."),
         option("minhold", number<O>(&O::minHoldMonths, &nonNegative),
                "Held-out resales: pairs held fewer completed months than this are not tested "
                "(as CHAINRS's minhold); 0 = off."),
         option("maxrate", number<O>(&O::maxRate, &nonNegative),
                "Held-out resales: pairs whose annualised log return exceeds this are not "
                "tested (as CHAINRS's maxrate); 0 = off."),
         spec::header(), spec::titles(), spec::notes()},
        {{"method", ""}, {"pairs", "0"}, {"median abs error %", "0.0"}, {"rms error %", "0.0"},
         {"mean revision %", "0.00"}, {"largest revision %", "0.00"}, {"volatility", "0.00"},
         {"missing %", "0"}, {"rank", "0"}, {"recommended", "0"}, {"reason", ""}},
        "11 columns, one row per method in the order given: method (the row's text) | pairs "
        "(held-out resales it predicted) | median abs error % and rms error % (100 x the log "
        "error of the predicted second price) | mean and largest revision % of values already "
        "published when the last periods are removed | volatility (sd of the period log "
        "changes, log points) | missing % (periods of the data's span without a value) | rank "
        "(1 = best; blank: not ranked) | recommended (1 for the method to quote) | reason (one "
        "line). A method that fails shows its message as the reason. With notes=1: the "
        "held-out resales, properties, folds, revision periods and the diagnostics. The rule: "
        "docs/methods/backtest.md.",
        "=INDEXBACKTEST(C2:C12010;A2:A12010;B2:B12010;E2:H12010;D2:E12010;J2:J12010;;\"M\";"
        "L2:L6;\"titles=1\")",
        indexBacktest};
    return {backtestSpec};
}

}  // namespace lintel::addin
