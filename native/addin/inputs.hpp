// Cells -> core inputs and core results -> cells, in one place. Every index function reads
// its ranges through these helpers, so row checks, header rows, date handling, blanks and
// the "no value" cell are the same everywhere.
#pragma once

#include <initializer_list>
#include <optional>
#include <string>
#include <vector>

#include "cell_model.hpp"
#include "call.hpp"
#include "function_table.hpp"
#include "index_table.hpp"
#include "periods.hpp"
#include "bind.hpp"
#include "sales.hpp"
#include "sales_check.hpp"

namespace lintel::addin {

// A named column argument: the range and the name the messages use.
struct NamedRange {
    const char* name;
    const Range* range;
};

// Checks that every given range is one column (unless allowMulti) and that all have the
// same number of rows; messages name the ranges ("dates has 5000 rows, prices has 4999").
// Returns the row count.
std::size_t checkAligned(const std::vector<NamedRange>& ranges,
                         const std::vector<const char*>& multiColumn = {});

// A cell as a date serial (day 0 = 1899-12-30): a number (document serial + offset) or a
// date written as text (date_text.hpp: ISO, and day/month/year in ctx.dateOrder); NaN
// otherwise.
double cellDate(const Cell& c, const CallContext& ctx);
// A cell as a number; NaN for blank or text.
double cellNumber(const Cell& c);
// A cell as a number, text read with the document's separators (number_text.hpp: "350,000",
// "$350,000", "350.000,00" with a decimal comma); NaN for blank, unreadable or ambiguous text.
double cellNumber(const Cell& c, const NumberFormat& numbers);
// Calc hands a reference to one empty cell to a value argument as the number 0, which the
// add-in cannot tell from a typed 0: " (an empty cell reads as 0)" for a cell holding 0, for
// the end of a message refusing it; "" otherwise. (In a range a blank stays blank.)
std::string emptyCellHint(const Cell& c);
// A cell as an include flag: 1/0, TRUE/FALSE; blank = 0.
char cellFlag(const Cell& c);
// A cell as text for categories and ids: text as is, numbers in canonical form ("3", "2.5").
std::string cellKey(const Cell& c);

// Column c of a range from row `first` on.
std::vector<double> dateColumn(const Range& r, std::size_t first, const CallContext& ctx,
                               std::size_t c = 0);
std::vector<double> numberColumn(const Range& r, std::size_t first, std::size_t c = 0);
std::vector<std::string> keyColumn(const Range& r, std::size_t first, std::size_t c = 0);

// How a call reads its sales table: the reading options (dateorder, labels) with the
// document's facts (CallContext), and the number rows get in messages.
struct TableReading {
    SalesReadOptions read;  // date order (the option's, else the document's), separators,
                            // current year
    LabelMode labels = LabelMode::Exact;
    // The number of the first row below the header in messages: the sheet's row number when
    // `first` is a range on a sheet, else counted from 1 at the range's first cell.
    std::size_t firstRowNumber = 1;
};
TableReading tableReading(const Call& call, const Range& first);

// Column c of a range from row `first` on, as the core's raw cells.
std::vector<RawValue> rawColumn(const Range& r, std::size_t first, std::size_t c = 0);
// The same for dates: numbers (the document's serials) shifted by ctx.dateOffset to day 0 =
// 1899-12-30, as the core counts.
std::vector<RawValue> rawDates(const Range& r, std::size_t first, const CallContext& ctx, std::size_t c = 0);
// Column c as labels (strata, categories, ids): exact as cellKey gives them, or cleaned: every
// label of a group with one label key (label_text.hpp) written as the group's most frequent
// spelling. Blank stays "".
std::vector<std::string> labelColumn(const Range& r, std::size_t first, std::size_t c, LabelMode mode);
// The same for a column already read as text.
void cleanLabels(std::vector<std::string>& labels);

// The argument "include" as a mask for a table of `rows` rows: nullptr when it chooses every
// row (omitted, or a single 1, TRUE or blank); InputError for a single 0 or FALSE.
const Range* includeMask(const Call& call, std::size_t rows);
// The "changed" argument of the repeat-sales functions, or nullptr: a single blank or 0 means
// no property changed; any other single value is refused (every pair would be dropped).
const Range* changedColumn(const Call& call, const Range& dates);
// The flags of a "changed" column from row `first` on (after a header): 1, TRUE or yes for a
// changed property, 0, FALSE, no or blank for none. Any other text ("x", "renovated") is
// refused naming its row, rather than read as "not changed" in silence.
std::vector<char> changedFlags(const Range& changed, std::size_t first);

// Reads the arguments "dates", "prices" and the optional "include" mask into a SalesInput (a
// header row is skipped with header=1). Marks rows where every given cell is blank. `extra`
// are further aligned ranges (characteristics, ids ...) checked for row count and counted in
// the empty-row test.
// Dates and prices are read as the sales check reads them (sales_check.hpp readDateColumn,
// readPriceColumn) with tableReading(call): a cell that cannot be read is dropped with its
// reason, and the notes name the first row of each reason with the forms accepted; dates
// before 1900 or after the next year are used and listed in the notes.
SalesInput readSales(const Call& call, const std::vector<NamedRange>& extra = {});

// The shared index layout: period start | index | count | lower | upper, with the titles row
// (titles=1: the spec's column titles) and, with notes=1, the diagnostics below the table.
OutTable indexTableCells(const IndexResult& r, const Call& call);
// With titles=1, starts the output with a row of the spec's column titles (or these).
void titleRow(OutTable& out, const Call& call);
void titleRow(OutTable& out, const Call& call, std::initializer_list<const char*> titles);
// Appends a row label | value, padded with no-value cells to `width` cells.
void labelRow(OutTable& out, const std::string& label, double value, std::size_t width);
void labelTextRow(OutTable& out, const std::string& label, const std::string& text,
                  std::size_t width);
// Appends the diagnostics (rows used, dropped by reason, warnings) as label | value rows.
void appendNotes(OutTable& out, const Diagnostics& d, std::size_t width);

}  // namespace lintel::addin
