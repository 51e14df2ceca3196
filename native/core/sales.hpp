// A table of closed sales as the estimators receive it, and the one screening step every
// estimator runs first: each row is used or dropped with a reason.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
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
    // Empty, or per row why its date or price (NaN) could not be read, in the words of the
    // cell conversion ("unreadable date", "two-digit year", "ambiguous number" ...); the
    // screening counts that reason instead of "blank or non-date date" / "... price".
    std::vector<std::optional<DropReason>> readProblem;
    // What the cell conversion has to say (the first unreadable cell of each kind and the
    // forms accepted, doubtful dates, the date order taken): the screening passes them on as
    // warnings, and says them when no row is usable.
    std::vector<std::string> notes;
};

// Per row: nullopt when the row passes, else why it is dropped.
using RowProblems = std::vector<std::optional<DropReason>>;

// The usable rows, in input order, with their period positions on the axis.
struct ScreenedSales {
    std::vector<std::size_t> rows;  // indices into SalesInput
    std::vector<int> period;        // position on axis, aligned with rows
    PeriodAxis axis;                // no periods when no row is usable
    RowProblems problem;            // per input row: why it was dropped (nullopt: used)
};

// The date and price checks of one sale, in screening order: BadDate, BadPrice,
// NonPositivePrice, or nullopt when both are usable.
std::optional<DropReason> saleProblem(double date, double price);

// Drops rows that are empty (emptyRow), have an unusable date or price (counted as
// in.readProblem says, where it says something), fail the caller's
// further check `extra` (ids, characteristics, strata: a per-row reason), or are excluded by
// the include mask, in that order; counts each reason in diag (rowsIn and rowsUsed are set).
// Does not throw when no row is usable (the axis is then empty).
ScreenedSales screenRows(const SalesInput& in, Frequency freq, Diagnostics& diag,
                         const RowProblems* extra = nullptr);
// screenRows, throwing InputError when no row is usable.
ScreenedSales screenSales(const SalesInput& in, Frequency freq, Diagnostics& diag,
                          const RowProblems* extra = nullptr);

// The prices of the used rows (aligned with s.rows) times one power of two that brings the
// largest near 1 when it lies beyond 2^500 or the smallest below 2^-500 (stats::rangeScale);
// the prices themselves otherwise. Scaling is exact, ratios of prices do not change. Throws
// InputError naming two rows when the prices span more than a double can hold together
// (the smallest would vanish next to the largest: about 600 orders of magnitude).
std::vector<double> scaledPrices(const SalesInput& in, const ScreenedSales& s);

}  // namespace lintel
