#include "diagnostics.hpp"

#include <fmt/format.h>

namespace lintel {

namespace {

struct ReasonText {
    DropReason reason;
    const char* text;
};

// The one table of drop-reason texts, in enum order.
constexpr ReasonText kReasonTexts[] = {
    {DropReason::EmptyRow, "empty row"},
    {DropReason::BadDate, "blank or non-date date"},
    {DropReason::BadPrice, "blank or non-numeric price"},
    {DropReason::NonPositivePrice, "non-positive price"},
    {DropReason::BlankId, "blank property id"},
    {DropReason::BadCharacteristic, "blank or invalid characteristic"},
    {DropReason::LogNonPositive, "log of a non-positive characteristic"},
    {DropReason::BlankStratum, "blank stratum"},
    {DropReason::Excluded, "excluded by include"},
    {DropReason::DuplicateSale, "duplicate sale (same id and date)"},
    {DropReason::SingleSale, "only sale of its property"},
    {DropReason::NoUsedPair, "in no used pair"},
    {DropReason::PairNotUsed, "pair not used"},
    {DropReason::ThinStratumPeriod, "in a stratum-period with fewer than minsales sales"},
    {DropReason::UnpricedStratum, "in a stratum without a price in the reference period"},
    {DropReason::BlankValue, "blank or non-numeric value"},
    {DropReason::NonPositiveValue, "non-positive value"},
    {DropReason::NoCommonValue, "period where either index has no value"},
    {DropReason::UnreadableDate, "unreadable date"},
    {DropReason::TwoDigitYear, "two-digit year"},
    {DropReason::NoSuchDate, "no such date"},
    {DropReason::AmbiguousDate, "ambiguous date"},
    {DropReason::ImplausibleDate, "date implausible for a sale"},
    {DropReason::UnreadablePrice, "unreadable price"},
    {DropReason::AmbiguousNumber, "ambiguous number"},
    {DropReason::BlankSegment, "blank segment"},
    {DropReason::DuplicateRow, "duplicate"},
    {DropReason::ConflictingPrices, "conflicting prices"},
};

constexpr bool tableInEnumOrder() {
    std::size_t i = 0;
    for (const ReasonText& r : kReasonTexts)
        if (static_cast<std::size_t>(r.reason) != i++) return false;
    return i == kDropReasonCount;
}
static_assert(tableInEnumOrder(), "one text per DropReason, in enum order");

}  // namespace

const char* dropReasonText(DropReason reason) {
    const auto i = static_cast<std::size_t>(reason);
    return i < kDropReasonCount ? kReasonTexts[i].text : "unknown reason";
}

void Diagnostics::drop(DropReason why, std::size_t n) {
    if (n == 0) return;
    for (auto& [r, c] : dropped)
        if (r == why) {
            c += n;
            return;
        }
    dropped.emplace_back(why, n);
}

std::size_t Diagnostics::rowsDropped() const {
    std::size_t n = 0;
    for (const auto& d : dropped) n += d.second;
    return n;
}

std::size_t Diagnostics::droppedFor(DropReason why) const {
    for (const auto& [r, c] : dropped)
        if (r == why) return c;
    return 0;
}

std::string droppedText(const std::vector<std::pair<std::string, std::size_t>>& dropped) {
    std::string s;
    if (dropped.empty()) return s;
    s += "; dropped:";
    const char* sep = " ";
    for (const auto& [r, c] : dropped) {
        s += fmt::format("{}{} {}", sep, c, r);
        sep = ", ";
    }
    return s;
}

std::string Diagnostics::summary() const {
    std::vector<std::pair<std::string, std::size_t>> texts;
    texts.reserve(dropped.size());
    for (const auto& [r, c] : dropped) texts.emplace_back(dropReasonText(r), c);
    std::string s = fmt::format("{} of {} rows used", rowsUsed, rowsIn) + droppedText(texts);
    if (!warnings.empty()) s += fmt::format("; {} warning(s)", warnings.size());
    return s;
}

}  // namespace lintel
