// INDEXREBASE, INDEXCHANGE, PRICEADJUST: index arithmetic on index columns.
#include <cmath>

#include <fmt/format.h>

#include "bind.hpp"
#include "diagnostics.hpp"
#include "function_table.hpp"
#include "index_arithmetic.hpp"
#include "inputs.hpp"

namespace lintel::addin {

namespace {

// The period rows of a periods | index pair of columns, skipping rows whose period cell is
// not a date (a titles row, blank rows below the table).
struct SeriesRows {
    IndexSeries series;
    std::vector<int> rowOfInput;  // for each input row: position in series, or -1
};

SeriesRows readSeries(const Call& call) {
    const Range& periods = call.required("periods");
    const Range& index = call.required("index");
    const CallContext& ctx = call.ctx();
    checkAligned({{"periods", &periods}, {"index", &index}});
    std::vector<double> start, value;
    SeriesRows out;
    out.rowOfInput.assign(periods.rows, -1);
    for (std::size_t i = 0; i < periods.rows; ++i) {
        const Cell& p = periods.at(i, 0);
        if (!p.isNumber()) continue;
        out.rowOfInput[i] = static_cast<int>(start.size());
        start.push_back(p.number + ctx.dateOffset);
        const Cell& v = index.at(i, 0);
        value.push_back(v.isNumber() ? v.number : kNoValue);
    }
    out.series = IndexSeries::fromColumns(std::move(start), std::move(value));
    return out;
}

OutTable rebase(const Call& call) {
    const SeriesRows s = readSeries(call);
    const RebaseOptions o = call.options<RebaseOptions>();
    const std::vector<double> v = rebaseIndex(s.series, o).values;
    const Range& index = call.required("index");
    OutTable out;
    for (std::size_t i = 0; i < s.rowOfInput.size(); ++i) {
        out.addRow();
        if (s.rowOfInput[i] >= 0) out.num(v[s.rowOfInput[i]]);
        else if (index.at(i, 0).isText()) out.text(index.at(i, 0).text);  // keep a title
        else out.none();
    }
    return out;
}

OutTable change(const Call& call) {
    const Range& index = call.required("index");
    checkAligned({{"index", &index}});
    const ChangeOptions o = call.options<ChangeOptions>();
    const std::vector<double> v = indexChange(numberColumn(index, 0), o).values;
    OutTable out;
    for (double x : v) {
        out.addRow();
        out.num(x);
    }
    return out;
}

// A scalar or a column; scalars broadcast over the rows of the others.
struct Broadcast {
    const Range* range;
    const char* name;
    const Cell& at(std::size_t i) const { return range->rows == 1 ? range->at(0, 0) : range->at(i, 0); }
};

OutTable adjust(const Call& call) {
    const Broadcast price{&call.required("price"), "price"};
    const Broadcast sale{&call.required("saledate"), "saledate"};
    const Broadcast target{&call.required("targetdate"), "targetdate"};
    const SeriesRows s = readSeries(call);
    const CallContext& ctx = call.ctx();
    std::size_t n = 1;
    const char* longest = nullptr;
    for (const Broadcast* b : {&price, &sale, &target}) {
        if (b->range->cols != 1)
            throw InputError(fmt::format("{} must be one value or one column", b->name));
        if (b->range->rows == 1) continue;
        if (n != 1 && b->range->rows != n)
            throw InputError(fmt::format("{} has {} rows, {} has {}", longest, n, b->name,
                                         b->range->rows));
        n = b->range->rows;
        longest = b->name;
    }
    OutTable out;
    out.scalar = price.range->scalar && sale.range->scalar && target.range->scalar;
    for (std::size_t i = 0; i < n; ++i) {
        out.addRow();
        const Cell& p = price.at(i);
        if (p.isEmpty() && sale.at(i).isEmpty()) { out.none(); continue; }
        try {
            if (!p.isNumber()) throw InputError("price is not a number");
            out.num(adjustPrice(s.series, p.number, cellDate(sale.at(i), ctx),
                                cellDate(target.at(i), ctx)).price);
        } catch (const InputError& e) {
            // The message about a single-cell argument holding 0 says an empty cell reads so.
            std::string m = e.what();
            for (const Broadcast* b : {&price, &sale, &target})
                if (b->range->scalar && m.rfind(b->name, 0) == 0) {
                    m += emptyCellHint(b->at(i));
                    break;
                }
            out.text("Lintel: " + m);
        }
    }
    return out;
}

}  // namespace

std::vector<FunctionSpec> arithmeticFunctions() {
    const ArgSpec periods{"periods", ArgKind::Column,
                          "The period column of an index table (period start dates)."};
    const ArgSpec index{"index", ArgKind::Column, "The index column aligned with periods."};
    ArgSpec rebaseBase = param("base", date<RebaseOptions>(&RebaseOptions::baseDate),
                               "A date in the new base period.");
    rebaseBase.kind = ArgKind::Range;  // required
    return {
        {"indexRebase",
         "INDEXREBASE",
         "Rebases an index column so that the period containing the base date is 100.",
         {periods, index, rebaseBase},
         {},
         {{"index", "0.0"}},
         "A column aligned with index: 100 * I(t) / I(base). Rows without a value stay blank; "
         "a title row is kept.",
         "=INDEXREBASE(E2:E61;F2:F61;DATE(2022;1;1))",
         rebase},
        {"indexChange",
         "INDEXCHANGE",
         "Change of an index over lag rows: percent (default), log points or annualised.",
         {{"index", ArgKind::Column, "An index column."},
          param("lag", whole<ChangeOptions>(&ChangeOptions::lag, 1, 100000),
                "Rows to look back (default 1; 12 on a monthly index, 4 on a quarterly one is "
                "year-over-year)."),
          param("kind",
                choice<ChangeOptions>(&ChangeOptions::kind,
                                       std::vector<std::pair<std::string, ChangeKind>>{
                                           {"pct", ChangeKind::Percent},
                                           {"log", ChangeKind::Log},
                                           {"annual", ChangeKind::Annual}}),
                "\"pct\" 100 (I(t)/I(t-lag) - 1) (default); \"log\" 100 ln(I(t)/I(t-lag)); "
                "\"annual\" the percent change annualised using freq."),
          spec::freq<ChangeOptions>()},
         {},
         {{"change", "0.00"}},
         "A column aligned with index; the first lag rows and rows where either value is "
         "missing stay blank. An index value of 0 or less is refused, naming its row.",
         "=INDEXCHANGE(F2:F61;12)",
         change},
        {"priceAdjust",
         "PRICEADJUST",
         "Time-adjusts a sale price to another date with an index: price * I(target) / I(sale). "
         "An index describes a market, not one home: no substitute for an appraisal.",
         {{"price", ArgKind::Range, "A sale price, or a column of prices."},
          {"saledate", ArgKind::Range, "The sale date, or a column of dates."},
          {"targetdate", ArgKind::Range, "The date to adjust to, or a column of dates."},
          periods, index},
         {},
         {{"adjusted price", "#,##0"}},
         "One value, or a column when any input is a column. A price of 0 or less, or a date "
         "outside the index or on a period without a value, gives a message in that cell.",
         "=PRICEADJUST(B2;A2;DATE(2024;6;30);E$2:E$61;F$2:F$61)",
         adjust},
    };
}

}  // namespace lintel::addin
