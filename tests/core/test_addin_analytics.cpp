// The analytics functions' cell conversion without UNO (native/addin/functions_analytics.cpp):
// arguments and options reach the core, results come back in the documented layout
// (docs/functions.md), bad input gives a "Lintel:" message.
// Expected values are hand-computed from the documented formulas (docs/methods/analytics.md)
// on small constructed inputs; each case says how.
#include <boost/test/unit_test.hpp>

#include "addin_test_cells.hpp"

#include <cmath>
#include <map>
#include <string>
#include <vector>

#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "mix_adjusted.hpp"
#include "periods.hpp"

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;

namespace {

// Columns of equal length into one range.
Arg block(const std::vector<std::vector<Cell>>& columns) {
    Range r;
    r.cols = columns.size();
    r.rows = columns.front().size();
    r.cells.resize(r.rows * r.cols);
    for (std::size_t c = 0; c < r.cols; ++c)
        for (std::size_t i = 0; i < r.rows; ++i) r.at(i, c) = columns[c].at(i);
    return r;
}
// NaN = blank cell.
std::vector<Cell> nums(const std::vector<double>& v) {
    std::vector<Cell> out;
    for (double x : v) out.push_back(std::isnan(x) ? Cell{} : Cell::num(x));
    return out;
}
Arg numbers(const std::vector<double>& v) { return column(nums(v)); }

bool isNone(const OutCell& c) { return c.kind == OutCell::Kind::NoValue; }
bool isMessage(const OutTable& t) {
    return t.scalar && t.rows.size() == 1 && t.rows[0].size() == 1 &&
           t.rows[0][0].kind == OutCell::Kind::Text && t.rows[0][0].text.rfind("Lintel: ", 0) == 0;
}
// label -> value of the label | value rows.
std::map<std::string, OutCell> labels(const OutTable& t, std::size_t from = 0) {
    std::map<std::string, OutCell> m;
    for (std::size_t i = from; i < t.rows.size(); ++i)
        if (t.rows[i].size() >= 2 && t.rows[i][0].kind == OutCell::Kind::Text)
            m[t.rows[i][0].text] = t.rows[i][1];
    return m;
}
double serial(int y, int m, int d) { return serialFromCivil({y, m, d}); }

// Sample standard deviation, written out (n - 1 denominator).
double sd(const std::vector<double>& v) {
    const double n = static_cast<double>(v.size());
    double mean = 0;
    for (double x : v) mean += x / n;
    double ss = 0;
    for (double x : v) ss += (x - mean) * (x - mean);
    return std::sqrt(ss / (n - 1));
}

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_analytics)

BOOST_AUTO_TEST_CASE(argument_lists_and_sign_convention_in_the_wizard) {
    const std::map<std::string, std::vector<std::string>> want = {
        {"INDEXMIX", {"dates", "prices", "strata", "include", "freq", "base", "options"}},
        {"INDEXVOLATILITY", {"index", "lag", "options"}},
        {"INDEXTREND", {"index", "freq", "lambda"}},
        {"INDEXSNR", {"index", "freq", "options"}},
        {"INDEXLEADLAG", {"a", "b", "maxlag", "options"}},
        {"INDEXTURNS", {"periods", "index", "freq", "options"}},
        {"INDEXSEASONAL", {"index", "freq", "options"}},
        {"INDEXCOMPARE", {"indexes", "freq", "options"}},
    };
    for (const auto& [name, args] : want) {
        BOOST_TEST_CONTEXT(name) {
            const FunctionSpec* f = findFunctionByName(name);
            BOOST_REQUIRE(f != nullptr);
            std::vector<std::string> got;
            for (const auto& a : f->args) got.push_back(a.name);
            BOOST_TEST(got == args, boost::test_tools::per_element());
            // The first arguments are required cell ranges, the rest optional.
            const std::size_t required = name == "INDEXMIX" ? 3 : (name == "INDEXLEADLAG" || name == "INDEXTURNS") ? 2 : 1;
            for (std::size_t i = 0; i < f->args.size(); ++i)
                BOOST_TEST((f->args[i].kind == (i < required ? ArgKind::Column : ArgKind::Optional)));
        }
    }
    const FunctionSpec* ll = findFunctionByName("INDEXLEADLAG");
    BOOST_TEST(ll->description.find("positive lag k means a leads b by k periods") != std::string::npos);
    BOOST_TEST(ll->output.find("a leads b") != std::string::npos);
    const FunctionSpec* cmp = findFunctionByName("INDEXCOMPARE");
    BOOST_TEST(cmp->description.find("positive lag = this column leads the first") != std::string::npos);
    BOOST_TEST(cmp->output.find("positive = this column leads the first column") != std::string::npos);
    // The report builder writes INDEXCOMPARE(...; "header=1; titles=1").
    std::vector<std::string> keys;
    for (const auto& o : cmp->options) keys.push_back(o.key);
    BOOST_TEST((std::find(keys.begin(), keys.end(), "header") != keys.end()));
    BOOST_TEST((std::find(keys.begin(), keys.end(), "titles") != keys.end()));
}

// Two strata given by two columns (region text, size number): A = (N, 1), B = (N, 2).
// Jan: A 100, 200 (median 150), B 400 -> weights by January sales 2/3, 1/3.
// Feb: A 165 (rel 1.1), B 480 (rel 1.2): 100 (2/3 1.1 + 1/3 1.2) = 113.333...
// Mar: A 150 (rel 1.0), B none: reweight -> 100; carry -> 100 (2/3 1.0 + 1/3 1.2) = 106.666...
// (formula P_t = sum w_h m_h^t / m_h^0, docs/methods/analytics.md; hand-computed)
BOOST_AUTO_TEST_CASE(mix_strata_columns_options_and_notes) {
    const double jan = serial(2024, 1, 1), feb = serial(2024, 2, 1), mar = serial(2024, 3, 1);
    std::vector<Cell> dates = {Cell::str("date"), Cell::num(jan + 3), Cell::num(jan + 9),
                               Cell::num(jan + 20), Cell::num(feb + 1), Cell::num(feb + 5),
                               Cell::num(mar + 2), Cell::num(mar + 4)};
    std::vector<Cell> prices = {Cell::str("price"), Cell::num(100), Cell::num(200), Cell::num(400),
                                Cell::num(165), Cell::num(480), Cell::num(150), Cell::num(999)};
    std::vector<Cell> region = {Cell::str("region"), Cell::str("N"), Cell::str("N"), Cell::str("N"),
                                Cell::str("N"), Cell::str("N"), Cell::str("N"), Cell{}};
    std::vector<Cell> size = {Cell::str("size"), Cell::num(1), Cell::num(1), Cell::num(2),
                              Cell::num(1), Cell::num(2), Cell::num(1), Cell::num(2)};
    std::vector<Arg> args(7);
    args[0] = column(dates);
    args[1] = column(prices);
    args[2] = block({region, size});
    args[6] = text("header=1; titles=1; notes=1");
    OutTable t = callOmitting("INDEXMIX", args);
    BOOST_REQUIRE(t.rows.size() >= 4);
    BOOST_TEST(t.rows[0][0].text == "period");
    BOOST_TEST(t.rows[0][2].text == "sales");
    BOOST_TEST(t.rows[1][0].number == jan);
    BOOST_TEST(t.rows[1][1].number == 100.0);
    BOOST_TEST(t.rows[1][2].number == 3.0);
    BOOST_TEST(t.rows[2][1].number == 100.0 * (2.0 / 3 * 1.1 + 1.0 / 3 * 1.2), boost::test_tools::tolerance(1e-12));
    BOOST_TEST(t.rows[2][2].number == 2.0);
    BOOST_TEST(t.rows[3][1].number == 100.0, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(t.rows[3][2].number == 1.0);
    BOOST_TEST(isNone(t.rows[1][3]));  // no bands by default
    BOOST_TEST(isNone(t.rows[1][4]));
    // Notes: the mix's counts first, then the shared diagnostics.
    BOOST_TEST(t.rows[4][0].text == "strata");
    auto n = labels(t, 4);
    BOOST_TEST(n["strata"].number == 2.0);
    BOOST_TEST(n["strata weighted"].number == 2.0);
    BOOST_TEST(n["links"].number == 1.0);
    BOOST_TEST(n["stratum-periods imputed"].number == 1.0);  // B in March
    BOOST_TEST(n["rows used"].number == 6.0);
    BOOST_TEST(n["dropped: blank stratum"].number == 1.0);
    for (const auto& row : t.rows) BOOST_TEST(row.size() == 5u);

    args[6] = text("header=1; empty=carry");
    t = callOmitting("INDEXMIX", args);
    BOOST_REQUIRE(t.rows.size() == 3);
    BOOST_TEST(t.rows[2][1].number == 100.0 * (2.0 / 3 * 1.0 + 1.0 / 3 * 1.2), boost::test_tools::tolerance(1e-12));
    args[6] = text("header=1; empty=renormalise; stat=mean; freq=Q");
    BOOST_TEST(isMessage(callOmitting("INDEXMIX", args)));  // freq is an argument, not an option
    // Quarterly, means, base in March: one period (Q1), 100, all 6 sales of the two strata.
    args[4] = text("Q");
    args[5] = number(mar);
    args[6] = text("header=1; empty=renormalise; stat=mean");
    t = callOmitting("INDEXMIX", args);
    BOOST_REQUIRE(t.rows.size() == 1);
    BOOST_TEST(t.rows[0][0].number == jan);
    BOOST_TEST(t.rows[0][1].number == 100.0);
    BOOST_TEST(t.rows[0][2].number == 6.0);
}

BOOST_AUTO_TEST_CASE(mix_bad_input) {
    const double jan = serial(2024, 1, 1);
    std::vector<Arg> args(7);
    args[0] = numbers({jan, jan + 1, jan + 40});
    args[1] = numbers({100, 200, 300});
    args[2] = column({Cell::str("a"), Cell::str("a")});
    BOOST_TEST(messageOf(callOmitting("INDEXMIX", args)) == "Lintel: dates has 3 rows, strata has 2");
    args[2].reset();
    BOOST_TEST(messageOf(callOmitting("INDEXMIX", args)) == "Lintel: strata is required");
    args[2] = column({Cell::str("a"), Cell::str("a"), Cell::str("a")});
    args[6] = text("bands=bootstrap; reps=5");
    BOOST_TEST(messageOf(callOmitting("INDEXMIX", args)) == "Lintel: reps must lie between 20 and 10000, got 5");
    args[6] = text("weights=price");
    BOOST_TEST(messageOf(callOmitting("INDEXMIX", args)) ==
               "Lintel: option weights must be \"sales\", \"value\" or \"all\", got \"price\"");
    args[6] = text("minsales=3");
    BOOST_TEST(messageOf(callOmitting("INDEXMIX", args)) == "Lintel: no period has a value (minsales 3)");
    args[6] = text("seed=-1");
    BOOST_TEST(messageOf(callOmitting("INDEXMIX", args)) ==
               "Lintel: option seed must be a whole number of at least 0, got -1");
}

// Changes 100 ln(I_t / I_{t-lag}) of 100, 110, 99, 104 and their sample sd, written out.
BOOST_AUTO_TEST_CASE(volatility_scalar_notes_and_lag) {
    const std::vector<double> v = {100, 110, NAN, 99, 104};
    std::vector<Cell> cells = {Cell::str("my index")};
    for (auto& c : nums({100, 110, 99, 104})) cells.push_back(c);
    OutTable t = callOmitting("INDEXVOLATILITY", {column(cells), {}, text("header=1")});
    const double w1 = sd({100 * std::log(1.1), 100 * std::log(0.9), 100 * std::log(104.0 / 99)});
    BOOST_REQUIRE(t.scalar);
    BOOST_TEST(t.rows[0][0].number == w1, boost::test_tools::tolerance(1e-12));
    // annual, quarterly: sd * sqrt(4 / 1)
    t = callOmitting("INDEXVOLATILITY", {column(cells), number(1), text("header=1; annual=1; freq=Q")});
    BOOST_TEST(t.rows[0][0].number == w1 * 2, boost::test_tools::tolerance(1e-12));
    // lag 2: 100 ln(99/100), 100 ln(104/110)
    t = callOmitting("INDEXVOLATILITY", {column(cells), number(2), text("header=1; notes=1")});
    BOOST_REQUIRE(!t.scalar);
    BOOST_TEST(t.rows[0][0].text == "volatility");
    auto n = labels(t);
    BOOST_TEST(n["volatility"].number == sd({100 * std::log(0.99), 100 * std::log(104.0 / 110)}),
               boost::test_tools::tolerance(1e-12));
    BOOST_TEST(n["changes used"].number == 2.0);
    BOOST_TEST(n["rows used"].number == 4.0);
    // A blank breaks the pairs around it: (100, 110), (99, 104) only.
    t = callOmitting("INDEXVOLATILITY", {numbers(v), {}, {}});
    BOOST_TEST(t.rows[0][0].number == sd({100 * std::log(1.1), 100 * std::log(104.0 / 99)}),
               boost::test_tools::tolerance(1e-12));

    BOOST_TEST(messageOf(callOmitting("INDEXVOLATILITY", {numbers(v), number(1.5), {}})) ==
               "Lintel: lag must be a whole number of at least 1, got 1.5");
    BOOST_TEST(messageOf(callOmitting("INDEXVOLATILITY", {numbers(v), number(0), {}})) ==
               "Lintel: lag must be a whole number of at least 1, got 0 (an empty cell reads as 0)");
    BOOST_TEST(messageOf(callOmitting("INDEXVOLATILITY", {numbers(v), {}, text("freq=W")})) ==
               "Lintel: option freq must be \"M\", \"Q\" or \"Y\", got \"W\"");
    BOOST_TEST(messageOf(callOmitting("INDEXVOLATILITY", {numbers({100, 110}), {}, {}})) ==
               "Lintel: volatility needs at least 2 changes over 1 period(s); the index gives 1");
    BOOST_TEST(messageOf(callOmitting("INDEXVOLATILITY", {block({nums({1, 2, 3}), nums({1, 2, 3})}), {}, {}})) ==
               "Lintel: index must be one column, got 2 columns");
}

// The HP trend leaves a straight line unchanged (its second differences are 0 and the fit is
// exact) and bridges a gap in a line with the line (docs/methods/analytics.md).
BOOST_AUTO_TEST_CASE(trend_line_gap_and_ends) {
    const OutTable t = callOmitting("INDEXTREND", {numbers({NAN, 1, 2, NAN, 4, 5, NAN}), text("Q"), {}});
    BOOST_REQUIRE(t.rows.size() == 7);
    BOOST_TEST(isNone(t.rows[0][0]));
    BOOST_TEST(isNone(t.rows[6][0]));
    for (int i = 1; i <= 5; ++i) BOOST_TEST(t.rows[i][0].number == double(i), boost::test_tools::tolerance(1e-9));
    // Text cells are periods without a value, as blanks.
    const OutTable u = callOmitting("INDEXTREND", {column({Cell::num(2), Cell::str("n/a"), Cell::num(6), Cell::num(8)}), {}, number(50)});
    BOOST_TEST(u.rows[1][0].number == 4.0, boost::test_tools::tolerance(1e-9));
    BOOST_TEST(messageOf(callOmitting("INDEXTREND", {numbers({1, 2, 3}), {}, number(0)})) ==
               "Lintel: lambda must be greater than 0, got 0");
    BOOST_TEST(messageOf(callOmitting("INDEXTREND", {numbers({1, 2, 3}), {}, text("smooth")})) ==
               "Lintel: lambda must be a number, got \"smooth\"");
    BOOST_TEST(messageOf(callOmitting("INDEXTREND", {numbers({1, NAN, 3}), {}, {}})) ==
               "Lintel: the trend needs at least 3 values, the index has 2");
    BOOST_TEST(messageOf(callOmitting("INDEXTREND", {numbers({1, 2, 3}), text("W"), {}})) ==
               "Lintel: freq must be \"M\", \"Q\" or \"Y\", got \"W\"");
}

// A geometric series is a straight line in logs: its HP trend is itself, so the signal is
// the constant log growth 100 ln 1.01 and the noise 0. The lambda is
// 1 / (4 (1 - cos(2 pi / 24))^2) monthly (docs/methods/analytics.md, two-year half gain).
// A constant series at 1 (log 0) has exactly no noise: no ratio, with a warning.
BOOST_AUTO_TEST_CASE(snr_output_detail_and_no_noise) {
    std::vector<double> v;
    for (int t = 0; t < 12; ++t) v.push_back(100 * std::pow(1.01, t));
    OutTable t = callOmitting("INDEXSNR", {numbers(v), {}, text("output=detail")});
    auto n = labels(t);
    BOOST_TEST(t.rows[0][0].text == "signal-to-noise");
    BOOST_TEST(t.rows.size() == 5u);
    BOOST_TEST(n["signal (rms trend change)"].number == 100 * std::log(1.01), boost::test_tools::tolerance(1e-9));
    BOOST_TEST(std::abs(n["noise (rms noise change)"].number) < 1e-6);
    BOOST_TEST(n["pairs"].number == 11.0);
    const double pi = std::acos(-1.0);
    const double g = 1 - std::cos(2 * pi / 24);
    BOOST_TEST(n["lambda"].number == 1 / (4 * g * g), boost::test_tools::tolerance(1e-12));
    t = callOmitting("INDEXSNR", {numbers(v), text("Q"), text("output=detail; lambda=7")});
    BOOST_TEST(labels(t)["lambda"].number == 7.0);

    const std::vector<double> flat(12, 1.0);
    t = callOmitting("INDEXSNR", {numbers(flat), {}, {}});
    BOOST_REQUIRE(t.scalar);
    BOOST_TEST(isNone(t.rows[0][0]));
    t = callOmitting("INDEXSNR", {numbers(flat), {}, text("notes=1")});
    n = labels(t);
    BOOST_TEST(t.rows[0][0].text == "signal-to-noise");
    BOOST_TEST(isNone(n["signal-to-noise"]));
    BOOST_TEST(n.count("pairs") == 0u);  // the detail rows only with output=detail
    BOOST_TEST(n["rows used"].number == 12.0);
    BOOST_TEST(n["warning"].text.find("no noise") != std::string::npos);
    // With noise the ratio is a positive number (its value is checked against statsmodels in
    // tests/calc/test_calc_analytics.py).
    v[5] *= 1.02;
    t = callOmitting("INDEXSNR", {numbers(v), {}, {}});
    BOOST_TEST(t.rows[0][0].number > 0.0);
    BOOST_TEST(messageOf(callOmitting("INDEXSNR", {numbers(v), {}, text("lambda=-1")})) ==
               "Lintel: option lambda must be greater than 0, got -1");
    BOOST_TEST(messageOf(callOmitting("INDEXSNR", {numbers(v), {}, text("output=chart")})) ==
               "Lintel: option output must be \"ratio\" or \"detail\", got \"chart\"");
    BOOST_TEST(messageOf(callOmitting("INDEXSNR", {numbers({100, NAN, 101, NAN, 102}), {}, {}})) ==
               "Lintel: the signal-to-noise ratio needs at least 2 pairs of consecutive values; the index has 0");
}

// b repeats a two periods later (b_t = a_{t-2}): with one-period changes the correlation at
// lag +2 (a leads b) is exactly 1.
BOOST_AUTO_TEST_CASE(leadlag_sign_layout_and_errors) {
    const std::vector<double> a = {100, 103, 101, 106, 104, 110, 107, 108, 115, 111, 118, 116, 121, 119};
    std::vector<double> b(a.size(), NAN);
    for (std::size_t t = 2; t < a.size(); ++t) b[t] = a[t - 2];
    OutTable t = callOmitting("INDEXLEADLAG", {numbers(a), numbers(b), number(3), text("lag=1; titles=1")});
    BOOST_REQUIRE(t.rows.size() == 1 + 7 + 1);
    BOOST_TEST(t.rows[0][0].text == "lag");
    BOOST_TEST(t.rows[0][1].text == "correlation");
    BOOST_TEST(t.rows[0][2].text == "pairs");
    for (int i = 0; i < 7; ++i) BOOST_TEST(t.rows[1 + i][0].number == double(i - 3));
    BOOST_TEST(t.rows[6][1].number == 1.0, boost::test_tools::tolerance(1e-12));  // lag +2
    BOOST_TEST(t.rows[6][2].number == 11.0);  // changes of b exist from t = 3, a's t = 1..11
    BOOST_TEST(t.rows[8][0].text == "best lag");
    BOOST_TEST(t.rows[8][1].number == 2.0);
    BOOST_TEST(t.rows[8][2].number == 1.0, boost::test_tools::tolerance(1e-12));
    // Swapped: b leads a by -2.
    t = callOmitting("INDEXLEADLAG", {numbers(b), numbers(a), number(3), text("lag=1")});
    BOOST_TEST(t.rows.back()[1].number == -2.0);
    // Default maxlag (monthly): one year, 12 (below rows - 1 = 13): lags -12 .. 12.
    t = callOmitting("INDEXLEADLAG", {numbers(a), numbers(b), {}, text("lag=1")});
    BOOST_TEST(t.rows.size() == 2 * 12 + 1 + 1);

    BOOST_TEST(messageOf(callOmitting("INDEXLEADLAG", {numbers(a), numbers({1, 2}), {}, {}})) ==
               "Lintel: the two indexes must cover the same periods: 14 rows and 2 rows");
    BOOST_TEST(messageOf(callOmitting("INDEXLEADLAG", {numbers(a), numbers(b), number(14), text("lag=1")})) ==
               "Lintel: maxlag must be smaller than the number of rows (14), got 14");
    BOOST_TEST(messageOf(callOmitting("INDEXLEADLAG", {numbers(a), numbers(b), number(-1), {}})) ==
               "Lintel: maxlag must be a whole number of at least 0, got -1");
    BOOST_TEST(messageOf(callOmitting("INDEXLEADLAG", {numbers(a), numbers(b), {}, text("minpairs=2")})) ==
               "Lintel: option minpairs must be a whole number of at least 3, got 2");
    BOOST_TEST(messageOf(callOmitting("INDEXLEADLAG", {numbers(a), numbers(b), number(1), text("lag=12")})) ==
               "Lintel: no lag has 3 or more pairs of 12-period changes with variation in both indexes");
    BOOST_TEST(messageOf(callOmitting("INDEXLEADLAG", {numbers(a), {}, {}, {}})) == "Lintel: b is required");
}

// 100 + 10 sin(2 pi t / 12) on quarter starts from 2015-Q1: peaks at t = 3, 15, 27 and
// troughs at t = 9, 21, 33, 6 quarters = 18 months apart (a sine's extremes; the BBQ rules
// keep all of them: phases 6 >= 2, cycles 12 >= 5, none within 2 quarters of the ends).
BOOST_AUTO_TEST_CASE(turns_sine_layout_offset_and_errors) {
    const double pi = std::acos(-1.0);
    std::vector<Cell> periods, index;
    for (int t = 0; t < 36; ++t) {
        periods.push_back(Cell::num(serial(2015 + t / 4, 1 + 3 * (t % 4), 1)));
        index.push_back(Cell::num(100 + 10 * std::sin(2 * pi * t / 12)));
    }
    OutTable r = callOmitting("INDEXTURNS", {column(periods), column(index), {}, text("titles=1")});
    BOOST_REQUIRE(r.rows.size() == 7);
    BOOST_TEST(r.rows[0][3].text == "months since previous");
    const int at[] = {3, 9, 15, 21, 27, 33};
    for (int k = 0; k < 6; ++k) {
        const auto& row = r.rows[1 + k];
        BOOST_TEST(row[0].number == periods[at[k]].number);
        BOOST_TEST(row[1].text == (k % 2 == 0 ? "peak" : "trough"));
        BOOST_TEST(row[2].number == (k % 2 == 0 ? 110.0 : 90.0), boost::test_tools::tolerance(1e-12));
        if (k == 0) BOOST_TEST(isNone(row[3]));
        else BOOST_TEST(row[3].number == 18.0);
    }
    // A document with another null date: input and output serials shift by the offset.
    CallContext ctx;
    ctx.dateOffset = 1462;
    std::vector<Cell> shifted = periods;
    for (auto& c : shifted) c.number -= 1462;
    r = callOmitting("INDEXTURNS", {column(shifted), column(index), text("Q"), text("notes=1")}, ctx);
    BOOST_TEST(r.rows[0][0].number == periods[3].number - 1462);
    auto n = labels(r, 6);
    BOOST_TEST(n["candidates"].number == 6.0);
    BOOST_TEST(n["window"].number == 2.0);
    BOOST_TEST(n["mincycle"].number == 5.0);
    BOOST_TEST(n["rows used"].number == 36.0);
    // A rising series has no turn.
    std::vector<Cell> rising;
    for (int t = 0; t < 36; ++t) rising.push_back(Cell::num(100 + t));
    r = callOmitting("INDEXTURNS", {column(periods), column(rising), {}, {}});
    BOOST_REQUIRE(r.rows.size() == 1);
    BOOST_TEST(r.rows[0][0].text == "no turning point");

    std::vector<Cell> bad = periods;
    bad[0] = Cell::num(bad[0].number + 14);
    BOOST_TEST(messageOf(callOmitting("INDEXTURNS", {column(bad), column(index), text("Q"), {}})) ==
               "Lintel: periods row 1 is not the start of a new quarter period (freq Q)");
    bad[0] = Cell::str("soon");
    BOOST_TEST(messageOf(callOmitting("INDEXTURNS", {column(bad), column(index), {}, {}})) ==
               "Lintel: periods row 1 is not a date");
    BOOST_TEST(messageOf(callOmitting("INDEXTURNS", {column(periods), numbers({1, 2}), {}, {}})) ==
               "Lintel: periods has 36 rows, index has 2");
    BOOST_TEST(messageOf(callOmitting("INDEXTURNS", {column(periods), column(index), {}, text("window=0")})) ==
               "Lintel: option window must be a whole number of at least 1, got 0");
}

// x_t = 100 s_(t mod 4), s = (0.9, 1.0, 1.1, 1.0): the centred 2x4 moving average of a
// constant level times a season averaging 1 is the level (100), the ratios are s, the
// factors s, the adjusted series 100 (classical decomposition, docs/methods/analytics.md).
BOOST_AUTO_TEST_CASE(seasonal_outputs_and_errors) {
    const double s[] = {0.9, 1.0, 1.1, 1.0};
    std::vector<double> x;
    for (int t = 0; t < 16; ++t) x.push_back(100 * s[t % 4]);
    OutTable t = callOmitting("INDEXSEASONAL", {numbers(x), text("Q"), {}});
    BOOST_REQUIRE(t.rows.size() == 16);
    for (int i = 0; i < 16; ++i) BOOST_TEST(t.rows[i][0].number == s[i % 4], boost::test_tools::tolerance(1e-12));
    t = callOmitting("INDEXSEASONAL", {numbers(x), text("Q"), text("output=adjusted; titles=1")});
    BOOST_TEST(t.rows[0][0].text == "adjusted");
    for (int i = 0; i < 16; ++i) BOOST_TEST(t.rows[1 + i][0].number == 100.0, boost::test_tools::tolerance(1e-12));
    x[5] = NAN;
    t = callOmitting("INDEXSEASONAL", {numbers(x), text("Q"), text("output=table; titles=1")});
    BOOST_REQUIRE(t.rows.size() == 17);
    BOOST_TEST(t.rows[0][2].text == "moving average");
    BOOST_TEST(isNone(t.rows[1][2]));       // first half year: no moving average
    BOOST_TEST(isNone(t.rows[1 + 5][1]));   // no value, no adjusted value
    BOOST_TEST(t.rows[1 + 5][0].number == s[1], boost::test_tools::tolerance(1e-12));  // factor still given
    BOOST_TEST(t.rows[1 + 8][2].number == 100.0, boost::test_tools::tolerance(1e-12));

    BOOST_TEST(messageOf(callOmitting("INDEXSEASONAL", {numbers(x), text("Y"), {}})) ==
               "Lintel: seasonal factors need a monthly or quarterly index (freq M or Q)");
    BOOST_TEST(messageOf(callOmitting("INDEXSEASONAL", {numbers(x), {}, {}})) ==
               "Lintel: seasonal factors need at least 2 years of rows (24), the index has 16");
    BOOST_TEST(messageOf(callOmitting("INDEXSEASONAL", {numbers(x), text("Q"), text("output=trend")})) ==
               "Lintel: option output must be \"factors\", \"adjusted\" or \"table\", got \"trend\"");
}

// Column 1 alternates x1.1, x0.9 (largest change 10 %); column 2 = column 1 shifted one
// period later (so it lags the first column: best lag -1) with one blank; column 3 unnamed.
BOOST_AUTO_TEST_CASE(compare_layout_names_and_errors) {
    std::vector<double> a = {100};
    for (int t = 1; t < 30; ++t) a.push_back(a.back() * ((t % 3 == 0) ? 0.9 : 1.1));
    std::vector<double> b(a.size(), NAN), c(a.size());
    for (std::size_t t = 1; t < a.size(); ++t) b[t] = a[t - 1];
    for (std::size_t t = 0; t < a.size(); ++t) c[t] = 100 + static_cast<double>(t);
    std::vector<Cell> ca = {Cell::str("raw")}, cb = {Cell::str("lagging")}, cc = {Cell{}};
    for (auto& x : nums(a)) ca.push_back(x);
    for (auto& x : nums(b)) cb.push_back(x);
    for (auto& x : nums(c)) cc.push_back(x);
    const OutTable t = callOmitting("INDEXCOMPARE", {block({ca, cb, cc}), text("M"), text("header=1; titles=1; leadlag=1; maxlag=3")});
    BOOST_REQUIRE(t.rows.size() == 4);
    const std::vector<std::string> titles = {"name", "volatility", "signal-to-noise", "largest change %",
                                             "lag vs first", "correlation", "missing"};
    for (std::size_t i = 0; i < 7; ++i) BOOST_TEST(t.rows[0][i].text == titles[i]);
    BOOST_TEST(t.rows[1][0].text == "raw");
    BOOST_TEST(t.rows[2][0].text == "lagging");
    BOOST_TEST(t.rows[3][0].text == "column 3");
    std::vector<double> changes;
    for (std::size_t i = 1; i < a.size(); ++i) changes.push_back(100 * std::log(a[i] / a[i - 1]));
    BOOST_TEST(t.rows[1][1].number == sd(changes), boost::test_tools::tolerance(1e-9));
    BOOST_TEST(t.rows[1][3].number == 10.0, boost::test_tools::tolerance(1e-9));
    BOOST_TEST(t.rows[1][4].number == 0.0);
    BOOST_TEST(t.rows[1][5].number == 1.0);
    BOOST_TEST(t.rows[2][4].number == -1.0);  // the second column follows the first
    BOOST_TEST(t.rows[2][5].number == 1.0, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(t.rows[1][6].number == 0.0);
    BOOST_TEST(t.rows[2][6].number == 1.0);
    BOOST_TEST(t.rows[3][6].number == 0.0);

    // Without header the first row is data; names are "column N".
    const OutTable u = callOmitting("INDEXCOMPARE", {block({nums(a), nums(c)}), {}, {}});
    BOOST_REQUIRE(u.rows.size() == 2);
    BOOST_TEST(u.rows[0][0].text == "column 1");
    BOOST_TEST(messageOf(callOmitting("INDEXCOMPARE", {block({nums(a), nums(c)}), {}, text("lag=0")})) ==
               "Lintel: option lag must be a whole number of at least 1, got 0");
    BOOST_TEST(messageOf(callOmitting("INDEXCOMPARE", {block({nums(a), nums(c)}), {}, text("lambda=-1")})) ==
               "Lintel: option lambda must be greater than 0, got -1");
    BOOST_TEST(messageOf(callOmitting("INDEXCOMPARE", {block({nums({1}), nums({2})}), {}, text("header=1")})) ==
               "Lintel: indexes holds no rows below the header");
    BOOST_TEST(messageOf(callOmitting("INDEXCOMPARE", {block({nums(a), nums(c)}), {}, text("colour=red")})) ==
               "Lintel: unknown option \"colour\" for INDEXCOMPARE (known: lag, annual, lambda, leadlag, maxlag, header, titles, notes)");
}

BOOST_AUTO_TEST_SUITE_END()
