// PERIODOF, INDEXMEAN, INDEXMEDIAN: table entries and implementations.
#include <cmath>

#include "bind.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "raw_index.hpp"

namespace lintel::addin {

namespace {

// PERIODOF's own settings: only the frequency.
struct PeriodOfOptions {
    Frequency freq = Frequency::Month;
};

OutTable periodOf(const Call& call) {
    const Range& dates = call.required("date");
    const Frequency f = call.options<PeriodOfOptions>().freq;
    const CallContext& ctx = call.ctx();
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
OutTable rawIndex(const Call& call) {
    const RawIndexOptions o = call.options<RawIndexOptions>();
    return indexTableCells(Estimator(readSales(call), o), call);
}

std::string trimCheck(double x) {
    return x >= 0 && x < 0.5 ? std::string() : std::string("must lie in [0, 0.5)");
}

}  // namespace

std::vector<FunctionSpec> rawIndexFunctions() {
    using O = RawIndexOptions;
    const std::vector<ArgSpec> indexArgs = {spec::dates(), spec::prices(), spec::include(),
                                            spec::freq<O>(), spec::base<O>(), spec::options()};
    FunctionSpec periodOfSpec{
        "periodOf",
        "PERIODOF",
        "The start date of the month, quarter or year that contains a date. Works on one date "
        "or a whole column.",
        {{"date", ArgKind::Column, "A cell holding a date, or a range of dates. Not a value: put DATE(...) or TODAY() in a cell."}, spec::freq<PeriodOfOptions>()},
        {},
        {{"period", "YYYY-MM-DD"}},
        "The period start date (format the cell as a date); a range gives a range of the same "
        "shape. Blank input cells stay blank.",
        "=PERIODOF(A2;\"Q\")",
        periodOf};

    FunctionSpec mean{
        "indexMean",
        "INDEXMEAN",
        "Mean-price index: the mean sale price of each period relative to the base period "
        "(= 100), with a t-interval band. Raw: no adjustment for the mix of homes sold.",
        indexArgs,
        {spec::minsales<O>(),
         option("trim", number<O>(&O::trim, &trimCheck),
                "Fraction of sales cut from each tail of a period before the mean (0.1 = 10 % of "
                "the lowest and 10 % of the highest prices); the band is then the trimmed-mean "
                "interval."),
         spec::level<O>(), spec::dateorder(), spec::header(), spec::titles(), spec::notes()},
        spec::indexColumns(),
        spec::indexOutput(),
        "=INDEXMEAN(A2:A5001;B2:B5001;(C2:C5001=\"North\");\"Q\")",
        rawIndex<indexMean>};

    FunctionSpec median{
        "indexMedian",
        "INDEXMEDIAN",
        "Median-price index: the median sale price of each period relative to the base period "
        "(= 100), with a distribution-free confidence band. Raw: no adjustment for the mix of "
        "homes sold.",
        indexArgs,
        {spec::minsales<O>(), spec::level<O>(), spec::dateorder(), spec::header(), spec::titles(),
         spec::notes()},
        spec::indexColumns(),
        spec::indexOutput(),
        "=INDEXMEDIAN(A2:A5001;B2:B5001)",
        rawIndex<indexMedian>};
    return {periodOfSpec, mean, median};
}

}  // namespace lintel::addin
