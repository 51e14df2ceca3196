// The function table is what the code runs on: every argument and option is bound to a
// field, its documented default is the struct's own default, every declared option is read,
// and formulas are laid out from the spec. Expected values: the documented behaviour
// (docs/functions.md) and the core's Options defaults.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <set>

#include "addin_test_cells.hpp"

#include "call.hpp"
#include "function_table.hpp"
#include "index_table.hpp"
#include "repeat_sales.hpp"

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;

namespace {

// A valid call of any function of the table, built from its argument names: 30 months of
// sales (three a month) of 25 properties with two characteristics, or an index series.
std::vector<Arg> sampleArgs(const FunctionSpec& f) {
    const std::size_t n = 90;
    std::vector<Cell> dates, prices, ids, chars, strata, periods, index, b;
    for (std::size_t i = 0; i < n; ++i) {
        const double month = static_cast<double>(i / 3);
        dates.push_back(Cell::num(43466 + 30.4 * month + static_cast<double>(i % 3)));  // 2019-01 on
        const double size = 60 + static_cast<double>((i * 7) % 50);
        prices.push_back(Cell::num(std::round(2000 * size * (1 + 0.01 * month) *
                                              (1 + 0.03 * std::sin(static_cast<double>(i))))));
        ids.push_back(Cell::str("p" + std::to_string(i % 25)));
        chars.push_back(Cell::num(size));
        chars.push_back(Cell::num(static_cast<double>(1 + i % 4)));
        strata.push_back(Cell::str(i % 2 ? "flat" : "house"));
    }
    for (int t = 0; t < 36; ++t) {
        periods.push_back(Cell::num(43466 + 30.4 * t));
        index.push_back(Cell::num(100 + 0.8 * t + 3 * std::sin(t * 0.9) + 2 * std::cos(t * 0.5)));
        b.push_back(Cell::num(100 + 0.6 * t + 2 * std::sin(t * 0.7 + 1)));
    }
    // Period starts must be month starts for PERIODOF-read columns: 2019-01-01 + months.
    periods.clear();
    for (int t = 0; t < 36; ++t) {
        const int y = 2019 + t / 12, m = 1 + t % 12;
        periods.push_back(Cell::num(serialFromCivil({y, m, 1})));
    }
    std::vector<Arg> a;
    for (const auto& arg : f.args) {
        const std::string& name = arg.name;
        Range r;
        if (name == "dates" || name == "date") a.push_back(column(dates));
        else if (name == "prices") a.push_back(column(prices));
        else if (name == "ids") a.push_back(column(ids));
        else if (name == "strata" || name == "labels") a.push_back(column(strata));
        else if (name == "values") a.push_back(text("flat"));
        else if (name == "characteristics") {
            r.rows = n;
            r.cols = 2;
            r.cells = chars;
            a.push_back(r);
        } else if (name == "index" || name == "a") a.push_back(column(index));
        else if (name == "b") a.push_back(column(b));
        else if (name == "periods") a.push_back(column(periods));
        else if (name == "indexes") {
            r.rows = 36;
            r.cols = 2;
            for (int t = 0; t < 36; ++t) {
                r.cells.push_back(index[static_cast<std::size_t>(t)]);
                r.cells.push_back(b[static_cast<std::size_t>(t)]);
            }
            a.push_back(r);
        } else if (name == "price") a.push_back(number(250000));
        else if (name == "saledate") a.push_back(number(43800));
        else if (name == "targetdate") a.push_back(number(44400));
        else if (name == "base" && arg.kind == ArgKind::Range) a.push_back(number(44000));
        else a.push_back(std::nullopt);
    }
    return a;
}

bool isMessage(const OutTable& t) {
    return t.scalar && t.rows.size() == 1 && t.rows[0].size() == 1 &&
           t.rows[0][0].kind == OutCell::Kind::Text && t.rows[0][0].text.rfind("Lintel: ", 0) == 0;
}

bool same(const OutTable& x, const OutTable& y) {
    if (x.rows.size() != y.rows.size()) return false;
    for (std::size_t i = 0; i < x.rows.size(); ++i) {
        if (x.rows[i].size() != y.rows[i].size()) return false;
        for (std::size_t j = 0; j < x.rows[i].size(); ++j) {
            const OutCell &a = x.rows[i][j], &b = y.rows[i][j];
            if (a.kind != b.kind || a.text != b.text) return false;
            if (a.kind == OutCell::Kind::Number && !(a.number == b.number)) return false;
        }
    }
    return true;
}

bool concreteDefault(const std::string& t) {
    // "1", "0.95", "cs", "M"; not "by freq", "one year", "first period with a value", "none".
    return !t.empty() && t.find(' ') == std::string::npos && t != "none";
}

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_spec)

BOOST_AUTO_TEST_CASE(every_function_runs_on_its_sample) {
    for (const auto& f : functionTable()) {
        BOOST_TEST_CONTEXT(f.name) {
            const OutTable t = callFunction(f, sampleArgs(f), {});
            BOOST_TEST(!isMessage(t), (isMessage(t) ? t.rows[0][0].text : ""));
        }
    }
}

BOOST_AUTO_TEST_CASE(every_option_is_read_and_its_documented_default_is_the_default) {
    // Giving an option its documented default changes nothing; an option bound to a struct the
    // implementation never asks for would make the call an internal fault instead.
    std::size_t checked = 0;
    for (const auto& f : functionTable()) {
        const int opt = f.argIndex("options");
        if (opt < 0) continue;
        std::vector<Arg> args = sampleArgs(f);
        const OutTable plain = callFunction(f, args, {});
        for (const auto& o : f.options) {
            BOOST_TEST_CONTEXT(f.name << " " << o.key << "=" << o.defaultText) {
                BOOST_TEST(!o.defaultText.empty());
                if (!concreteDefault(o.defaultText)) continue;
                args[static_cast<std::size_t>(opt)] = text(o.key + "=" + o.defaultText);
                const OutTable given = callFunction(f, args, {});
                BOOST_TEST(same(plain, given), (isMessage(given) ? given.rows[0][0].text : "differs"));
                ++checked;
            }
        }
    }
    BOOST_TEST(checked > 60u);
}

BOOST_AUTO_TEST_CASE(defaults_come_from_the_core) {
    const auto def = [](const char* fn, const char* key) {
        return functionSpec(fn).option(key)->defaultText;
    };
    BOOST_TEST(def("INDEXMEDIAN", "minsales") == fmt::format("{}", IndexOptions{}.minSales));
    BOOST_TEST(def("INDEXMEDIAN", "level") == fmt::format("{}", IndexOptions{}.level));
    BOOST_TEST(def("CHAINRS", "method") == "cs");
    BOOST_TEST(def("CHAINRS", "minhold") == fmt::format("{}", RepeatSalesOptions{}.minHoldMonths));
    BOOST_TEST(def("CHAINRS", "maxrate") == fmt::format("{}", RepeatSalesOptions{}.maxRate));
    BOOST_TEST(def("INDEXHEDONIC", "se") == "classical");
    BOOST_TEST(def("INDEXMIX", "reps") == "200");
    // Optional parameters say their default in words.
    for (const auto& f : functionTable())
        for (const auto& a : f.args)
            if (a.binding && a.kind == ArgKind::Optional) {
                BOOST_TEST_CONTEXT(f.name << " " << a.name) BOOST_TEST(!a.defaultText.empty());
            }
}

BOOST_AUTO_TEST_CASE(arguments_are_read_by_name) {
    const std::vector<Arg> args(6);
    const Call call(functionSpec("INDEXMEDIAN"), args, {});
    BOOST_CHECK_THROW(call.arg("dats"), std::logic_error);  // a misspelt name is a fault
    BOOST_TEST(!call.given("dates"));
    try {
        call.required("prices");
        BOOST_FAIL("no error");
    } catch (const InputError& e) {
        BOOST_TEST(std::string(e.what()) == "prices is required");
    }
}

BOOST_AUTO_TEST_CASE(an_unread_option_is_a_fault_not_silence) {
    // A function whose spec declares an option bound to a struct its implementation never
    // reads: giving that option is reported as an internal fault.
    struct Unused {
        int x = 0;
    };
    FunctionSpec f;
    f.name = "TESTFN";
    f.args = {{"values", ArgKind::Range, "values"}, spec::options()};
    f.options = {option("x", whole<Unused>(&Unused::x, 0), "never read")};
    f.columns = {{"value", ""}};
    f.impl = [](const Call& call) {
        OutTable t;
        t.addRow();
        t.num(call.required("values").at(0, 0).number);
        return t;
    };
    const std::vector<Arg> without = {number(5), std::nullopt};
    BOOST_TEST(callFunction(f, without, {}).rows[0][0].number == 5.0);
    const std::vector<Arg> with = {number(5), text("x=3")};
    const OutTable t = callFunction(f, with, {});
    BOOST_TEST(t.rows[0][0].text.rfind(kInternalFault, 0) == 0u);
    BOOST_TEST(t.rows[0][0].text.find("\"x\" was given but the function never read it") != std::string::npos);
}

BOOST_AUTO_TEST_CASE(formula_calls_are_laid_out_from_the_spec) {
    BOOST_TEST(formulaCall(functionSpec("INDEXMEDIAN"),
                           {{"prices", "B2:B9"}, {"dates", "A2:A9"}, {"freq", "\"Q\""}}) ==
               "INDEXMEDIAN(A2:A9;B2:B9;;\"Q\")");
    BOOST_TEST(formulaCall(functionSpec("CHAINRS"), {{"ids", "C:C"}, {"dates", "A:A"},
                                                     {"prices", "B:B"}, {"options", "\"chain=1\""}}) ==
               "CHAINRS(C:C;A:A;B:B;;;;;\"chain=1\")");
    BOOST_CHECK_THROW(formulaCall(functionSpec("INDEXMEDIAN"), {{"price", "B2:B9"}}), std::logic_error);
}

BOOST_AUTO_TEST_CASE(single_include_of_zero_is_said) {
    // Issue 10: a single-cell include of 0 or FALSE() was ignored (all rows used).
    std::vector<Arg> args = sampleArgs(functionSpec("INDEXMEDIAN"));
    args[2] = number(0);
    BOOST_TEST(messageOf(callFunction(functionSpec("INDEXMEDIAN"), args, {})) ==
               "Lintel: include is a single 0 or FALSE: no sale is chosen (give a column of 1/0, "
               "or leave include empty for all sales)");
    args[2] = number(1);
    BOOST_TEST(!isMessage(callFunction(functionSpec("INDEXMEDIAN"), args, {})));
}

BOOST_AUTO_TEST_SUITE_END()
