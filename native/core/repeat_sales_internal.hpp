// Internals shared by repeat_sales_pairs.cpp (pair building and filters) and
// repeat_sales.cpp (estimators). Not part of the public API.
#pragma once

#include <cstdint>
#include <optional>
#include <string_view>
#include <vector>

#include "repeat_sales.hpp"

namespace lintel::rs_detail {

// Pairs in audit order as plain columns (the audit rows with their texts are only built
// when asked for: CHAINRS does not need them).
struct BuiltPairs {
    std::vector<std::size_t> firstRow, secondRow;  // input rows (pair input: the pair)
    std::vector<std::uint32_t> group;              // index into ids
    std::vector<long> key1, key2;                  // period keys (set when both usable)
    std::vector<double> y;                         // ln(P2 / P1) (set when both usable)
    std::vector<double> months, rate;              // months held, annualised log return
    std::vector<PairStatus> status;                // Used = candidate until estimated
    std::vector<std::optional<DropReason>> problem;  // First/SecondSaleUnusable: the
                                                     // sale's row reason
    std::vector<char> realPair;                    // 0: a duplicate listed as a pseudo pair
    std::vector<char> swapped;                     // pair input: the dates were reversed
    std::vector<double> weight;                    // final-stage weight, mean 1 over used
    std::vector<std::string_view> ids;             // trimmed id per group (views of input)

    Diagnostics diag;                // row-level drops so far
    const RepeatSalesInput* sales = nullptr;        // the source (one of the two)
    const RepeatSalesPairInput* pairInput = nullptr;
    std::vector<char> rowUsable;     // per input row: usable and not a dropped duplicate
    std::optional<PeriodAxis> axis;  // periods spanned by the usable sales, if any

    std::size_t size() const { return status.size(); }
};

BuiltPairs buildPairsFromSales(const RepeatSalesInput& in, const RepeatSalesOptions& o);
BuiltPairs buildPairsFromPairInput(const RepeatSalesPairInput& in, const RepeatSalesOptions& o);

// The reason of pair i (status Used when it is used).
PairReason reasonOf(const BuiltPairs& bp, std::size_t i);

// Pair reasons numbered 0 .. kPairReasonSlots - 1 (a table index for counting and caching the
// texts): status * (kDropReasonCount + 1) + (sale ? 1 + sale : 0).
inline constexpr std::size_t kPairReasonSlots = kPairStatusCount * (kDropReasonCount + 1);
std::size_t pairReasonSlot(const PairReason& r);

// Pairs formed, used and dropped by reason.
PairCounts countPairs(const BuiltPairs& bp);
// The audit rows.
std::vector<SalePair> auditRows(const BuiltPairs& bp);

}  // namespace lintel::rs_detail
