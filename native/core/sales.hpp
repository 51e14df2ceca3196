// A table of closed sales as the estimators receive it, and the one screening step every
// estimator runs first: each row is used or dropped with a reason.
#pragma once

#include <cstddef>
#include <vector>

#include "diagnostics.hpp"
#include "periods.hpp"

namespace lintel {

// Plain columns, one entry per spreadsheet row. NaN marks a blank or non-numeric cell (the
// add-in's cell conversion does that mapping, in one place).
struct SalesInput {
    std::vector<double> date;     // date serials
    std::vector<double> price;
    std::vector<char> include;    // empty = every row; else 1 keeps the row, 0 drops it
    std::vector<char> emptyRow;   // empty, or 1 where every input cell of the row was blank
};

// The usable rows, in input order, with their period positions on the axis.
struct ScreenedSales {
    std::vector<std::size_t> rows;  // indices into SalesInput
    std::vector<int> period;        // position on axis, aligned with rows
    PeriodAxis axis;
};

// Drops rows with an unusable date or price, or excluded by the include mask, counting each
// reason in diag (rowsIn and rowsUsed are set). Rows marked emptyRow are counted as
// reason::kEmptyRow. `extraValid`, when given, is a per-row flag of further checks the caller
// made (e.g. characteristics); rows with 0 there are dropped for `extraReason`.
// Throws InputError when no row is usable.
ScreenedSales screenSales(const SalesInput& in, Frequency freq, Diagnostics& diag,
                          const std::vector<char>* extraValid = nullptr,
                          const char* extraReason = nullptr);

}  // namespace lintel
