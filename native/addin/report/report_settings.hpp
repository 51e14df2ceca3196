// What a report is built from: the settings the sidebar panel edits and the document keeps.
// Plain data with a text form ("key=value" lines) that is stored in the document and accepted
// by the headless builder.
#pragma once

#include <map>
#include <string>
#include <utility>
#include <vector>

namespace lintel::report {

// Methods a report can include, in report order.
enum class Method { Median, Mean, Mix, Hedonic, RepeatSales, ReferenceHome };
const std::vector<Method>& allMethods();
const char* methodKey(Method m);    // "median", "mean", "mix", "hedonic", "repeat", "refhome"
const char* methodLabel(Method m);  // "Median", "Mean", "Mix-adjusted median", ...

struct SegmentFilter {
    std::string column;               // header name of a segment column
    std::vector<std::string> values;  // values to keep (any of them)
};

struct ReportSettings {
    std::string dataRange;      // the sales table with its header row, e.g. "Sales.A1:J12010"
    std::string dateColumn;     // header names of the column roles
    std::string priceColumn;
    std::string idColumn;       // for repeat sales
    std::string changedColumn;  // optional: renovated / changed flag
    std::vector<std::string> characteristics;  // for hedonic and reference home
    std::vector<std::string> strata;           // for the mix-adjusted median
    std::vector<SegmentFilter> segment;        // the scope of the report; empty = all sales
    // Segments reported one by one beside the whole scope: every combination of these
    // columns' values (labels compared cleaned: trimmed, case folded) with at least
    // segmentMin sales, most sales first, at most maxSegments; or the listed ones.
    std::vector<std::string> segmentColumns;
    int segmentMin = 120;
    int maxSegments = 12;
    std::vector<std::string> segmentList;  // "Varnholt/flat" per entry (values in column order)
    std::string quote = "auto";  // quote: the measure the summary quotes: "auto" (the best by
                                 // INDEXBACKTEST where available) or a method key
    std::string freq = "M";
    std::string baseDate;                      // ISO date; empty = first period
    double level = 0.95;
    std::vector<Method> methods = {Method::Median, Method::Mean};
    std::map<std::string, std::string> advanced;  // method key -> extra options text
    std::string sheetName;                         // empty = named after the segment
    bool includePartial = false;  // partial=include: headline changes use a last period that
                                  // is not over yet (default: the last complete period)
    int thin = 20;                // thin: a headline figure resting on fewer sales is flagged
    std::string reportId;  // "r1", "r2" ...: names the objects the report owns (charts, named
                           // ranges) uniquely in the document; given at the first build

    // "key=value" lines; lists separated by "|"; segment as "column=v1|v2" per line.
    std::string serialize() const;
    static ReportSettings parse(const std::string& text);  // throws lintel::InputError
    bool has(Method m) const;
    std::string segmentText() const;  // "district = Varnholt; type = flat, terraced" or "all sales"
    std::string defaultSheetName() const;
};

}  // namespace lintel::report
