// CHAINRS and RSPAIRS in the add-in, without UNO: cells -> RepeatSalesInput, options ->
// RepeatSalesOptions, results -> cells. Expected values: the three-period example solved by
// hand in tests/core/test_repeat_sales.cpp (repeated in the comments below), the documented
// layout and messages (docs/functions.md, docs/methods/repeat_sales.md), and
// day counts of the calendar. The core itself is checked against statsmodels in
// tests/reference/test_repeat_sales_*.py.
//
// Test data (helper `hand`): yearly periods 2020, 2021, 2022; three properties sold twice,
// price 100 then 100 exp(y):
//   A: 2020-03-01 -> 2021-03-01, y = 0.10   (365 days, 12 months)
//   B: 2021-04-01 -> 2022-04-01, y = 0.05   (365 days, 12 months)
//   C: 2020-03-01 -> 2022-03-01, y = 0.18   (730 days, 24 months)
// BMN by hand: X = [1 0; -1 1; 0 1], b = (X'X)^-1 X'y = (0.11, 0.17); residuals -0.01, -0.01,
// 0.01; s^2 = 3e-4 / 1; se = sqrt(2e-4); t(1) 0.975 quantile 12.7062047 (any t table):
// index 100, 111.627807, 118.530485; 2021 band 93.26802 .. 133.60171.
#include <boost/test/unit_test.hpp>

#include "addin_test_cells.hpp"

#include <cmath>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "options.hpp"
#include "repeat_sales.hpp"
#include "text_keys.hpp"

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;

namespace {

// Date serials (day 0 = 1899-12-30): 2020-01-01 = 43831 (a calendar count), then day counts.
constexpr double k2020 = 43831, k2021 = 44197, k2022 = 44562;   // period starts (Jan 1)
constexpr double kMar20 = 43891, kMar21 = 44256, kApr21 = 44287, kMar22 = 44621,
                 kApr22 = 44652;


struct Sheet {
    std::vector<Cell> ids, dates, prices, changed;
    Sheet& add(Cell id, double date, Cell price, double changedFlag = 0) {
        ids.push_back(std::move(id));
        dates.push_back(Cell::num(date));
        prices.push_back(std::move(price));
        changed.push_back(Cell::num(changedFlag));
        return *this;
    }
    Sheet& add(const std::string& id, double date, double price, double changedFlag = 0) {
        return add(Cell::str(id), date, Cell::num(price), changedFlag);
    }
};

Sheet hand() {
    Sheet s;
    s.add("A", kMar20, 100).add("A", kMar21, 100 * std::exp(0.10));
    s.add("B", kApr21, 100).add("B", kApr22, 100 * std::exp(0.05));
    s.add("C", kMar20, 100).add("C", kMar22, 100 * std::exp(0.18));
    return s;
}

// CHAINRS(ids; dates; prices; changed; include; freq; base; options)
std::vector<Arg> chainArgs(const Sheet& s, const std::string& options, bool withChanged = false,
                           const std::string& freq = "Y") {
    std::vector<Arg> a(8);
    a[0] = column(s.ids);
    a[1] = column(s.dates);
    a[2] = column(s.prices);
    if (withChanged) a[3] = column(s.changed);
    if (!freq.empty()) a[5] = text(freq);
    if (!options.empty()) a[7] = text(options);
    return a;
}
// RSPAIRS(ids; dates; prices; changed; include; options)
std::vector<Arg> pairArgs(const Sheet& s, const std::string& options, bool withChanged = false) {
    std::vector<Arg> a(6);
    a[0] = column(s.ids);
    a[1] = column(s.dates);
    a[2] = column(s.prices);
    if (withChanged) a[3] = column(s.changed);
    if (!options.empty()) a[5] = text(options);
    return a;
}



bool isNone(const OutCell& c) { return c.kind == OutCell::Kind::NoValue; }

const std::vector<OutCell>* rowOf(const OutTable& t, const std::string& label) {
    for (const auto& r : t.rows)
        if (!r.empty() && r[0].kind == OutCell::Kind::Text && r[0].text == label) return &r;
    return nullptr;
}

// The index and band columns of two CHAINRS results agree exactly.
void sameIndex(const OutTable& a, const OutTable& b) {
    BOOST_REQUIRE_EQUAL(a.rows.size(), b.rows.size());
    for (std::size_t i = 0; i < a.rows.size(); ++i)
        for (std::size_t c = 0; c < 5; ++c) {
            BOOST_TEST((a.rows[i][c].kind == b.rows[i][c].kind));
            BOOST_TEST(a.rows[i][c].number == b.rows[i][c].number);
        }
}

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_repeat_sales)

BOOST_AUTO_TEST_CASE(table_entries_have_the_fixed_names_and_argument_orders) {
    const auto argNames = [](const char* fn) {
        std::vector<std::string> v;
        for (const auto& a : findFunctionByName(fn)->args) v.push_back(a.name);
        return v;
    };
    const auto optionKeys = [](const char* fn) {
        std::vector<std::string> v;
        for (const auto& o : findFunctionByName(fn)->options) v.push_back(o.key);
        return v;
    };
    BOOST_TEST(argNames("CHAINRS") == (std::vector<std::string>{"ids", "dates", "prices", "changed",
                                                                "include", "freq", "base", "options"}));
    BOOST_TEST(argNames("RSPAIRS") ==
               (std::vector<std::string>{"ids", "dates", "prices", "changed", "include", "options"}));
    BOOST_TEST(optionKeys("CHAINRS") ==
               (std::vector<std::string>{"method", "minhold", "maxrate", "chain", "init", "smooth",
                                         "seasonal", "realtime", "borrow", "minsales", "level", "dateorder",
                                         "labels", "header", "titles", "notes"}));
    BOOST_TEST(optionKeys("RSPAIRS") ==
               (std::vector<std::string>{"method", "minhold", "maxrate", "chain", "init", "minsales",
                                         "level", "freq", "base", "dateorder", "labels", "header", "titles",
                                         "notes"}));
    for (const char* fn : {"CHAINRS", "RSPAIRS"}) {
        const FunctionSpec& f = *findFunctionByName(fn);
        BOOST_TEST(f.description.size() > 40u);
        BOOST_TEST(!f.output.empty());
        BOOST_TEST(f.example.rfind(std::string("=") + fn + "(", 0) == 0u);
        for (std::size_t i = 0; i < f.args.size(); ++i) {
            BOOST_TEST(f.args[i].description.size() > 20u, fn << " " << f.args[i].name);
            BOOST_TEST((f.args[i].kind == (i < 3 ? ArgKind::Column : ArgKind::Optional)));
        }
        for (const auto& o : f.options) BOOST_TEST(o.description.size() > 20u, fn << " " << o.key);
    }
    BOOST_TEST(findFunctionByMethod("chainRs")->name == "CHAINRS");
    BOOST_TEST(findFunctionByMethod("rsPairs")->name == "RSPAIRS");
    // The defaults shown are the core's defaults.
    const RepeatSalesOptions o;
    const auto& opts = findFunctionByName("CHAINRS")->options;
    BOOST_TEST(opts[1].defaultText == "6");
    BOOST_TEST(o.minHoldMonths == 6.0);
    BOOST_TEST(opts[2].defaultText == "1");
    BOOST_TEST(o.maxRate == 1.0);
    BOOST_TEST((o.method == RepeatSalesMethod::CaseShiller));
    BOOST_TEST(opts[0].defaultText == "cs");
}

BOOST_AUTO_TEST_CASE(changed_text_that_is_no_flag_is_refused) {
    // Issue 10, the bad-input matrix (kind "wrong type" of changed): a changed column of
    // text such as "x" was read as "not changed" in silence, so every pair was kept.
    Sheet s = hand();
    s.changed[3] = Cell::str("x");
    const std::string want = "Lintel: changed holds \"x\" in row 4: write 1 (or TRUE) where the "
                             "property changed before that sale, 0 or nothing otherwise";
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(s, "method=bmn; minhold=0", true))) == want);
    BOOST_TEST(messageOf(call("RSPAIRS", pairArgs(s, "minhold=0", true))) == want);
    // The words of a flag, any case and with blanks around, still read as flags.
    Sheet t = hand();
    t.changed[3] = Cell::str(" TRUE ");
    t.changed[1] = Cell::str("no");
    t.changed[5] = Cell::str("");
    Sheet u = hand();
    u.changed[3] = Cell::num(1);
    sameIndex(call("CHAINRS", chainArgs(t, "method=bmn; minhold=0", true)),
              call("CHAINRS", chainArgs(u, "method=bmn; minhold=0", true)));
}

BOOST_AUTO_TEST_CASE(chainrs_hand_solved_bmn) {
    const OutTable t = call("CHAINRS", chainArgs(hand(), "method=bmn; titles=1"));
    BOOST_REQUIRE_EQUAL(t.rows.size(), 4u);
    const std::vector<std::string> titles = {"period", "index", "pairs", "lower", "upper"};
    for (std::size_t c = 0; c < 5; ++c) BOOST_TEST(txt(t.rows[0][c]) == titles[c]);
    const double start[] = {k2020, k2021, k2022};
    const double index[] = {100, 111.627807, 118.530485};
    const double count[] = {0, 1, 2};  // pairs ending in the period
    for (int i = 0; i < 3; ++i) {
        const auto& r = t.rows[i + 1];
        BOOST_REQUIRE_EQUAL(r.size(), 5u);
        BOOST_TEST(num(r[0]) == start[i]);
        BOOST_TEST(num(r[1]) == index[i], boost::test_tools::tolerance(1e-8));
        BOOST_TEST(num(r[2]) == count[i]);
    }
    BOOST_TEST(num(t.rows[1][1]) == 100.0);
    BOOST_TEST(num(t.rows[1][3]) == 100.0);  // the base row's band is 100 | 100
    BOOST_TEST(num(t.rows[1][4]) == 100.0);
    BOOST_TEST(num(t.rows[2][3]) == 93.26802, boost::test_tools::tolerance(1e-6));
    BOOST_TEST(num(t.rows[2][4]) == 133.60171, boost::test_tools::tolerance(1e-6));
    // cs on this data: equal squared residuals, equal weights, the same values as bmn.
    const OutTable cs = call("CHAINRS", chainArgs(hand(), "titles=1"));
    BOOST_TEST(num(cs.rows[3][1]) == 118.530485, boost::test_tools::tolerance(1e-8));
}

BOOST_AUTO_TEST_CASE(chainrs_chain_one_hand_solved) {
    // chain=1, init=1: 2021 = the one pair ending there, A: 0.10; 2022 = mean of B (0.10 +
    // 0.05) and C (0 + 0.18) = 0.165 (hand-solved in tests/core/test_repeat_sales.cpp).
    const OutTable t = call("CHAINRS", chainArgs(hand(), "method=bmn; chain=1; init=1"));
    BOOST_REQUIRE_EQUAL(t.rows.size(), 3u);
    BOOST_TEST(num(t.rows[1][1]) == 100 * std::exp(0.10), boost::test_tools::tolerance(1e-12));
    BOOST_TEST(num(t.rows[2][1]) == 100 * std::exp(0.165), boost::test_tools::tolerance(1e-12));
    BOOST_TEST(isNone(t.rows[1][3]));  // one pair for one value: no residual df, no band
    BOOST_TEST(isNone(t.rows[1][4]));
}

BOOST_AUTO_TEST_CASE(ids_as_numbers_and_text_are_one_property) {
    // The same sheet with numeric ids 7, 8, 9, and with the second sale of each id as text
    // "7", " 8 " (blanks trimmed), "9": the same three properties, the same index.
    Sheet numeric, mixed;
    const Sheet h = hand();
    for (std::size_t i = 0; i < h.ids.size(); ++i) {
        const double id = 7 + static_cast<double>(i / 2);
        numeric.add(Cell::num(id), h.dates[i].number, h.prices[i]);
        const std::string t = i == 3 ? " 8 " : fmt::format("{}", id);
        mixed.add(i % 2 ? Cell::str(t) : Cell::num(id), h.dates[i].number, h.prices[i]);
    }
    const OutTable a = call("CHAINRS", chainArgs(h, "method=bmn"));
    const OutTable b = call("CHAINRS", chainArgs(numeric, "method=bmn"));
    const OutTable c = call("CHAINRS", chainArgs(mixed, "method=bmn"));
    BOOST_REQUIRE_EQUAL(a.rows.size(), 3u);
    sameIndex(a, b);
    sameIndex(a, c);
    const OutTable p = call("RSPAIRS", pairArgs(mixed, "method=bmn; freq=Y"));
    BOOST_REQUIRE_EQUAL(p.rows.size(), 3u);
    BOOST_TEST(txt(p.rows[0][0]) == "7");
    BOOST_TEST(txt(p.rows[1][0]) == "8");
    BOOST_TEST(txt(p.rows[2][0]) == "9");
    // The add-in's rule is the core's: a number cell's id is keyText's text.
    for (double x : {123.0, -7.0, 12.5, 1e16, 0.1})
        BOOST_TEST(cellKey(Cell::num(x)) == keyText(x));
    // 12.5 and "12.50" are different ids (text is compared as written).
    Sheet d;
    d.add(Cell::num(12.5), kMar20, Cell::num(100)).add(Cell::str("12.50"), kMar21, Cell::num(110));
    BOOST_TEST(messageOf(call("RSPAIRS", pairArgs(d, ""))).rfind("Lintel: ", 0) == 0u);
}

BOOST_AUTO_TEST_CASE(rspairs_rows_every_cell) {
    const OutTable t = call("RSPAIRS", pairArgs(hand(), "method=bmn; freq=Y; titles=1"));
    BOOST_REQUIRE_EQUAL(t.rows.size(), 4u);
    const std::vector<std::string> titles = {"id",          "first date", "first price",
                                             "second date", "second price", "months held",
                                             "annual log return", "used", "reason", "weight"};
    BOOST_REQUIRE_EQUAL(t.rows[0].size(), 10u);
    for (std::size_t c = 0; c < 10; ++c) BOOST_TEST(txt(t.rows[0][c]) == titles[c]);
    struct Want {
        const char* id;
        double d1, d2, y, months, days;
    } want[] = {{"A", kMar20, kMar21, 0.10, 12, 365},
                {"B", kApr21, kApr22, 0.05, 12, 365},
                {"C", kMar20, kMar22, 0.18, 24, 730}};
    for (int i = 0; i < 3; ++i) {
        const auto& r = t.rows[i + 1];
        BOOST_REQUIRE_EQUAL(r.size(), 10u);
        BOOST_TEST(txt(r[0]) == want[i].id);
        BOOST_TEST(num(r[1]) == want[i].d1);
        BOOST_TEST(num(r[2]) == 100.0);
        BOOST_TEST(num(r[3]) == want[i].d2);
        BOOST_TEST(num(r[4]) == 100 * std::exp(want[i].y));
        BOOST_TEST(num(r[5]) == want[i].months);
        BOOST_TEST(num(r[6]) == want[i].y * 365.25 / want[i].days, boost::test_tools::tolerance(1e-12));
        BOOST_TEST(num(r[7]) == 1.0);
        BOOST_TEST(isNone(r[8]));  // used: no reason
        BOOST_TEST(num(r[9]) == 1.0);  // bmn: every weight 1
    }
    // The day counts behind the table (calendar, no source needed).
    BOOST_TEST(kMar21 - kMar20 == 365.0);
    BOOST_TEST(kMar22 - kMar20 == 730.0);
    BOOST_TEST(kApr22 - kApr21 == 365.0);
}

BOOST_AUTO_TEST_CASE(changed_column_drops_the_pair_ending_there) {
    // A changed at its second sale: pair A dropped. B and C fit exactly: b2 = 0.18 (C),
    // b1 = b2 - 0.05 = 0.13 (B); two pairs for two values: no band.
    Sheet s = hand();
    s.changed[1] = Cell::str("TRUE");
    const OutTable t = call("CHAINRS", chainArgs(s, "method=bmn", true));
    BOOST_REQUIRE_EQUAL(t.rows.size(), 3u);
    BOOST_TEST(num(t.rows[1][1]) == 100 * std::exp(0.13), boost::test_tools::tolerance(1e-12));
    BOOST_TEST(num(t.rows[2][1]) == 100 * std::exp(0.18), boost::test_tools::tolerance(1e-12));
    BOOST_TEST(num(t.rows[1][2]) == 0.0);
    BOOST_TEST(num(t.rows[2][2]) == 2.0);
    BOOST_TEST(isNone(t.rows[2][3]));
    const OutTable p = call("RSPAIRS", pairArgs(s, "method=bmn; freq=Y", true));
    BOOST_REQUIRE_EQUAL(p.rows.size(), 3u);
    BOOST_TEST(num(p.rows[0][7]) == 0.0);
    BOOST_TEST(txt(p.rows[0][8]) == "property changed at the second sale");
    BOOST_TEST(num(p.rows[0][9]) == 0.0);
    BOOST_TEST(num(p.rows[1][7]) == 1.0);
    // The same column without the flag, or a single 0 / blank for changed: nothing dropped.
    const OutTable none = call("CHAINRS", chainArgs(hand(), "method=bmn", true));
    const OutTable plain = call("CHAINRS", chainArgs(hand(), "method=bmn"));
    sameIndex(none, plain);
    std::vector<Arg> a = chainArgs(hand(), "method=bmn");
    a[3] = number(0);
    sameIndex(call("CHAINRS", a), plain);
    a[3] = number(1);
    BOOST_TEST(messageOf(call("CHAINRS", a)) ==
               "Lintel: changed must be a column aligned with dates (1 where the property "
               "changed before that sale), got a single value");
}

BOOST_AUTO_TEST_CASE(header_row_blank_ids_and_unusable_prices) {
    // header=1 skips the first row; a blank id is dropped; a blank price keeps its place in
    // the history and breaks both pairs touching it.
    Sheet s;
    s.add(Cell::str("id"), 0, Cell::str("price"));
    s.dates[0] = Cell::str("date");
    const Sheet h = hand();
    for (std::size_t i = 0; i < h.ids.size(); ++i) s.add(h.ids[i], h.dates[i].number, h.prices[i]);
    s.add(Cell{}, kMar21, Cell::num(150));                          // blank id
    s.add("A", kMar22, 0).prices.back() = Cell{};                  // A's third sale, no price
    const OutTable t = call("CHAINRS", chainArgs(s, "method=bmn; header=1; notes=1"));
    const OutTable plain = call("CHAINRS", chainArgs(hand(), "method=bmn"));
    for (std::size_t i = 0; i < 3; ++i)
        for (std::size_t c = 0; c < 5; ++c) BOOST_TEST(t.rows[i][c].number == plain.rows[i][c].number);
    const auto* blank = rowOf(t, "dropped: blank property id");
    BOOST_REQUIRE(blank);
    BOOST_TEST(num((*blank)[1]) == 1.0);
    const auto* pairs = rowOf(t, "pairs");
    BOOST_REQUIRE(pairs);
    BOOST_TEST(txt((*pairs)[1]) == "3 of 4 pairs used; dropped: 1 second sale: blank or non-numeric price");
    BOOST_TEST(pairs->size() == 5u);

    const OutTable p = call("RSPAIRS", pairArgs(s, "method=bmn; header=1; freq=Y; notes=1"));
    // A's pairs: A1 -> A2 used, A2 -> A3 dropped; then B, C; then the notes.
    BOOST_TEST(txt(p.rows[1][0]) == "A");
    BOOST_TEST(num(p.rows[1][3]) == kMar22);
    BOOST_TEST(isNone(p.rows[1][4]));  // the blank price stays blank
    BOOST_TEST(isNone(p.rows[1][6]));  // no return
    BOOST_TEST(txt(p.rows[1][8]) == "second sale: blank or non-numeric price");
    const auto* prow = rowOf(p, "pairs");
    BOOST_REQUIRE(prow);
    BOOST_TEST(prow->size() == 10u);
    BOOST_TEST(txt((*prow)[1]) == "3 of 4 pairs used; dropped: 1 second sale: blank or non-numeric price");
    BOOST_REQUIRE(rowOf(p, "rows used"));
    BOOST_TEST(num((*rowOf(p, "rows used"))[1]) == 6.0);
}

BOOST_AUTO_TEST_CASE(rspairs_freq_and_base_options) {
    // D: 2024-03 -> 2025-03, a part of the pair graph not linked to 2020 .. 2022.
    Sheet s = hand();
    const double mar24 = 45352, mar25 = 45717;  // 2024-03-01, 2025-03-01
    s.add("D", mar24, 200).add("D", mar25, 210);
    // Default base: the part with the most pairs (A, B, C); D is not linked.
    const OutTable a = call("RSPAIRS", pairArgs(s, "freq=Y"));
    BOOST_REQUIRE_EQUAL(a.rows.size(), 4u);
    BOOST_TEST(txt(a.rows[3][8]) == "not linked to the base period");
    BOOST_TEST(num(a.rows[0][7]) == 1.0);
    // base in 2024 (serial or ISO text): D is used, A, B, C are not linked.
    for (const char* base : {"base=2024-06-30", "base=45473"}) {
        const OutTable b = call("RSPAIRS", pairArgs(s, std::string("freq=Y; ") + base));
        BOOST_REQUIRE_EQUAL(b.rows.size(), 4u);
        for (int i = 0; i < 3; ++i) BOOST_TEST(txt(b.rows[i][8]) == "not linked to the base period");
        BOOST_TEST(num(b.rows[3][7]) == 1.0);
        BOOST_TEST(num(b.rows[3][9]) == 1.0);
    }
    // Default freq M: A links 2020-03 and 2021-03, C 2020-03 and 2022-03, B 2021-04 and
    // 2022-04, a part of its own (fewer pairs): B is not linked, A and C are used.
    const OutTable m = call("RSPAIRS", pairArgs(hand(), ""));
    BOOST_TEST(num(m.rows[0][7]) == 1.0);
    BOOST_TEST(txt(m.rows[1][8]) == "not linked to the base period");
    BOOST_TEST(num(m.rows[2][7]) == 1.0);
    // freq=Y with two sales in one year: same-period pair dropped.
    Sheet y;
    y.add("E", kMar20, 100).add("E", kMar20 + 250, 104);
    y.add("F", kMar20, 100).add("F", kMar21, 105);
    const OutTable yy = call("RSPAIRS", pairArgs(y, "freq=Y; minhold=0"));
    BOOST_TEST(txt(yy.rows[0][8]) == "both sales in one period");
    const OutTable ym = call("RSPAIRS", pairArgs(y, "freq=M; minhold=0"));
    BOOST_TEST(num(ym.rows[0][7]) == 1.0);
    // Bad values read by the same readers as CHAINRS's arguments.
    BOOST_TEST(messageOf(call("RSPAIRS", pairArgs(s, "freq=W"))) ==
               "Lintel: option freq must be \"M\", \"Q\" or \"Y\", got \"W\"");
    // A date that cannot be read says the forms accepted.
    BOOST_TEST(messageOf(call("RSPAIRS", pairArgs(s, "base=soon"))) ==
               "Lintel: option base must be a date, got \"soon\"; accepted: a date cell, 2024-03-15, "
               "15/03/2024 or 03/15/2024 where day and month cannot be confused (set the date order "
               "for the others; also with . or -), 15 March 2024, March 15, 2024; the year with four "
               "digits; a time after the date is ignored");
    // base and freq are arguments of CHAINRS, not options.
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(s, "freq=Y"))).find("unknown option \"freq\" for CHAINRS") !=
               std::string::npos);
}

BOOST_AUTO_TEST_CASE(rspairs_when_the_index_cannot_be_built) {
    // A base date outside the data: CHAINRS says why; RSPAIRS still lists the pairs, marks
    // those that passed the filters "index not estimated" and gives the reason in the notes.
    std::vector<Arg> c = chainArgs(hand(), "");
    c[6] = text("2030-01-01");
    const std::string msg = messageOf(call("CHAINRS", c));
    BOOST_TEST(msg.rfind("Lintel: ", 0) == 0u);
    const OutTable p = call("RSPAIRS", pairArgs(hand(), "freq=Y; base=2030-01-01; notes=1"));
    for (int i = 0; i < 3; ++i) {
        BOOST_TEST(txt(p.rows[i][8]) == "index not estimated");
        BOOST_TEST(num(p.rows[i][7]) == 0.0);
        BOOST_TEST(num(p.rows[i][9]) == 0.0);
    }
    bool found = false;
    for (const auto& r : p.rows)
        if (r[0].kind == OutCell::Kind::Text && r[0].text == "warning" &&
            r[1].text == "index not estimated: " + msg.substr(8))
            found = true;
    BOOST_TEST(found);
    // No pair at all: a message rather than an empty result.
    Sheet once;
    once.add("A", kMar20, 100).add("B", kMar21, 110);
    BOOST_TEST(messageOf(call("RSPAIRS", pairArgs(once, ""))) ==
               "Lintel: no usable pair of sales: no property has two sales with a usable date and id");
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(once, ""))) ==
               "Lintel: no usable pair of sales: no property has two sales with a usable date and id");
    // ... but with titles=1 the title row alone.
    const OutTable tt = call("RSPAIRS", pairArgs(once, "titles=1"));
    BOOST_TEST(tt.rows.size() == 1u);
}

BOOST_AUTO_TEST_CASE(bad_input_messages) {
    Sheet s = hand();
    std::vector<Arg> a = chainArgs(s, "");
    Sheet shorter = s;
    shorter.dates.pop_back();
    a[1] = column(shorter.dates);
    BOOST_TEST(messageOf(call("CHAINRS", a)) == "Lintel: ids has 6 rows, dates has 5");
    std::vector<Arg> p = pairArgs(s, "");
    p[0] = column(shorter.dates);
    BOOST_TEST(messageOf(call("RSPAIRS", p)) == "Lintel: ids has 5 rows, dates has 6");
    std::vector<Arg> ch = chainArgs(s, "", true);
    Sheet lessChanged = s;
    lessChanged.changed.pop_back();
    ch[3] = column(lessChanged.changed);
    BOOST_TEST(messageOf(call("CHAINRS", ch)) == "Lintel: ids has 6 rows, changed has 5");
    std::vector<Arg> inc = chainArgs(s, "");
    inc[4] = column(std::vector<Cell>(5, Cell::num(1)));
    BOOST_TEST(messageOf(call("CHAINRS", inc)) == "Lintel: dates has 6 rows, include has 5");
    std::vector<Arg> wide = chainArgs(s, "");
    Range two;
    two.rows = 6;
    two.cols = 2;
    two.cells.assign(12, Cell::str("x"));
    wide[0] = two;
    BOOST_TEST(messageOf(call("CHAINRS", wide)) == "Lintel: ids must be one column, got 2 columns");

    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(s, "colour=red"))) ==
               "Lintel: unknown option \"colour\" for CHAINRS (known: method, minhold, maxrate, "
               "chain, init, smooth, seasonal, realtime, borrow, minsales, level, dateorder, labels, header, "
               "titles, notes)");
    BOOST_TEST(messageOf(call("RSPAIRS", pairArgs(s, "method=ols"))) ==
               "Lintel: option method must be \"cs\", \"bmn\" or \"cs2\", got \"ols\"");
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(s, "chain=2"))) == "Lintel: option chain must be 1 or 0 (TRUE or FALSE), got \"2\"");
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(s, "chain=1e12"))) ==
               "Lintel: option chain must be 1 or 0 (TRUE or FALSE), got \"1e12\"");
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(s, "minhold=-1"))) ==
               "Lintel: option minhold must be 0 or more, got -1");
    BOOST_TEST(messageOf(call("RSPAIRS", pairArgs(s, "maxrate=-2"))) ==
               "Lintel: option maxrate must be 0 or more, got -2");
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(s, "init=-1"))) ==
               "Lintel: option init must be a whole number of at least 1, got -1");
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(s, "", false, "W"))) ==
               "Lintel: freq must be \"M\", \"Q\" or \"Y\", got \"W\"");
    // A period no pair reaches has no value, named in the notes; never a failure.
    Sheet gap = hand();
    gap.add("G", 45352, 100).add("G", 45717, 110);  // 2024 -> 2025, base part is 2020 .. 2022
    const OutTable g = call("CHAINRS", chainArgs(gap, "method=bmn; notes=1"));
    BOOST_REQUIRE(g.rows.size() >= 6u);
    BOOST_TEST(num(g.rows[3][0]) == 44927.0);  // 2023-01-01: no pair reaches it
    BOOST_TEST(num(g.rows[4][0]) == 45292.0);  // 2024-01-01: not linked to the base
    for (int i = 3; i < 6; ++i) BOOST_TEST(isNone(g.rows[i][1]));
    BOOST_TEST(num(g.rows[2][1]) == 118.530485, boost::test_tools::tolerance(1e-8));
    bool named = false;
    for (const auto& r : g.rows)
        if (r[0].kind == OutCell::Kind::Text && r[0].text == "warning" &&
            r[1].text.find("no value for") != std::string::npos)
            named = true;
    BOOST_TEST(named);
}

BOOST_AUTO_TEST_CASE(document_date_offset) {
    // A document counting days from 1904-01-01 (offset 1462): input serials are the
    // document's, so are the output period starts and the pair dates.
    Sheet s;
    const Sheet h = hand();
    for (std::size_t i = 0; i < h.ids.size(); ++i) s.add(h.ids[i], h.dates[i].number - 1462, h.prices[i]);
    CallContext ctx;
    ctx.dateOffset = 1462;
    const OutTable t = call("CHAINRS", chainArgs(s, "method=bmn"), ctx);
    BOOST_TEST(num(t.rows[0][0]) == k2020 - 1462);
    BOOST_TEST(num(t.rows[2][1]) == 118.530485, boost::test_tools::tolerance(1e-8));
    const OutTable p = call("RSPAIRS", pairArgs(s, "freq=Y"), ctx);
    BOOST_TEST(num(p.rows[0][1]) == kMar20 - 1462);
    BOOST_TEST(num(p.rows[0][5]) == 12.0);
    // base as a serial in RSPAIRS's options is a document serial too.
    const OutTable b = call("RSPAIRS", pairArgs(s, fmt::format("freq=Y; base={}", k2022 - 1462)), ctx);
    BOOST_TEST(num(b.rows[0][7]) == 1.0);
}

BOOST_AUTO_TEST_SUITE_END()
