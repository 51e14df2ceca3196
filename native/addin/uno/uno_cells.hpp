// UNO values <-> the add-in's neutral cells (cell_model.hpp). The one place that knows how
// Calc passes ranges and how a result must look to be shown as intended.
#pragma once

#include <string>

#include <com/sun/star/uno/Any.hxx>
#include <com/sun/star/uno/Sequence.hxx>
#include <rtl/ustring.hxx>

#include "cell_model.hpp"

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

// The result: a single value, or a sequence<sequence<any>> padded to a rectangle. A missing
// value is an empty string: shown blank, skipped by AVERAGE and COUNT, a gap in charts
// (a void Any would be the number 0 and a NaN would show #NUM!).
com::sun::star::uno::Any toAny(const OutTable& t);
com::sun::star::uno::Any failureAny(const char* message) noexcept;

}  // namespace lintel::addin
