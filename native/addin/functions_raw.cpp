// PERIODOF, INDEXMEAN, INDEXMEDIAN: table entries and implementations.
#include <cmath>

#include "function_table.hpp"
#include "inputs.hpp"
#include "raw_index.hpp"

namespace lintel::addin {

namespace {

OutTable periodOf(const std::vector<Arg>& a, const CallContext& ctx) {
    const Range& dates = required(a[0], "date");
    const Frequency f = frequencyArg(a[1]);
    OutTable out;
    out.scalar = dates.scalar;
    for (std::size_t r = 0; r < dates.rows; ++r) {
        out.addRow();
        for (std::size_t c = 0; c < dates.cols; ++c) {
            const Cell& cell = dates.at(r, c);
            const double s = cellDate(cell, ctx);
            if (cell.isEmpty()) out.none();
            else if (!isUsableSerial(s)) out.text("Lintel: not a date");
            else out.num(periodStartOf(s, f) - ctx.dateOffset);
        }
    }
    return out;
}

template <IndexResult (*Estimator)(const SalesInput&, const RawIndexOptions&)>
OutTable rawIndex(const std::vector<Arg>& a, const CallContext& ctx, const FunctionSpec& spec) {
    const OptionBag opts = OptionBag::parse(a[5], spec);
    const SalesInput sales = readSales(a[0], a[1], a[2], opts, ctx);
    RawIndexOptions o;
    readIndexOptions(o, a[3], a[4], opts, ctx);
    if (opts.has("trim")) o.trim = opts.number("trim", 0.0);
    return indexTableCells(Estimator(sales, o), opts, ctx);
}

const FunctionSpec& self(const char* method) { return *findFunctionByMethod(method); }

}  // namespace

std::vector<FunctionSpec> rawIndexFunctions() {
    const std::vector<ArgSpec> indexArgs = {spec::dates(), spec::prices(), spec::include(),
                                            spec::freq(), spec::base(), spec::options()};
    FunctionSpec periodOfSpec{
        "periodOf",
        "PERIODOF",
        "The start date of the month, quarter or year that contains a date. Works on one date "
        "or a whole column.",
        {{"date", ArgKind::Column, "A cell holding a date, or a range of dates. Not a value: put DATE(...) or TODAY() in a cell."}, spec::freq()},
        {},
        "The period start date (format the cell as a date); a range gives a range of the same "
        "shape. Blank input cells stay blank.",
        "=PERIODOF(A2;\"Q\")",
        [](const std::vector<Arg>& a, const CallContext& ctx) { return periodOf(a, ctx); }};

    FunctionSpec mean{
        "indexMean",
        "INDEXMEAN",
        "Mean-price index: the mean sale price of each period relative to the base period "
        "(= 100), with a t-interval band. Raw: no adjustment for the mix of homes sold.",
        indexArgs,
        {spec::minsales(),
         {"trim", "0",
          "Fraction of sales cut from each tail of a period before the mean (0.1 = 10 % of the "
          "lowest and 10 % of the highest prices); the band is then the trimmed-mean interval."},
         spec::level(), spec::header(), spec::titles(), spec::notes()},
        spec::kIndexOutput,
        "=INDEXMEAN(A2:A5001;B2:B5001;(C2:C5001=\"North\");\"Q\")",
        [](const std::vector<Arg>& a, const CallContext& ctx) {
            return rawIndex<indexMean>(a, ctx, self("indexMean"));
        }};

    FunctionSpec median{
        "indexMedian",
        "INDEXMEDIAN",
        "Median-price index: the median sale price of each period relative to the base period "
        "(= 100), with a distribution-free confidence band. Raw: no adjustment for the mix of "
        "homes sold.",
        indexArgs,
        {spec::minsales(), spec::level(), spec::header(), spec::titles(), spec::notes()},
        spec::kIndexOutput,
        "=INDEXMEDIAN(A2:A5001;B2:B5001)",
        [](const std::vector<Arg>& a, const CallContext& ctx) {
            return rawIndex<indexMedian>(a, ctx, self("indexMedian"));
        }};
    periodOfSpec.formats = {"YYYY-MM-DD"};
    mean.formats = median.formats = spec::indexFormats();
    return {periodOfSpec, mean, median};
}

}  // namespace lintel::addin
