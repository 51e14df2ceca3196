// The add-in's neutral picture of cells, independent of UNO: what a function receives (Arg)
// and what it returns (OutTable). native/addin/uno/ converts UNO values to and from these in
// one place; everything else in the add-in works on these types and is unit-testable.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "date_text.hpp"
#include "number_text.hpp"

namespace lintel::addin {

struct Cell {
    enum class Kind { Empty, Number, Text };
    Kind kind = Kind::Empty;
    double number = 0.0;
    std::string text;

    static Cell num(double x) { Cell c; c.kind = Kind::Number; c.number = x; return c; }
    static Cell str(std::string s) { Cell c; c.kind = Kind::Text; c.text = std::move(s); return c; }
    bool isEmpty() const { return kind == Kind::Empty || (kind == Kind::Text && text.empty()); }
    bool isNumber() const { return kind == Kind::Number; }
    bool isText() const { return kind == Kind::Text && !text.empty(); }
};

// A rectangular block of cells, row-major. A scalar argument is a 1 x 1 range.
struct Range {
    std::size_t rows = 0, cols = 0;
    std::vector<Cell> cells;
    bool scalar = false;  // the argument was a single value, not a cell range
    // The sheet's number of its first row (1 = the sheet's first row) when the argument was a
    // cell range read from a sheet; 0 when not known (a value, an expression, a test). Messages
    // about rows use it, so "row 17" is the row the user sees.
    std::size_t sheetRow = 0;

    const Cell& at(std::size_t r, std::size_t c) const { return cells[r * cols + c]; }
    Cell& at(std::size_t r, std::size_t c) { return cells[r * cols + c]; }
};

// One argument: missing (omitted or left empty) or a range / value.
using Arg = std::optional<Range>;

// Context of one call, supplied by the UNO layer: facts of the document the core cannot know.
// The defaults are what a call gets when the document says nothing usable: ISO dates (and
// texts where day and month cannot be confused), "." as the decimal separator, no upper bound
// for plausible sale dates.
struct CallContext {
    // Days to add to a document serial to get a serial with day 0 = 1899-12-30 (0 unless the
    // document uses another null date, e.g. 1904-01-01).
    double dateOffset = 0.0;
    // The order of day and month in dates written as text in the document's language
    // (15/03/2024 or 03/15/2024); the option dateorder= overrides it for one call.
    DateOrder dateOrder = DateOrder::Unknown;
    // The decimal and thousands separators of the document's language, for numbers written
    // as text ("350,000", "350.000,00").
    NumberFormat numbers;
    // The current year (sale dates after the end of the next year are doubtful); 0 = unknown.
    int currentYear = 0;
    // The language the facts above come from ("en-GB"), for messages; empty when unknown.
    std::string locale;
};

// What a function returns: a table of output cells. `noValue` cells are written as an empty
// text, which Calc shows blank, AVERAGE and COUNT skip, and charts leave as a gap.
struct OutCell {
    enum class Kind { Number, Text, NoValue };
    Kind kind = Kind::NoValue;
    double number = 0.0;
    std::string text;
};

struct OutTable {
    std::vector<std::vector<OutCell>> rows;
    bool scalar = false;  // return a single value rather than a 1 x 1 array

    void addRow() { rows.emplace_back(); }
    void num(double x);          // appends to the last row; NaN becomes noValue
    void text(std::string s);    // appends to the last row
    void none();                 // appends noValue to the last row
};

}  // namespace lintel::addin
