// INDEXHEDONIC, HEDONICCOEFS, REFHOMEVALUE in the add-in, without UNO: cells -> core input,
// options -> HedonicOptions, results -> cells. Expected values: the documented layout and
// messages (docs/functions.md), the generating model of the test
// data (exact fits), and the core called directly on the same data built by hand (the core
// itself is checked against statsmodels and R in tests/reference/test_hedonic_*.py).
//
// Test data (helper `sales`): months 2024-01 .. 2024-03, `perMonth` sales each on day
// 1 + 2i; characteristics from a fixed linear congruential sequence u in [0, 1):
//   size = 40 + 160 u1, district = "A" if u2 < 0.55 else "B" (text), bedrooms = 2 if u3 < 0.6
//   else 3 (numbers, categorical=3), age = floor(50 u4);
//   ln price = 12 + 0.05 [Feb] + 0.08 [Mar] + 0.6 ln size + 0.2 [district B]
//              + 0.1 [bedrooms 3] - 0.003 age + noise,
//   noise = 0 (exact) or sigma (u5 - 0.5) sqrt(12) (uniform with sd sigma).
#include <boost/test/unit_test.hpp>

#include "addin_test_cells.hpp"

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "diagnostics.hpp"
#include "function_table.hpp"
#include "hedonic.hpp"
#include "inputs.hpp"
#include "options.hpp"

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;

namespace {

struct Lcg {
    unsigned long long s;
    double next() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
};

constexpr double kJan = 45292, kFeb = 45323, kMar = 45352;  // 2024-01-01, -02-01, -03-01

struct Sales {
    std::vector<double> date, price, size, bedrooms, age;
    std::vector<std::string> district;
};

Sales sales(int perMonth, double sigma, unsigned long long seed = 11) {
    Sales s;
    Lcg g{seed};
    const double start[] = {kJan, kFeb, kMar};
    const double delta[] = {0.0, 0.05, 0.08};
    for (int m = 0; m < 3; ++m)
        for (int i = 0; i < perMonth; ++i) {
            const double size = 40 + 160 * g.next();
            const bool b = g.next() >= 0.55;
            const double bed = g.next() < 0.6 ? 2 : 3;
            const double age = std::floor(50 * g.next());
            const double noise = sigma * (g.next() - 0.5) * std::sqrt(12.0);
            const double lnp = 12 + delta[m] + 0.6 * std::log(size) + (b ? 0.2 : 0.0) +
                               (bed == 3 ? 0.1 : 0.0) - 0.003 * age + noise;
            s.date.push_back(start[m] + (2 * i) % 28);
            s.price.push_back(std::exp(lnp));
            s.size.push_back(size);
            s.district.push_back(b ? "B" : "A");
            s.bedrooms.push_back(bed);
            s.age.push_back(age);
        }
    return s;
}

Arg grid(std::size_t rows, std::size_t cols, std::vector<Cell> cells) {
    Range r;
    r.rows = rows;
    r.cols = cols;
    r.cells = std::move(cells);
    return r;
}

// The ranges of a sheet holding `s`, with a header row when `header`: dates | prices |
// size, district, bedrooms, age.
struct Sheet {
    Arg dates, prices, chars;
};
Sheet sheet(const Sales& s, bool header) {
    std::vector<Cell> d, p, c;
    if (header) {
        d.push_back(Cell::str("date"));
        p.push_back(Cell::str("price"));
        for (const char* n : {"size", "district", "bedrooms", "age"}) c.push_back(Cell::str(n));
    }
    for (std::size_t i = 0; i < s.date.size(); ++i) {
        d.push_back(Cell::num(s.date[i]));
        p.push_back(Cell::num(s.price[i]));
        c.push_back(Cell::num(s.size[i]));
        c.push_back(Cell::str(s.district[i]));
        c.push_back(Cell::num(s.bedrooms[i]));
        c.push_back(Cell::num(s.age[i]));
    }
    const std::size_t n = d.size();
    return {grid(n, 1, d), grid(n, 1, p), grid(n, 4, c)};
}

// The same data as the core's input, built by hand (no cell conversion).
HedonicInput coreInput(const Sales& s, bool names) {
    HedonicInput in;
    in.sales.date = s.date;
    in.sales.price = s.price;
    in.characteristics = {{names ? "size" : "", s.size, {}},
                          {names ? "district" : "", {}, s.district},
                          {names ? "bedrooms" : "", s.bedrooms, {}},
                          {names ? "age" : "", s.age, {}}};
    return in;
}

std::vector<Arg> args7(const Sheet& sh, const std::string& options) {
    std::vector<Arg> a(7);
    a[0] = sh.dates;
    a[1] = sh.prices;
    a[2] = sh.chars;
    if (!options.empty()) a[6] = text(options);
    return a;
}



bool same(const OutCell& c, double want) {
    if (!std::isfinite(want)) return c.kind == OutCell::Kind::NoValue;
    return c.kind == OutCell::Kind::Number && c.number == want;
}

// The label | value rows below the terms, by label.
const std::vector<OutCell>* rowOf(const OutTable& t, const std::string& label) {
    for (const auto& r : t.rows)
        if (!r.empty() && r[0].kind == OutCell::Kind::Text && r[0].text == label) return &r;
    return nullptr;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_hedonic)

BOOST_AUTO_TEST_CASE(table_entries_have_the_fixed_names_and_argument_orders) {
    const auto names = [](const char* fn) {
        std::vector<std::string> v;
        for (const auto& a : findFunctionByName(fn)->args) v.push_back(a.name);
        return v;
    };
    const std::vector<std::string> fit = {"dates", "prices", "characteristics", "include",
                                          "freq",  "base",   "options"};
    BOOST_TEST(names("INDEXHEDONIC") == fit);
    BOOST_TEST(names("HEDONICCOEFS") == fit);
    const std::vector<std::string> home = {"dates", "prices", "characteristics", "home",
                                           "include", "freq", "base", "options"};
    BOOST_TEST(names("REFHOMEVALUE") == home);
    const FunctionSpec& r = *findFunctionByName("REFHOMEVALUE");
    BOOST_TEST((r.args[3].kind == ArgKind::Optional));  // can be left empty
    BOOST_TEST(r.args[3].description.find("base period's median home") != std::string::npos);
    BOOST_TEST((r.args[2].kind == ArgKind::Column));
    BOOST_TEST(findFunctionByMethod("indexHedonic")->name == "INDEXHEDONIC");
    BOOST_TEST(findFunctionByMethod("hedonicCoefs")->name == "HEDONICCOEFS");
    BOOST_TEST(findFunctionByMethod("refHomeValue")->name == "REFHOMEVALUE");
}

BOOST_AUTO_TEST_CASE(exact_fit_index_is_the_generating_index) {
    // Noise 0: 100 exp(delta_t), delta = 0, 0.05, 0.08 (generating model above).
    const Sales s = sales(8, 0.0);
    const OutTable t = call("INDEXHEDONIC", args7(sheet(s, false), "log=1; categorical=3; titles=1"));
    BOOST_REQUIRE_EQUAL(t.rows.size(), 4u);
    BOOST_TEST(t.rows[0][0].text == "period");
    BOOST_TEST(t.rows[0][2].text == "sales");
    const double start[] = {kJan, kFeb, kMar}, want[] = {100, 100 * std::exp(0.05), 100 * std::exp(0.08)};
    for (int i = 0; i < 3; ++i) {
        const auto& row = t.rows[i + 1];
        BOOST_REQUIRE_EQUAL(row.size(), 5u);
        BOOST_TEST(row[0].number == start[i]);
        BOOST_TEST(row[1].number == want[i], boost::test_tools::tolerance(1e-10));
        BOOST_TEST(row[2].number == 8.0);
    }
    BOOST_TEST(t.rows[1][3].number == 100.0);  // the base row's band is 100 | 100
    BOOST_TEST(t.rows[1][4].number == 100.0);
}

BOOST_AUTO_TEST_CASE(exact_fit_coefficients_with_header_names) {
    const Sales s = sales(8, 0.0);
    const OutTable t =
        call("HEDONICCOEFS", args7(sheet(s, true), "header=1; log=1; categorical=3; titles=1"));
    BOOST_REQUIRE_GE(t.rows.size(), 8u);
    BOOST_TEST(t.rows[0][0].text == "term");
    BOOST_TEST(t.rows[0][3].text == "t");
    // (Intercept) = d_Jan = 12; then the characteristic terms in column order, named from
    // the header row; then the periods (generating model above).
    const std::vector<std::pair<std::string, double>> want = {
        {"(Intercept)", 12.0},     {"log(size)", 0.6},         {"district=B", 0.2},
        {"bedrooms=3", 0.1},       {"age", -0.003},            {"period 2024-02", 0.05},
        {"period 2024-03", 0.08}};
    for (std::size_t i = 0; i < want.size(); ++i) {
        const auto& row = t.rows[i + 1];
        BOOST_REQUIRE_EQUAL(row.size(), 4u);
        BOOST_TEST(row[0].text == want[i].first);
        BOOST_TEST(row[1].number == want[i].second, boost::test_tools::tolerance(1e-9));
    }
    const auto* obs = rowOf(t, "observations");
    BOOST_REQUIRE(obs);
    BOOST_TEST((*obs)[1].number == 24.0);
    BOOST_TEST(((*obs)[2].kind == OutCell::Kind::NoValue && (*obs)[3].kind == OutCell::Kind::NoValue));
    BOOST_TEST((*rowOf(t, "dropped"))[1].number == 0.0);
    BOOST_TEST((*rowOf(t, "R-squared"))[1].number == 1.0, boost::test_tools::tolerance(1e-12));
    BOOST_TEST((*rowOf(t, "residual df"))[1].number == 24.0 - 3 - 4);
    BOOST_TEST(((*rowOf(t, "dropped terms"))[1].kind == OutCell::Kind::NoValue));
    // Without a header the terms are x1, x2 ...
    const OutTable u = call("HEDONICCOEFS", args7(sheet(s, false), "log=1; categorical=3"));
    BOOST_TEST(u.rows[1][0].text == "log(x1)");
    BOOST_TEST(u.rows[2][0].text == "x2=B");
    BOOST_TEST(u.rows[3][0].text == "x3=3");
}

BOOST_AUTO_TEST_CASE(cells_equal_the_core_on_the_same_data) {
    // Noisy data: the add-in's cells must be the core's numbers for the hand-built input.
    const Sales s = sales(30, 0.1);
    HedonicOptions o;
    o.logColumns = {1};
    o.categoricalColumns = {3};
    o.se = HedonicStdErr::HC1;
    const HedonicFit fit = hedonicFit(coreInput(s, true), o);
    const OutTable t = call("HEDONICCOEFS", args7(sheet(s, true), "header=1; log=1; categorical=3; se=hc1"));
    BOOST_REQUIRE_EQUAL(t.rows.size(), fit.terms.size() + 7);
    for (std::size_t i = 0; i < fit.terms.size(); ++i) {
        BOOST_TEST(t.rows[i][0].text == fit.terms[i].name);
        BOOST_TEST(same(t.rows[i][1], fit.terms[i].coefficient));
        BOOST_TEST(same(t.rows[i][2], fit.terms[i].stdError));
        BOOST_TEST(same(t.rows[i][3], fit.terms[i].tValue));
    }
    BOOST_TEST(same((*rowOf(t, "adjusted R-squared"))[1], fit.adjRSquared));
    BOOST_TEST(same((*rowOf(t, "residual standard error"))[1], fit.residualSE));

    o.window = 2;
    o.bias = HedonicBias::Kennedy;
    const IndexResult r = hedonicIndex(coreInput(s, false), o);
    const OutTable x = call("INDEXHEDONIC", args7(sheet(s, false), "log=1; categorical=3; se=hc1; window=2; bias=kennedy"));
    BOOST_REQUIRE_EQUAL(x.rows.size(), 3u);
    for (int i = 0; i < 3; ++i) {
        BOOST_TEST(same(x.rows[i][1], r.table.index[i]));
        BOOST_TEST(same(x.rows[i][3], r.table.lower[i]));
        BOOST_TEST(same(x.rows[i][4], r.table.upper[i]));
    }
}

BOOST_AUTO_TEST_CASE(reference_home_given_typical_and_header_row) {
    const Sales s = sales(8, 0.0);
    std::vector<Arg> a(8);
    const Sheet sh = sheet(s, false);
    a[0] = sh.dates;
    a[1] = sh.prices;
    a[2] = sh.chars;
    a[7] = text("log=1; categorical=3; notes=1; titles=1");
    // A given home: size 100, district B, 3 bedrooms, age 10 -> exact fit, smearing factor 1:
    // exp(12 + delta_t + 0.6 ln 100 + 0.2 + 0.1 - 0.03).
    a[3] = grid(1, 4, {Cell::num(100), Cell::str("B"), Cell::num(3), Cell::num(10)});
    OutTable t = call("REFHOMEVALUE", a);
    BOOST_TEST(t.rows[0][1].text == "value");
    const double delta[] = {0, 0.05, 0.08};
    for (int i = 0; i < 3; ++i) {
        BOOST_REQUIRE_EQUAL(t.rows[i + 1].size(), 4u);
        BOOST_TEST(t.rows[i + 1][1].number ==
                       std::exp(12 + delta[i] + 0.6 * std::log(100.0) + 0.2 + 0.1 - 0.03),
                   boost::test_tools::tolerance(1e-9));
    }
    const auto* size = rowOf(t, "home: x1");
    BOOST_REQUIRE(size);
    BOOST_TEST((*size)[1].number == 100.0);
    BOOST_TEST(((*size)[2].kind == OutCell::Kind::NoValue));
    BOOST_TEST((*rowOf(t, "home: x2"))[1].text == "B");
    BOOST_TEST((*rowOf(t, "home: x3"))[1].text == "3");
    BOOST_TEST((*rowOf(t, "retransformation factor"))[1].number == 1.0,
               boost::test_tools::tolerance(1e-9));

    // Left empty: the typical home, every cell marked; a blank cell: typical for that column.
    a[3].reset();
    t = call("REFHOMEVALUE", a);
    for (const char* c : {"home: x1", "home: x2", "home: x3", "home: x4"})
        BOOST_TEST((*rowOf(t, c))[2].text == "base-period median home");
    // Typical = the base period's (January's) median size and age, most frequent levels.
    std::vector<double> jan(s.size.begin(), s.size.begin() + 8);
    std::sort(jan.begin(), jan.end());
    BOOST_TEST((*rowOf(t, "home: x1"))[1].number == (jan[3] + jan[4]) / 2);
    a[3] = grid(1, 4, {Cell::num(100), Cell(), Cell::num(3), Cell::num(10)});
    t = call("REFHOMEVALUE", a);
    BOOST_TEST(((*rowOf(t, "home: x1"))[2].kind == OutCell::Kind::NoValue));
    BOOST_TEST((*rowOf(t, "home: x2"))[2].text == "base-period median home");
    a[3] = grid(1, 1, {Cell()});  // a single blank cell is the typical home too
    BOOST_TEST((*rowOf(call("REFHOMEVALUE", a), "home: x3"))[2].text == "base-period median home");

    // header=1: the home may carry its header row.
    const Sheet hs = sheet(s, true);
    a[0] = hs.dates;
    a[1] = hs.prices;
    a[2] = hs.chars;
    a[7] = text("header=1; log=1; categorical=3; notes=1");
    a[3] = grid(2, 4, {Cell::str("size"), Cell::str("district"), Cell::str("bedrooms"),
                       Cell::str("age"), Cell::num(100), Cell::str("B"), Cell::num(3),
                       Cell::num(10)});
    t = call("REFHOMEVALUE", a);
    BOOST_TEST(t.rows[0][1].number == std::exp(12 + 0.6 * std::log(100.0) + 0.27),
               boost::test_tools::tolerance(1e-9));
    BOOST_TEST((*rowOf(t, "home: district"))[1].text == "B");
}

BOOST_AUTO_TEST_CASE(home_errors) {
    const Sales s = sales(8, 0.0);
    const Sheet sh = sheet(s, false);
    std::vector<Arg> a(8);
    a[0] = sh.dates;
    a[1] = sh.prices;
    a[2] = sh.chars;
    a[7] = text("log=1; categorical=3");
    a[3] = grid(1, 3, {Cell::num(100), Cell::str("B"), Cell::num(3)});
    BOOST_TEST(messageOf(call("REFHOMEVALUE", a)) ==
               "Lintel: home has 3 cells but characteristics has 4 columns");
    a[3] = grid(2, 4, std::vector<Cell>(8, Cell::num(1)));
    BOOST_TEST(messageOf(call("REFHOMEVALUE", a)) ==
               "Lintel: home must be one row with a cell per characteristics column, got 2 rows");
    a[3] = grid(1, 4, {Cell::num(100), Cell::str("Z"), Cell::num(3), Cell::num(10)});
    BOOST_TEST(messageOf(call("REFHOMEVALUE", a)) ==
               "Lintel: home: x2 'Z' does not occur among the sales used");
    a[3] = grid(1, 4, {Cell::num(-5), Cell::str("A"), Cell::num(3), Cell::num(10)});
    BOOST_TEST(messageOf(call("REFHOMEVALUE", a)) ==
               "Lintel: home: column 1 (x1) is taken in logs and needs a positive value");
    a[3] = grid(1, 4, {Cell::str("big"), Cell::str("A"), Cell::num(3), Cell::num(10)});
    BOOST_TEST(messageOf(call("REFHOMEVALUE", a)) ==
               "Lintel: home: column 1 (x1) needs a number, got 'big'");
}

BOOST_AUTO_TEST_CASE(bad_cells_are_dropped_with_reasons) {
    Sales s = sales(8, 0.0);
    Sheet sh = sheet(s, false);
    sh.prices->at(2, 0) = Cell::str("n/a");     // a text price
    sh.chars->at(5, 0) = Cell::num(0);          // log of 0
    sh.chars->at(7, 3) = Cell::str("old");      // text in the numeric column age
    sh.chars->at(9, 1) = Cell();                // blank district
    const OutTable t = call("INDEXHEDONIC", args7(sh, "log=1; categorical=3; notes=1"));
    BOOST_TEST((*rowOf(t, "rows used"))[1].number == 20.0);
    // A text price is read as a number where it is one; "n/a" is not (its own reason).
    BOOST_REQUIRE(rowOf(t, "dropped: unreadable price"));
    BOOST_TEST((*rowOf(t, "dropped: unreadable price"))[1].number == 1.0);
    BOOST_TEST((*rowOf(t, "dropped: log of a non-positive characteristic"))[1].number == 1.0);
    BOOST_TEST((*rowOf(t, "dropped: blank or invalid characteristic"))[1].number == 2.0);
    // Exact fit: the index stays the generating one on the remaining rows.
    BOOST_TEST(t.rows[2][1].number == 100 * std::exp(0.08), boost::test_tools::tolerance(1e-10));
}

BOOST_AUTO_TEST_CASE(numbers_in_a_text_column_are_levels) {
    // district as mostly text with a number: the number is a level "7" (classifyColumn).
    Sales s = sales(8, 0.1);
    Sheet sh = sheet(s, false);
    for (int i : {0, 8, 16}) sh.chars->at(i, 1) = Cell::num(7);
    const OutTable t = call("HEDONICCOEFS", args7(sh, "log=1; categorical=3"));
    bool found = false;
    for (const auto& r : t.rows) found = found || r[0].text == "x2=7";
    BOOST_TEST(found);
}

BOOST_AUTO_TEST_CASE(option_and_argument_errors) {
    const Sales s = sales(8, 0.1);
    const Sheet sh = sheet(s, false);
    const std::vector<std::pair<std::string, std::string>> cases = {
        {"log=1; bias=kennedy", ""},  // accepted by INDEXHEDONIC
        {"log=1; colour=red",
         "Lintel: unknown option \"colour\" for INDEXHEDONIC (known: log, categorical, window, "
         "se, bias, smooth, seasonal, realtime, borrow, minsales, level, dateorder, labels, header, titles, notes)"},
        {"window=1", "Lintel: window must be 0 (pooled) or at least 2 periods, got 1"},
        {"window=-2", "Lintel: option window must be a whole number of at least 0, got -2"},
        {"window=1e9", "Lintel: option window must be a whole number from 0 to 1000000, got 1000000000"},
        {"se=hc3", "Lintel: option se must be \"classical\" or \"hc1\", got \"hc3\""},
        {"bias=yes", "Lintel: option bias must be \"none\" or \"kennedy\", got \"yes\""},
        {"log=2", "Lintel: log: column 2 (x2) holds text, not numbers"},
        {"log=5", "Lintel: log: column 5 lies outside the characteristics (1..4)"},
        {"log=1,3; categorical=3", "Lintel: column 3 cannot be both log and categorical"},
        {"categorical=x", "Lintel: option categorical must list column numbers like \"1,3\", got \"x\""},
        {"level=2", "Lintel: option level must lie between 0 and 1, got 2"},
    };
    for (const auto& [options, want] : cases) {
        BOOST_TEST_CONTEXT(options) {
            const OutTable t = call("INDEXHEDONIC", args7(sh, options));
            if (want.empty()) BOOST_TEST(t.rows.size() == 3u);
            else BOOST_TEST(messageOf(t) == want);
        }
    }
    // bias and retransform belong to one function each.
    BOOST_TEST(messageOf(call("HEDONICCOEFS", args7(sh, "bias=kennedy"))).find(
                   "Lintel: unknown option \"bias\" for HEDONICCOEFS") == 0);
    BOOST_TEST(messageOf(call("INDEXHEDONIC", args7(sh, "retransform=lognormal"))).find(
                   "Lintel: unknown option \"retransform\" for INDEXHEDONIC") == 0);
    // "log=1,4" and "log=1 4" list two columns (age enters as log(age); age 0 rows drop).
    const OutTable l = call("HEDONICCOEFS", args7(sh, "log=1,4"));
    BOOST_TEST(l.rows[4][0].text == "log(x4)");

    // Mismatched rows name the ranges.
    Sheet bad = sh;
    bad.chars->rows -= 1;
    bad.chars->cells.resize(bad.chars->rows * 4);
    BOOST_TEST(messageOf(call("INDEXHEDONIC", args7(bad, ""))) ==
               "Lintel: dates has 24 rows, characteristics has 23");
    std::vector<Arg> missing = args7(sh, "");
    missing[2].reset();
    BOOST_TEST(messageOf(call("HEDONICCOEFS", missing)) == "Lintel: characteristics is required");
    BOOST_TEST(messageOf(call("REFHOMEVALUE", args7(sh, ""))) ==
               "Lintel: REFHOMEVALUE takes 8 arguments, got 7");
}

BOOST_AUTO_TEST_CASE(aliased_terms_are_listed) {
    // age copied into a fifth column: collinear with earlier terms, dropped and named.
    const Sales s = sales(8, 0.1);
    Sheet sh = sheet(s, true);
    Range wide;
    wide.rows = sh.chars->rows;
    wide.cols = 5;
    for (std::size_t i = 0; i < wide.rows; ++i) {
        for (std::size_t c = 0; c < 4; ++c) wide.cells.push_back(sh.chars->at(i, c));
        wide.cells.push_back(i == 0 ? Cell::str("age2") : sh.chars->at(i, 3));
    }
    sh.chars = wide;
    const OutTable t = call("HEDONICCOEFS", args7(sh, "header=1; log=1; categorical=3; notes=1"));
    BOOST_TEST((*rowOf(t, "dropped terms"))[1].text == "age2 (collinear with earlier terms)");
    bool warned = false;
    for (const auto& r : t.rows)
        warned = warned || (r[0].text == "warning" && r[1].text.find("age2") != std::string::npos);
    BOOST_TEST(warned);
}

BOOST_AUTO_TEST_SUITE_END()
