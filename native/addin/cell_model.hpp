// The add-in's neutral picture of cells, independent of UNO: what a function receives (Arg)
// and what it returns (OutTable). native/addin/uno/ converts UNO values to and from these in
// one place; everything else in the add-in works on these types and is unit-testable.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

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

    const Cell& at(std::size_t r, std::size_t c) const { return cells[r * cols + c]; }
    Cell& at(std::size_t r, std::size_t c) { return cells[r * cols + c]; }
};

// One argument: missing (omitted or left empty) or a range / value.
using Arg = std::optional<Range>;

// Context of one call, supplied by the UNO layer.
struct CallContext {
    // Days to add to a document serial to get a serial with day 0 = 1899-12-30 (0 unless the
    // document uses another null date, e.g. 1904-01-01).
    double dateOffset = 0.0;
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
