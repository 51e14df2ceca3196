// The add-in's UNO-free logic: option parsing, argument checks and the shared output layout.
// Expected values are the documented behaviour (docs/functions.md, docs/errors.md).
#include <boost/test/unit_test.hpp>

#include "addin_test_cells.hpp"

#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "options.hpp"

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;

namespace {
}  // namespace

BOOST_AUTO_TEST_SUITE(addin_logic)

BOOST_AUTO_TEST_CASE(options_text_and_range) {
    const FunctionSpec& spec = *findFunctionByName("INDEXMEAN");
    const OptionBag a = OptionBag::parse(text(" MinSales = 5 ; trim=0.1;titles=TRUE "), spec);
    BOOST_TEST(a.integer("minsales", 1, 1) == 5);
    BOOST_TEST(a.number("trim", 0) == 0.1);
    BOOST_TEST(a.flag("titles", false));
    BOOST_TEST(a.number("level", 0.95) == 0.95);

    Range r;
    r.rows = 2;
    r.cols = 2;
    r.cells = {Cell::str("level"), Cell::num(0.9), Cell::str("notes"), Cell::num(1)};
    const OptionBag b = OptionBag::parse(Arg(r), spec);
    BOOST_TEST(b.number("level", 0.95) == 0.9);
    BOOST_TEST(b.flag("notes", false));
}

BOOST_AUTO_TEST_CASE(decimal_comma_in_option_numbers) {
    // "level="&B9 gives "level=0,9" in a German or French Calc.
    const FunctionSpec& spec = *findFunctionByName("INDEXMEAN");
    BOOST_TEST(OptionBag::parse(text("level=0,9; trim=0.1"), spec).number("level", 0.95) == 0.9);
    BOOST_TEST(OptionBag::parse(text("trim=0.1"), spec).number("trim", 0) == 0.1);
}

BOOST_AUTO_TEST_CASE(option_errors_name_the_key) {
    const FunctionSpec& spec = *findFunctionByName("INDEXMEDIAN");
    try {
        OptionBag::parse(text("minsales=3; colour=red"), spec);
        BOOST_FAIL("unknown key accepted");
    } catch (const InputError& e) {
        BOOST_TEST(std::string(e.what()) ==
                   "unknown option \"colour\" for INDEXMEDIAN (known: minsales, level, header, titles, notes)");
    }
    BOOST_CHECK_THROW(OptionBag::parse(text("minsales"), spec), InputError);
    BOOST_CHECK_THROW(OptionBag::parse(text("level=1;level=2"), spec), InputError);
    BOOST_CHECK_THROW(OptionBag::parse(text("minsales=2.5"), spec).integer("minsales", 1, 1), InputError);
    BOOST_CHECK_THROW(OptionBag::parse(text("titles=maybe"), spec).flag("titles", false), InputError);
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
