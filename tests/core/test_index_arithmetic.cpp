// Index arithmetic: rebase, period change, time adjustment of a price (common practice, no
// source; the formulas are in index_arithmetic.hpp). Expected values are worked by hand.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <string>

#include "index_arithmetic.hpp"

using namespace lintel;

BOOST_AUTO_TEST_SUITE(index_arithmetic)

BOOST_AUTO_TEST_CASE(index_arithmetic_formulas) {
    // Common practice, no source: rebase 100 I/I_b, change 100 (I_t/I_{t-k} - 1),
    // log 100 ln(I_t/I_{t-k}), annualised 100 ((I_t/I_{t-k})^(p/k) - 1), P I_target/I_sale.
    const std::vector<double> starts = {serialFromCivil({2024, 1, 1}), serialFromCivil({2024, 4, 1}),
                                        serialFromCivil({2024, 7, 1}), serialFromCivil({2024, 10, 1})};
    const IndexSeries s = IndexSeries::fromColumns(starts, {100, 110, kNoValue, 121});
    BOOST_TEST((s.freq == Frequency::Quarter));
    RebaseOptions base;
    base.baseDate = serialFromCivil({2024, 5, 20});
    const auto rb = rebaseIndex(s, base).values;
    BOOST_TEST(rb[1] == 100.0);
    BOOST_TEST(rb[3] == 110.0);
    BOOST_TEST(std::isnan(rb[2]));
    auto change = [](const std::vector<double>& index, int lag, ChangeKind kind, Frequency f) {
        ChangeOptions o;
        o.lag = lag;
        o.kind = kind;
        o.freq = f;
        return indexChange(index, o).values;
    };
    const auto pct = change(s.value, 1, ChangeKind::Percent, Frequency::Quarter);
    BOOST_TEST(std::isnan(pct[0]));
    BOOST_TEST(pct[1] == 10.0, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(std::isnan(pct[2]));
    BOOST_TEST(std::isnan(pct[3]));  // the previous row has no value
    const auto ann = change(s.value, 2, ChangeKind::Annual, Frequency::Quarter);
    // 100 -> 121 over 2 quarters: 1.21^(4/2) = 1.4641 -> 46.41 %
    BOOST_TEST(std::isnan(ann[2]));
    const auto lg = change({100, 110, 121}, 2, ChangeKind::Log, Frequency::Month);
    BOOST_TEST(lg[2] == 100 * std::log(1.21), boost::test_tools::tolerance(1e-12));
    const auto ann2 = change({100, 110, 121}, 2, ChangeKind::Annual, Frequency::Quarter);
    BOOST_TEST(ann2[2] == 46.41, boost::test_tools::tolerance(1e-12));
    const PriceAdjustment adj =
        adjustPrice(s, 200000, serialFromCivil({2024, 2, 10}), serialFromCivil({2024, 12, 31}));
    BOOST_TEST(adj.price == 242000.0, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(adj.saleIndex == 100.0);
    BOOST_TEST(adj.targetIndex == 121.0);
    BOOST_CHECK_EXCEPTION(adjustPrice(s, 1, serialFromCivil({2024, 8, 1}), starts[0]), InputError,
                          [](const InputError& e) {
                              return std::string(e.what()) ==
                                     "saledate 2024-08-01 falls on period 2024-07-01 without an index value";
                          });
    BOOST_CHECK_THROW(IndexSeries::fromColumns({serialFromCivil({2024, 1, 15})}, {100}), InputError);
}

BOOST_AUTO_TEST_CASE(arithmetic_options_and_diagnostics) {
    const std::vector<double> starts = {serialFromCivil({2024, 1, 1}), serialFromCivil({2024, 2, 1}),
                                        serialFromCivil({2024, 3, 1})};
    const IndexSeries s = IndexSeries::fromColumns(starts, {100, kNoValue, 120});
    // The base is required; validate() says so on its own too.
    const RebaseOptions none;
    BOOST_CHECK_THROW(none.validate(), InputError);
    BOOST_CHECK_EXCEPTION(rebaseIndex(s, none), InputError, [](const InputError& e) {
        return std::string(e.what()) == "base is required: a date in the new base period";
    });
    RebaseOptions base;
    base.baseDate = starts[2];
    const SeriesResult rb = rebaseIndex(s, base);
    BOOST_TEST(rb.values[0] == 100.0 / 1.2, boost::test_tools::tolerance(1e-14));
    BOOST_TEST(rb.diag.rowsIn == 3u);
    BOOST_TEST(rb.diag.rowsUsed == 2u);
    BOOST_TEST(rb.diag.droppedFor(DropReason::BlankValue) == 1u);
    ChangeOptions lag0;
    lag0.lag = 0;
    BOOST_CHECK_THROW(lag0.validate(), InputError);
    // An index value of 0 or less has no change: refused by row, not left blank in silence
    // (issue 10: INDEXCHANGE of 100, -5, 110 gave blanks with no word).
    BOOST_CHECK_EXCEPTION(indexChange({100, -5, 110}, ChangeOptions{}), InputError, [](const InputError& e) {
        return std::string(e.what()) == "changes need index values above 0: row 2 holds -5";
    });
    const SeriesResult ch = indexChange({100, kNoValue, 110}, ChangeOptions{});
    BOOST_TEST(std::isnan(ch.values[1]));
    BOOST_TEST(std::isnan(ch.values[2]));  // its previous value is missing
}

BOOST_AUTO_TEST_SUITE_END()
