// Building a report sheet in a document (used by the ReportBuilder job and the sidebar).
#pragma once

#include <optional>
#include <string>

#include <com/sun/star/sheet/XSpreadsheetDocument.hpp>
#include <com/sun/star/task/XStatusIndicator.hpp>
#include <com/sun/star/uno/XComponentContext.hpp>

#include "report_plan.hpp"

namespace lintel::addin {

// Builds (update = false, from settingsText) or updates in place (update = true: the report on
// updateSheet, with settingsText when given (the panel's edits), else its own settings and
// settings cells) a report; returns the status line. Throws lintel::InputError.
// Progress goes to `progress` when given, else to the document window's status bar; it is
// ended however the build ends.
std::string buildReport(const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
                        const std::string& settingsText, bool update, const std::string& updateSheet,
                        const com::sun::star::uno::Reference<com::sun::star::task::XStatusIndicator>& progress = {});

// The settings of the report on a sheet, as the panel shows them: from the report's record
// with the settings cells as the user left them (base date, band level, frequency), or from
// an earlier version's stored settings; nullopt when the sheet is no Lintel report.
std::optional<report::ReportSettings> reportSettingsOnSheet(
    const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc, const std::string& sheet);

// The settings text stored in the document for a report sheet, or "".
std::string loadReportSettings(const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
                               const std::string& sheet);

// Reads the sales table (header row first) of "Sheet.A1:J500"; with growToRegion, widened to
// the region around its header cell (new rows pasted below). usedRange is the range read.
report::SheetData readSalesTable(const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
                                 const std::string& dataRange, bool growToRegion, std::string& usedRange);

// A new document with the report sheet as values (charts, formats and print ranges kept), for
// readers without Lintel; the report is not touched. Throws lintel::InputError when the sheet
// is no report.
com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument> valuesCopy(
    const com::sun::star::uno::Reference<com::sun::star::uno::XComponentContext>& ctx,
    const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
    const std::string& sheetName, bool hidden);

// The report's client pages as a PDF file (a file URL), written from a hidden values copy.
void exportReportPdf(const com::sun::star::uno::Reference<com::sun::star::uno::XComponentContext>& ctx,
                     const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
                     const std::string& sheetName, const std::string& url);

// Days to add to the document's date serials to count from 1899-12-30 (its NullDate).
double documentDateOffset(const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc);

// The key of a number format code written in English ("YYYY-MM-DD", "0.0"), added if new.
sal_Int32 numberFormatKey(const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
                          const std::string& code);

// Text kept in the document as a user-defined property (saved in .ods).
void storeDocumentText(const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
                       const std::string& key, const std::string& text);
std::string loadDocumentText(const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
                             const std::string& key);

}  // namespace lintel::addin
