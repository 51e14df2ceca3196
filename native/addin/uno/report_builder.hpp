// Building a report sheet in a document (used by the ReportBuilder job and the sidebar).
#pragma once

#include <string>

#include <com/sun/star/sheet/XSpreadsheetDocument.hpp>

namespace lintel::addin {

// Builds (update = false, from settingsText) or rebuilds (update = true, from the settings
// stored for updateSheet) a report; returns the status line. Throws lintel::InputError.
std::string buildReport(const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
                        const std::string& settingsText, bool update, const std::string& updateSheet);

// The settings text stored in the document for a report sheet, or "".
std::string loadReportSettings(const com::sun::star::uno::Reference<com::sun::star::sheet::XSpreadsheetDocument>& doc,
                               const std::string& sheet);

}  // namespace lintel::addin
