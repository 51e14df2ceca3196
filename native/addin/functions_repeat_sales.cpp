// CHAINRS, RSPAIRS: the repeat-sales functions. Table entries, cell conversion and layout
// only; the pairs, filters and estimators live in native/core/repeat_sales.{hpp,cpp} and
// repeat_sales_pairs.cpp (method: docs/methods/repeat_sales.md).
#include <climits>
#include <cmath>
#include <cstdlib>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "bind.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "repeat_sales.hpp"
#include "smoothing_options.hpp"

namespace lintel::addin {

namespace {

// ids, dates, prices, changed, include -> RepeatSalesInput. The row checks name ids first
// ("ids has 100 rows, dates has 99"); include, the header row and empty rows go through
// readSales.
RepeatSalesInput readInput(const Call& call) {
    const Range& ids = call.required("ids");
    const Range& dates = call.required("dates");
    const Range& prices = call.required("prices");
    const Range* changed = changedColumn(call, dates);
    std::vector<NamedRange> cols = {{"ids", &ids}, {"dates", &dates}, {"prices", &prices}};
    if (changed) cols.push_back({"changed", changed});
    checkAligned(cols);  // one column each, same rows

    // The empty-row test looks at ids, dates and prices (a flag beside an empty row, e.g. a
    // formula column of 0s running past the data, does not make it a sale).
    RepeatSalesInput in;
    in.sales = readSales(call, {{"ids", &ids}});
    const std::size_t h = call.headerRows();
    // Ids as cellKey writes them: text as it is (the core trims it), numbers in canonical form
    // (the same text as the core's propertyIdFromNumber, so 123 and "123" are one property).
    in.id = labelColumn(ids, h, 0, call.options<ReadOptions>().labels);
    if (changed) in.changed = changedFlags(*changed, h);
    return in;
}

OutTable chainRs(const Call& call) {
    const RepeatSalesOptions o = call.options<RepeatSalesOptions>();
    if (o.smoothed()) return smoothedIndexCells(smoothedRepeatSalesIndex(readInput(call), o), call, true);
    const RepeatSalesResult r = repeatSalesIndex(readInput(call), o);
    OutTable out = indexTableCells(r, call);
    if (call.layout().notes) labelTextRow(out, "pairs", r.pairCounts.summary(), call.spec().width());
    return out;
}

OutTable rsPairs(const Call& call) {
    const RepeatSalesOptions o = call.options<RepeatSalesOptions>();
    const PairAudit audit = repeatSalesPairs(readInput(call), o);
    const bool titles = call.layout().titles, notes = call.layout().notes;
    const CallContext& ctx = call.ctx();
    const std::size_t width = call.spec().width();
    if (audit.pairs.empty() && !titles && !notes) {
        // Nothing to list: say why rather than "the result is empty".
        if (audit.notEstimated) throw InputError(*audit.notEstimated);
        throw InputError("no property has two sales with a usable date and id");
    }
    OutTable out;
    titleRow(out, call);
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
        appendNotes(out, audit.diag, width);
        labelTextRow(out, "pairs", audit.counts.summary(), width);
    }
    return out;
}

// Arguments and options, each described once.
ArgSpec idsArg() {
    return {"ids", ArgKind::Column,
            "Property id of each sale, one column aligned with dates (text or numbers). Sales "
            "with the same id are the same property; blanks around an id are ignored, case "
            "matters (with labels=clean it does not), the number 123 and the text \"123\" are "
            "one id. A blank id drops the sale."};
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
using O = RepeatSalesOptions;

std::string nonNegative(double x) { return x >= 0 ? std::string() : std::string("must be 0 or more"); }

OptionSpec methodOption() {
    return option("method",
                  choice<O>(&O::method, std::vector<std::pair<std::string, RepeatSalesMethod>>{
                                            {"cs", RepeatSalesMethod::CaseShiller},
                                            {"bmn", RepeatSalesMethod::BaileyMuthNourse},
                                            {"cs2", RepeatSalesMethod::CaseShillerQuadratic}}),
                  "\"cs\" (weighted repeat sales): a pair weighs less the longer the time "
                  "between its two sales, because prices drift apart over time (Case & Shiller "
                  "1987, three-stage weighted regression); \"bmn\": every pair weighs the same "
                  "(Bailey, Muth & Nourse 1963); \"cs2\": as cs, the drift also allowed to grow "
                  "with the squared time (Calhoun 1996).");
}
OptionSpec minholdOption() {
    return option("minhold", number<O>(&O::minHoldMonths, &nonNegative),
                  "Pairs held fewer completed months than this are dropped as flips; 0 = off.");
}
OptionSpec maxrateOption() {
    return option("maxrate", number<O>(&O::maxRate, &nonNegative),
                  "Pairs whose annualised log return exceeds this in absolute value are dropped "
                  "as data errors (1 = a factor e = 2.72 a year); 0 = off.");
}
OptionSpec chainOption() {
    return option("chain", flag<O>(&O::chain),
                  "0: re-estimate the whole history (past values revise as sales are added); 1: "
                  "published values never revise, each new period is estimated from the pairs "
                  "ending in it given the earlier values.");
}
OptionSpec initOption() {
    return option("init", whole<O>(&O::chainInit, 1).withDefault("two years"),
                  "With chain=1: number of periods at the start estimated together before "
                  "chaining begins; default two years (24 months, 8 quarters, 2 years).");
}
OptionSpec minsalesOption() {
    return spec::minsales<O>(
        "Periods informed by fewer used pairs than this show no index value (pairs with a "
        "sale in the period; for chained periods, pairs ending in it).");
}
OptionSpec freqOption() {
    return option("freq", frequency<O>(&O::freq),
                  "Period length of the index the audit explains: \"M\", \"Q\" or \"Y\" "
                  "(pairs with both sales in one period are dropped). Use CHAINRS's freq.");
}
OptionSpec baseOption() {
    return option("base", date<O>(&O::baseDate).withDefault("first period with a value"),
                  "Base date of the index the audit explains (a date serial or ISO text such as "
                  "2020-01-01); pairs not linked to its period are dropped. Use CHAINRS's base.");
}

std::vector<OptionSpec> indexOptions() {
    std::vector<OptionSpec> v = {methodOption(), minholdOption(), maxrateOption(), chainOption(),
                                 initOption()};
    for (OptionSpec& s : smoothingOptions<O>(
             "Without smooth, chain=1 gives values that never revise."))
        v.push_back(std::move(s));
    OptionSpec minsales = minsalesOption();
    minsales.description += " With smooth they get a value from the model instead.";
    for (OptionSpec s : {minsales, spec::level<O>(), spec::dateorder(), spec::labels("ids"), spec::header(),
                         spec::titles(), smoothingNotesOption()})
        v.push_back(std::move(s));
    return v;
}

}  // namespace

std::vector<FunctionSpec> repeatSalesFunctions() {
    FunctionSpec index{
        "chainRs",
        "CHAINRS",
        "Repeat-sales index: the price changes of the same homes sold twice or more, regressed "
        "on period dummies (weighted repeat sales by default: pairs far apart in time weigh "
        "less; or every pair equal), base period = 100, with a confidence band. Needs a "
        "property id per sale, no characteristics.",
        {idsArg(), spec::dates(), spec::prices(), changedArg(), includeArg(), spec::freq<O>(),
         spec::base<O>(), spec::options()},
        indexOptions(),
        spec::indexColumns("pairs"),
        spec::indexOutput() +
            " Count: pairs whose second sale falls in the period (the first period shows 0). "
            "Bands: the confidence interval of the change from the base period (the base row "
            "is 100 | 100). With notes=1 a last row \"pairs\" gives the pairs used and dropped "
            "by reason. With smooth: the smoothed index and its band (normal quantiles); every "
            "period of the range has a value; the pairs row comes before the model's rows.",
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
         minsalesOption(), spec::level<O>(), freqOption(), baseOption(), spec::dateorder(),
         spec::labels("ids"), spec::header(), spec::titles(), spec::notes()},
        {{"id", ""}, {"first date", "YYYY-MM-DD"}, {"first price", "#,##0"},
         {"second date", "YYYY-MM-DD"}, {"second price", "#,##0"}, {"months held", "0"},
         {"annual log return", "0.0000"}, {"used", "0"}, {"reason", ""}, {"weight", "0.000"}},
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
    return {index, pairs};
}

}  // namespace lintel::addin
