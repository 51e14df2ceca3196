// UNO values <-> the add-in's neutral cells (cell_model.hpp). The one place that knows how
// Calc passes ranges and how a result must look to be shown as intended.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include <com/sun/star/table/XCellRange.hpp>
#include <com/sun/star/uno/Any.hxx>
#include <com/sun/star/uno/Reference.hxx>
#include <com/sun/star/uno/Sequence.hxx>
#include <rtl/ustring.hxx>

#include "cell_model.hpp"
#include "function_table.hpp"

using ::rtl::OString;
using ::rtl::OUString;

namespace lintel::addin {

std::string utf8(const OUString& s);
OUString ustr(const std::string& s);

// Calc's array of values for a range argument (sequence<sequence<any>>): numbers and booleans
// arrive as double, empty cells as an empty string (or void), text as string.
using AnyRows = com::sun::star::uno::Sequence<com::sun::star::uno::Sequence<com::sun::star::uno::Any>>;

// All of an array as the add-in's cells (a 1 x 1 array is a single value). Throws
// std::bad_alloc when memory runs out (the caller says so; it is not a missing argument).
Range cellsOf(const AnyRows& v);

// One argument of a call as the generated methods pass it to readArguments: converted
// already (a single value, or missing), an array of values kept as Calc passed it until the
// call knows how many of its rows it keeps (a whole-column expression is a million rows), or
// a Column argument's range (table::XCellRange), which is read only down to its data.
struct UnoArg {
    Arg value;                                                 // a converted argument
    std::optional<AnyRows> array;                              // or an array to convert
    bool arrayScalar = false;                                  // a 1 x 1 array is a single value
    com::sun::star::uno::Reference<com::sun::star::table::XCellRange> range;  // or a range to read
    UnoArg(Arg v) : value(std::move(v)) {}  // NOLINT: the generated calls rely on it
    UnoArg(AnyRows a, bool scalarWhenOne) : array(std::move(a)), arrayScalar(scalarWhenOne) {}
    explicit UnoArg(com::sun::star::uno::Reference<com::sun::star::table::XCellRange> r)
        : range(std::move(r)) {}
};
// A range argument (sequence<sequence<any>>).
UnoArg toArg(const AnyRows& v);
// An optional argument (any): void when omitted or left empty; a number, a string, or a
// range as sequence<sequence<any>>.
UnoArg toArg(const com::sun::star::uno::Any& v);
// A Column argument: Calc passes the range itself.
UnoArg toArg(const com::sun::star::uno::Reference<com::sun::star::table::XCellRange>& v) noexcept;

// The arguments of a call of f as the add-in's cells. A Column argument is read only down to
// its last row holding data; rows are then planned as column_rows.hpp says (whole columns cut
// to their data, other ranges keep their size). Throws InputError naming the cell when a Column
// argument holds an error value where the call would use it (column_rows.hpp refusedError);
// an error in a row the include argument leaves out, or below the table, reads as empty.
std::vector<Arg> readArguments(const FunctionSpec& f, std::vector<UnoArg> args);

// The result: a single value, or a sequence<sequence<any>> padded to a rectangle. A missing
// value is an empty string: shown blank, skipped by AVERAGE and COUNT, a gap in charts
// (a void Any would be the number 0 and a NaN would show #NUM!).
// Results that would take Calc long to store are first trimmed or replaced by a message
// (result_cost.hpp).
com::sun::star::uno::Any toAny(OutTable t);
com::sun::star::uno::Any failureAny(const char* message) noexcept;
com::sun::star::uno::Any failureAny(const std::string& message) noexcept;

}  // namespace lintel::addin
