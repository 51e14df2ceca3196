// Whole columns at the cost of their data: how many rows each argument of a call keeps.
//
// Column arguments (ArgKind::Column) arrive as the cell range itself. The UNO layer measures
// each one (ColumnExtent: its size and the rows down to its last non-empty cell) and reads
// only those rows. This plan, free of UNO so that it is unit-tested, says how many rows every
// argument then has:
//  - A Column argument that stops short of its sheet's last row keeps all its rows: the rows
//    below its data become empty cells without being read, so a result that follows the input
//    rows keeps the shape the user chose (blank below the data).
//  - Column arguments that reach the sheet's last row (A:A, A2:A1048576) form a group with
//    every other argument of exactly the same height (Calc passes a whole-column reference or
//    expression given to a Range or Optional argument as values, e.g. an include mask
//    (C:C="North")*(D:D="flat")). The group keeps its rows down to the last row holding data
//    in any of its Column or Range arguments, at least one. Optional arguments do not extend
//    it (a mask holds 0 or FALSE in every row) and keep all their rows when the cut would drop
//    text (an options range).
#pragma once

#include <cstddef>
#include <optional>
#include <vector>

#include "cell_model.hpp"
#include "function_table.hpp"

namespace lintel::addin {

struct ColumnExtent {
    std::size_t rows = 0, cols = 0;  // the range as given
    std::size_t usedRows = 0;        // rows down to its last non-empty cell (0: none)
    bool toSheetEnd = false;         // reaches the last row of its sheet (a whole column)
};

// What the plan needs of an argument given as values (a Range or Optional argument): its
// rows, its rows down to the last one with a non-empty cell, and down to the last one with
// text (0: none). The UNO layer measures Calc's array before converting it, so that a
// whole-column expression of a million rows is converted only down to the rows kept.
struct ValueShape {
    std::size_t rows = 0, usedRows = 0, textRows = 0;
};
ValueShape shapeOf(const Range& r);

// The number of rows each argument of a call keeps. kinds: the arguments' kinds; columns: the
// extent of each Column argument (unset for the others); values: the shape of the other
// arguments (ignored for Column arguments; unset when missing). A missing argument keeps 0
// rows.
std::vector<std::size_t> plannedRowsByShape(const std::vector<ArgKind>& kinds,
                                     const std::vector<std::optional<ColumnExtent>>& columns,
                                     const std::vector<std::optional<ValueShape>>& values);
// The same with the other arguments as converted.
std::vector<std::size_t> plannedRows(const std::vector<ArgKind>& kinds,
                                     const std::vector<std::optional<ColumnExtent>>& columns,
                                     const std::vector<Arg>& values);

// An error value (#DIV/0!, #N/A ...) found in a Column argument while reading it: the
// argument's position and the cell's row and column within the range as read. The cell itself
// is left empty.
struct ErrorAt {
    std::size_t arg = 0, row = 0, col = 0;
};

// The error the call must refuse (its index in errors), or nullopt when every error lies where
// the user has said the data does not reach; those cells are then read as empty:
//  - a row the include argument leaves out (0, FALSE or blank in that row, as the functions
//    read include), for a function that has one and is given a column of it;
//  - for a function without an include argument (an index series, PERIODOF ...), a row below
//    the last row holding a value (number or text) in any of its Column arguments: a #N/A under the series is
//    outside it.
// Errors anywhere else are refused, so an answer never passes over a sale in silence.
std::optional<std::size_t> refusedError(const FunctionSpec& f, const std::vector<Arg>& values,
                                        const std::vector<ErrorAt>& errors);

// Rows of r down to its last row with a non-empty cell (0 when all are empty).
std::size_t usedRows(const Range& r);

// Cuts r to its first n rows, or adds empty rows up to n.
void setRows(Range& r, std::size_t n);

}  // namespace lintel::addin
