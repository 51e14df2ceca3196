// Raw mean / median indexes. Expected values are worked by hand in the comments (their
// building blocks, medians, trimmed means and the bands, are in test_statistics.cpp); the
// pandas/scipy reference check (tests/reference/test_raw_pandas.py) checks the bands to 1e-10.
#include <boost/test/unit_test.hpp>

#include <cmath>

#include "raw_index.hpp"

using namespace lintel;

namespace {
SalesInput sales(const std::vector<std::pair<CivilDate, double>>& rows) {
    SalesInput in;
    for (const auto& [d, p] : rows) {
        in.date.push_back(serialFromCivil(d));
        in.price.push_back(p);
    }
    return in;
}
}  // namespace

BOOST_AUTO_TEST_SUITE(raw_index)

BOOST_AUTO_TEST_CASE(median_index_with_gap_base_and_minsales) {
    const SalesInput in = sales({{{2024, 1, 5}, 100}, {{2024, 1, 20}, 300}, {{2024, 3, 2}, 150},
                                 {{2024, 3, 30}, 250}, {{2024, 3, 31}, 400}, {{2024, 4, 1}, 220}});
    RawIndexOptions o;
    IndexResult r = indexMedian(in, o);
    BOOST_TEST(r.table.axis.count == 4);                 // Jan .. Apr, February kept
    BOOST_TEST(r.table.index[0] == 100.0);               // base: the first period (median 200)
    BOOST_TEST(std::isnan(r.table.index[1]));            // February: no sales, no value
    BOOST_TEST(r.table.count[1] == 0u);
    BOOST_TEST(r.table.index[2] == 125.0);               // median 250 / 200
    BOOST_TEST(r.table.index[3] == 110.0);               // 220 / 200
    BOOST_TEST(r.diag.warnings.size() == 1u);            // "1 period(s) without sales"
    o.baseDate = serialFromCivil({2024, 3, 15});
    r = indexMedian(in, o);
    BOOST_TEST(r.table.index[2] == 100.0);
    BOOST_TEST(r.table.index[0] == 80.0);                // 200 / 250
    o.minSales = 3;
    r = indexMedian(in, o);                              // only March has 3 sales
    BOOST_TEST(std::isnan(r.table.index[0]));
    BOOST_TEST(r.table.index[2] == 100.0);
    o.baseDate = serialFromCivil({2024, 1, 15});
    BOOST_CHECK_EXCEPTION(indexMedian(in, o), InputError, [](const InputError& e) {
        return std::string(e.what()) == "the base period 2024-01 has no value (too few sales; minsales 3)";
    });
    o.baseDate = serialFromCivil({2023, 12, 31});
    BOOST_CHECK_EXCEPTION(indexMedian(in, o), InputError, [](const InputError& e) {
        return std::string(e.what()) == "base 2023-12-31 lies outside the data (2024-01 .. 2024-04)";
    });
}

BOOST_AUTO_TEST_CASE(rows_dropped_with_reasons) {
    SalesInput in = sales({{{2024, 1, 5}, 100}, {{2024, 1, 6}, -5}, {{2024, 1, 7}, 0}, {{2024, 1, 8}, 200}});
    in.date.push_back(NAN);
    in.price.push_back(50);
    in.date.push_back(serialFromCivil({2024, 1, 9}));
    in.price.push_back(NAN);
    in.include = {1, 1, 1, 0, 1, 1};
    const IndexResult r = indexMean(in, RawIndexOptions{});
    BOOST_TEST(r.diag.rowsIn == 6u);
    BOOST_TEST(r.diag.rowsUsed == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::NonPositivePrice) == 2u);
    BOOST_TEST(r.diag.droppedFor(DropReason::BadDate) == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::BadPrice) == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::Excluded) == 1u);
    BOOST_TEST(r.diag.summary() ==
               "1 of 6 rows used; dropped: 1 blank or non-date date, 1 blank or non-numeric price, "
               "2 non-positive price, 1 excluded by include");
    in.include.assign(6, 0);
    BOOST_CHECK_THROW(indexMean(in, RawIndexOptions{}), InputError);  // no usable sale
}

BOOST_AUTO_TEST_SUITE_END()
