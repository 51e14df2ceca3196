// Building neutral cell arguments and reading results, shared by the add-in logic tests.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include <boost/test/unit_test.hpp>

#include "cell_model.hpp"
#include "function_table.hpp"

namespace addin_test {

using lintel::addin::Arg;
using lintel::addin::CallContext;
using lintel::addin::Cell;
using lintel::addin::OutCell;
using lintel::addin::OutTable;
using lintel::addin::Range;

inline Arg scalar(Cell c) {
    Range r;
    r.rows = r.cols = 1;
    r.scalar = true;
    r.cells.push_back(std::move(c));
    return r;
}
inline Arg text(const std::string& s) { return scalar(Cell::str(s)); }
inline Arg number(double x) { return scalar(Cell::num(x)); }
inline Arg column(std::vector<Cell> cells) {
    Range r;
    r.rows = cells.size();
    r.cols = 1;
    r.cells = std::move(cells);
    return r;
}

// Calls a function by the name users type, with exactly these arguments.
inline OutTable call(const char* name, const std::vector<Arg>& args, const CallContext& ctx = {}) {
    const lintel::addin::FunctionSpec* f = lintel::addin::findFunctionByName(name);
    BOOST_REQUIRE(f != nullptr);
    return lintel::addin::callFunction(*f, args, ctx);
}
// The same, with missing trailing arguments omitted (as Calc passes them).
inline OutTable callOmitting(const char* name, std::vector<Arg> args, const CallContext& ctx = {}) {
    const lintel::addin::FunctionSpec* f = lintel::addin::findFunctionByName(name);
    BOOST_REQUIRE(f != nullptr);
    if (args.size() < f->args.size()) args.resize(f->args.size());
    return lintel::addin::callFunction(*f, args, ctx);
}

// The text of a single-cell result (a "Lintel: ..." message).
inline std::string messageOf(const OutTable& t) {
    BOOST_REQUIRE(t.scalar && t.rows.size() == 1 && t.rows[0].size() == 1);
    return t.rows[0][0].text;
}
inline double num(const OutCell& c) {
    BOOST_REQUIRE(c.kind == OutCell::Kind::Number);
    return c.number;
}
inline std::string txt(const OutCell& c) {
    BOOST_REQUIRE(c.kind == OutCell::Kind::Text);
    return c.text;
}

}  // namespace addin_test
