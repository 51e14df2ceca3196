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

// The number of rows each argument of a call keeps. kinds: the arguments' kinds; columns: the
// extent of each Column argument (unset for the others); values: the other arguments as
// converted (ignored for Column arguments). A missing argument keeps 0 rows.
std::vector<std::size_t> plannedRows(const std::vector<ArgKind>& kinds,
                                     const std::vector<std::optional<ColumnExtent>>& columns,
                                     const std::vector<Arg>& values);

// Rows of r down to its last row with a non-empty cell (0 when all are empty).
std::size_t usedRows(const Range& r);

// Cuts r to its first n rows, or adds empty rows up to n.
void setRows(Range& r, std::size_t n);

}  // namespace lintel::addin
