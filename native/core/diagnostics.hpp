// What an estimator reports besides its numbers: rows used, rows dropped with reasons,
// warnings. Modelled on Ceres Solver's Solver::Summary: one shape for every estimator, and a
// one-line summary a cell can show.
#pragma once

#include <cstddef>
#include <cstdint>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

namespace lintel {

// An input the estimator cannot work with. The message says what is wrong and where, in the
// user's terms ("base 2019-05-01 lies outside the data (2020-01 .. 2024-12)"); the add-in
// shows it in the cell as "Lintel: <message>".
class InputError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// Why a row was dropped. The texts are in one table (dropReasonText); a text that depends on
// an option names the option ("fewer than minsales sales"), never its value.
enum class DropReason : std::uint8_t {
    // The screening of a sales table (screenSales), in its order of checks; the caller's
    // further checks (ids, characteristics, strata) come before the include mask.
    EmptyRow,           // "empty row"
    BadDate,            // "blank or non-date date"
    BadPrice,           // "blank or non-numeric price"
    NonPositivePrice,   // "non-positive price"
    BlankId,            // "blank property id" (repeat sales)
    BadCharacteristic,  // "blank or invalid characteristic" (hedonic)
    LogNonPositive,     // "log of a non-positive characteristic" (hedonic)
    BlankStratum,       // "blank stratum" (mix)
    Excluded,           // "excluded by include"
    // Repeat sales, after pairing.
    DuplicateSale,      // "duplicate sale (same id and date)"
    SingleSale,         // "only sale of its property"
    NoUsedPair,         // "in no used pair"
    PairNotUsed,        // "pair not used" (pairs given directly: each pair is a row)
    // Mix adjustment, after the cells are formed.
    ThinStratumPeriod,  // "in a stratum-period with fewer than minsales sales"
    UnpricedStratum,    // "in a stratum without a price in the reference period"
    // Index columns (the measures of one or two index series).
    BlankValue,         // "blank or non-numeric value"
    NonPositiveValue,   // "non-positive value"
    NoCommonValue,      // "period where either index has no value"
    // Sales exports read from text (the sales check, sales_check.hpp; same texts as its
    // problems).
    UnreadableDate,     // "unreadable date"
    TwoDigitYear,       // "two-digit year"
    NoSuchDate,         // "no such date"
    AmbiguousDate,      // "ambiguous date"
    ImplausibleDate,    // "date implausible for a sale"
    UnreadablePrice,    // "unreadable price"
    AmbiguousNumber,    // "ambiguous number"
    BlankSegment,       // "blank segment"
    DuplicateRow,       // "duplicate" (same id, date and price: used once)
    ConflictingPrices,  // "conflicting prices" (same id and date, different prices)
};
inline constexpr std::size_t kDropReasonCount =
    static_cast<std::size_t>(DropReason::ConflictingPrices) + 1;

const char* dropReasonText(DropReason reason);

struct Diagnostics {
    std::size_t rowsIn = 0;    // rows offered (after a header row, if any)
    std::size_t rowsUsed = 0;  // rows that entered the estimate
    // Dropped rows by reason, in the order the reasons first occurred.
    std::vector<std::pair<DropReason, std::size_t>> dropped;
    std::vector<std::string> warnings;

    void drop(DropReason reason, std::size_t n = 1);
    void warn(std::string text) { warnings.push_back(std::move(text)); }
    std::size_t rowsDropped() const;
    std::size_t droppedFor(DropReason reason) const;
    // "4987 of 5000 rows used; dropped: 10 blank or non-date date, 3 non-positive price"
    std::string summary() const;
};

// "; dropped: 10 blank price, 3 excluded by include" from (text, count) entries; empty when
// there are none.
std::string droppedText(const std::vector<std::pair<std::string, std::size_t>>& dropped);

}  // namespace lintel
