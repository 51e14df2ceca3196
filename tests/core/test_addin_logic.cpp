// The add-in's UNO-free logic: option parsing, argument checks and the shared output layout.
// Expected values are the documented behaviour (docs/functions.md, docs/errors.md).
#include <boost/test/unit_test.hpp>

#include "addin_test_cells.hpp"

#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "call.hpp"
#include "options.hpp"
#include "raw_index.hpp"

#include <functional>

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;

namespace {
}  // namespace

BOOST_AUTO_TEST_SUITE(addin_logic)

namespace {
// The options an INDEXMEAN call with this options argument gets.
RawIndexOptions meanOptions(const Arg& options) {
    std::vector<Arg> args(6);
    args[5] = options;
    return Call(*findFunctionByName("INDEXMEAN"), args, {}).options<RawIndexOptions>();
}
TableLayout meanLayout(const Arg& options) {
    std::vector<Arg> args(6);
    args[5] = options;
    return Call(*findFunctionByName("INDEXMEAN"), args, {}).layout();
}
std::string errorOf(const std::function<void()>& f) {
    try {
        f();
    } catch (const InputError& e) {
        return e.what();
    }
    return "(no error)";
}
}  // namespace

BOOST_AUTO_TEST_CASE(options_text_and_range) {
    const RawIndexOptions a = meanOptions(text(" MinSales = 5 ; trim=0.1;titles=TRUE "));
    BOOST_TEST(a.minSales == 5u);
    BOOST_TEST(a.trim == 0.1);
    BOOST_TEST(a.level == 0.95);  // the core's default
    BOOST_TEST(meanLayout(text(" MinSales = 5 ; trim=0.1;titles=TRUE ")).titles);

    Range r;
    r.rows = 2;
    r.cols = 2;
    r.cells = {Cell::str("level"), Cell::num(0.9), Cell::str("notes"), Cell::num(1)};
    BOOST_TEST(meanOptions(Arg(r)).level == 0.9);
    BOOST_TEST(meanLayout(Arg(r)).notes);
}

BOOST_AUTO_TEST_CASE(decimal_comma_in_option_numbers) {
    // "level="&B9 gives "level=0,9" in a German or French Calc.
    BOOST_TEST(meanOptions(text("level=0,9; trim=0.1")).level == 0.9);
    BOOST_TEST(meanOptions(text("trim=0.1")).trim == 0.1);
}

BOOST_AUTO_TEST_CASE(ambiguous_or_foreign_numbers_are_refused) {
    // Issue 10: minsales=1,000 was read as 1, minsales=0x10 as 16, lambda=129,600 as 129.6.
    BOOST_TEST(errorOf([] { meanOptions(text("minsales=1,000")); }) ==
               "option minsales: \"1,000\" is ambiguous (a thousands separator or a decimal "
               "comma?); write it without a separator, e.g. 1000");
    BOOST_TEST(errorOf([] { meanOptions(text("minsales=0x10")); }) ==
               "option minsales must be a number, got \"0x10\"");
    BOOST_TEST(errorOf([] { meanOptions(text("level=inf")); }) ==
               "option level must be a number, got \"inf\"");
    BOOST_TEST(errorOf([] { meanOptions(text("minsales=12abc")); }) ==
               "option minsales must be a number, got \"12abc\"");
    std::vector<Arg> args(3);
    args[0] = column({Cell::num(100), Cell::num(101), Cell::num(102)});
    args[2] = text("129,600");
    BOOST_TEST(messageOf(callFunction(*findFunctionByName("INDEXTREND"), args, {})) ==
               "Lintel: lambda: \"129,600\" is ambiguous (a thousands separator or a decimal "
               "comma?); write it without a separator, e.g. 129600");
    BOOST_TEST(meanOptions(text("trim=0,25")).trim == 0.25);  // not three digits: a decimal comma
    BOOST_TEST(meanOptions(text("minsales=1e3")).minSales == 1000u);
}

BOOST_AUTO_TEST_CASE(option_keys_with_no_break_spaces) {
    // A key typed or pasted with U+00A0 around it (issue 10).
    BOOST_TEST(meanOptions(text("\xC2\xA0minsales\xC2\xA0=3")).minSales == 3u);
}

BOOST_AUTO_TEST_CASE(option_errors_name_the_key) {
    BOOST_TEST(errorOf([] {
                   std::vector<Arg> args(6);
                   args[5] = text("minsales=3; colour=red");
                   Call(*findFunctionByName("INDEXMEDIAN"), args, {});
               }) ==
               "unknown option \"colour\" for INDEXMEDIAN (known: minsales, level, dateorder, header, titles, notes)");
    BOOST_TEST(errorOf([] { meanOptions(text("minsales")); }) ==
               "option \"minsales\" has no value (write key=value)");
    BOOST_TEST(errorOf([] { meanOptions(text("level=1;level=2")); }) == "option \"level\" is given twice");
    BOOST_TEST(errorOf([] { meanOptions(text("minsales=2.5")); }) ==
               "option minsales must be a whole number of at least 1, got 2.5");
    BOOST_TEST(errorOf([] { meanOptions(text("titles=maybe")); }) ==
               "option titles must be 1 or 0 (TRUE or FALSE), got \"maybe\"");
    BOOST_TEST(errorOf([] { meanOptions(text("level=1.5")); }) ==
               "option level must lie between 0 and 1, got 1.5");
}

BOOST_AUTO_TEST_CASE(long_option_text_is_not_echoed_whole) {
    // A 10 KB options text (issue 10) gives a short message, not 10 KB in every cell.
    const std::string junk(10000, 'x');
    std::vector<Arg> args(6);
    args[0] = column({Cell::num(45000)});
    args[1] = column({Cell::num(1)});
    args[5] = text(junk + "=1");
    const std::string m = messageOf(callFunction(*findFunctionByName("INDEXMEDIAN"), args, {}));
    BOOST_TEST(m.size() < 200u);
    BOOST_TEST(m.find("unknown option \"xxxx") != std::string::npos);
}

BOOST_AUTO_TEST_CASE(a_zero_argument_may_be_an_empty_cell) {
    // Calc hands a reference to an empty cell to an optional argument as the number 0
    // (measured in tests/calc/test_calc_bad_input_matrix.py, kind "blank"): a message that
    // refuses the 0 says so, instead of 'got "0"' or a base of 1899-12-30.
    const std::string hint = " (an empty cell reads as 0)";
    std::vector<Arg> args(6);
    args[0] = column({Cell::num(44927), Cell::num(44958)});
    args[1] = column({Cell::num(100), Cell::num(110)});
    args[3] = number(0);
    BOOST_TEST(messageOf(callFunction(*findFunctionByName("INDEXMEDIAN"), args, {})) ==
               "Lintel: freq must be \"M\", \"Q\" or \"Y\", got \"0\"" + hint);
    args[3] = Arg();
    args[4] = number(0);
    BOOST_TEST(messageOf(callFunction(*findFunctionByName("INDEXMEDIAN"), args, {})) ==
               "Lintel: base must be a date, got 0" + hint);
    args[4] = Arg();
    args[5] = number(0);
    BOOST_TEST(messageOf(callFunction(*findFunctionByName("INDEXMEDIAN"), args, {})) ==
               "Lintel: options must be text \"key=value; key=value\" or a two-column range" + hint);
    std::vector<Arg> change(4);
    change[0] = column({Cell::num(100), Cell::num(101), Cell::num(103)});
    change[1] = number(0);
    BOOST_TEST(messageOf(callFunction(*findFunctionByName("INDEXCHANGE"), change, {})) ==
               "Lintel: lag must be a whole number of at least 1, got 0" + hint);
    change[1] = Arg();
    change[2] = number(0);
    BOOST_TEST(messageOf(callFunction(*findFunctionByName("INDEXCHANGE"), change, {})) ==
               "Lintel: kind must be \"pct\", \"log\" or \"annual\", got \"0\"" + hint);
    // Other numbers, and a 0 inside the options text, keep their plain messages.
    change[2] = number(7);
    BOOST_TEST(messageOf(callFunction(*findFunctionByName("INDEXCHANGE"), change, {})) ==
               "Lintel: kind must be \"pct\", \"log\" or \"annual\", got \"7\"");
    BOOST_TEST(errorOf([] { meanOptions(text("minsales=0")); }) ==
               "option minsales must be a whole number of at least 1, got 0");
}

BOOST_AUTO_TEST_CASE(mismatched_ranges_message) {
    const FunctionSpec& spec = *findFunctionByName("INDEXMEDIAN");
    std::vector<Arg> args(6);
    args[0] = column({Cell::num(45000), Cell::num(45001), Cell::num(45002)});
    args[1] = column({Cell::num(1), Cell::num(2)});
    BOOST_TEST(messageOf(callFunction(spec, args, {})) == "Lintel: dates has 3 rows, prices has 2");
    args[1].reset();
    BOOST_TEST(messageOf(callFunction(spec, args, {})) == "Lintel: prices is required");
    BOOST_TEST(messageOf(callFunction(spec, {}, {})) == "Lintel: INDEXMEDIAN takes 6 arguments, got 0");
}

BOOST_AUTO_TEST_CASE(index_layout_with_titles_and_gap) {
    const FunctionSpec& spec = *findFunctionByName("INDEXMEDIAN");
    std::vector<Arg> args(6);
    // 2024-01-10, 2024-01-20, 2024-03-05 (February has no sale)
    args[0] = column({Cell::num(45301), Cell::num(45311), Cell::str("2024-03-05")});
    args[1] = column({Cell::num(100), Cell::num(300), Cell::num(150)});
    args[5] = text("titles=1");
    const OutTable t = callFunction(spec, args, {});
    BOOST_REQUIRE(t.rows.size() == 4);
    BOOST_TEST(t.rows[0][1].text == "index");
    BOOST_TEST(t.rows[1][0].number == 45292.0);  // 2024-01-01
    BOOST_TEST(t.rows[1][1].number == 100.0);
    BOOST_TEST(t.rows[1][2].number == 2.0);
    BOOST_TEST((t.rows[2][1].kind == OutCell::Kind::NoValue));  // February: no value, 0 sales
    BOOST_TEST(t.rows[2][2].number == 0.0);
    BOOST_TEST(t.rows[3][1].number == 75.0);  // 150 / median(100, 300)
}

BOOST_AUTO_TEST_CASE(date_offset_of_other_null_dates) {
    CallContext ctx;
    ctx.dateOffset = 1462;  // a document counting from 1904-01-01
    BOOST_TEST(cellDate(Cell::num(0), ctx) == 1462.0);
    BOOST_TEST(cellDate(Cell::str("1904-01-01"), ctx) == 1462.0);  // ISO text is absolute
    BOOST_TEST(std::isnan(cellDate(Cell::str("2023-02-30"), ctx)));
    BOOST_TEST(std::isnan(cellDate(Cell::str("next week"), ctx)));
}

BOOST_AUTO_TEST_CASE(every_function_is_fully_described) {
    for (const auto& f : functionTable()) {
        BOOST_TEST_CONTEXT(f.name) {
            BOOST_TEST(!f.description.empty());
            BOOST_TEST(!f.output.empty());
            BOOST_TEST(!f.example.empty());
            BOOST_TEST(f.impl != nullptr);
            for (const auto& a : f.args) BOOST_TEST(!a.description.empty());
            for (const auto& o : f.options) BOOST_TEST(!o.description.empty());
        }
    }
}

BOOST_AUTO_TEST_SUITE_END()
