// The sales check: reads a sales table as an export gives it (dates and prices as cells or
// text, ids and segment labels as typed), and lists every row with a problem: row number,
// column, problem, the value as given and, for a price outlier, its robust z-score. It also
// returns the cleaned columns, so the index functions can read a table the same way.
//
// What happens to a row (rows excluded by include, and rows where every given cell is blank,
// are skipped: not read, not listed):
//   date blank / unreadable / two-digit year / no such date / ambiguous   not used, listed
//   date before 1900 or after the year after currentYear                   not used, listed
//   price blank / unreadable / ambiguous / zero or negative                not used, listed
//   blank id, blank segment label                                          used, listed
//   duplicate (same id, day and price as an earlier row)                   not used, listed
//   conflicting prices (same id and day, different prices)                 not used, listed
//   price outlier (modified z-score, price_outliers.hpp)                   used, listed
// Texts are read by date_text.hpp and number_text.hpp; ids and segment labels are compared
// by their label keys (label_text.hpp); duplicates follow sale_duplicates.hpp. The outlier
// test groups the used rows by period (of options.freq) and segment.
#pragma once

#include <cstddef>
#include <limits>
#include <string>
#include <utility>
#include <vector>

#include "date_text.hpp"
#include "diagnostics.hpp"
#include "number_text.hpp"
#include "periods.hpp"
#include "price_outliers.hpp"

namespace lintel {

// A cell as the add-in hands it over (no UNO here): empty, a number, or text (UTF-8). A date
// cell's number is a serial with day 0 = 1899-12-30 (the add-in applies the document's null
// date first).
struct RawValue {
    enum class Kind : char { Empty, Number, Text };
    Kind kind = Kind::Empty;
    double number = 0;
    std::string text;

    static RawValue empty() { return {}; }
    static RawValue of(double x) { return {Kind::Number, x, {}}; }
    static RawValue of(std::string t) { return {Kind::Text, 0, std::move(t)}; }
    bool isBlank() const;  // empty, or text of blanks only
};

// Every problem the check reports; saleProblemText gives its wording (one table).
enum class SaleProblem {
    BlankDate,
    UnreadableDate,
    TwoDigitYear,
    NoSuchDate,
    AmbiguousDate,
    ImplausibleDate,
    BlankPrice,
    UnreadablePrice,
    AmbiguousNumber,
    NonPositivePrice,
    BlankId,
    BlankSegment,
    DuplicateSale,
    ConflictingPrices,
    PriceOutlier,
};
constexpr std::size_t kSaleProblemCount = 15;
// "blank date", "unreadable date", "two-digit year", "no such date", "ambiguous date",
// "date implausible for a sale", "blank price", "unreadable price", "ambiguous number",
// "price zero or negative", "blank id", "blank segment", "duplicate", "conflicting prices",
// "price outlier". The drop reasons of the index functions use the same texts.
const char* saleProblemText(SaleProblem p);
// Whether a row with this problem stays in the indexes (blank id, blank segment, outlier).
bool saleProblemKeepsRow(SaleProblem p);

// How texts are read: the facts of the document's locale, or the user's options.
struct SalesReadOptions {
    DateOrder dateOrder = DateOrder::Unknown;  // day/month order of dates written with numbers
    // With no day/month order known (Unknown, or a year-first locale): take the order the
    // column itself shows (inferDateOrder) when it is consistent.
    bool inferOrder = true;
    NumberFormat numbers;  // decimal and thousands separators
    // Dates after the end of the year after this one are implausible for a sale; 0: no upper
    // bound. The add-in passes the current year (the core never reads the clock).
    int currentYear = 0;

    void validate() const;
};

struct SalesCheckInput {
    std::vector<RawValue> dates;
    std::vector<RawValue> prices;
    std::vector<RawValue> ids;                    // empty: no id column
    std::vector<std::vector<RawValue>> segments;  // segment label columns (any number)
    std::vector<std::string> segmentNames;        // their names in the list; default "segment"
    std::vector<char> include;                    // empty: every row; else 1 keeps, 0 skips
};

struct SalesCheckOptions {
    SalesReadOptions read;
    Frequency freq = Frequency::Month;  // periods of the outlier test
    OutlierOptions outliers;
    std::size_t firstRowNumber = 1;  // the number the first data row gets (1 + header rows)
    std::string datesName = "dates", pricesName = "prices", idsName = "ids";
    // Ids and segment labels compared by their label keys (label_text.hpp: "AB-12 " = "ab-12");
    // false: as written, blanks at both ends ignored (a number cell as its key text).
    bool cleanLabels = true;

    void validate() const;
};

struct SalesProblemRow {
    std::size_t row = 0;  // firstRowNumber + index
    std::string column;   // datesName, pricesName, idsName or the segment's name
    SaleProblem problem = SaleProblem::BlankDate;
    std::string value;    // the cell as given (a date cell as YYYY-MM-DD)
    double z = std::numeric_limits<double>::quiet_NaN();  // PriceOutlier only
    std::string detail;   // what is wrong and what would be accepted
};

struct SalesCheck {
    // By row; within a row: date, price, id, segments, duplicate or conflict, outlier.
    std::vector<SalesProblemRow> problems;
    // Rows listed per problem, every problem in enum order (zeros included).
    std::vector<std::pair<SaleProblem, std::size_t>> counts;

    // The cleaned table, one entry per input row.
    std::vector<double> date;    // serial; NaN when unusable
    std::vector<double> price;   // NaN when unusable (blank, unreadable, <= 0)
    std::vector<std::string> idKeys;       // label keys; empty without ids
    std::vector<std::string> segmentKeys;  // label keys of the segment columns joined by U+001F
    std::vector<char> used;      // 1: the row enters an index
    std::vector<char> skipped;   // 1: excluded by include or an empty row (not checked)
    std::vector<double> z;       // modified z-score of used rows in tested groups, else NaN

    DateOrder dateOrder = DateOrder::Unknown;  // the order the date texts were read in
    OutlierCheck outlierGroups;                // group counts of the outlier test
    Diagnostics diagnostics;  // rows in / used, dropped by problem text, warnings

    std::size_t count(SaleProblem p) const;
};

SalesCheck checkSales(const SalesCheckInput& input, const SalesCheckOptions& options);

// ---- The first step of the check, shared with the index functions' cell conversion -------

// A cell of a date or price column that could not be read, or (ImplausibleDate) was read but
// is doubtful as a sale date.
struct CellIssue {
    std::size_t index = 0;  // position in the column
    SaleProblem problem = SaleProblem::UnreadableDate;
    std::string detail;     // what is wrong and, for texts, what is accepted
};

struct ColumnReading {
    std::vector<double> value;      // the date serial or number; NaN where none was read
    std::vector<CellIssue> issues;  // in row order; an ImplausibleDate keeps its value
    DateOrder dateOrder = DateOrder::Unknown;  // dates: the order the texts were read in
    std::vector<std::string> notes;  // dates: the order taken from the column, or a conflict
};

// A date column read as the sales check reads it: a number is a date serial (day 0 =
// 1899-12-30); a text is read by readDateText in the order of `o` or, when that gives none and
// o.inferOrder, the order the column's texts show (inferDateOrder). Blank, unreadable, two-digit
// years, no such date, ambiguous: value NaN and an issue. A number that is no date serial
// (before 1583 or after 9999) is an unreadable date. A date before 1900 or after the end of the
// year after o.currentYear keeps its value and is an ImplausibleDate issue. Rows with skip[i]
// set (skip may be empty) are not read (NaN, no issue) and take no part in the order.
// firstRowNumber: the number the notes give row 0.
ColumnReading readDateColumn(const std::vector<RawValue>& cells, const SalesReadOptions& o,
                             const std::vector<char>& skip, std::size_t firstRowNumber);
// A price column: a number as it is, a text by readNumberText. Blank (also a lone dash),
// unreadable, ambiguous: value NaN and an issue; a price of 0 or less keeps its value and is
// an issue.
ColumnReading readPriceColumn(const std::vector<RawValue>& cells, const NumberFormat& numbers,
                              const std::vector<char>& skip);

}  // namespace lintel
