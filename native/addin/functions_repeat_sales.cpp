// CHAINRS, RSPAIRS: the repeat-sales functions. Table entries, cell conversion and layout
// only; the pairs, filters and estimators live in native/core/repeat_sales.{hpp,cpp} and
// repeat_sales_pairs.cpp (method: docs/methods/repeat_sales.md; wiring notes:
// docs/notes/addin-repeat_sales.md).
#include <climits>
#include <cmath>
#include <cstdlib>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "repeat_sales.hpp"

namespace lintel::addin {

namespace {

// Argument positions: ids, dates, prices, changed, include, then CHAINRS freq, base, options
// and RSPAIRS options.
constexpr std::size_t kIds = 0, kDates = 1, kPrices = 2, kChanged = 3, kInclude = 4;
constexpr std::size_t kIndexFreq = 5, kIndexBase = 6, kIndexOptions = 7;
constexpr std::size_t kPairsOptions = 5;
constexpr std::size_t kPairsWidth = 10;

const FunctionSpec& self(const char* method) { return *findFunctionByMethod(method); }

// ids, dates, prices, changed, include -> RepeatSalesInput. The row checks name ids first
// ("ids has 100 rows, dates has 99"); include, the header row and empty rows go through
// readSales.
RepeatSalesInput readInput(const std::vector<Arg>& a, const OptionBag& opts,
                           const CallContext& ctx) {
    const Range& ids = required(a[kIds], "ids");
    const Range& dates = required(a[kDates], "dates");
    const Range& prices = required(a[kPrices], "prices");
    const Range* changed = a[kChanged] ? &*a[kChanged] : nullptr;
    if (changed && changed->rows * changed->cols == 1 && dates.rows != 1) {
        // A single value: blank or 0 means no property changed; anything else is a mistake
        // (every pair would be dropped).
        if (cellFlag(changed->at(0, 0)))
            throw InputError(
                "changed must be a column aligned with dates (1 where the property changed "
                "before that sale), got a single value");
        changed = nullptr;
    }
    std::vector<NamedRange> cols = {{"ids", &ids}, {"dates", &dates}, {"prices", &prices}};
    if (changed) cols.push_back({"changed", changed});
    checkAligned(cols);  // one column each, same rows

    // The empty-row test looks at ids, dates and prices (a flag beside an empty row, e.g. a
    // formula column of 0s running past the data, does not make it a sale).
    RepeatSalesInput in;
    in.sales = readSales(a[kDates], a[kPrices], a[kInclude], opts, ctx, {{"ids", &ids}});
    const std::size_t h = headerRows(opts);
    // Ids as cellKey writes them: text as it is (the core trims it), numbers in canonical form
    // (the same text as the core's propertyIdFromNumber, so 123 and "123" are one property).
    in.id = keyColumn(ids, h);
    if (changed) {
        in.changed.reserve(changed->rows - h);
        for (std::size_t i = h; i < changed->rows; ++i)
            in.changed.push_back(cellFlag(changed->at(i, 0)));
    }
    return in;
}

// A whole-number option as the core's int; a huge value stays out of range (the core names
// it) rather than wrapping round.
int intOption(const OptionBag& opts, const char* key) {
    const long v = opts.integer(key, 0, 0);
    return v > INT_MAX ? INT_MAX : static_cast<int>(v);
}

// The repeat-sales keys shared by CHAINRS and RSPAIRS (freq, base, minsales and level are
// read by the caller).
void readRepeatOptions(RepeatSalesOptions& o, const OptionBag& opts) {
    const std::string m = opts.choice("method", "cs", {"cs", "bmn", "cs2"});
    o.method = *parseRepeatSalesMethod(m);
    o.minHoldMonths = opts.number("minhold", 6);  // the core rejects negative values
    o.maxRate = opts.number("maxrate", 1.0);
    const long chain = opts.integer("chain", 0, 0);
    if (chain > 1) throw InputError(fmt::format("chain must be 0 or 1, got {}", chain));
    o.chain = static_cast<int>(chain);
    o.chainInit = intOption(opts, "init");
}

// An option value as a one-cell argument, so freq= and base= in RSPAIRS's options read (and
// fail) exactly as CHAINRS's freq and base arguments: a number stays a number (a date
// serial), other text stays text (an ISO date, "Q").
Arg optionAsArg(const OptionBag& opts, const char* key) {
    const std::string t = opts.text(key, "");
    if (t.empty()) return std::nullopt;
    Range r;
    r.rows = r.cols = 1;
    r.scalar = true;
    char* end = nullptr;
    const double x = std::strtod(t.c_str(), &end);
    r.cells.push_back(*end == '\0' && std::isfinite(x) ? Cell::num(x) : Cell::str(t));
    return r;
}

void labelTextRow(OutTable& out, const std::string& label, const std::string& text,
                  std::size_t width) {
    out.addRow();
    out.text(label);
    out.text(text);
    for (std::size_t i = 2; i < width; ++i) out.none();
}

OutTable chainRs(const std::vector<Arg>& a, const CallContext& ctx) {
    const OptionBag opts = OptionBag::parse(a[kIndexOptions], self("chainRs"));
    RepeatSalesOptions o;
    readIndexOptions(o, a[kIndexFreq], a[kIndexBase], opts, ctx);
    readRepeatOptions(o, opts);
    const RepeatSalesInput in = readInput(a, opts, ctx);
    const RepeatSalesResult r = repeatSalesIndex(in, o);
    OutTable out = indexTableCells(IndexResult{r.table, r.diag}, opts, ctx, "pairs");
    if (opts.flag("notes", false)) labelTextRow(out, "pairs", r.pairCounts.summary(), 5);
    return out;
}

OutTable rsPairs(const std::vector<Arg>& a, const CallContext& ctx) {
    const OptionBag opts = OptionBag::parse(a[kPairsOptions], self("rsPairs"));
    RepeatSalesOptions o;
    readIndexOptions(o, Arg{}, Arg{}, opts, ctx);
    o.freq = frequencyArg(optionAsArg(opts, "freq"));
    o.baseDate = dateArg(optionAsArg(opts, "base"), "base", ctx);
    readRepeatOptions(o, opts);
    const RepeatSalesInput in = readInput(a, opts, ctx);
    const PairAudit audit = repeatSalesPairs(in, o);
    const bool titles = opts.flag("titles", false), notes = opts.flag("notes", false);
    if (audit.pairs.empty() && !titles && !notes) {
        // Nothing to list: say why rather than "the result is empty".
        const std::string prefix = "index not estimated: ";
        for (const auto& w : audit.diag.warnings)
            if (w.rfind(prefix, 0) == 0) throw InputError(w.substr(prefix.size()));
        throw InputError("no property has two sales with a usable date and id");
    }
    OutTable out;
    if (titles) {
        out.addRow();
        for (const char* s : {"id", "first date", "first price", "second date", "second price",
                              "months held", "annual log return", "used", "reason", "weight"})
            out.text(s);
    }
    for (const SalePair& p : audit.pairs) {
        out.addRow();
        out.text(p.id);
        out.num(p.firstDate - ctx.dateOffset);
        out.num(p.firstPrice);
        out.num(p.secondDate - ctx.dateOffset);
        out.num(p.secondPrice);
        out.num(p.monthsHeld);
        out.num(p.annualRate);
        out.num(p.used ? 1.0 : 0.0);
        if (p.reason.empty()) out.none(); else out.text(p.reason);
        out.num(p.weight);
    }
    if (notes) {
        appendNotes(out, audit.diag, kPairsWidth);
        labelTextRow(out, "pairs", audit.counts.summary(), kPairsWidth);
    }
    return out;
}

// Arguments and options, each described once.
ArgSpec idsArg() {
    return {"ids", ArgKind::Column,
            "Property id of each sale, one column aligned with dates (text or numbers). Sales "
            "with the same id are the same property; blanks around an id are ignored, case "
            "matters, the number 123 and the text \"123\" are one id. A blank id drops the "
            "sale."};
}
ArgSpec changedArg() {
    return {"changed", ArgKind::Optional,
            "Optional column of 1/0 or TRUE/FALSE: 1 where the property was renovated, extended "
            "or rebuilt before this sale. The pair ending at that sale is dropped, the next pair "
            "starts from it. Empty: no property changed."};
}
ArgSpec includeArg() {
    ArgSpec s = spec::include();
    s.description +=
        " An excluded sale breaks its property's chain: both pairs touching it are dropped.";
    return s;
}
OptionSpec methodOption() {
    return {"method", "cs",
            "\"cs\": Case-Shiller three-stage weighted regression (the variance of a pair grows "
            "with the time between its sales); \"bmn\": Bailey-Muth-Nourse, every pair weighs "
            "the same; \"cs2\": Case-Shiller with the squared interval too (Calhoun 1996)."};
}
OptionSpec minholdOption() {
    return {"minhold", "6",
            "Pairs held fewer completed months than this are dropped as flips; 0 = off."};
}
OptionSpec maxrateOption() {
    return {"maxrate", "1",
            "Pairs whose annualised log return exceeds this in absolute value are dropped as "
            "data errors (1 = a factor e = 2.72 a year); 0 = off."};
}
OptionSpec chainOption() {
    return {"chain", "0",
            "0: re-estimate the whole history (past values revise as sales are added); 1: "
            "published values never revise, each new period is estimated from the pairs ending "
            "in it given the earlier values."};
}
OptionSpec initOption() {
    return {"init", "0",
            "With chain=1: number of periods at the start estimated together before chaining "
            "begins; 0 = two years (24 months, 8 quarters, 2 years)."};
}
OptionSpec minsalesOption() {
    return {"minsales", "1",
            "Periods informed by fewer used pairs than this show no index value (pairs with a "
            "sale in the period; for chained periods, pairs ending in it)."};
}
OptionSpec freqOption() {
    return {"freq", "M",
            "Period length of the index the audit explains: \"M\", \"Q\" or \"Y\" (pairs with "
            "both sales in one period are dropped). Use CHAINRS's freq."};
}
OptionSpec baseOption() {
    return {"base", "first period with a value",
            "Base date of the index the audit explains (a date serial or ISO text such as "
            "2020-01-01); pairs not linked to its period are dropped. Use CHAINRS's base."};
}

}  // namespace

std::vector<FunctionSpec> repeatSalesFunctions() {
    FunctionSpec index{
        "chainRs",
        "CHAINRS",
        "Repeat-sales index: the price changes of the same homes sold twice or more, regressed "
        "on period dummies (Case-Shiller weighted by default, or Bailey-Muth-Nourse), base "
        "period = 100, with a confidence band. Needs a property id per sale, no "
        "characteristics.",
        {idsArg(), spec::dates(), spec::prices(), changedArg(), includeArg(), spec::freq(),
         spec::base(), spec::options()},
        {methodOption(), minholdOption(), maxrateOption(), chainOption(), initOption(),
         minsalesOption(), spec::level(), spec::header(), spec::titles(), spec::notes()},
        std::string(spec::kIndexOutput) +
            " Count: pairs whose second sale falls in the period (the first period shows 0). "
            "Bands: the confidence interval of the change from the base period (the base row "
            "is 100 | 100). With notes=1 a last row \"pairs\" gives the pairs used and dropped "
            "by reason.",
        "=CHAINRS(C2:C12010;A2:A12010;B2:B12010;J2:J12010;;\"Q\";;\"method=cs; minhold=6\")",
        chainRs};

    FunctionSpec pairs{
        "rsPairs",
        "RSPAIRS",
        "The pairs of sales behind CHAINRS: one row per pair of consecutive sales of a "
        "property, with the months held, the annualised return, whether it was used, why not, "
        "and its weight. Takes the same filters and options as CHAINRS.",
        {idsArg(), spec::dates(), spec::prices(), changedArg(), includeArg(), spec::options()},
        {methodOption(), minholdOption(), maxrateOption(), chainOption(), initOption(),
         minsalesOption(), spec::level(), freqOption(), baseOption(), spec::header(),
         spec::titles(), spec::notes()},
        "10 columns, one row per pair, grouped by property (in the order ids first appear) "
        "then by date: id | first date | first price | second date | second price | months "
        "held | annualised log return | used (1/0) | reason dropped (blank when used) | weight "
        "in the final stage (mean 1 over the used pairs, 0 when not used). Format the date "
        "columns as dates. A duplicate sale (same id and date) is listed as a dropped pair "
        "from the kept sale. When the index cannot be built, the pairs that passed the "
        "filters show \"index not estimated\" and notes=1 says why. With notes=1: the "
        "diagnostics and a row \"pairs\" with the pairs used and dropped by reason.",
        "=RSPAIRS(C2:C12010;A2:A12010;B2:B12010;J2:J12010;;\"freq=Q; titles=1\")",
        rsPairs};
    index.formats = spec::indexFormats();
    // id | first date | first price | second date | second price | months | return | used |
    // reason | weight
    pairs.formats = {"", "YYYY-MM-DD", "#,##0", "YYYY-MM-DD", "#,##0", "0", "0.0000", "0", "", "0.000"};
    return {index, pairs};
}

}  // namespace lintel::addin
