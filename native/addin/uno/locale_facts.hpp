// The facts of a document the add-in reads cells by (cell_model.hpp CallContext): its null
// date, and from its language (the document's CharLocale: Tools > Options > Language Settings >
// Languages > Default languages for documents) the order of day and month in dates written as
// text and the decimal and thousands separators, as the office's own locale data gives them
// (com.sun.star.i18n.LocaleData); and the current year.
#pragma once

#include <com/sun/star/beans/XPropertySet.hpp>
#include <com/sun/star/lang/Locale.hpp>
#include <com/sun/star/uno/Reference.hxx>
#include <com/sun/star/uno/XComponentContext.hpp>

#include "cell_model.hpp"

namespace lintel::addin {

// The office's component context, kept by each Lintel component when the office creates it
// (the locale data service is created from it).
void rememberOfficeContext(const com::sun::star::uno::Reference<com::sun::star::uno::XComponentContext>& ctx);

// The order of day and month and the separators of a locale, from the office's locale data,
// cached per locale. Never throws: what cannot be read stays at CallContext's defaults (dates
// as ISO or where day and month cannot be confused; "." as the decimal separator).
void applyLocale(const com::sun::star::lang::Locale& locale, CallContext& ctx) noexcept;

// The call context of a document (its model's properties: NullDate, CharLocale) and the
// current year from the clock. Never throws.
CallContext documentContext(const com::sun::star::uno::Reference<com::sun::star::beans::XPropertySet>& doc) noexcept;

}  // namespace lintel::addin
