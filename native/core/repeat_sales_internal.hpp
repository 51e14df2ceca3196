// Internals shared by repeat_sales_pairs.cpp (pair building and filters) and
// repeat_sales.cpp (estimators). Not part of the public API.
#pragma once

#include <optional>
#include <vector>

#include "repeat_sales.hpp"

namespace lintel::rs_detail {

// Pairs in audit order with what the estimators need beside each.
struct BuiltPairs {
    std::vector<SalePair> pairs;
    std::vector<long> key1, key2;   // period keys of the two sales (set for candidates)
    std::vector<char> candidate;    // passed every filter: goes on to the estimator
    std::vector<char> realPair;     // 0 for the duplicate-sale rows listed as pseudo pairs
    Diagnostics diag;               // row-level drops so far
    bool fromRows = true;           // false: built from RepeatSalesPairInput
    std::vector<char> rowUsable;    // per input row: usable and not a dropped duplicate
    std::optional<PeriodAxis> axis; // periods spanned by the usable sales, if any
};

void validateOptions(const RepeatSalesOptions& o);
BuiltPairs buildPairsFromSales(const RepeatSalesInput& in, const RepeatSalesOptions& o);
BuiltPairs buildPairsFromPairInput(const RepeatSalesPairInput& in, const RepeatSalesOptions& o);

// Completed calendar months from one serial day to a later one: 12 (y2 - y1) + (m2 - m1),
// minus one when the day of month of the second is smaller than that of the first.
int completedMonths(double fromSerial, double toSerial);

// Reason text of a filter status (the add-in and the audit show it).
std::string statusText(PairStatus s, const RepeatSalesOptions& o);

}  // namespace lintel::rs_detail
