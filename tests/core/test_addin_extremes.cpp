// The cases of issue 10 through the add-in's UNO-free calls: prices and index values near the
// largest double (1.8e308) and the smallest (2.2e-308), 0 and negative values give the value
// that exists or a "Lintel: ..." message; never a blank in place of a number.
// Reference values: exact arithmetic on the decimal inputs (medians of two = their mean,
// ratios), 616 ln 10 = ln(1e308 / 1e-308) = 1418.392417284332 (Python decimal, 40 digits),
// and the HP filter passing a constant through unchanged (Hodrick & Prescott 1997).
#include <boost/test/unit_test.hpp>

#include "addin_test_cells.hpp"

#include <cmath>
#include <string>
#include <vector>

#include "function_table.hpp"
#include "periods.hpp"

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;
namespace tt = boost::test_tools;

namespace {

Arg numbers(const std::vector<double>& v) {
    std::vector<Cell> out;
    for (double x : v) out.push_back(std::isnan(x) ? Cell{} : Cell::num(x));
    return column(out);
}
double serial(int y, int m, int d) { return serialFromCivil({y, m, d}); }
bool startsWith(const std::string& s, const std::string& head) { return s.rfind(head, 0) == 0; }

constexpr double kLn1e616 = 1418.392417284332;  // 616 ln 10, Python decimal

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_extremes)

// Issue 10: "INDEXMEDIAN with prices around 1e308 gives period dates and counts but a blank
// index column." Jan 1e308, 1.2e308 (median 1.1e308); Feb 1.21e308, 1.43e308 (1.32e308):
// 100, 120.
BOOST_AUTO_TEST_CASE(indexmedian_and_indexmean_of_prices_near_1e308) {
    const Arg dates = numbers({serial(2024, 1, 5), serial(2024, 1, 9), serial(2024, 2, 3),
                               serial(2024, 2, 4)});
    const Arg prices = numbers({1e308, 1.2e308, 1.21e308, 1.43e308});
    for (const char* f : {"INDEXMEDIAN", "INDEXMEAN"}) {
        const OutTable t = callOmitting(f, {dates, prices});
        BOOST_REQUIRE(t.rows.size() == 2u);
        BOOST_TEST(num(t.rows[0][1]) == 100.0);
        BOOST_TEST(num(t.rows[1][1]) == 120.0, tt::tolerance(1e-13));
        BOOST_TEST(num(t.rows[1][2]) == 2.0);
    }
    // 1e308 next to 1e-308: refused, naming both rows.
    const OutTable far = callOmitting(
        "INDEXMEDIAN", {numbers({serial(2024, 1, 5), serial(2024, 2, 3)}), numbers({1e308, 1e-308})});
    BOOST_TEST(messageOf(far) ==
               "Lintel: prices span too far to compare: row 2 holds 1e-308 and row 1 holds 1e+308 "
               "(a ratio beyond the range of numbers, about 1e308)");
}

// Issue 10: "INDEXMIX's even-count median overflows and miscounts." One stratum, two sales a
// month: Jan median 1.1e308, Feb 1.32e308: 100, 120; both sales of each month counted.
BOOST_AUTO_TEST_CASE(indexmix_even_count_median_near_1e308) {
    std::vector<Arg> args(7);
    args[0] = numbers({serial(2024, 1, 5), serial(2024, 1, 9), serial(2024, 2, 3), serial(2024, 2, 4)});
    args[1] = numbers({1e308, 1.2e308, 1.21e308, 1.43e308});
    args[2] = column({Cell::str("a"), Cell::str("a"), Cell::str("a"), Cell::str("a")});
    for (const char* opts : {"", "weights=value", "stat=mean; weights=value"}) {
        args[6] = text(opts);
        const OutTable t = callOmitting("INDEXMIX", args);
        BOOST_REQUIRE(t.rows.size() == 2u);
        BOOST_TEST(num(t.rows[0][1]) == 100.0);
        BOOST_TEST(num(t.rows[1][1]) == 120.0, tt::tolerance(1e-13));
        BOOST_TEST(num(t.rows[0][2]) == 2.0);
        BOOST_TEST(num(t.rows[1][2]) == 2.0);
    }
}

// Issue 10: "PRICEADJUST(1E+308; ...) returns a blank." 1e308 * 105 / 100 = 1.05e308 is a
// value; 1e308 * 200 / 100 is beyond the largest double: a message, not a blank.
BOOST_AUTO_TEST_CASE(priceadjust_of_1e308) {
    const Arg periods = numbers({serial(2024, 1, 1), serial(2024, 2, 1), serial(2024, 3, 1)});
    const Arg index = numbers({100, 105, 200});
    const Arg jan = number(serial(2024, 1, 15)), feb = number(serial(2024, 2, 15)),
              mar = number(serial(2024, 3, 15));
    OutTable t = call("PRICEADJUST", {number(1e308), jan, feb, periods, index});
    BOOST_TEST(num(t.rows[0][0]) == 1.05e308, tt::tolerance(1e-15));
    t = call("PRICEADJUST", {number(1e308), jan, mar, periods, index});
    BOOST_TEST(txt(t.rows[0][0]) ==
               "Lintel: the adjusted price 1e+308 x 200 / 100 is beyond the range of numbers "
               "(about 1e-308 to 1e308)");
    // A tiny price: 1e-308 * 100 / 200 = 5e-309.
    t = call("PRICEADJUST", {number(1e-308), mar, jan, periods, index});
    BOOST_TEST(num(t.rows[0][0]) == 5e-309, tt::tolerance(1e-12));
}

// A price of 0 or less is no sale price: refused, not adjusted to 0. Calc hands a reference
// to one empty cell over as the number 0 (backlog: "a blank cell reference reads as 0 in
// PRICEADJUST's price"), so a single 0 says so; a 0 in a column of prices (where a blank stays
// blank) is a typed 0.
BOOST_AUTO_TEST_CASE(priceadjust_refuses_a_price_of_0_or_less) {
    const Arg periods = numbers({serial(2024, 1, 1), serial(2024, 2, 1)});
    const Arg index = numbers({100, 105});
    const Arg jan = number(serial(2024, 1, 15)), feb = number(serial(2024, 2, 15));
    OutTable t = call("PRICEADJUST", {number(0), jan, feb, periods, index});
    BOOST_TEST(txt(t.rows[0][0]) == "Lintel: price must be above 0, got 0 (an empty cell reads as 0)");
    t = call("PRICEADJUST", {number(-5), jan, feb, periods, index});
    BOOST_TEST(txt(t.rows[0][0]) == "Lintel: price must be above 0, got -5");
    t = call("PRICEADJUST", {numbers({200000, 0}), jan, feb, periods, index});
    BOOST_TEST(num(t.rows[0][0]) == 210000.0, tt::tolerance(1e-12));
    BOOST_TEST(txt(t.rows[1][0]) == "Lintel: price must be above 0, got 0");
    // A sale date from an empty cell: 1899-12-30, outside the index, with the hint.
    t = call("PRICEADJUST", {number(200000), number(0), feb, periods, index});
    BOOST_TEST(txt(t.rows[0][0]) ==
               "Lintel: saledate 1899-12-30 lies outside the index (2024-01-01 .. 2024-02-01) "
               "(an empty cell reads as 0)");
}

// Issue 10: "INDEXSEASONAL on a negative index says 'too many missing values'."
BOOST_AUTO_TEST_CASE(indexseasonal_names_the_negative_value) {
    std::vector<double> v(24, 100.0);
    v[6] = -5;
    BOOST_TEST(messageOf(callOmitting("INDEXSEASONAL", {numbers(v)})) ==
               "Lintel: seasonal factors need index values above 0: row 7 holds -5");
}

// Issue 10: "INDEXVOLATILITY on values alternating 1e308/1e-308 says '0 changes'." Changes
// -c, +c, -c with c = 100 * 616 ln 10: mean -c/3, deviations -2c/3, 4c/3, -2c/3, squares
// summing to 8c^2/3, over n - 1 = 2: 4c^2/3; sample sd = 2c / sqrt(3).
BOOST_AUTO_TEST_CASE(indexvolatility_of_values_alternating_1e308_and_1e_308) {
    const OutTable t = callOmitting("INDEXVOLATILITY", {numbers({1e308, 1e-308, 1e308, 1e-308})});
    const double c = 100.0 * kLn1e616;
    BOOST_TEST(num(t.rows[0][0]) == c * 2.0 / std::sqrt(3.0), tt::tolerance(1e-13));
}

// Issue 10: "INDEXTREND of a constant 5 returns 5.000000000055."
BOOST_AUTO_TEST_CASE(indextrend_of_a_constant_is_exact) {
    const OutTable t = callOmitting("INDEXTREND", {numbers(std::vector<double>(36, 5.0))});
    BOOST_REQUIRE(t.rows.size() == 36u);
    for (const auto& row : t.rows) BOOST_TEST(num(row[0]) == 5.0);
}

// INDEXREBASE and INDEXCHANGE near the largest double: values, or the reason.
BOOST_AUTO_TEST_CASE(indexrebase_and_indexchange_near_1e308) {
    const Arg periods = numbers({serial(2024, 1, 1), serial(2024, 2, 1), serial(2024, 3, 1)});
    OutTable t = call("INDEXREBASE", {periods, numbers({1e308, 2e307, 1.5e308}), number(serial(2024, 1, 1))});
    BOOST_TEST(num(t.rows[1][0]) == 20.0, tt::tolerance(1e-14));
    BOOST_TEST(num(t.rows[2][0]) == 150.0, tt::tolerance(1e-14));
    t = callOmitting("INDEXCHANGE", {numbers({1e-308, 1e308}), {}, text("log")});
    BOOST_TEST(num(t.rows[1][0]) == 100.0 * kLn1e616, tt::tolerance(1e-14));
    t = callOmitting("INDEXCHANGE", {numbers({1e-308, 1e308})});
    BOOST_TEST(startsWith(messageOf(t), "Lintel: the change at row 2 (1e+308 after 1e-308) is beyond"));
}

// A value of 0 or less: the messages say which row holds it instead of "no value".
BOOST_AUTO_TEST_CASE(zero_and_negative_index_values_are_named) {
    BOOST_TEST(messageOf(callOmitting("INDEXVOLATILITY", {numbers({100, 0, 100, 100})})) ==
               "Lintel: volatility needs at least 2 changes over 1 period(s); the index gives 1 "
               "(a value of 0 or less has no log change: row 2 holds 0)");
    const Arg periods = numbers({serial(2024, 1, 1), serial(2024, 2, 1)});
    BOOST_TEST(messageOf(call("INDEXREBASE", {periods, numbers({-5, 100}), number(serial(2024, 1, 1))})) ==
               "Lintel: the base period 2024-01-01 holds -5: an index value must be above 0");
    const OutTable t = call("PRICEADJUST", {number(100), number(serial(2024, 1, 4)),
                                            number(serial(2024, 2, 4)), periods, numbers({-5, 100})});
    BOOST_TEST(txt(t.rows[0][0]) ==
               "Lintel: saledate 2024-01-04 falls on period 2024-01-01, which holds -5: an index "
               "value must be above 0");
}

// INDEXHEDONIC and CHAINRS work on log prices: prices 1e-300 in January and 1e300 in February
// give log levels 1381.6 apart; 100 exp(1381.6) is beyond the largest double: a message, not
// a blank (and the reverse base, 100 exp(-1381.6), not a 0).
BOOST_AUTO_TEST_CASE(log_price_indexes_beyond_the_range_say_so) {
    std::vector<double> dates, prices, sizes, ids;
    for (int k = 0; k < 8; ++k) {
        const bool feb = k >= 4;
        dates.push_back(serial(2024, feb ? 2 : 1, 3 + k));
        sizes.push_back(1 + k % 2);
        prices.push_back((feb ? 1e300 : 1e-300) * (1 + k % 2) * (1 + 0.01 * k));
        ids.push_back(k % 4 + 1);
    }
    OutTable t = callOmitting("INDEXHEDONIC", {numbers(dates), numbers(prices), numbers(sizes)});
    BOOST_TEST(messageOf(t) == "Lintel: the index of period 2024-02 is beyond the largest number "
                               "(about 1.8e308): the prices span too far");
    std::vector<Arg> args(7);
    args[0] = numbers(dates);
    args[1] = numbers(prices);
    args[2] = numbers(sizes);
    args[5] = number(serial(2024, 2, 1));
    t = callOmitting("INDEXHEDONIC", args);
    BOOST_TEST(messageOf(t) == "Lintel: the index of period 2024-01 is below the smallest number "
                               "(about 1e-308): the prices span too far");
    std::vector<Arg> rs(8);
    rs[0] = numbers(ids);
    rs[1] = numbers(dates);
    rs[2] = numbers(prices);
    rs[7] = text("minhold=0; maxrate=0");  // the flip and rate screens off: the pairs stay
    t = callOmitting("CHAINRS", rs);
    BOOST_TEST(messageOf(t) == "Lintel: the index of period 2024-02 is beyond the largest number "
                               "(about 1.8e308): the prices span too far");
}

BOOST_AUTO_TEST_SUITE_END()
