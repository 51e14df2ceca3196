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
#include <com/sun/star/chart/ChartAxisLabelPosition.hpp>
#include <com/sun/star/chart/ChartAxisType.hpp>
#include <com/sun/star/chart/ChartLegendPosition.hpp>
#include <com/sun/star/chart/ChartSymbolType.hpp>
#include <com/sun/star/chart/TimeIncrement.hpp>
#include <com/sun/star/chart/TimeInterval.hpp>
#include <com/sun/star/chart/TimeUnit.hpp>
#include <com/sun/star/chart/X3DDisplay.hpp>
#include <com/sun/star/chart/XAxisXSupplier.hpp>
#include <com/sun/star/chart/XAxisYSupplier.hpp>
#include <com/sun/star/drawing/DashStyle.hpp>
#include <com/sun/star/drawing/FillStyle.hpp>
#include <com/sun/star/drawing/LineDash.hpp>
#include <com/sun/star/drawing/LineStyle.hpp>
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
#include <com/sun/star/table/BorderLine2.hpp>
#include <com/sun/star/table/CellHoriJustify.hpp>
#include <com/sun/star/table/CellAddress.hpp>
#include <com/sun/star/util/XMergeable.hpp>
#include <com/sun/star/table/CellContentType.hpp>
#include <com/sun/star/frame/Desktop.hpp>
#include <com/sun/star/frame/XController.hpp>
#include <com/sun/star/frame/XDesktop2.hpp>
#include <com/sun/star/frame/XStorable.hpp>
#include <com/sun/star/sheet/XSpreadsheets2.hpp>
#include <com/sun/star/sheet/XSheetPageBreak.hpp>
#include <com/sun/star/sheet/XUsedAreaCursor.hpp>
#include <com/sun/star/util/XCloseable.hpp>
#include <com/sun/star/util/Date.hpp>
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
#include <com/sun/star/chart2/XChartDocument.hpp>
#include <com/sun/star/chart2/XChartTypeContainer.hpp>
#include <com/sun/star/chart2/XCoordinateSystemContainer.hpp>
#include <com/sun/star/chart2/XDataSeriesContainer.hpp>
#include <com/sun/star/util/XNumberFormats.hpp>
#include <com/sun/star/util/XNumberFormatsSupplier.hpp>

#include <algorithm>
#include <cmath>
#include <map>
#include <optional>
#include <set>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "periods.hpp"
#include "inputs.hpp"
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
        if (w.wrap) props->setPropertyValue("IsTextWrapped", Any(true));
        if (w.center) props->setPropertyValue("HoriJustify", Any(css::table::CellHoriJustify_CENTER));
        if (w.shrink) props->setPropertyValue("ShrinkToFit", Any(true));
        if (w.rule) {
            css::table::BorderLine2 line;
            line.Color = 0x808080;
            line.OuterLineWidth = 18;
            line.LineWidth = 18;
            props->setPropertyValue("BottomBorder2", Any(line));
        }
        if (w.mergeCols > 1) {
            Reference<css::util::XMergeable> m(sheet->getCellRangeByPosition(w.col, w.row, w.col + w.mergeCols - 1, w.row),
                                               UNO_QUERY);
            if (m.is()) m->merge(true);
        }
        if (w.charHeight > 0) props->setPropertyValue("CharHeight", Any(static_cast<float>(w.charHeight)));
    }

    // Chart object names are unique in the whole document: "Lintel_r2_quoted". The look is
    // our own: white plot, light grid, a palette that stays apart in grey and for the common
    // colour-vision deficiencies (Okabe & Ito's set) with a line pattern per series, period
    // labels below the plot at years (monthly) or quarter starts, compact legends below.
    std::string chart(const Reference<css::sheet::XSpreadsheet>& sheet, sal_Int16 sheetIndex,
                      const report::ChartSpec& c, const std::string& reportId,
                      std::pair<double, double> scale) {
        Reference<css::table::XTableChartsSupplier> tcs(sheet, UNO_QUERY_THROW);
        Reference<css::table::XTableCharts> charts = tcs->getCharts();
        const OUString name = ustr(fmt::format("Lintel_{}_{}", reportId, c.name));
        if (charts->hasByName(name)) charts->removeByName(name);
        Reference<css::beans::XPropertySet> anchor(sheet->getCellByPosition(c.anchorCol, c.anchorRow), UNO_QUERY_THROW);
        css::awt::Point pos;
        anchor->getPropertyValue("Position") >>= pos;
        css::awt::Rectangle rect(pos.X + c.offsetMm * 100, pos.Y, c.widthMm * 100, c.heightMm * 100);
        Sequence<css::table::CellRangeAddress> ranges(static_cast<sal_Int32>(c.ranges.size()));
        for (std::size_t i = 0; i < c.ranges.size(); ++i) {
            const report::Rect& r = c.ranges[i];
            ranges.getArray()[i] = css::table::CellRangeAddress(sheetIndex, r.col0, r.row0, r.col1, r.row1);
        }
        charts->addNewByName(name, rect, ranges, true, true);
        Reference<css::document::XEmbeddedObjectSupplier> eos(charts->getByName(name), UNO_QUERY_THROW);
        Reference<css::chart::XChartDocument> chart(eos->getEmbeddedObject(), UNO_QUERY_THROW);
        Reference<css::lang::XMultiServiceFactory> factory(chart, UNO_QUERY_THROW);
        const bool bar = c.type == report::ChartSpec::Type::Bar;
        chart->setDiagram(Reference<css::chart::XDiagram>(
            factory->createInstance(bar ? OUString("com.sun.star.chart.BarDiagram") : OUString("com.sun.star.chart.LineDiagram")),
            UNO_QUERY_THROW));
        Reference<css::chart::XDiagram> diagram = chart->getDiagram();
        Reference<css::beans::XPropertySet> cp(chart, UNO_QUERY_THROW);
        const float small = c.small ? 7.f : 8.f;
        cp->setPropertyValue("HasMainTitle", Any(true));
        Reference<css::beans::XPropertySet> title(chart->getTitle(), UNO_QUERY_THROW);
        title->setPropertyValue("String", Any(ustr(c.title)));
        title->setPropertyValue("CharHeight", Any(c.small ? 8.f : 10.f));
        title->setPropertyValue("CharWeight", Any(css::awt::FontWeight::BOLD));
        int series = 0;
        for (const auto& r : c.ranges) series += r.col1 - r.col0 + 1;
        series -= 1;  // the first column holds the periods
        const bool legend = c.legend && series > 1;
        cp->setPropertyValue("HasLegend", Any(legend));
        if (legend) {
            Reference<css::beans::XPropertySet> lg(chart->getLegend(), UNO_QUERY_THROW);
            lg->setPropertyValue("Alignment", Any(css::chart::ChartLegendPosition_BOTTOM));
            lg->setPropertyValue("CharHeight", Any(small));
            lg->setPropertyValue("LineStyle", Any(css::drawing::LineStyle_NONE));
            lg->setPropertyValue("FillStyle", Any(css::drawing::FillStyle_NONE));
        }
        Reference<css::beans::XPropertySet> dp(diagram, UNO_QUERY_THROW);
        try {
            Reference<css::chart::X3DDisplay> walls(diagram, UNO_QUERY_THROW);
            Reference<css::beans::XPropertySet> wall(walls->getWall(), UNO_QUERY_THROW);
            wall->setPropertyValue("FillStyle", Any(css::drawing::FillStyle_NONE));
            wall->setPropertyValue("LineColor", Any(static_cast<sal_Int32>(0xBBBBBB)));
        } catch (const css::uno::Exception&) {
        }
        // The period axis.
        Reference<css::chart::XAxisXSupplier> xs(diagram, UNO_QUERY_THROW);
        Reference<css::beans::XPropertySet> x = xs->getXAxis();
        x->setPropertyValue("CharHeight", Any(small));
        x->setPropertyValue("LabelPosition", Any(css::chart::ChartAxisLabelPosition_OUTSIDE_START));
        x->setPropertyValue("TextCanOverlap", Any(false));
        {
            const bool years = c.freq == "Y" || (c.freq == "M" && c.periods > 30) || (c.freq == "Q" && c.periods > 16);
            // Labels at whole years (or quarter starts on a short quarterly axis), fewer on a
            // narrow chart: about one label per 22 mm.
            const int spanYears = std::max(1, c.periods / (c.freq == "M" ? 12 : c.freq == "Q" ? 4 : 1));
            const int room = std::max(2, c.widthMm / 22);
            const int step = years ? std::max(1, (spanYears + room - 1) / room) : 3;
            x->setPropertyValue("AxisType", Any(css::chart::ChartAxisType::DATE));
            css::chart::TimeInterval major(step, years ? css::chart::TimeUnit::YEAR : css::chart::TimeUnit::MONTH);
            css::chart::TimeIncrement inc;
            inc.MajorTimeInterval <<= major;
            x->setPropertyValue("TimeIncrement", Any(inc));
            x->setPropertyValue("NumberFormat", Any(formatKey(years ? "YYYY" : "YYYY-MM")));
            x->setPropertyValue("LinkNumberFormatToSource", Any(false));
            x->setPropertyValue("TextRotation", Any(static_cast<sal_Int32>(0)));
        }
        // The value axis.
        Reference<css::chart::XAxisYSupplier> ys(diagram, UNO_QUERY_THROW);
        Reference<css::beans::XPropertySet> y = ys->getYAxis();
        y->setPropertyValue("CharHeight", Any(small));
        y->setPropertyValue("NumberFormat", Any(formatKey(c.money ? "#,##0" : "0")));
        y->setPropertyValue("LinkNumberFormatToSource", Any(false));
        if (scale.first < scale.second) {
            y->setPropertyValue("AutoMin", Any(false));
            y->setPropertyValue("AutoMax", Any(false));
            y->setPropertyValue("Min", Any(scale.first));
            y->setPropertyValue("Max", Any(scale.second));
        }
        if (!c.yTitle.empty() && !c.small) {
            dp->setPropertyValue("HasYAxisTitle", Any(true));
            Reference<css::beans::XPropertySet> yt(ys->getYAxisTitle(), UNO_QUERY_THROW);
            yt->setPropertyValue("String", Any(ustr(c.yTitle)));
            yt->setPropertyValue("CharHeight", Any(small));
        }
        dp->setPropertyValue("HasYAxisGrid", Any(true));
        Reference<css::beans::XPropertySet>(ys->getYMainGrid(), UNO_QUERY_THROW)
            ->setPropertyValue("LineColor", Any(static_cast<sal_Int32>(0xE4E4E4)));
        // Series: colour and pattern; a band as thin dashed lines in a lighter shade.
        // Through the chart2 model: the old API's row properties do not reach a line's style.
        Reference<css::chart2::XChartDocument> chart2(chart, UNO_QUERY_THROW);
        Reference<css::chart2::XCoordinateSystemContainer> csc(chart2->getFirstDiagram(), UNO_QUERY_THROW);
        int i = 0;
        for (const auto& cs : csc->getCoordinateSystems()) {
            Reference<css::chart2::XChartTypeContainer> ctc(cs, UNO_QUERY_THROW);
            for (const auto& ct : ctc->getChartTypes()) {
                Reference<css::chart2::XDataSeriesContainer> dsc(ct, UNO_QUERY_THROW);
                for (const auto& s : dsc->getDataSeries()) {
                    Reference<css::beans::XPropertySet> sp(s, UNO_QUERY_THROW);
                    styleSeries(sp, i++, bar, c.bandSeries, c.emphasis);
                }
            }
        }
        return utf8(name);
    }

    static void styleSeries(const Reference<css::beans::XPropertySet>& sp, int i, bool bar, const std::vector<int>& bands,
                            int emphasis) {
        static const sal_Int32 palette[] = {0x0072B2, 0xD55E00, 0x009E73, 0xCC79A7, 0xE69F00, 0x56B4E9, 0x000000};
        const bool band = std::find(bands.begin(), bands.end(), i) != bands.end();
        if (bar) {
            sp->setPropertyValue("Color", Any(static_cast<sal_Int32>(0x6D9CC2)));
            sp->setPropertyValue("BorderStyle", Any(css::drawing::LineStyle_NONE));
            return;
        }
        sp->setPropertyValue("Color", Any(band ? static_cast<sal_Int32>(0x7FB8D8) : palette[i % 7]));
        sp->setPropertyValue("LineWidth", Any(static_cast<sal_Int32>(band ? 18 : (i == emphasis ? 55 : 25))));
        const int pattern = band ? 1 : i % 4;  // solid, dash, dot, dash-dot
        if (pattern == 0) {
            sp->setPropertyValue("LineStyle", Any(css::drawing::LineStyle_SOLID));
        } else {
            css::drawing::LineDash dash;
            dash.Style = css::drawing::DashStyle_RECTRELATIVE;
            dash.Dots = static_cast<sal_Int16>(pattern == 1 ? 0 : 1);
            dash.DotLen = 100;
            dash.Dashes = static_cast<sal_Int16>(pattern == 2 ? 0 : 1);
            dash.DashLen = 400;
            dash.Distance = 200;
            sp->setPropertyValue("LineStyle", Any(css::drawing::LineStyle_DASH));
            sp->setPropertyValue("LineDash", Any(dash));
        }
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
    Range cells = cellsOf(data->getDataArray());
    report::SheetData d;
    d.dateOffset = documentDateOffset(doc);
    const CallContext facts = documentContext(Reference<css::beans::XPropertySet>(doc, UNO_QUERY));
    d.dateOrder = facts.dateOrder;
    d.numbers = facts.numbers;
    d.sheet = sheetName;
    d.firstRow = a.StartRow;
    d.firstCol = a.StartColumn;
    d.cells = std::move(cells);
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

// The number format the sheet shows its prices in (its currency), for the report's money
// cells; "#,##0" when the prices are in the standard format.
std::string priceFormat(const Reference<css::sheet::XSpreadsheetDocument>& doc, const report::SheetData& data,
                        const std::string& priceColumn) {
    try {
        for (std::size_t c = 0; c < data.cells.cols; ++c) {
            if (addin::cellKey(data.cells.at(0, c)) != priceColumn || data.cells.rows < 2) continue;
            Reference<css::container::XIndexAccess> sheets(doc->getSheets(), UNO_QUERY_THROW);
            Reference<css::sheet::XSpreadsheets> byName = doc->getSheets();
            Reference<css::sheet::XSpreadsheet> sheet(byName->getByName(ustr(data.sheet)), UNO_QUERY_THROW);
            Reference<css::beans::XPropertySet> cell(
                sheet->getCellByPosition(data.firstCol + static_cast<sal_Int32>(c), data.firstRow + 1), UNO_QUERY_THROW);
            sal_Int32 key = 0;
            cell->getPropertyValue("NumberFormat") >>= key;
            Reference<css::util::XNumberFormatsSupplier> nfs(doc, UNO_QUERY_THROW);
            Reference<css::beans::XPropertySet> f = nfs->getNumberFormats()->getByKey(key);
            OUString code;
            f->getPropertyValue("FormatString") >>= code;
            const std::string s = utf8(code);
            if (s.empty() || s == "General" || s == "Standard" || s == "0") return "#,##0";
            return s;
        }
    } catch (const css::uno::Exception&) {
    }
    return "#,##0";
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
    // Fits A4 and Letter landscape: one page wide, pages as the report breaks them.
    style->setPropertyValue("ScaleToPagesX", Any(static_cast<sal_Int16>(1)));
    style->setPropertyValue("ScaleToPagesY", Any(static_cast<sal_Int16>(0)));
    for (const char* margin : {"LeftMargin", "RightMargin", "TopMargin", "BottomMargin"})
        style->setPropertyValue(OUString::createFromAscii(margin), Any(static_cast<sal_Int32>(1000)));
    style->setPropertyValue("HeaderIsOn", Any(false));
    style->setPropertyValue("FooterIsOn", Any(true));
    style->setPropertyValue("CenterHorizontally", Any(true));
    Reference<css::beans::XPropertySet> sp(sheet, UNO_QUERY_THROW);
    sp->setPropertyValue("PageStyle", Any(name));
    // The printed page's columns and the rows that need more height.
    Reference<css::table::XColumnRowRange> crr(sheet, UNO_QUERY_THROW);
    Reference<css::container::XIndexAccess> cols(crr->getColumns(), UNO_QUERY_THROW);
    for (std::size_t i = 0; i < plan.columnWidthsMm.size(); ++i)
        Reference<css::beans::XPropertySet>(cols->getByIndex(static_cast<sal_Int32>(i)), UNO_QUERY_THROW)
            ->setPropertyValue("Width", Any(static_cast<sal_Int32>(plan.columnWidthsMm[i] * 100)));
    Reference<css::container::XIndexAccess> rows(crr->getRows(), UNO_QUERY_THROW);
    for (const auto& [row, mm] : plan.rowHeightsMm)
        Reference<css::beans::XPropertySet>(rows->getByIndex(row), UNO_QUERY_THROW)
            ->setPropertyValue("Height", Any(static_cast<sal_Int32>(std::lround(mm * 100))));
    for (int row : plan.pageBreakRows)
        Reference<css::beans::XPropertySet>(rows->getByIndex(row), UNO_QUERY_THROW)
            ->setPropertyValue("IsStartOfNewPage", Any(true));
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

// The value scale of each chart: its series' values (after calculation) with a margin, on
// round numbers; one scale for all small multiples; bars (counts) start at 0 by themselves.
std::vector<std::pair<double, double>> chartScales(const Reference<css::sheet::XSpreadsheet>& sheet,
                                                   const report::ReportPlan& plan) {
    std::vector<std::pair<double, double>> out(plan.charts.size(), {0.0, 0.0});
    double commonLo = 1e300, commonHi = -1e300;
    std::vector<std::pair<double, double>> raw(plan.charts.size(), {1e300, -1e300});
    for (std::size_t i = 0; i < plan.charts.size(); ++i) {
        const report::ChartSpec& c = plan.charts[i];
        if (c.type == report::ChartSpec::Type::Bar) continue;
        for (std::size_t k = 0; k < c.ranges.size(); ++k) {
            const report::Rect& r = c.ranges[k];
            const int col0 = k == 0 ? r.col0 + 1 : r.col0;  // the first column holds the periods
            if (col0 > r.col1) continue;
            Reference<css::sheet::XCellRangeData> data(sheet->getCellRangeByPosition(col0, r.row0 + 1, r.col1, r.row1),
                                                      UNO_QUERY_THROW);
            for (const auto& row : data->getDataArray())
                for (const auto& v : row) {
                    double x = 0;
                    if (v.getValueTypeClass() == css::uno::TypeClass_DOUBLE && (v >>= x) && std::isfinite(x)) {
                        raw[i].first = std::min(raw[i].first, x);
                        raw[i].second = std::max(raw[i].second, x);
                    }
                }
        }
        if (c.commonScale) {
            commonLo = std::min(commonLo, raw[i].first);
            commonHi = std::max(commonHi, raw[i].second);
        }
    }
    auto nice = [](double lo, double hi) -> std::pair<double, double> {
        if (!(lo <= hi) || lo > 1e299) return {0.0, 0.0};
        const double span = std::max(hi - lo, std::max(std::fabs(hi), 1.0) * 0.02);
        const double step = std::pow(10.0, std::floor(std::log10(span / 4)));
        const double unit = span / step > 20 ? 5 * step : span / step > 8 ? 2 * step : step;
        return {std::floor((lo - 0.05 * span) / unit) * unit, std::ceil((hi + 0.05 * span) / unit) * unit};
    };
    for (std::size_t i = 0; i < plan.charts.size(); ++i)
        out[i] = plan.charts[i].commonScale ? nice(commonLo, commonHi) : nice(raw[i].first, raw[i].second);
    return out;
}

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

// The cells the user fills in (the comparables and their valuation date), by their setting,
// in the order the report wrote them: an update writes them back where the new layout has
// them.
std::map<std::string, std::vector<std::string>> readInputs(const Reference<css::sheet::XSpreadsheet>& sheet,
                                                           const report::ReportRecord& record) {
    std::map<std::string, std::vector<std::string>> out;
    for (const auto& e : record.editable)
        if (e.setting == "input" || e.setting == "valuation")
            out[e.setting].push_back(utf8(sheet->getCellByPosition(e.col, e.row)->getFormula()));
    return out;
}

void restoreInputs(const Reference<css::sheet::XSpreadsheet>& sheet, const report::ReportPlan& plan,
                   const std::map<std::string, std::vector<std::string>>& inputs) {
    std::map<std::string, std::size_t> next;
    for (const auto& w : plan.cells) {
        const auto it = inputs.find(w.setting);
        if (it == inputs.end()) continue;
        const std::size_t i = next[w.setting]++;
        if (i < it->second.size() && !it->second[i].empty())
            sheet->getCellByPosition(w.col, w.row)->setFormula(ustr(it->second[i]));
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
    report::SheetData data = readSalesTable(doc, settings.dataRange, true, usedRange);
    settings.dataRange = usedRange;
    data.priceFormat = priceFormat(doc, data, settings.priceColumn);
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
    std::map<std::string, std::vector<std::string>> inputs;  // the user's inputs, kept
    if (found) {
        // In place: nothing the user typed may be in the way.
        sheet.set(sheets->getByName(sheetName), UNO_QUERY_THROW);
        std::vector<report::ReportRecord::Block> next;
        for (const auto& b : plan.blocks) next.push_back({b.key, b.title, b.rect});
        UnoSheetView view(sheet);
        const std::string conflict = report::findUserCell(found->record, next, view, target);
        if (!conflict.empty()) throw InputError(conflict);
        inputs = readInputs(sheet, found->record);
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
    restoreInputs(sheet, plan, inputs);
    setUpPage(doc, sheet, plan);
    Reference<css::sheet::XCalculatable> calc(doc, UNO_QUERY);
    if (calc.is()) calc->calculateAll();
    std::vector<std::string> chartNames;
    const auto scales = chartScales(sheet, plan);
    for (std::size_t i = 0; i < plan.charts.size(); ++i)
        chartNames.push_back(applier.chart(sheet, position, plan.charts[i], settings.reportId, scales[i]));
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
        // A Lintel message, or a Calc error value (Err:504 ...) where the status formula stands.
        if (t.rfind("Lintel:", 0) == 0 || c->getError() != 0) {
            ++failed;
            failures += fmt::format("{}{}: {}", failures.empty() ? "" : "; ", label,
                                    t.rfind("Lintel:", 0) == 0 ? t.substr(8) : "Calc error " + t);
        }
    }
    std::string status = plan.status;
    if (status.rfind(plan.sheetName, 0) == 0) status = target + status.substr(plan.sheetName.size());
    if (failed && static_cast<std::size_t>(failed) == plan.methodCells.size())
        status += fmt::format("; every method failed ({}): {}", failed, failures);
    else if (failed)
        status += fmt::format("; {} method{} failed: {}", failed, failed > 1 ? "s" : "", failures);
    try {
        Reference<css::sheet::XSpreadsheetView> view(model->getCurrentController(), UNO_QUERY);
        if (view.is()) view->setActiveSheet(sheet);
    } catch (...) {
    }
    return status;
}

namespace {

}  // namespace

// The printed layout of a report sheet onto its copy in another document: the page style (by
// its properties), the print area and the manual page breaks.
void copyPageLayout(const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& sheetName,
                    const Reference<css::sheet::XSpreadsheetDocument>& copy,
                    const Reference<css::sheet::XSpreadsheet>& target) {
    Reference<css::sheet::XSpreadsheet> source(doc->getSheets()->getByName(ustr(sheetName)), UNO_QUERY_THROW);
    OUString styleName;
    Reference<css::beans::XPropertySet>(source, UNO_QUERY_THROW)->getPropertyValue("PageStyle") >>= styleName;
    Reference<css::style::XStyleFamiliesSupplier> from(doc, UNO_QUERY_THROW), to(copy, UNO_QUERY_THROW);
    Reference<css::container::XNameAccess> fromPages(from->getStyleFamilies()->getByName("PageStyles"), UNO_QUERY_THROW);
    Reference<css::container::XNameContainer> toPages(to->getStyleFamilies()->getByName("PageStyles"), UNO_QUERY_THROW);
    if (!toPages->hasByName(styleName)) {
        Reference<css::lang::XMultiServiceFactory> f(copy, UNO_QUERY_THROW);
        toPages->insertByName(styleName, Any(f->createInstance("com.sun.star.style.PageStyle")));
    }
    Reference<css::beans::XPropertySet> a(fromPages->getByName(styleName), UNO_QUERY_THROW);
    Reference<css::beans::XPropertySet> b(toPages->getByName(styleName), UNO_QUERY_THROW);
    for (const char* name : {"Width", "Height", "IsLandscape", "ScaleToPagesX", "ScaleToPagesY", "LeftMargin",
                             "RightMargin", "TopMargin", "BottomMargin", "HeaderIsOn", "FooterIsOn",
                             "CenterHorizontally"}) {
        try {
            b->setPropertyValue(OUString::createFromAscii(name), a->getPropertyValue(OUString::createFromAscii(name)));
        } catch (const css::uno::Exception&) {
        }
    }
    Reference<css::beans::XPropertySet>(target, UNO_QUERY_THROW)->setPropertyValue("PageStyle", Any(styleName));
    Sequence<css::table::CellRangeAddress> areas = Reference<css::sheet::XPrintAreas>(source, UNO_QUERY_THROW)->getPrintAreas();
    for (sal_Int32 i = 0; i < areas.getLength(); ++i) areas.getArray()[i].Sheet = 0;
    Reference<css::sheet::XPrintAreas>(target, UNO_QUERY_THROW)->setPrintAreas(areas);
    Reference<css::sheet::XSheetPageBreak> breaks(source, UNO_QUERY_THROW);
    Reference<css::table::XColumnRowRange> crr(target, UNO_QUERY_THROW);
    Reference<css::container::XIndexAccess> rows(crr->getRows(), UNO_QUERY_THROW);
    for (const auto& br : breaks->getRowPageBreaks())
        if (br.ManualBreak)
            Reference<css::beans::XPropertySet>(rows->getByIndex(br.Position), UNO_QUERY_THROW)
                ->setPropertyValue("IsStartOfNewPage", Any(true));
}

// A new document holding the report sheet with values in place of formulas (and its charts,
// formats, print ranges and page style), for readers without Lintel. The report sheet itself
// is not touched.
Reference<css::sheet::XSpreadsheetDocument> valuesCopy(const Reference<css::uno::XComponentContext>& ctx,
                                                        const Reference<css::sheet::XSpreadsheetDocument>& doc,
                                                        const std::string& sheetName, bool hidden) {
    if (!findReportOnSheet(doc, sheetName))
        throw InputError(fmt::format("sheet \"{}\" is not a Lintel report", sheetName));
    Reference<css::frame::XDesktop2> desktop = css::frame::Desktop::create(ctx);
    Sequence<css::beans::PropertyValue> load(1);
    load.getArray()[0].Name = "Hidden";
    load.getArray()[0].Value <<= hidden;
    Reference<css::sheet::XSpreadsheetDocument> copy(
        desktop->loadComponentFromURL("private:factory/scalc", "_blank", 0, load), UNO_QUERY_THROW);
    try {
        // The same day count, so date serials mean the same dates.
        Reference<css::beans::XPropertySet> from(doc, UNO_QUERY_THROW), to(copy, UNO_QUERY_THROW);
        to->setPropertyValue("NullDate", from->getPropertyValue("NullDate"));
        Reference<css::sheet::XSpreadsheets2> sheets(copy->getSheets(), UNO_QUERY_THROW);
        const OUString name = ustr(sheetName);
        const OUString blank = utf8(copy->getSheets()->getElementNames()[0]) == sheetName ? OUString() :
                               copy->getSheets()->getElementNames()[0];
        sheets->importSheet(doc, name, 0);
        if (!blank.isEmpty()) copy->getSheets()->removeByName(blank);
        Reference<css::sheet::XSpreadsheet> sheet(copy->getSheets()->getByName(name), UNO_QUERY_THROW);
        Reference<css::sheet::XSheetCellCursor> cursor = sheet->createCursor();
        Reference<css::sheet::XUsedAreaCursor> used(cursor, UNO_QUERY_THROW);
        used->gotoEndOfUsedArea(false);
        Reference<css::sheet::XCellRangeAddressable> end(cursor, UNO_QUERY_THROW);
        const css::table::CellRangeAddress a = end->getRangeAddress();
        Reference<css::table::XCellRange> all = sheet->getCellRangeByPosition(0, 0, a.EndColumn, a.EndRow);
        Reference<css::sheet::XCellRangeData> data(all, UNO_QUERY_THROW);
        // The values as the report shows them (the copy cannot compute them: it has no sales).
        Reference<css::sheet::XSpreadsheet> source(doc->getSheets()->getByName(name), UNO_QUERY_THROW);
        const Sequence<Sequence<Any>> values =
            Reference<css::sheet::XCellRangeData>(source->getCellRangeByPosition(0, 0, a.EndColumn, a.EndRow), UNO_QUERY_THROW)
                ->getDataArray();
        Reference<css::sheet::XSheetOperation> op(all, UNO_QUERY_THROW);
        op->clearContents(css::sheet::CellFlags::FORMULA);
        data->setDataArray(values);
        copyPageLayout(doc, sheetName, copy, sheet);
        // The record is the report's, not the copy's.
        Reference<css::table::XCell> record = sheet->getCellByPosition(0, 80);
        Reference<css::text::XText>(record, UNO_QUERY_THROW)->setString(OUString());
    } catch (...) {
        Reference<css::util::XCloseable> c(copy, UNO_QUERY);
        if (c.is()) c->close(true);
        throw;
    }
    return copy;
}

// The report's client pages as a PDF at url (file URL), through a values copy.
void exportReportPdf(const Reference<css::uno::XComponentContext>& ctx,
                     const Reference<css::sheet::XSpreadsheetDocument>& doc, const std::string& sheetName,
                     const std::string& url) {
    Reference<css::sheet::XSpreadsheetDocument> copy = valuesCopy(ctx, doc, sheetName, true);
    try {
        Reference<css::frame::XStorable> st(copy, UNO_QUERY_THROW);
        Sequence<css::beans::PropertyValue> args(1);
        args.getArray()[0].Name = "FilterName";
        args.getArray()[0].Value <<= OUString("calc_pdf_Export");
        st->storeToURL(ustr(url), args);
    } catch (...) {
        Reference<css::util::XCloseable>(copy, UNO_QUERY_THROW)->close(true);
        throw;
    }
    Reference<css::util::XCloseable>(copy, UNO_QUERY_THROW)->close(true);
}

namespace {

class ReportBuilder : public cppu::WeakImplHelper2<css::task::XJob, css::lang::XServiceInfo> {
public:
    explicit ReportBuilder(const Reference<css::uno::XComponentContext>& ctx) : ctx_(ctx) {}

    Any SAL_CALL execute(const Sequence<css::beans::NamedValue>& args) override {
        try {
            Reference<css::sheet::XSpreadsheetDocument> doc;
            std::string settings, mode = "build", sheet, url;
            bool hidden = false;
            Reference<css::task::XStatusIndicator> progress;
            for (const auto& a : args) {
                if (a.Name == "Document") a.Value >>= doc;
                else if (a.Name == "StatusIndicator") a.Value >>= progress;
                else if (a.Name == "Settings") { OUString s; a.Value >>= s; settings = utf8(s); }
                else if (a.Name == "Mode") { OUString s; a.Value >>= s; mode = utf8(s); }
                else if (a.Name == "Sheet") { OUString s; a.Value >>= s; sheet = utf8(s); }
                else if (a.Name == "Url") { OUString s; a.Value >>= s; url = utf8(s); }
                else if (a.Name == "Hidden") a.Value >>= hidden;
            }
            if (!doc.is()) {
                Reference<css::frame::XDesktop2> desktop = css::frame::Desktop::create(ctx_);
                doc.set(desktop->getCurrentComponent(), UNO_QUERY);
            }
            if (!doc.is()) return Any(OUString("Lintel: no spreadsheet document to build the report in"));
            if (mode == "values" || mode == "pdf") {
                if (sheet.empty()) return Any(OUString("Lintel: Sheet must name the report sheet"));
                if (mode == "values") {
                    valuesCopy(ctx_, doc, sheet, hidden);
                    return Any(ustr(fmt::format("{}: copied as values into a new document (save it and send it; "
                                                "it needs no Lintel)", sheet)));
                }
                if (url.empty()) return Any(OUString("Lintel: Url must name the PDF file to write"));
                exportReportPdf(ctx_, doc, sheet, url);
                return Any(ustr(fmt::format("{}: client pages written to {}", sheet, url)));
            }
            if (mode != "build" && mode != "update")
                return Any(OUString("Lintel: Mode must be \"build\", \"update\", \"values\" or \"pdf\""));
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
