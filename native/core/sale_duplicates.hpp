// Duplicate sales: one property (id) sold on one day twice in the table.
//
// - Same id, same day and same price: the same sale entered twice (an export joined from two
//   sources, a row pasted twice). The first row is used; every later one is a Duplicate and
//   is dropped with reason "duplicate".
// - Same id and same day with two or more different prices: a Conflict. Which price is right
//   cannot be told from the table (a correction entered as a new row, a typo, a split lot),
//   so none of them is used: every row of the group is dropped with reason "conflicting
//   prices" and listed by the sales check, to be fixed at the source. Dropping one sale
//   costs an index less than averaging in a wrong price twice (our choice; no published
//   rule).
// Ids are compared by their label key (label_text.hpp: "AB-12 " and "ab-12" are one id);
// days by the date serial's whole part (the time of day is ignored); prices exactly. Rows
// without an id, or without a usable date and positive price, are not compared. Without
// ids there is no duplicate test: two homes may sell on one day at one price.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

namespace lintel {

enum class DuplicateMark : char { None, Duplicate, Conflict };

struct DuplicateCheck {
    std::vector<DuplicateMark> mark;  // per row
    // Duplicate: the row it repeats (its first copy). Conflict: the first row of the
    // group. None: the row itself.
    std::vector<std::size_t> firstOf;
    std::size_t duplicates = 0;      // rows marked Duplicate
    std::size_t conflictRows = 0;    // rows marked Conflict
    std::size_t conflictGroups = 0;  // id-and-day groups with more than one price
};

// idKeys: label keys (empty = no id); dates: serials (NaN = none); prices (NaN or <= 0 =
// none). `usable`, when given, marks further rows not to compare (0: excluded).
DuplicateCheck findDuplicateSales(const std::vector<std::string>& idKeys,
                                  const std::vector<double>& dates,
                                  const std::vector<double>& prices,
                                  const std::vector<char>* usable = nullptr);

}  // namespace lintel
