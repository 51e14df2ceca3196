// INDEXBACKTEST in the add-in, without UNO: the methods rows read with the bindings of each
// method's own function (the option keys and values documented in docs/functions.md for
// INDEXHEDONIC, CHAINRS, INDEXMEAN), the messages naming the bad row, and a whole call laid
// out as the spec declares (11 columns, one row per method). Expected values come from the
// documented option meanings and from the noise-free market below, where the repeat-sales
// index reproduces the generating index exactly (so its held-out prediction error is 0).
// The figures themselves are checked against pandas and statsmodels in
// tests/reference/test_backtest_statsmodels.py.
#include <boost/test/unit_test.hpp>

#include "addin_test_cells.hpp"

#include <cmath>
#include <string>
#include <variant>
#include <vector>

#include <fmt/format.h>

#include "backtest_methods.hpp"
#include "diagnostics.hpp"
#include "function_table.hpp"

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;

namespace {

bool has(const std::string& s, const std::string& part) { return s.find(part) != std::string::npos; }

std::string rowError(const std::vector<std::string>& rows) {
    try {
        parseMethodRows(rows);
    } catch (const InputError& e) {
        return e.what();
    }
    return "(no error)";
}

double serial(int monthsSince2020) {
    return serialFromCivil({2020 + monthsSince2020 / 12, monthsSince2020 % 12 + 1, 10});
}

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_backtest)

BOOST_AUTO_TEST_CASE(method_rows_take_the_functions_own_options) {
    const auto ms = parseMethodRows({"median", "  ", "Mean trim=0.1", "hedonic log=1, 3 window=13",
                                     "repeat method=bmn; minsales=5", "CHAINRS"});
    BOOST_REQUIRE(ms.size() == 5u);  // the blank row is skipped
    BOOST_TEST(ms[0].label == "median");
    BOOST_TEST((ms[0].kind == IndexMethodKind::Median));
    BOOST_TEST(!ms[0].ownMinSales);

    BOOST_TEST((ms[1].kind == IndexMethodKind::Mean));
    BOOST_TEST(std::get<RawIndexOptions>(ms[1].options).trim == 0.1);

    BOOST_TEST((ms[2].kind == IndexMethodKind::Hedonic));
    const auto& h = std::get<HedonicOptions>(ms[2].options);
    BOOST_TEST(h.logColumns == (std::vector<int>{1, 3}), boost::test_tools::per_element());
    BOOST_TEST(h.window == 13);

    BOOST_TEST((ms[3].kind == IndexMethodKind::RepeatSales));
    const auto& r = std::get<RepeatSalesOptions>(ms[3].options);
    BOOST_TEST((r.method == RepeatSalesMethod::BaileyMuthNourse));
    BOOST_TEST(r.minSales == 5u);
    BOOST_TEST(ms[3].ownMinSales);

    // The function's name works as the word; the defaults are CHAINRS's (Case-Shiller).
    BOOST_TEST((std::get<RepeatSalesOptions>(ms[4].options).method == RepeatSalesMethod::CaseShiller));
}

BOOST_AUTO_TEST_CASE(bad_rows_are_named) {
    BOOST_TEST(rowError({"median", "hedonic lgo=1"}) ==
               "methods row 2 (\"hedonic lgo=1\"): unknown option \"lgo\" for hedonic (known: "
               "log, categorical, window, se, bias, smooth, seasonal, realtime, borrow, minsales, level)");  // INDEXHEDONIC's keys
    BOOST_TEST(has(rowError({"medain"}), "methods row 1 (\"medain\"): unknown method \"medain\" "
                                          "(known: median, mean, mix, hedonic, repeat;"));
    BOOST_TEST(rowError({"median", "repeat freq=Q"}) ==
               "methods row 2 (\"repeat freq=Q\"): freq is set once for every method by "
               "INDEXBACKTEST's freq");
    BOOST_TEST(has(rowError({"mean base=2020-01"}), "methods row 1 (\"mean base=2020-01\"): base "
                                                    "does not apply"));
    BOOST_TEST(rowError({"median", "mean", "median"}) ==
               "methods rows 1 and 3 are the same (\"median\")");
    BOOST_TEST(rowError({"", " "}) == "methods holds no method (one per row, e.g. \"median\")");
    // A value the function itself refuses: the function's own message, after the row.
    BOOST_TEST(has(rowError({"repeat method=xyz"}), "methods row 1 (\"repeat method=xyz\"): "),
               rowError({"repeat method=xyz"}));
    BOOST_TEST(has(rowError({"hedonic log"}), "methods row 1 (\"hedonic log\"): \"log\" has no value"),
               rowError({"hedonic log"}));
}

// Noise-free market (generating model): 240 properties "H0".."H239", each sold in month
// m1 = i mod 12 and again in m2 = m1 + 6 + (floor(i / 12) mod 12) (months since 2020-01, day
// 10); price = (300 if i is even else 100) * 1.01^month. Repeat sales reproduce 1.01^month
// exactly, so every held-out resale is predicted without error.
BOOST_AUTO_TEST_CASE(a_whole_call_and_its_layout) {
    std::vector<Cell> ids, dates, prices;
    for (int i = 0; i < 240; ++i) {
        const int m1 = i % 12, m2 = m1 + 6 + (i / 12) % 12;
        for (int m : {m1, m2}) {
            ids.push_back(Cell::str(fmt::format("H{}", i)));
            dates.push_back(Cell::num(serial(m)));
            prices.push_back(Cell::num((i % 2 == 0 ? 300.0 : 100.0) * std::pow(1.01, m)));
        }
    }
    const Arg methods = column({Cell::str("median"), Cell::str("repeat method=bmn")});
    const OutTable t = callOmitting("INDEXBACKTEST", {column(ids), column(dates), column(prices), Arg{},
                                                      Arg{}, Arg{}, Arg{}, text("M"), methods,
                                                      text("titles=1; revisions=3")});
    BOOST_REQUIRE(t.rows.size() == 3u);  // titles + two methods
    BOOST_REQUIRE(t.rows[0].size() == 11u);
    BOOST_TEST(txt(t.rows[0][0]) == "method");
    BOOST_TEST(txt(t.rows[0][2]) == "median abs error %");
    BOOST_TEST(txt(t.rows[0][10]) == "reason");
    BOOST_TEST(txt(t.rows[1][0]) == "median");
    BOOST_TEST(txt(t.rows[2][0]) == "repeat method=bmn");
    // 240 resales; the last month (2022-05, m1 = 11, m2 = 28) is sold only by H143, so when
    // H143's fold is held out that month has no value: 239 predicted by both (the other months
    // keep a sale of another fold's property: H131 and H142 share month 27 and lie in
    // different folds). Repeat sales predict exactly.
    BOOST_TEST(lintel::propertyFold("H131", 1, 10) != lintel::propertyFold("H142", 1, 10));
    BOOST_TEST(num(t.rows[1][1]) == 239.0);
    BOOST_TEST(num(t.rows[2][1]) == 239.0);
    BOOST_TEST(std::fabs(num(t.rows[2][2])) < 1e-9);
    BOOST_TEST(num(t.rows[1][2]) > 1.0);  // the median jumps with the mix of dear and cheap
    BOOST_TEST(num(t.rows[2][8]) == 1.0);  // rank
    BOOST_TEST(num(t.rows[2][9]) == 1.0);  // recommended
    BOOST_TEST(num(t.rows[1][8]) == 2.0);
    BOOST_TEST(num(t.rows[1][9]) == 0.0);
    BOOST_TEST(has(txt(t.rows[2][10]), "predicts held-out resales best (median error 0.0 %)"),
               txt(t.rows[2][10]));
    BOOST_TEST(has(txt(t.rows[1][10]), "less accurate than repeat method=bmn"), txt(t.rows[1][10]));

    // A bad row: one message naming it, in the single result cell.
    const OutTable bad = callOmitting("INDEXBACKTEST",
                                      {column(ids), column(dates), column(prices), Arg{}, Arg{}, Arg{},
                                       Arg{}, text("M"), column({Cell::str("median"), Cell::str("mix")})});
    BOOST_TEST(has(messageOf(bad), "method \"mix\" needs the strata argument"), messageOf(bad));
}

BOOST_AUTO_TEST_SUITE_END()
