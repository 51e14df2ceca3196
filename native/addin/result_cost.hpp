// What an array result costs Calc to store, and the limits Lintel keeps to.
//
// Calc (7.4) turns a returned sequence<sequence<any>> into a matrix that starts as one block
// of numbers (ScMatrix(cols, rows, 0.0)) and sets it cell by cell, row after row, while the
// matrix stores column after column (sc/source/core/tool/rangeseq.cxx,
// ScSequenceToMatrix::CreateMixedMatrix). Setting a text or empty cell inside a block of
// numbers splits the block, and mdds 2.0 does that by moving every number below the cell
// (std::vector::erase at the block's front, or a copy of its lower part; mdds 2.0.3
// multi_type_vector/soa/main_def.inl, set_impl). Numbers cost nothing extra. So each text or
// blank cell costs about the number of cells still numeric after it in storage order, and a
// column of n blank cells about n^2/2: measured here 65,536 rows 0.36 s, 131,072 rows 1.4 s,
// 262,144 rows 6.7 s, 1,048,576 rows several minutes. (mdds 2.1 delays those erasures; that
// is LibreOffice 7.6 and later.) No other value Calc shows blank is cheaper: an empty Any is
// stored as an empty cell in the same way (measured slower), and numbers are not blank.
#pragma once

#include <cstddef>

#include "cell_model.hpp"

namespace lintel::addin {

// Cells Calc moves to store t as the UNO layer lays it out (a rectangle as wide as its widest
// row, short rows padded with no-value cells, a one-row table followed by a blank row).
// Counting stops once the total passes stopAbove.
double storeCost(const OutTable& t, double stopAbove);

// Above this cost (about a third of a second here: a blank tail of some 63,000 rows) the
// rows at the end of a result that hold no value at all are left out: array cells below the
// last row with a value then show #N/A.
inline constexpr double kTrimBlankTailCost = 2e9;
// Above this cost (about two seconds here), even without those rows, the result is replaced
// by a message.
inline constexpr double kMaxStoreCost = 1.2e10;

// t as it may be returned: unchanged, without its trailing no-value rows, or a one-cell
// message when it would still cost more than kMaxStoreCost.
OutTable withinStoreLimits(OutTable t);

// The most rows a list may have, before it is built, to stay within kTrimBlankTailCost when
// each row holds `textCells` text or blank cells after a first column of numbers: each such
// cell costs about the rows below it, so n rows cost about textCells n^2 / 2.
std::size_t listRowsWithinLimit(std::size_t textCells);

}  // namespace lintel::addin
