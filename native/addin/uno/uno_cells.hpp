// UNO values <-> the add-in's neutral cells (cell_model.hpp). The one place that knows how
// Calc passes ranges and how a result must look to be shown as intended.
#pragma once

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

// A range argument (sequence<sequence<any>>): numbers and booleans arrive as double, empty
// cells as an empty string, text as string. Throws std::bad_alloc when memory runs out (the
// caller says so; it is not a missing argument).
Arg toArg(const com::sun::star::uno::Sequence<com::sun::star::uno::Sequence<com::sun::star::uno::Any>>& v);
// An optional argument (any): void when omitted or left empty; a number, a string, or a
// range as sequence<sequence<any>>.
Arg toArg(const com::sun::star::uno::Any& v);

// A Column argument (table::XCellRange): Calc passes the range itself; it is read by
// readArguments, which sees all the arguments of the call.
struct UnoArg {
    Arg value;                                                 // a converted argument
    com::sun::star::uno::Reference<com::sun::star::table::XCellRange> range;  // or a range to read
    UnoArg(Arg v) : value(std::move(v)) {}  // NOLINT: the generated calls rely on it
    explicit UnoArg(com::sun::star::uno::Reference<com::sun::star::table::XCellRange> r)
        : range(std::move(r)) {}
};
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
