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
#include "sales.hpp"

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

// A cell as a date serial (day 0 = 1899-12-30): a number (document serial + offset) or an
// ISO text date "YYYY-MM-DD"; NaN otherwise.
double cellDate(const Cell& c, const CallContext& ctx);
// A cell as a number; NaN for blank or text.
double cellNumber(const Cell& c);
// A cell as an include flag: 1/0, TRUE/FALSE; blank = 0.
char cellFlag(const Cell& c);
// A cell as text for categories and ids: text as is, numbers in canonical form ("3", "2.5").
std::string cellKey(const Cell& c);

// Column c of a range from row `first` on.
std::vector<double> dateColumn(const Range& r, std::size_t first, const CallContext& ctx,
                               std::size_t c = 0);
std::vector<double> numberColumn(const Range& r, std::size_t first, std::size_t c = 0);
std::vector<std::string> keyColumn(const Range& r, std::size_t first, std::size_t c = 0);

// Reads the arguments "dates", "prices" and the optional "include" mask into a SalesInput (a
// header row is skipped with header=1). Marks rows where every given cell is blank. `extra`
// are further aligned ranges (characteristics, ids ...) checked for row count and counted in
// the empty-row test.
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
