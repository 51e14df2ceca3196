// org.lintel.ReportBuilder: builds or updates a report sheet from report settings. Callable
// from the sidebar panel, from a macro or from a script as a com.sun.star.task.XJob:
//   execute([Document=<spreadsheet model>, Settings=<settings text>, Mode="build"|"update",
//            Sheet=<report sheet for update>, StatusIndicator=<optional progress>])
//     -> status text ("Lintel: ..." on failure)
// The layout itself is planned without UNO (report/report_plan.cpp); this file reads the
// sales table, applies the plan, makes the charts and keeps the settings in the document.
#include "report_builder.hpp"
#include "locale_facts.hpp"

#include <cppuhelper/implbase2.hxx>
#include <cppuhelper/supportsservice.hxx>

#include <com/sun/star/awt/FontWeight.hpp>
#include <com/sun/star/awt/Point.hpp>
#include <com/sun/star/awt/Rectangle.hpp>
#include <com/sun/star/beans/NamedValue.hpp>
#include <com/sun/star/beans/PropertyAttribute.hpp>
#include <com/sun/star/beans/XPropertyContainer.hpp>
#include <com/sun/star/beans/XPropertySet.hpp>
#include <com/sun/star/chart/XChartDocument.hpp>
#include <com/sun/star/chart/XDiagram.hpp>
#include <com/sun/star/container/XIndexAccess.hpp>
#include <com/sun/star/container/XNamed.hpp>
#include <com/sun/star/document/XDocumentProperties.hpp>
#include <com/sun/star/document/XDocumentPropertiesSupplier.hpp>
#include <com/sun/star/document/XEmbeddedObjectSupplier.hpp>
#include <com/sun/star/document/XUndoManager.hpp>
#include <com/sun/star/document/XUndoManagerSupplier.hpp>
#include <com/sun/star/sheet/CellFlags.hpp>
#include <com/sun/star/sheet/XCellRangeReferrer.hpp>
#include <com/sun/star/sheet/XCellRangesQuery.hpp>
#include <com/sun/star/sheet/XNamedRange.hpp>
#include <com/sun/star/sheet/XNamedRanges.hpp>
#include <com/sun/star/sheet/XSheetCellRanges.hpp>
#include <com/sun/star/sheet/XSheetOperation.hpp>
#include <com/sun/star/table/CellAddress.hpp>
#include <com/sun/star/table/CellContentType.hpp>
#include <com/sun/star/frame/Desktop.hpp>
#include <com/sun/star/frame/XController.hpp>
#include <com/sun/star/frame/XDesktop2.hpp>
#include <com/sun/star/frame/XFrame.hpp>
#include <com/sun/star/frame/XModel.hpp>
#include <com/sun/star/lang/Locale.hpp>
#include <com/sun/star/lang/XMultiServiceFactory.hpp>
#include <com/sun/star/lang/XServiceInfo.hpp>
#include <com/sun/star/sheet/XArrayFormulaRange.hpp>
#include <com/sun/star/sheet/XCalculatable.hpp>
#include <com/sun/star/sheet/XCellRangeAddressable.hpp>
#include <com/sun/star/sheet/XCellRangeData.hpp>
#include <com/sun/star/sheet/XSheetCellCursor.hpp>
#include <com/sun/star/sheet/XSheetCellRange.hpp>
#include <com/sun/star/sheet/XSpreadsheet.hpp>
#include <com/sun/star/sheet/XSpreadsheetDocument.hpp>
#include <com/sun/star/sheet/XSpreadsheetView.hpp>
#include <com/sun/star/sheet/XSpreadsheets.hpp>
#include <com/sun/star/sheet/XPrintAreas.hpp>
#include <com/sun/star/style/XStyleFamiliesSupplier.hpp>
#include <com/sun/star/container/XNameContainer.hpp>
#include <com/sun/star/table/CellRangeAddress.hpp>
#include <com/sun/star/table/XCell.hpp>
#include <com/sun/star/table/XColumnRowRange.hpp>
#include <com/sun/star/table/XCellRange.hpp>
#include <com/sun/star/table/XTableCharts.hpp>
#include <com/sun/star/table/XTableChartsSupplier.hpp>
#include <com/sun/star/task/XJob.hpp>
#include <com/sun/star/task/XStatusIndicator.hpp>
#include <com/sun/star/task/XStatusIndicatorFactory.hpp>
#include <com/sun/star/text/XText.hpp>
#include <com/sun/star/uno/XComponentContext.hpp>
#include <com/sun/star/util/Date.hpp>
#include <com/sun/star/util/XNumberFormats.hpp>
#include <com/sun/star/util/XNumberFormatsSupplier.hpp>

#include <algorithm>
#include <map>
#include <optional>
#include <set>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "periods.hpp"
#include "report_plan.hpp"
#include "text.hpp"
#include "uno_cells.hpp"

namespace css = com::sun::star;
using css::uno::Any;
using css::uno::Reference;
using css::uno::Sequence;
using css::uno::UNO_QUERY;
using css::uno::UNO_QUERY_THROW;

namespace lintel::addin {

namespace {

const char* kPropertyPrefix = "Lintel report: ";

// "Sales.A1:J100" or "$Sales.$A$1:$J$100" or "'My sales'.A1:J100" -> sheet and range.
std::pair<std::string, std::string> splitRange(const std::string& text) {
    std::string t;
    for (char c : text)
        if (c != '$') t += c;
    const auto dot = t.rfind('.');
    if (dot == std::string::npos || dot == 0)
        throw InputError(fmt::format("sales data \"{}\" must name a sheet and a range, e.g. Sales.A1:J5000", text));
    std::string sheet = t.substr(0, dot);
    if (sheet.size() >= 2 && sheet.front() == '\'' && sheet.back() == '\'') sheet = sheet.substr(1, sheet.size() - 2);
    return {sheet, t.substr(dot + 1)};
}

class Applier {
public:
    explicit Applier(const Reference<css::sheet::XSpreadsheetDocument>& doc) : doc_(doc) {}

    sal_Int32 formatKey(const std::string& code) {
        auto it = keys_.find(code);
        if (it != keys_.end()) return it->second;
        return keys_[code] = numberFormatKey(doc_, code);
    }

    void apply(const Reference<css::sheet::XSpreadsheet>& sheet, const report::CellWrite& w) {
        using Kind = report::CellWrite::Kind;
        Reference<css::table::XCellRange> range =
            sheet->getCellRangeByPosition(w.col, w.row, w.col + w.cols - 1, w.row + w.rows - 1);
        switch (w.kind) {
            case Kind::Text: {
                Reference<css::text::XText> text(range->getCellByPosition(0, 0), UNO_QUERY_THROW);
                text->setString(ustr(w.value));
                break;
            }
            case Kind::Number: range->getCellByPosition(0, 0)->setValue(w.number); break;
            case Kind::Formula: range->getCellByPosition(0, 0)->setFormula(ustr(w.value)); break;
            case Kind::ArrayFormula: {
                Reference<css::sheet::XArrayFormulaRange> af(range, UNO_QUERY_THROW);
                af->setArrayFormula(ustr(w.value));
                break;
            }
            case Kind::Format: break;
        }
        Reference<css::beans::XPropertySet> props(range, UNO_QUERY_THROW);
        if (!w.format.empty()) props->setPropertyValue("NumberFormat", Any(formatKey(w.format)));
        if (w.bold) props->setPropertyValue("CharWeight", Any(css::awt::FontWeight::BOLD));
        if (w.charHeight > 0) props->setPropertyValue("CharHeight", Any(static_cast<float>(w.charHeight)));
    }

    // Chart object names are unique in the whole document: "Lintel_r2_levels".
    std::string chart(const Reference<css::sheet::XSpreadsheet>& sheet, sal_Int16 sheetIndex,
                      const report::ChartSpec& c, const std::string& reportId) {
        Reference<css::table::XTableChartsSupplier> tcs(sheet, UNO_QUERY_THROW);
        Reference<css::table::XTableCharts> charts = tcs->getCharts();
        const OUString name = ustr(fmt::format("Lintel_{}_{}", reportId, c.name));
        if (charts->hasByName(name)) charts->removeByName(name);
        Reference<css::beans::XPropertySet> anchor(sheet->getCellByPosition(c.anchorCol, c.anchorRow), UNO_QUERY_THROW);
        css::awt::Point pos;
        anchor->getPropertyValue("Position") >>= pos;
        css::awt::Rectangle rect(pos.X, pos.Y, c.widthMm * 100, c.heightMm * 100);
        css::table::CellRangeAddress addr(sheetIndex, c.col, c.row, c.col + c.cols - 1, c.row + c.rows - 1);
        Sequence<css::table::CellRangeAddress> ranges(1);
        ranges.getArray()[0] = addr;
        charts->addNewByName(name, rect, ranges, true, true);
        Reference<css::document::XEmbeddedObjectSupplier> eos(charts->getByName(name), UNO_QUERY_THROW);
        Reference<css::chart::XChartDocument> chart(eos->getEmbeddedObject(), UNO_QUERY_THROW);
        Reference<css::lang::XMultiServiceFactory> factory(chart, UNO_QUERY_THROW);
        const char* kind = c.type == report::ChartSpec::Type::Bar ? "com.sun.star.chart.BarDiagram"
                                                                  : "com.sun.star.chart.LineDiagram";
        chart->setDiagram(Reference<css::chart::XDiagram>(factory->createInstance(OUString::createFromAscii(kind)), UNO_QUERY_THROW));
        Reference<css::beans::XPropertySet> cp(chart, UNO_QUERY_THROW);
        cp->setPropertyValue("HasMainTitle", Any(true));
        Reference<css::beans::XPropertySet> title(chart->getTitle(), UNO_QUERY_THROW);
        title->setPropertyValue("String", Any(ustr(c.title)));
        title->setPropertyValue("CharHeight", Any(static_cast<float>(11)));
        // A legend names the methods; a chart of one series needs none.
        cp->setPropertyValue("HasLegend", Any(c.cols > 2 || (c.type == report::ChartSpec::Type::Line && c.cols > 1)));
        return utf8(name);
    }

private:
    Reference<css::sheet::XSpreadsheetDocument> doc_;
    std::map<std::string, sal_Int32> keys_;
};

}  // namespace

double documentDateOffset(const Reference<css::sheet::XSpreadsheetDocument>& doc) {
    try {
        Reference<css::beans::XPropertySet> props(doc, UNO_QUERY);
        css::util::Date d;
        if (props.is() && (props->getPropertyValue("NullDate") >>= d))
            return serialFromCivil({d.Year, d.Month, d.Day});
    } catch (const css::uno::Exception&) {
    }
    return 0.0;  // the standard null date 1899-12-30
}

sal_Int32 numberFormatKey(const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& code) {
    Reference<css::util::XNumberFormatsSupplier> nfs(doc, UNO_QUERY_THROW);
    Reference<css::util::XNumberFormats> formats = nfs->getNumberFormats();
    // Format codes are written in English (YYYY-MM-DD, 0.0): read them as en-US whatever the
    // office's language, where the keywords differ (e.g. JJJJ in German).
    const css::lang::Locale loc("en", "US", "");
    sal_Int32 k = formats->queryKey(ustr(code), loc, false);
    if (k == -1) k = formats->addNew(ustr(code), loc);
    return k;
}

report::SheetData readSalesTable(const Reference<css::sheet::XSpreadsheetDocument>& doc,
                                 const std::string& dataRange, bool growToRegion, std::string& usedRange) {
    const auto [sheetName, rangeText] = splitRange(dataRange);
    Reference<css::sheet::XSpreadsheets> sheets = doc->getSheets();
    if (!sheets->hasByName(ustr(sheetName)))
        throw InputError(fmt::format("there is no sheet \"{}\" for the sales data", sheetName));
    Reference<css::sheet::XSpreadsheet> sheet(sheets->getByName(ustr(sheetName)), UNO_QUERY_THROW);
    Reference<css::table::XCellRange> range;
    try {
        range = sheet->getCellRangeByName(ustr(rangeText));
    } catch (const css::uno::RuntimeException&) {
        throw InputError(fmt::format("\"{}\" is not a cell range", rangeText));
    }
    Reference<css::sheet::XCellRangeAddressable> ra(range, UNO_QUERY_THROW);
    css::table::CellRangeAddress a = ra->getRangeAddress();
    if (growToRegion) {
        // New sales pasted below (or columns added): take the region around the header.
        Reference<css::sheet::XSheetCellCursor> cursor =
            sheet->createCursorByRange(Reference<css::sheet::XSheetCellRange>(
                sheet->getCellRangeByPosition(a.StartColumn, a.StartRow, a.StartColumn, a.StartRow), UNO_QUERY_THROW));
        cursor->collapseToCurrentRegion();
        Reference<css::sheet::XCellRangeAddressable> ca(cursor, UNO_QUERY_THROW);
        const css::table::CellRangeAddress r = ca->getRangeAddress();
        a.EndRow = std::max(a.EndRow, r.EndRow);
        a.EndColumn = std::max(a.EndColumn, r.EndColumn);
        range = sheet->getCellRangeByPosition(a.StartColumn, a.StartRow, a.EndColumn, a.EndRow);
    }
    Reference<css::sheet::XCellRangeData> data(range, UNO_QUERY_THROW);
    Arg cells = toArg(data->getDataArray());
    if (!cells) throw InputError("the sales table could not be read");
    report::SheetData d;
    d.dateOffset = documentDateOffset(doc);
    const CallContext facts = documentContext(Reference<css::beans::XPropertySet>(doc, UNO_QUERY));
    d.dateOrder = facts.dateOrder;
    d.numbers = facts.numbers;
    d.sheet = sheetName;
    d.firstRow = a.StartRow;
    d.firstCol = a.StartColumn;
    d.cells = std::move(*cells);
    usedRange = sheetName + "." + report::columnName(a.StartColumn) + std::to_string(a.StartRow + 1) + ":" +
                report::columnName(a.EndColumn) + std::to_string(a.EndRow + 1);
    return d;
}

void storeDocumentText(const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& key,
                       const std::string& text) {
    Reference<css::document::XDocumentPropertiesSupplier> dps(doc, UNO_QUERY_THROW);
    Reference<css::beans::XPropertyContainer> udp = dps->getDocumentProperties()->getUserDefinedProperties();
    Reference<css::beans::XPropertySet> ps(udp, UNO_QUERY_THROW);
    const OUString name = ustr(key);
    if (ps->getPropertySetInfo()->hasPropertyByName(name)) ps->setPropertyValue(name, Any(ustr(text)));
    else udp->addProperty(name, css::beans::PropertyAttribute::REMOVABLE, Any(ustr(text)));
}

namespace {

// The sheet a build writes to. Lintel never deletes or overwrites a sheet it did not make: a
// sheet is a Lintel report when the document keeps report settings for it. Update rebuilds
// its own report sheet; Build rebuilds a report sheet of that name only when it is the same
// report (same sales table and segment), and otherwise takes a free name "Report X (2)". A
// sheet named explicitly (sheet=) that is not a Lintel report is refused.
std::string reportSheetName(const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& wanted,
                            report::ReportSettings& settings, bool update) {
    Reference<css::sheet::XSpreadsheets> sheets = doc->getSheets();
    if (update) return wanted;
    // The same report: settings stored for the sheet with the same sales sheet and segment.
    const auto sameReport = [&](const std::string& name) -> bool {
        const std::string stored = loadReportSettings(doc, name);
        if (stored.empty()) return false;
        const report::ReportSettings old = report::ReportSettings::parse(stored);
        const auto dataSheet = [](const std::string& range) { return range.substr(0, range.rfind('.')); };
        if (old.segmentText() != settings.segmentText() || dataSheet(old.dataRange) != dataSheet(settings.dataRange))
            return false;
        settings.reportId = old.reportId;
        return true;
    };
    for (int k = 1; k < 1000; ++k) {
        std::string candidate = wanted;
        if (k > 1) {
            const std::string suffix = fmt::format(" ({})", k);
            if (candidate.size() + suffix.size() > 31) candidate.resize(31 - suffix.size());
            candidate = addin::trim(candidate) + suffix;
        }
        if (!sheets->hasByName(ustr(candidate)) || sameReport(candidate)) return candidate;
        if (k == 1 && !settings.sheetName.empty() && loadReportSettings(doc, candidate).empty())
            throw InputError(fmt::format(
                "the sheet \"{}\" exists and is not a Lintel report; Lintel never replaces a sheet it "
                "did not make: choose another sheet name",
                candidate));
    }
    throw InputError(fmt::format("no free sheet name for the report \"{}\"", wanted));
}

// The smallest "r<n>" no report of the document uses.
std::string freeReportId(const Reference<css::sheet::XSpreadsheetDocument>& doc) {
    Reference<css::document::XDocumentPropertiesSupplier> dps(doc, UNO_QUERY_THROW);
    Reference<css::beans::XPropertySet> ps(dps->getDocumentProperties()->getUserDefinedProperties(), UNO_QUERY_THROW);
    std::set<std::string> used;
    for (const auto& p : ps->getPropertySetInfo()->getProperties()) {
        const std::string name = utf8(p.Name);
        if (name.rfind(kPropertyPrefix, 0) != 0) continue;
        OUString v;
        ps->getPropertyValue(p.Name) >>= v;
        try {
            used.insert(report::ReportSettings::parse(utf8(v)).reportId);
        } catch (const InputError&) {
        }
    }
    for (int n = 1;; ++n) {
        const std::string id = fmt::format("r{}", n);
        if (!used.count(id)) return id;
    }
}

// A page style of our own for report sheets: landscape, one page wide; the print area is the
// report's top part and its tables.
void setUpPage(const Reference<css::sheet::XSpreadsheetDocument>& doc,
               const Reference<css::sheet::XSpreadsheet>& sheet, const report::ReportPlan& plan) {
    Reference<css::style::XStyleFamiliesSupplier> sfs(doc, UNO_QUERY_THROW);
    Reference<css::container::XNameContainer> pages(sfs->getStyleFamilies()->getByName("PageStyles"), UNO_QUERY_THROW);
    const OUString name = "Lintel report";
    if (!pages->hasByName(name)) {
        Reference<css::lang::XMultiServiceFactory> f(doc, UNO_QUERY_THROW);
        pages->insertByName(name, Any(f->createInstance("com.sun.star.style.PageStyle")));
    }
    Reference<css::beans::XPropertySet> style(pages->getByName(name), UNO_QUERY_THROW);
    sal_Int32 w = 0, h = 0;
    style->getPropertyValue("Width") >>= w;
    style->getPropertyValue("Height") >>= h;
    if (w < h) {
        style->setPropertyValue("Width", Any(h));
        style->setPropertyValue("Height", Any(w));
    }
    style->setPropertyValue("IsLandscape", Any(true));
    style->setPropertyValue("ScaleToPagesX", Any(static_cast<sal_Int16>(1)));
    style->setPropertyValue("ScaleToPagesY", Any(static_cast<sal_Int16>(0)));
    Reference<css::beans::XPropertySet> sp(sheet, UNO_QUERY_THROW);
    sp->setPropertyValue("PageStyle", Any(name));
    // Wider label and value columns for the settings block.
    Reference<css::table::XColumnRowRange> crr(sheet, UNO_QUERY_THROW);
    Reference<css::container::XIndexAccess> cols(crr->getColumns(), UNO_QUERY_THROW);
    Reference<css::beans::XPropertySet>(cols->getByIndex(0), UNO_QUERY_THROW)->setPropertyValue("Width", Any(static_cast<sal_Int32>(3600)));
    Reference<css::sheet::XPrintAreas> pa(sheet, UNO_QUERY_THROW);
    Reference<css::sheet::XCellRangeAddressable> ra(
        sheet->getCellRangeByPosition(0, 0, plan.printCols - 1, plan.printRows - 1), UNO_QUERY_THROW);
    Sequence<css::table::CellRangeAddress> areas(1);
    areas.getArray()[0] = ra->getRangeAddress();
    pa->setPrintAreas(areas);
}

}  // namespace

std::string loadReportSettings(const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& sheet) {
    return loadDocumentText(doc, kPropertyPrefix + sheet);
}

std::string loadDocumentText(const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& key) {
    Reference<css::document::XDocumentPropertiesSupplier> dps(doc, UNO_QUERY_THROW);
    Reference<css::beans::XPropertySet> ps(dps->getDocumentProperties()->getUserDefinedProperties(), UNO_QUERY_THROW);
    const OUString name = ustr(key);
    if (!ps->getPropertySetInfo()->hasPropertyByName(name)) return {};
    OUString v;
    ps->getPropertyValue(name) >>= v;
    return utf8(v);
}

namespace {

// ---- The report's record and the sheet as the update check reads it -------------------

const char* kRecordSuffix = "_record";

Reference<css::sheet::XNamedRanges> namedRanges(const Reference<css::sheet::XSpreadsheetDocument>& doc) {
    Reference<css::beans::XPropertySet> props(doc, UNO_QUERY_THROW);
    return Reference<css::sheet::XNamedRanges>(props->getPropertyValue("NamedRanges"), UNO_QUERY_THROW);
}

// The cell a named range points to (its top-left), or nullopt.
std::optional<css::table::CellAddress> namedCell(const Reference<css::sheet::XSpreadsheetDocument>& doc,
                                                 const std::string& name) {
    Reference<css::sheet::XNamedRanges> names = namedRanges(doc);
    if (!names->hasByName(ustr(name))) return std::nullopt;
    Reference<css::sheet::XCellRangeReferrer> ref(names->getByName(ustr(name)), UNO_QUERY);
    if (!ref.is()) return std::nullopt;
    try {
        Reference<css::sheet::XCellRangeAddressable> ra(ref->getReferredCells(), UNO_QUERY);
        if (!ra.is()) return std::nullopt;
        const css::table::CellRangeAddress a = ra->getRangeAddress();
        return css::table::CellAddress(a.Sheet, a.StartColumn, a.StartRow);
    } catch (const css::uno::RuntimeException&) {
        return std::nullopt;  // #REF!: the sheet was deleted
    }
}

std::string sheetNameAt(const Reference<css::sheet::XSpreadsheetDocument>& doc, sal_Int16 index) {
    Reference<css::container::XIndexAccess> sheets(doc->getSheets(), UNO_QUERY_THROW);
    return utf8(Reference<css::container::XNamed>(sheets->getByIndex(index), UNO_QUERY_THROW)->getName());
}

// The record of the report on a sheet: found through the named range Lintel_<id>_record
// that points into it.
struct FoundReport {
    report::ReportRecord record;
    css::table::CellAddress cell;
};
std::optional<FoundReport> findReportOnSheet(const Reference<css::sheet::XSpreadsheetDocument>& doc,
                                             const std::string& sheetName) {
    Reference<css::sheet::XNamedRanges> names = namedRanges(doc);
    for (const OUString& n : names->getElementNames()) {
        const std::string name = utf8(n);
        if (name.rfind("Lintel_", 0) != 0 || name.size() < 8 ||
            name.compare(name.size() - std::string(kRecordSuffix).size(), std::string::npos, kRecordSuffix) != 0)
            continue;
        const auto cell = namedCell(doc, name);
        if (!cell || sheetNameAt(doc, cell->Sheet) != sheetName) continue;
        Reference<css::container::XIndexAccess> sheets(doc->getSheets(), UNO_QUERY_THROW);
        Reference<css::sheet::XSpreadsheet> sheet(sheets->getByIndex(cell->Sheet), UNO_QUERY_THROW);
        Reference<css::text::XText> text(sheet->getCellByPosition(cell->Column, cell->Row), UNO_QUERY_THROW);
        return FoundReport{report::ReportRecord::parse(utf8(text->getString())), *cell};
    }
    return std::nullopt;
}

class UnoSheetView : public report::SheetView {
public:
    explicit UnoSheetView(Reference<css::sheet::XSpreadsheet> sheet) : sheet_(std::move(sheet)) {}
    std::vector<std::pair<int, int>> contentCells(const report::Rect& r) override {
        std::vector<std::pair<int, int>> out;
        if (r.isEmpty()) return out;
        Reference<css::sheet::XCellRangesQuery> q(
            sheet_->getCellRangeByPosition(r.col0, r.row0, r.col1, r.row1), UNO_QUERY_THROW);
        const sal_Int16 flags = css::sheet::CellFlags::VALUE | css::sheet::CellFlags::DATETIME |
                                css::sheet::CellFlags::STRING | css::sheet::CellFlags::FORMULA;
        Reference<css::sheet::XSheetCellRanges> found = q->queryContentCells(flags);
        for (const auto& a : found->getRangeAddresses())
            for (sal_Int32 row = a.StartRow; row <= a.EndRow; ++row)
                for (sal_Int32 col = a.StartColumn; col <= a.EndColumn; ++col) out.emplace_back(row, col);
        return out;
    }
    std::string content(int row, int col) override {
        return utf8(sheet_->getCellByPosition(col, row)->getFormula());
    }
    std::string arrayFormula(const report::Rect& r) override {
        Reference<css::sheet::XArrayFormulaRange> af(
            sheet_->getCellRangeByPosition(r.col0, r.row0, r.col1, r.row1), UNO_QUERY_THROW);
        return utf8(af->getArrayFormula());
    }

private:
    Reference<css::sheet::XSpreadsheet> sheet_;
};

// Edit > Undo takes a build or an update back in one step.
class UndoStep {
public:
    UndoStep(const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& title) {
        Reference<css::document::XUndoManagerSupplier> ums(doc, UNO_QUERY);
        if (ums.is()) manager_ = ums->getUndoManager();
        if (manager_.is()) manager_->enterUndoContext(ustr(title));
    }
    ~UndoStep() {
        try {
            if (manager_.is()) manager_->leaveUndoContext();
        } catch (...) {
        }
    }
    UndoStep(const UndoStep&) = delete;
    UndoStep& operator=(const UndoStep&) = delete;

private:
    Reference<css::document::XUndoManager> manager_;
};

// The values of the settings cells the user may edit (base date, band level, frequency).
void readEditedSettings(const Reference<css::sheet::XSpreadsheet>& sheet, const report::ReportRecord& record,
                        double dateOffset, report::ReportSettings& settings) {
    for (const auto& e : record.editable) {
        Reference<css::table::XCell> cell = sheet->getCellByPosition(e.col, e.row);
        const std::string text = utf8(Reference<css::text::XText>(cell, UNO_QUERY_THROW)->getString());
        if (e.setting == "base") {
            if (cell->getType() == css::table::CellContentType_VALUE) settings.baseDate = isoDate(cell->getValue() + dateOffset);
            else if (!trim(text).empty()) settings.baseDate = trim(text);
        } else if (e.setting == "level") {
            const double x = cell->getValue();
            if (cell->getType() == css::table::CellContentType_VALUE && x > 0 && x < 1) settings.level = x;
            else throw InputError(fmt::format("the band level in the settings block must lie between 0 and 1, got \"{}\"", text));
        } else if (e.setting == "freq") {
            const auto f = parseFrequency(trim(text));
            if (!f) throw InputError(fmt::format("the frequency in the settings block must be M, Q or Y, got \"{}\"", text));
            settings.freq = frequencyCode(*f);
        }
    }
}

void clearCells(const Reference<css::sheet::XSpreadsheet>& sheet, const report::Rect& r, sal_Int32 flags) {
    if (r.isEmpty()) return;
    Reference<css::sheet::XSheetOperation> op(sheet->getCellRangeByPosition(r.col0, r.row0, r.col1, r.row1), UNO_QUERY_THROW);
    op->clearContents(flags);
}

// Removes what the old build wrote (its cells, arrays, formats and charts); user cells
// outside its blocks are untouched (and there are none inside: checked before).
void removeOld(const Reference<css::sheet::XSpreadsheet>& sheet, const report::ReportRecord& old) {
    const sal_Int32 all = css::sheet::CellFlags::VALUE | css::sheet::CellFlags::DATETIME |
                          css::sheet::CellFlags::STRING | css::sheet::CellFlags::FORMULA |
                          css::sheet::CellFlags::HARDATTR;
    for (const auto& a : old.arrays) clearCells(sheet, a.rect, all);
    for (const auto& b : old.blocks) clearCells(sheet, b.rect, all);
    Reference<css::table::XTableCharts> charts = Reference<css::table::XTableChartsSupplier>(sheet, UNO_QUERY_THROW)->getCharts();
    for (const auto& c : old.charts)
        if (charts->hasByName(ustr(c))) charts->removeByName(ustr(c));
}

// Named ranges of the report's blocks: Lintel_<id>_<key>; an existing one gets its new
// content, so formulas elsewhere that use it keep working when a table grows.
std::vector<std::string> defineNames(const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& sheetName,
                                     sal_Int16 sheetIndex, const report::ReportPlan& plan, const std::string& id,
                                     const report::ReportRecord* old) {
    Reference<css::sheet::XNamedRanges> names = namedRanges(doc);
    std::vector<std::string> defined;
    auto define = [&](const std::string& name, const report::Rect& r) {
        const std::string content = report::absoluteRange(sheetName, r.row0, r.col0, r.row1, r.col1);
        if (names->hasByName(ustr(name))) {
            Reference<css::sheet::XNamedRange>(names->getByName(ustr(name)), UNO_QUERY_THROW)->setContent(ustr(content));
        } else {
            names->addNewByName(ustr(name), ustr(content), css::table::CellAddress(sheetIndex, 0, 0), 0);
        }
        defined.push_back(name);
    };
    for (const auto& b : plan.blocks)
        if (!b.named.isEmpty()) define(fmt::format("Lintel_{}_{}", id, b.key), b.named);
    define(fmt::format("Lintel_{}{}", id, kRecordSuffix),
           report::Rect{plan.recordRow, plan.recordCol, plan.recordRow, plan.recordCol});
    if (old)
        for (const auto& n : old->names)
            if (std::find(defined.begin(), defined.end(), n) == defined.end() && names->hasByName(ustr(n)))
                names->removeByName(ustr(n));
    return defined;
}

// What was written, read back as Calc keeps it, for the next update's check.
report::ReportRecord makeRecord(const Reference<css::sheet::XSpreadsheet>& sheet, const report::ReportPlan& plan,
                                const report::ReportSettings& settings, std::vector<std::string> charts,
                                std::vector<std::string> names) {
    report::ReportRecord r;
    r.reportId = settings.reportId;
    r.settings = settings.serialize();
    for (const auto& b : plan.blocks) r.blocks.push_back({b.key, b.title, b.rect});
    UnoSheetView view(sheet);
    for (const auto& w : plan.cells) {
        using Kind = report::CellWrite::Kind;
        if (w.kind == Kind::Format) continue;
        if (!w.setting.empty()) {
            r.editable.push_back({w.row, w.col, w.setting});
        } else if (w.kind == Kind::ArrayFormula) {
            const report::Rect rect{w.row, w.col, w.row + w.rows - 1, w.col + w.cols - 1};
            r.arrays.push_back({rect, report::contentHash(view.arrayFormula(rect))});
        } else {
            r.cells.push_back({w.row, w.col, report::contentHash(view.content(w.row, w.col))});
        }
    }
    r.editable.push_back({plan.recordRow, plan.recordCol, "record"});
    r.charts = std::move(charts);
    r.names = std::move(names);
    return r;
}

}  // namespace

std::optional<report::ReportSettings> reportSettingsOnSheet(const Reference<css::sheet::XSpreadsheetDocument>& doc,
                                                          const std::string& sheetName) {
    Reference<css::sheet::XSpreadsheets> sheets = doc->getSheets();
    if (!sheets->hasByName(ustr(sheetName))) return std::nullopt;
    const auto found = findReportOnSheet(doc, sheetName);
    const std::string stored = found ? found->record.settings : loadReportSettings(doc, sheetName);
    if (stored.empty()) return std::nullopt;
    report::ReportSettings s = report::ReportSettings::parse(stored);
    if (found) {
        Reference<css::sheet::XSpreadsheet> sheet(sheets->getByName(ustr(sheetName)), UNO_QUERY_THROW);
        readEditedSettings(sheet, found->record, documentDateOffset(doc), s);
    }
    s.sheetName = sheetName;
    return s;
}

std::string buildReport(const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& settingsText,
                        bool update, const std::string& updateSheet,
                        const Reference<css::task::XStatusIndicator>& givenProgress) {
    const double dateOffset = documentDateOffset(doc);
    Reference<css::sheet::XSpreadsheets> sheets = doc->getSheets();
    report::ReportSettings settings;
    std::optional<FoundReport> found;
    if (update) {
        if (!sheets->hasByName(ustr(updateSheet)))
            throw InputError(fmt::format("there is no sheet \"{}\" to update", updateSheet));
        found = findReportOnSheet(doc, updateSheet);
        const std::string stored = found ? found->record.settings : loadReportSettings(doc, updateSheet);
        if (stored.empty())
            throw InputError(fmt::format("sheet \"{}\" is not a Lintel report (no settings stored for it)", updateSheet));
        if (!settingsText.empty()) {
            // The panel's edits of this report's settings.
            settings = report::ReportSettings::parse(settingsText);
            settings.reportId = report::ReportSettings::parse(stored).reportId;
        } else {
            settings = report::ReportSettings::parse(stored);
            if (found) {
                Reference<css::sheet::XSpreadsheet> sheet(sheets->getByName(ustr(updateSheet)), UNO_QUERY_THROW);
                readEditedSettings(sheet, found->record, dateOffset, settings);
            }
        }
        settings.sheetName = updateSheet;
    } else {
        settings = report::ReportSettings::parse(settingsText);
    }
    if (settings.dataRange.empty()) throw InputError("choose the sales table first");

    Reference<css::frame::XModel> model(doc, UNO_QUERY);
    Reference<css::task::XStatusIndicator> progress = givenProgress;
    try {
        if (!progress.is()) {
            Reference<css::task::XStatusIndicatorFactory> f(model->getCurrentController()->getFrame(), UNO_QUERY);
            if (f.is()) progress = f->createStatusIndicator();
        }
    } catch (...) {
    }
    if (progress.is()) progress->start(update ? "Lintel: updating the report" : "Lintel: building the report", 100);
    // The bar is ended however the build ends (an exception included).
    struct EndProgress {
        Reference<css::task::XStatusIndicator> p;
        ~EndProgress() {
            try {
                if (p.is()) p->end();
            } catch (...) {
            }
        }
    } endProgress{progress};

    // The sales table grows with the data: the region around its header row is read, so rows
    // added below it are taken in.
    std::string usedRange;
    const report::SheetData data = readSalesTable(doc, settings.dataRange, true, usedRange);
    settings.dataRange = usedRange;
    report::ReportPlan plan = report::planReport(settings, data);
    if (progress.is()) progress->setValue(20);

    Reference<css::container::XIndexAccess> byIndex(sheets, UNO_QUERY_THROW);
    const std::string target = reportSheetName(doc, plan.sheetName, settings, update);
    const OUString sheetName = ustr(target);
    if (!update && sheets->hasByName(sheetName)) found = findReportOnSheet(doc, target);  // the same report again
    if (found && !found->record.reportId.empty()) settings.reportId = found->record.reportId;
    if (settings.reportId.empty()) settings.reportId = freeReportId(doc);

    UndoStep undo(doc, update || found ? "Lintel: update report" : "Lintel: build report");
    sal_Int16 position = static_cast<sal_Int16>(byIndex->getCount());
    if (sheets->hasByName(sheetName)) {
        for (sal_Int32 i = 0; i < byIndex->getCount(); ++i) {
            Reference<css::container::XNamed> named(byIndex->getByIndex(i), UNO_QUERY);
            if (named.is() && named->getName() == sheetName) position = static_cast<sal_Int16>(i);
        }
    }
    Reference<css::sheet::XSpreadsheet> sheet;
    if (found) {
        // In place: nothing the user typed may be in the way.
        sheet.set(sheets->getByName(sheetName), UNO_QUERY_THROW);
        std::vector<report::ReportRecord::Block> next;
        for (const auto& b : plan.blocks) next.push_back({b.key, b.title, b.rect});
        UnoSheetView view(sheet);
        const std::string conflict = report::findUserCell(found->record, next, view, target);
        if (!conflict.empty()) throw InputError(conflict);
        removeOld(sheet, found->record);
    } else {
        if (sheets->hasByName(sheetName)) {
            // A report sheet of an earlier version, without a record: made by Lintel, rebuilt.
            sheets->removeByName(sheetName);
        }
        sheets->insertNewByName(sheetName, position);
        sheet.set(sheets->getByName(sheetName), UNO_QUERY_THROW);
    }

    Applier applier(doc);
    const std::size_t n = plan.cells.size();
    for (std::size_t i = 0; i < n; ++i) {
        applier.apply(sheet, plan.cells[i]);
        if (progress.is() && i % 200 == 0) progress->setValue(20 + static_cast<sal_Int32>(60 * i / n));
    }
    setUpPage(doc, sheet, plan);
    Reference<css::sheet::XCalculatable> calc(doc, UNO_QUERY);
    if (calc.is()) calc->calculateAll();
    std::vector<std::string> chartNames;
    for (const auto& c : plan.charts) chartNames.push_back(applier.chart(sheet, position, c, settings.reportId));
    const std::vector<std::string> names =
        defineNames(doc, target, position, plan, settings.reportId, found ? &found->record : nullptr);
    if (progress.is()) progress->setValue(95);

    // The record, in a hidden cell of the sheet itself (so an undo restores it with the sheet).
    settings.sheetName = target;
    const report::ReportRecord record = makeRecord(sheet, plan, settings, chartNames, names);
    Reference<css::text::XText>(sheet->getCellByPosition(plan.recordCol, plan.recordRow), UNO_QUERY_THROW)
        ->setString(ustr(record.serialize()));
    {
        Reference<css::table::XColumnRowRange> crr(sheet, UNO_QUERY_THROW);
        Reference<css::container::XIndexAccess> rows(crr->getRows(), UNO_QUERY_THROW);
        Reference<css::beans::XPropertySet>(rows->getByIndex(plan.recordRow), UNO_QUERY_THROW)
            ->setPropertyValue("IsVisible", Any(false));
    }
    storeDocumentText(doc, kPropertyPrefix + target, settings.serialize());

    // A method that failed says so here and in its table.
    std::string failures;
    int failed = 0;
    for (const auto& [label, cell] : plan.methodCells) {
        Reference<css::table::XCell> c = sheet->getCellByPosition(cell.second, cell.first);
        const std::string t = utf8(Reference<css::text::XText>(c, UNO_QUERY_THROW)->getString());
        if (t.rfind("Lintel:", 0) == 0) {
            ++failed;
            failures += fmt::format("{}{}: {}", failures.empty() ? "" : "; ", label, t.substr(8));
        }
    }
    std::string status = plan.status;
    if (status.rfind(plan.sheetName, 0) == 0) status = target + status.substr(plan.sheetName.size());
    if (failed) status += fmt::format("; {} method{} failed: {}", failed, failed > 1 ? "s" : "", failures);
    try {
        Reference<css::sheet::XSpreadsheetView> view(model->getCurrentController(), UNO_QUERY);
        if (view.is()) view->setActiveSheet(sheet);
    } catch (...) {
    }
    return status;
}

namespace {

class ReportBuilder : public cppu::WeakImplHelper2<css::task::XJob, css::lang::XServiceInfo> {
public:
    explicit ReportBuilder(const Reference<css::uno::XComponentContext>& ctx) : ctx_(ctx) {}

    Any SAL_CALL execute(const Sequence<css::beans::NamedValue>& args) override {
        try {
            Reference<css::sheet::XSpreadsheetDocument> doc;
            std::string settings, mode = "build", sheet;
            Reference<css::task::XStatusIndicator> progress;
            for (const auto& a : args) {
                if (a.Name == "Document") a.Value >>= doc;
                else if (a.Name == "StatusIndicator") a.Value >>= progress;
                else if (a.Name == "Settings") { OUString s; a.Value >>= s; settings = utf8(s); }
                else if (a.Name == "Mode") { OUString s; a.Value >>= s; mode = utf8(s); }
                else if (a.Name == "Sheet") { OUString s; a.Value >>= s; sheet = utf8(s); }
            }
            if (!doc.is()) {
                Reference<css::frame::XDesktop2> desktop = css::frame::Desktop::create(ctx_);
                doc.set(desktop->getCurrentComponent(), UNO_QUERY);
            }
            if (!doc.is()) return Any(OUString("Lintel: no spreadsheet document to build the report in"));
            if (mode != "build" && mode != "update")
                return Any(OUString("Lintel: Mode must be \"build\" or \"update\""));
            return Any(ustr(buildReport(doc, settings, mode == "update", sheet, progress)));
        } catch (const InputError& e) {
            return Any(ustr(std::string("Lintel: ") + e.what()));
        } catch (const css::uno::Exception& e) {
            return Any("Lintel: the report could not be built: " + e.Message);
        } catch (const std::exception& e) {
            return Any(ustr(std::string("Lintel: internal fault while building the report (a bug in "
                                        "Lintel; please report it): ") + e.what()));
        } catch (...) {
            return Any(OUString("Lintel: internal fault while building the report (a bug in Lintel; please report it)"));
        }
    }

    OUString SAL_CALL getImplementationName() override { return "org.lintel.ReportBuilder"; }
    sal_Bool SAL_CALL supportsService(const OUString& name) override { return cppu::supportsService(this, name); }
    Sequence<OUString> SAL_CALL getSupportedServiceNames() override {
        Sequence<OUString> s(1);
        s.getArray()[0] = "org.lintel.ReportBuilder";
        return s;
    }

private:
    Reference<css::uno::XComponentContext> ctx_;
};

}  // namespace

}  // namespace lintel::addin

extern "C" SAL_DLLPUBLIC_EXPORT css::uno::XInterface* org_lintel_ReportBuilder_get_implementation(
    css::uno::XComponentContext* ctx, css::uno::Sequence<css::uno::Any> const&) {
    lintel::addin::rememberOfficeContext(ctx);
    return cppu::acquire(new lintel::addin::ReportBuilder(ctx));
}
