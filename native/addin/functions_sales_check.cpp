// ISSEGMENT, SALESCHECK: reading a sales export as it comes. Table entries, cell conversion and
// layout only; the readers and the check live in native/core (label_text, date_text,
// number_text, sale_duplicates, price_outliers, sales_check).
#include <cmath>
#include <string>
#include <unordered_map>
#include <unordered_set>
#include <vector>

#include <fmt/format.h>

#include "bind.hpp"
#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "label_text.hpp"
#include "result_cost.hpp"
#include "sales_check.hpp"

namespace lintel::addin {

namespace {

// ---- ISSEGMENT -------------------------------------------------------------------------

// The text a label is compared by.
std::string compared(const Cell& c, LabelMode mode) {
    const std::string k = cellKey(c);
    return mode == LabelMode::Clean ? labelKey(k) : k;
}

OutTable isSegment(const Call& call) {
    const Range& labels = call.required("labels");
    const Range& values = call.required("values");
    const LabelMode mode = call.options<SegmentOptions>().labels;
    checkAligned({{"labels", &labels}});
    std::unordered_set<std::string> wanted;
    for (const Cell& c : values.cells)
        if (std::string k = compared(c, mode); !k.empty()) wanted.insert(std::move(k));
    if (wanted.empty())
        throw InputError("values holds no label: give the segment's value, e.g. \"North\", or a range of values");
    OutTable out;
    out.scalar = labels.scalar;
    // Exports repeat a few labels many times: each distinct text is compared once.
    std::unordered_map<std::string, bool> seen;
    for (std::size_t i = 0; i < labels.rows; ++i) {
        const Cell& c = labels.at(i, 0);
        bool in = false;
        if (c.isText()) {
            auto it = seen.find(c.text);
            if (it == seen.end()) it = seen.emplace(c.text, wanted.count(compared(c, mode)) > 0).first;
            in = it->second;
        } else if (c.isNumber()) {
            in = wanted.count(compared(c, mode)) > 0;
        }
        out.addRow();
        out.num(in ? 1.0 : 0.0);
    }
    return out;
}

// ---- SALESCHECK ------------------------------------------------------------------------

enum class CheckOutput { List, Use, Counts };

// SALESCHECK's own settings (the outlier test binds to the core's OutlierOptions).
struct CheckSettings {
    Frequency freq = Frequency::Month;
    CheckOutput output = CheckOutput::List;
};

// The name a column gets in the list: its header cell with header=1, else `fallback`.
std::string columnName(const Range& r, std::size_t c, std::size_t header, const std::string& fallback) {
    if (header) {
        std::string h = cellKey(r.at(0, c));
        if (!h.empty()) return h;
    }
    return fallback;
}

OutTable listTable(const SalesCheck& r, const Call& call, std::size_t rowsChecked) {
    const std::size_t width = call.spec().width();
    OutTable out;
    titleRow(out, call);
    if (r.problems.empty()) {
        out.addRow();
        out.none();
        out.none();
        out.text(fmt::format("no problem found in {} rows", rowsChecked));
        for (std::size_t i = 3; i < width; ++i) out.none();
    }
    // Every cell after the row number is text or blank: the list is cut before it would take
    // Calc seconds to store (result_cost.hpp), and says so in its last row.
    const std::size_t room = listRowsWithinLimit(width - 1);
    const std::size_t listed = r.problems.size() <= room ? r.problems.size() : room - 1;
    for (std::size_t k = 0; k < listed; ++k) {
        const SalesProblemRow& p = r.problems[k];
        out.addRow();
        out.num(static_cast<double>(p.row));
        out.text(p.column);
        out.text(saleProblemText(p.problem));
        if (p.value.empty()) out.none(); else out.text(p.value);
        if (std::isnan(p.z)) out.none(); else out.num(p.z);
        out.text(p.detail);
    }
    if (listed < r.problems.size()) {
        out.addRow();
        out.none();
        out.none();
        out.text(fmt::format("{} more problems not listed", r.problems.size() - listed));
        out.none();
        out.none();
        out.text("fix the ones above at the source, or see them all by kind with output=counts");
    }
    if (call.layout().notes) appendNotes(out, r.diagnostics, width);
    return out;
}

OutTable salesCheck(const Call& call) {
    const CheckSettings settings = call.options<CheckSettings>();
    const OutlierOptions outliers = call.options<OutlierOptions>();
    const Range& dates = call.required("dates");
    const Range& prices = call.required("prices");
    const Range* ids = call.given("ids") ? &*call.arg("ids") : nullptr;
    const Range* segments = call.given("segments") ? &*call.arg("segments") : nullptr;
    const Range* include = includeMask(call, dates.rows);
    std::vector<NamedRange> all = {{"dates", &dates}, {"prices", &prices}};
    if (ids) all.push_back({"ids", ids});
    if (segments) all.push_back({"segments", segments});
    if (include) all.push_back({"include", include});
    const std::size_t n = checkAligned(all, {"segments"});
    const std::size_t h = call.headerRows();
    if (n <= h) throw InputError("the ranges hold no rows below the header");

    const TableReading t = tableReading(call, dates);
    SalesCheckInput in;
    in.dates = rawDates(dates, h, call.ctx());
    in.prices = rawColumn(prices, h);
    if (ids) in.ids = rawColumn(*ids, h);
    if (segments)
        for (std::size_t c = 0; c < segments->cols; ++c) {
            in.segments.push_back(rawColumn(*segments, h, c));
            in.segmentNames.push_back(columnName(*segments, c, h,
                                                 segments->cols == 1 ? "segment" : fmt::format("segment {}", c + 1)));
        }
    if (include)
        for (std::size_t i = h; i < n; ++i) in.include.push_back(cellFlag(include->at(i, 0)));

    SalesCheckOptions o;
    o.read = t.read;
    o.freq = settings.freq;
    o.outliers = outliers;
    o.firstRowNumber = t.firstRowNumber;
    o.cleanLabels = t.labels == LabelMode::Clean;
    o.datesName = columnName(dates, 0, h, "dates");
    o.pricesName = columnName(prices, 0, h, "prices");
    if (ids) o.idsName = columnName(*ids, 0, h, "ids");
    const SalesCheck r = checkSales(in, o);

    const std::size_t checked = n - h - std::count(r.skipped.begin(), r.skipped.end(), char(1));
    switch (settings.output) {
        case CheckOutput::List: return listTable(r, call, checked);
        case CheckOutput::Use: {
            // Aligned with the input rows (a header row gets 0), to multiply into an index
            // function's include.
            OutTable out;
            for (std::size_t i = 0; i < h; ++i) {
                out.addRow();
                out.num(0);
            }
            for (char u : r.used) {
                out.addRow();
                out.num(u ? 1.0 : 0.0);
            }
            return out;
        }
        case CheckOutput::Counts: {
            OutTable out;
            titleRow(out, call, {"problem", "count"});
            const auto row = [&](const std::string& label, double x) {
                out.addRow();
                out.text(label);
                out.num(x);
            };
            row("rows checked", static_cast<double>(checked));
            row("rows used", static_cast<double>(r.diagnostics.rowsUsed));
            for (const auto& [p, count] : r.counts) row(saleProblemText(p), static_cast<double>(count));
            if (call.layout().notes)
                for (const auto& w : r.diagnostics.warnings) {
                    out.addRow();
                    out.text("warning");
                    out.text(w);
                }
            return out;
        }
    }
    throw std::logic_error("unknown SALESCHECK output");
}

std::string positive(double x) { return x > 0 ? std::string() : std::string("must be more than 0"); }

}  // namespace

std::vector<FunctionSpec> salesCheckFunctions() {
    FunctionSpec segment{
        "isSegment",
        "ISSEGMENT",
        "1 for each row whose label is one of the given values, compared cleaned: blanks "
        "around and inside trimmed (also no-break spaces) and case ignored, so \"Ellenford \", "
        "\"ellenford\" and \"Ellenford\" are one segment; 0 otherwise. Use it in an index "
        "function's include.",
        {{"labels", ArgKind::Column, "The segment column (district, type ...), one column."},
         {"values", ArgKind::Range,
          "The value(s) of the segment: a text such as \"Ellenford\", or a range of texts (any of "
          "them)."},
         spec::options()},
        {spec::labels<SegmentOptions>("the labels and the values")},
        {{"in segment", "0"}},
        "One column aligned with labels: 1 where the label is one of the values, else 0 (also "
        "for a blank label or a header row). Multiply masks to combine them, e.g. "
        "ISSEGMENT(C2:C5001;\"North\")*ISSEGMENT(D2:D5001;\"flat\").",
        "=INDEXMEDIAN(A2:A5001;B2:B5001;ISSEGMENT(C2:C5001;\"Ellenford\"))",
        isSegment};

    using O = CheckSettings;
    FunctionSpec check{
        "salesCheck",
        "SALESCHECK",
        "Checks a sales table as the index functions read it and lists every row with a "
        "problem: dates and prices that cannot be read, duplicated sales, one property sold "
        "twice on a day at two prices, blank ids or segments, and prices far from their period "
        "and segment (robust z-score of the log price). Or gives a 1/0 column of the rows to "
        "use, or the counts.",
        {spec::dates(), spec::prices(),
         {"ids", ArgKind::Optional,
          "Optional property id of each sale, aligned with dates: the same id, date and price "
          "twice is a duplicate (used once); the same id and date at two prices are both left "
          "out. Empty: no duplicate test."},
         {"segments", ArgKind::Optional,
          "Optional segment column(s) (district, type ...), aligned with dates: prices are "
          "compared within period and segment; blank labels are listed."},
         spec::include(), spec::freq<O>(" Periods within which prices are compared."),
         spec::options()},
        {option("output",
                choice<O>(&O::output, std::vector<std::pair<std::string, CheckOutput>>{
                                          {"list", CheckOutput::List},
                                          {"use", CheckOutput::Use},
                                          {"counts", CheckOutput::Counts}}),
                "list: one row per problem; use: one 1/0 value per input row, 0 for rows that "
                "cannot be read, duplicates, conflicting prices, implausible dates, excluded and "
                "empty rows (multiply it into an index function's include to use each sale "
                "once); counts: rows checked, rows used and each problem with its count."),
         option("threshold", number<OutlierOptions>(&OutlierOptions::threshold, &positive),
                "A price is listed as an outlier when its robust z-score (modified z-score of "
                "the log price within its period and segment, Iglewicz & Hoaglin 1993) exceeds "
                "this in absolute value."),
         option("mingroup", whole<OutlierOptions>(&OutlierOptions::minGroup, 3),
                "Fewest sales a period-and-segment group needs to be tested for price outliers."),
         spec::dateorder(), spec::labels("ids and segments"), spec::header(), spec::titles(),
         spec::notes()},
        {{"row", "0"}, {"column", ""}, {"problem", ""}, {"value", ""}, {"z", "0.0"}, {"detail", ""}},
        "output=list: 6 columns, one row per problem, in row order: row (the sheet's row "
        "number when dates is a range on a sheet, so with header=1 the first sale is the row "
        "below the header; else counted from 1 at the first cell of dates) | column (its header "
        "with header=1, else dates, prices, ids, segment) | problem | value as given | z (price "
        "outliers) | detail (what is wrong, what is accepted). With no problem: one row \"no "
        "problem found in N rows\". A very long list ends with a row saying how many more "
        "problems there are. output=use: one column aligned with the input rows. "
        "output=counts: 2 columns, problem | count, 17 rows. notes=1 appends the diagnostics "
        "(the date order read, groups too small for the outlier test).",
        "=SALESCHECK(A2:A5001;B2:B5001;C2:C5001;D2:D5001;;\"Q\")",
        salesCheck};
    return {segment, check};
}

}  // namespace lintel::addin
