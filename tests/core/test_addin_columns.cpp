// Whole columns at the cost of their data (column_rows.hpp) and the cost of storing a result
// in Calc (result_cost.hpp). The expected rows follow the rules documented in column_rows.hpp;
// the expected costs follow the storage model documented in result_cost.hpp (mdds 2.0.3
// multi_type_vector::set_impl), worked by hand below each case.
#include <boost/test/unit_test.hpp>

#include "addin_test_cells.hpp"

#include "column_rows.hpp"
#include "function_table.hpp"
#include "result_cost.hpp"

using namespace lintel::addin;
using namespace addin_test;

namespace {

constexpr std::size_t kSheetRows = 1048576;

ColumnExtent wholeColumn(std::size_t used, std::size_t cols = 1) {
    return {kSheetRows, cols, used, true};
}

Range numbers(std::size_t rows, std::size_t filled, double value = 1.0) {
    Range r;
    r.rows = rows;
    r.cols = 1;
    r.cells.resize(rows);
    for (std::size_t i = 0; i < filled; ++i) r.cells[i] = Cell::num(value);
    return r;
}

// One output column: 'n' a number, 't' a text, '.' no value.
OutTable table(const std::vector<std::string>& rows) {
    OutTable t;
    for (const auto& row : rows) {
        t.rows.emplace_back();
        for (char c : row) {
            OutCell cell;
            if (c == 'n') cell = {OutCell::Kind::Number, 1.0, ""};
            if (c == 't') cell = {OutCell::Kind::Text, 0.0, "x"};
            t.rows.back().push_back(cell);
        }
    }
    return t;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_columns)

BOOST_AUTO_TEST_CASE(whole_columns_keep_the_rows_of_their_data) {
    // INDEXMEDIAN(A:A; B:B): dates end at row 1001, prices at row 999 -> both keep 1001 rows.
    const std::vector<ArgKind> kinds = {ArgKind::Column, ArgKind::Column, ArgKind::Optional};
    const auto rows = plannedRows(kinds, {wholeColumn(1001), wholeColumn(999), std::nullopt},
                                  {std::nullopt, std::nullopt, std::nullopt});
    BOOST_TEST(rows == (std::vector<std::size_t>{1001, 1001, 0}), boost::test_tools::per_element());
}

BOOST_AUTO_TEST_CASE(explicit_ranges_keep_their_size) {
    // A2:A5001 with data down to row 1001 of the sheet: all 5000 rows, the rest read as blank.
    const ColumnExtent explicitRange{5000, 1, 1000, false};
    const auto rows = plannedRows({ArgKind::Column, ArgKind::Column}, {explicitRange, explicitRange},
                                  {std::nullopt, std::nullopt});
    BOOST_TEST(rows == (std::vector<std::size_t>{5000, 5000}), boost::test_tools::per_element());
}

BOOST_AUTO_TEST_CASE(an_include_mask_over_whole_columns_follows_the_data) {
    // INDEXMEAN(A:A; B:B; (C:C="North")*(D:D="flat")): the mask holds a number in every row
    // (0 below the data) and must not keep a million rows; it is cut with the data columns.
    Range mask = numbers(kSheetRows, kSheetRows, 0.0);
    const auto rows = plannedRows({ArgKind::Column, ArgKind::Column, ArgKind::Optional},
                                  {wholeColumn(1200), wholeColumn(1200), std::nullopt},
                                  {std::nullopt, std::nullopt, mask});
    BOOST_TEST(rows == (std::vector<std::size_t>{1200, 1200, 1200}), boost::test_tools::per_element());
}

BOOST_AUTO_TEST_CASE(an_optional_range_with_text_below_the_data_keeps_its_rows) {
    // An options range given as whole columns G:H whose keys lie below the data must not lose
    // them.
    Range options;
    options.rows = kSheetRows;
    options.cols = 1;
    options.cells.resize(kSheetRows);
    options.cells[2000] = Cell::str("minsales");
    const auto rows = plannedRows({ArgKind::Column, ArgKind::Optional}, {wholeColumn(100), std::nullopt},
                                  {std::nullopt, options});
    BOOST_TEST(rows[0] == 100u);
    BOOST_TEST(rows[1] == kSheetRows);
}

BOOST_AUTO_TEST_CASE(a_value_shape_says_where_the_values_and_the_text_end) {
    // The plan works on shapes so that the UNO layer converts a whole-column expression only
    // down to the rows kept; shapeOf must see what the converted range holds.
    Range r = numbers(10, 6);
    r.cells[3] = Cell::str("minsales");
    ValueShape s = shapeOf(r);
    BOOST_TEST(s.rows == 10u);
    BOOST_TEST(s.usedRows == 6u);
    BOOST_TEST(s.textRows == 4u);
    r.cells[3] = Cell::num(2);
    s = shapeOf(r);
    BOOST_TEST(s.textRows == 0u);
    BOOST_TEST(shapeOf(numbers(7, 0)).usedRows == 0u);
    // A million-row mask as a shape: cut with the data; with text below the data, kept.
    const std::vector<ArgKind> kinds = {ArgKind::Column, ArgKind::Optional};
    const std::vector<std::optional<ColumnExtent>> cols = {wholeColumn(1200), std::nullopt};
    BOOST_TEST(plannedRowsByShape(kinds, cols, {std::nullopt, ValueShape{kSheetRows, kSheetRows, 0}})[1] == 1200u);
    BOOST_TEST(plannedRowsByShape(kinds, cols, {std::nullopt, ValueShape{kSheetRows, 2001, 2001}})[1] == kSheetRows);
    BOOST_TEST(plannedRowsByShape(kinds, cols, {std::nullopt, ValueShape{kSheetRows, kSheetRows, 1200}})[1] == 1200u);
}

BOOST_AUTO_TEST_CASE(value_or_column_arguments_extend_the_group) {
    // PRICEADJUST(B:B; A:A; DATE(...); H:H; I:I): prices and sale dates (Range arguments, passed
    // as values) reach row 1000, the index table (Column arguments) row 61: every column keeps
    // 1000 rows, so the result follows the prices.
    const Range prices = numbers(kSheetRows, 1000);
    const Range dates = numbers(kSheetRows, 998);
    const Range target = numbers(1, 1);
    const std::vector<ArgKind> kinds = {ArgKind::Range, ArgKind::Range, ArgKind::Range, ArgKind::Column,
                                        ArgKind::Column};
    const auto rows = plannedRows(kinds, {std::nullopt, std::nullopt, std::nullopt, wholeColumn(61), wholeColumn(61)},
                                  {prices, dates, target, std::nullopt, std::nullopt});
    BOOST_TEST(rows == (std::vector<std::size_t>{1000, 1000, 1, 1000, 1000}), boost::test_tools::per_element());
}

BOOST_AUTO_TEST_CASE(misaligned_whole_columns_are_not_made_equal) {
    // A2:A1048576 and B:B differ by one row: each group is cut to its own data and the
    // functions still report the difference.
    const ColumnExtent fromRow2{kSheetRows - 1, 1, 1000, true};
    const auto rows = plannedRows({ArgKind::Column, ArgKind::Column}, {fromRow2, wholeColumn(1001)},
                                  {std::nullopt, std::nullopt});
    BOOST_TEST(rows == (std::vector<std::size_t>{1000, 1001}), boost::test_tools::per_element());
}

BOOST_AUTO_TEST_CASE(an_empty_whole_column_keeps_one_row) {
    const auto rows = plannedRows({ArgKind::Column}, {wholeColumn(0)}, {std::nullopt});
    BOOST_TEST(rows[0] == 1u);
}

BOOST_AUTO_TEST_CASE(error_cells_in_rows_left_out_are_passed_over) {
    // INDEXMEDIAN(dates; prices; include): an error in prices row 2 (0-based) where include
    // holds 0 is passed over; one in row 3 where include holds 1 is refused; without include
    // every error is refused. Issue 10: errors in excluded rows gave Err:504 / a message.
    const FunctionSpec& f = functionSpec("INDEXMEDIAN");
    Range include = numbers(5, 5);
    include.at(2, 0) = Cell::num(0);
    std::vector<Arg> values = {numbers(5, 5, 45000), numbers(5, 5, 200000), include};
    BOOST_TEST(!refusedError(f, values, {{1, 2, 0}}).has_value());
    BOOST_TEST(refusedError(f, values, {{1, 2, 0}, {1, 3, 0}}).value() == 1u);
    include.at(3, 0) = Cell::str("FALSE");  // FALSE as text, as cellFlag reads it
    values[2] = include;
    BOOST_TEST(!refusedError(f, values, {{1, 2, 0}, {1, 3, 0}}).has_value());
    values[2] = std::nullopt;
    BOOST_TEST(refusedError(f, values, {{1, 2, 0}}).value() == 0u);
}

BOOST_AUTO_TEST_CASE(error_cells_below_a_series_are_passed_over) {
    // INDEXCHANGE(P:P) with 20 numbers and #N/A in row 25 (0-based 24): below the series,
    // passed over; an error inside the series (row 5) is refused.
    const FunctionSpec& f = functionSpec("INDEXCHANGE");
    std::vector<Arg> values(f.args.size());
    values[0] = numbers(25, 20, 100);
    BOOST_TEST(!refusedError(f, values, {{0, 24, 0}}).has_value());
    BOOST_TEST(refusedError(f, values, {{0, 5, 0}, {0, 24, 0}}).value() == 0u);
    // INDEXREBASE(periods; index): the table reaches as far as any Column argument holds a value:
    // an error in index row 22 while periods go on to row 25 is inside it.
    const FunctionSpec& g = functionSpec("INDEXREBASE");
    std::vector<Arg> two(g.args.size());
    two[0] = numbers(25, 25, 45000);
    two[1] = numbers(25, 20, 100);
    BOOST_TEST(refusedError(g, two, {{1, 22, 0}}).value() == 0u);
    // ISSEGMENT(labels; ...): labels are text; an error among them is inside the table.
    const FunctionSpec& h = functionSpec("ISSEGMENT");
    std::vector<Arg> labels(h.args.size());
    Range text;
    text.rows = 10;
    text.cols = 1;
    text.cells.assign(10, Cell::str("North"));
    text.at(4, 0) = Cell{};
    labels[0] = text;
    BOOST_TEST(refusedError(h, labels, {{0, 4, 0}}).value() == 0u);
}

BOOST_AUTO_TEST_CASE(set_rows_cuts_and_pads) {
    Range r = numbers(5, 5);
    BOOST_TEST(usedRows(r) == 5u);
    setRows(r, 2);
    BOOST_TEST(r.rows == 2u);
    BOOST_TEST(r.cells.size() == 2u);
    setRows(r, 4);
    BOOST_TEST(r.at(1, 0).isNumber());
    BOOST_TEST(r.at(3, 0).isEmpty());
    BOOST_TEST(usedRows(r) == 2u);
}

BOOST_AUTO_TEST_CASE(store_cost_of_a_column) {
    // One column n . . n (height 4): the blank in row 1 splits the numbers of rows 2..3 (2
    // cells moved), the blank in row 2 those of row 3 (1 cell): 3.
    BOOST_TEST(storeCost(table({"n", ".", ".", "n"}), 1e18) == 3.0);
    // Numbers only: nothing moves.
    BOOST_TEST(storeCost(table({"n", "n", "n"}), 1e18) == 0.0);
    // A blank tail of b rows below d numbers costs b (b - 1) / 2: 100 numbers, 1000 blanks.
    std::vector<std::string> rows(100, "n");
    rows.resize(1100, ".");
    BOOST_TEST(storeCost(table(rows), 1e18) == 1000.0 * 999.0 / 2.0);
}

BOOST_AUTO_TEST_CASE(store_cost_runs_into_following_columns) {
    // Two columns, height 3, text in column 0 only ("tn" / "tn" / "tn"). Calc fills row by row,
    // the matrix stores column 0 then column 1:
    //  (0,0): rows 1..2 of column 0 (2) + all of column 1 (3, nothing set there yet) = 5
    //  (1,0): row 2 of column 0 (1) + column 1, whose row 0 is a number (3) = 4
    //  (2,0): nothing left in column 0 + column 1 (3) = 3
    BOOST_TEST(storeCost(table({"tn", "tn", "tn"}), 1e18) == 12.0);
    // With a text in row 0 of column 1 ("tt" / "tn" / "tn") the runs stop there:
    //  (0,0): 2 + column 1 (its row 0 is not set yet: 3) = 5
    //  (0,1): rows 1..2 of column 1 = 2
    //  (1,0): 1 + nothing of column 1 (a text above row 1) = 1
    //  (2,0): 0
    BOOST_TEST(storeCost(table({"tt", "tn", "tn"}), 1e18) == 8.0);
    // A one-row result gets a blank second row: (1,0) moves column 1 (2 cells), (1,1) nothing.
    BOOST_TEST(storeCost(table({"nn"}), 1e18) == 2.0);
}

BOOST_AUTO_TEST_CASE(long_blank_tails_are_trimmed_and_huge_text_results_refused) {
    // 1,000 numbers over 200,000 blank rows: about 2e10 cells moved -> the blank tail goes.
    std::vector<std::string> rows(1000, "n");
    rows.resize(201000, ".");
    const OutTable trimmed = withinStoreLimits(table(rows));
    BOOST_TEST(trimmed.rows.size() == 1000u);
    // 70,000 blank rows (2.4e9 cells moved) go; 50,000 (1.25e9) stay blank, as the docs say.
    rows.resize(71000, ".");
    BOOST_TEST(withinStoreLimits(table(rows)).rows.size() == 1000u);
    rows.resize(51000, ".");
    BOOST_TEST(withinStoreLimits(table(rows)).rows.size() == 51000u);
    // 200,000 text rows cannot be trimmed: a message instead.
    const OutTable refused = withinStoreLimits(table(std::vector<std::string>(200000, "t")));
    BOOST_TEST(refused.scalar);
    BOOST_TEST(messageOf(refused).find("200000 rows with 200000 text or blank cells") != std::string::npos);
    // Blanks inside the data of a short result are kept.
    const OutTable kept = withinStoreLimits(table({"n", ".", "n", "."}));
    BOOST_TEST(kept.rows.size() == 4u);
}

BOOST_AUTO_TEST_SUITE_END()
