// Diagnostics: the one table of drop-reason texts and the summary line built from it.
#include <boost/test/unit_test.hpp>

#include <set>
#include <string>

#include "diagnostics.hpp"

using namespace lintel;

BOOST_AUTO_TEST_SUITE(diagnostics)

BOOST_AUTO_TEST_CASE(one_distinct_text_per_reason) {
    std::set<std::string> texts;
    for (std::size_t r = 0; r < kDropReasonCount; ++r) {
        const std::string t = dropReasonText(static_cast<DropReason>(r));
        BOOST_TEST(!t.empty());
        // Texts name options, never their values: no digits.
        BOOST_TEST(t.find_first_of("0123456789") == std::string::npos, t);
        texts.insert(t);
    }
    BOOST_TEST(texts.size() == kDropReasonCount);
}

BOOST_AUTO_TEST_CASE(summary_in_order_of_first_occurrence) {
    Diagnostics d;
    d.rowsIn = 20;
    d.rowsUsed = 14;
    d.drop(DropReason::NonPositivePrice, 2);
    d.drop(DropReason::BadDate);
    d.drop(DropReason::Excluded, 0);  // nothing dropped: not listed
    d.drop(DropReason::NonPositivePrice, 3);
    d.warn("one");
    BOOST_TEST(d.rowsDropped() == 6u);
    BOOST_TEST(d.droppedFor(DropReason::NonPositivePrice) == 5u);
    BOOST_TEST(d.droppedFor(DropReason::Excluded) == 0u);
    BOOST_TEST(d.summary() ==
               "14 of 20 rows used; dropped: 5 non-positive price, 1 blank or non-date date; "
               "1 warning(s)");
}

BOOST_AUTO_TEST_SUITE_END()
