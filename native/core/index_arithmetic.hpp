// Index arithmetic on an index column as the index functions write it (common practice, no
// source; formulas in the Eurostat RPPI Handbook 2013, ch. 9, and any index-number text):
//   rebase        100 * I_t / I_b
//   change        100 (I_t / I_{t-k} - 1); log: 100 ln(I_t / I_{t-k});
//                 annual: 100 ((I_t / I_{t-k})^(p/k) - 1), p periods per year
//   time-adjust   P_target = P_sale * I(target) / I(sale)
// kNoValue (NaN) in an index means "no value" and propagates.
#pragma once

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

std::vector<double> rebaseIndex(const IndexSeries& s, double baseDate);

enum class ChangeKind { Percent, Log, Annual };
std::vector<double> indexChange(const std::vector<double>& index, int lag, ChangeKind kind,
                                Frequency freq);

// Time adjustment of one sale price; throws InputError with the reason when a date falls
// outside the index or on a period without a value.
double adjustPrice(const IndexSeries& s, double price, double saleDate, double targetDate);

}  // namespace lintel
