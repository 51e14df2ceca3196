// Lays out a report sheet: which cells get which text, value, formula or array formula,
// their number formats, and which charts show which ranges. No UNO here: the plan is applied
// to a document by native/addin/uno/report_builder.cpp, and tested on its own.
//
// The report is ordinary Calc formulas over the user's own ranges: a settings block that
// every formula references (change the base date there and the whole report follows), the
// segment as a visible include expression, one index table per method, a block that lines
// the methods up by period for the charts, a comparison table, and the caution.
#pragma once

#include <string>
#include <vector>

#include "cell_model.hpp"
#include "report_record.hpp"
#include "report_settings.hpp"

namespace lintel::report {

// The sales table as read from the sheet: its position and its cells, header row first.
struct SheetData {
    std::string sheet;        // sheet name
    int firstRow = 0;         // 0-based position of the header row
    int firstCol = 0;
    addin::Range cells;       // header row + data rows
    // Days to add to the document's serials to count from 1899-12-30 (1462 in a document
    // counting from 1904-01-01): date cells are read and serials written in the document's own.
    double dateOffset = 0.0;
    // Number format of the price column as the sheet shows it (its currency), for money cells.
    std::string priceFormat = "#,##0";
};

struct CellWrite {
    enum class Kind { Text, Number, Formula, ArrayFormula, Format };  // Format: number format only
    Kind kind = Kind::Text;
    int row = 0, col = 0;     // 0-based top-left on the report sheet
    int rows = 1, cols = 1;   // size (array formulas, formats)
    std::string value;        // text or formula (English function names, ';' separators)
    double number = 0.0;
    std::string format;       // number format code, or empty
    bool bold = false;
    double charHeight = 0.0;  // 0 = default
    bool wrap = false;        // wrap the text in the cell
    int mergeCols = 0;        // > 1: merge with the cells to its right (a text across the page)
    bool rule = false;        // a thin line below (headings)
    bool center = false;      // centred in the cell
    int block = -1;           // the block it belongs to (ReportPlan::blocks)
    std::string setting;      // an editable settings cell: the report setting it holds
                              // ("base", "level", "freq"); Update reads it back
};

// A rectangle of the report sheet the report owns (see report_record.hpp).
struct PlanBlock {
    std::string key;     // stable: "settings", "comparison", "table_median", "chartdata" ...
    std::string title;   // for messages and docs
    Rect rect;           // the cells it owns (the bounding box of its writes)
    Rect named;          // what its named range Lintel_<id>_<key> covers; empty: no name
};

struct ChartSpec {
    enum class Type { Line, Bar };
    std::string name;   // short key ("quoted"); the builder makes it unique in the document
    std::string title;
    Type type = Type::Line;
    // The data: one block (first column the periods, first row the series names), or several
    // column ranges of equal height read side by side (the first one the periods).
    std::vector<Rect> ranges;
    int row = 0, col = 0, rows = 0, cols = 0;  // the first range (kept for tests and docs)
    int anchorRow = 0, anchorCol = 0;  // cell at the chart's top-left corner
    int widthMm = 150, heightMm = 75;
    int offsetMm = 0;                  // to the right of the anchor cell's left edge
    int emphasis = 0;                  // the series drawn thickest (-1: none)
    std::string yTitle;                // axis title with the unit
    std::vector<int> bandSeries;       // series drawn as a band around the first one
    bool legend = true;                // a compact legend below the plot
    bool small = false;                // a small multiple: small fonts, no axis titles
    bool commonScale = false;          // every small multiple on one value scale
    bool money = false;                // values in the sales' currency
    std::string freq = "M";            // the period axis: labels at years (M) or quarters (Q)
    int periods = 0;
};

struct ReportPlan {
    std::string sheetName;
    std::vector<CellWrite> cells;
    std::vector<PlanBlock> blocks;
    int recordRow = 0, recordCol = 0;  // the hidden cell that keeps the record
    // Top-left cells of the method tables with the method's label: a "Lintel: ..." text there
    // after calculation means the method failed (the builder reports it).
    std::vector<std::pair<std::string, std::pair<int, int>>> methodCells;
    std::vector<ChartSpec> charts;
    // Print area (0-based): the client pages, rows 0 .. printRows - 1, columns 0 .. printCols - 1;
    // a page starts at each of pageBreakRows.
    int printRows = 0, printCols = 0;
    std::vector<int> pageBreakRows;
    std::vector<int> columnWidthsMm;  // widths of the first columns (the printed page's)
    std::vector<std::pair<int, double>> rowHeightsMm;  // row, height (mm): the printed pages' rows
    std::size_t salesUsed = 0;
    int periods = 0;
    std::vector<std::string> warnings;
    std::string status;  // one line for the panel
};

// Throws lintel::InputError when a column role is missing from the header, the segment
// keeps no sale, or a method lacks the columns it needs.
ReportPlan planReport(const ReportSettings& settings, const SheetData& data);

// The function a report method's tables call ("INDEXMEDIAN" ...).
const char* methodFunction(Method m);
// A sheet name as formulas write it: as is, or quoted ('My sales').
std::string quoteSheet(const std::string& sheet);
// "A", "B", ..., "Z", "AA" ... for a 0-based column.
std::string columnName(int col);
// An absolute reference such as $'My sales'.$B$2:$B$100.
std::string absoluteRange(const std::string& sheet, int row0, int col0, int row1, int col1);

}  // namespace lintel::report
