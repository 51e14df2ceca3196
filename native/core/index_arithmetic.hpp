// Index arithmetic on an index column as the index functions write it (common practice, no
// source; formulas in the Eurostat RPPI Handbook 2013, ch. 9, and any index-number text):
//   rebase        100 * I_t / I_b
//   change        100 (I_t / I_{t-k} - 1); log: 100 ln(I_t / I_{t-k});
//                 annual: 100 ((I_t / I_{t-k})^(p/k) - 1), p periods per year
//   time-adjust   P_target = P_sale * I(target) / I(sale)
// kNoValue (NaN) in an index means "no value" and propagates.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "index_table.hpp"

namespace lintel {

// A period column (period start dates) with its index values, as read back from a sheet.
struct IndexSeries {
    std::vector<double> start;  // period starts
    std::vector<double> value;  // kNoValue where there is none
    Frequency freq = Frequency::Month;

    // Checks the starts are period starts of one frequency in increasing order and infers it.
    static IndexSeries fromColumns(std::vector<double> start, std::vector<double> value);
    // Row of the period containing the serial, or -1.
    int rowOf(double serial) const;
};

// A column of values computed from an index column, row by row.
struct SeriesResult {
    std::vector<double> values;  // one per row; kNoValue where there is none
    Diagnostics diag;            // rowsIn = rows; rowsUsed = rows with a usable index value
};

// ---- INDEXREBASE ------------------------------------------------------------------------
struct RebaseOptions {
    std::optional<double> baseDate;  // base: a date in the new base period; required (no
                                     // default)

    void validate() const;  // base given
};

// Throws InputError when the base lies outside the periods or its period has no value.
SeriesResult rebaseIndex(const IndexSeries& s, const RebaseOptions& options);

// ---- INDEXCHANGE ------------------------------------------------------------------------
enum class ChangeKind { Percent, Log, Annual };

struct ChangeOptions {
    int lag = 1;                            // lag: periods between the two values, >= 1;
                                            // default 1
    ChangeKind kind = ChangeKind::Percent;  // kind: "pct" (default), "log", "annual"
    Frequency freq = Frequency::Month;      // freq: "M" (default), "Q", "Y"; p for "annual"

    void validate() const;  // lag >= 1
};

SeriesResult indexChange(const std::vector<double>& index, const ChangeOptions& options);

// ---- PRICEADJUST ------------------------------------------------------------------------
struct PriceAdjustment {
    double price = kNoValue;        // the sale price at the target date
    double saleIndex = kNoValue;    // I(sale) and I(target) used
    double targetIndex = kNoValue;
    Diagnostics diag;               // one row: the sale
};

// Time adjustment of one sale price; throws InputError with the reason when a date falls
// outside the index or on a period without a value.
PriceAdjustment adjustPrice(const IndexSeries& s, double price, double saleDate,
                            double targetDate);

}  // namespace lintel
