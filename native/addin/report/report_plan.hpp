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
    // The document's order of day and month and its separators, for dates and prices
    // written as text (as the functions read them: cell_model.hpp CallContext).
    DateOrder dateOrder = DateOrder::Unknown;
    NumberFormat numbers;
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
    std::string name;   // short key ("levels"); the builder makes it unique in the document
    std::string title;
    Type type = Type::Line;
    // One block: first column categories (periods or method names), first row series names.
    int row = 0, col = 0, rows = 0, cols = 0;
    int anchorRow = 0, anchorCol = 0;  // cell at the chart's top-left corner
    int widthMm = 150, heightMm = 75;
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
    // Print area (0-based, inclusive): title, settings, comparison, charts and the tables.
    int printRows = 0, printCols = 0;
    std::size_t salesUsed = 0;
    int periods = 0;
    std::vector<std::string> warnings;
    std::string status;  // one line for the panel
};

// Throws lintel::InputError when a column role is missing from the header, the segment
// keeps no sale, or a method lacks the columns it needs.
ReportPlan planReport(const ReportSettings& settings, const SheetData& data);

// "A", "B", ..., "Z", "AA" ... for a 0-based column.
std::string columnName(int col);
// An absolute reference such as $'My sales'.$B$2:$B$100.
std::string absoluteRange(const std::string& sheet, int row0, int col0, int row1, int col1);

}  // namespace lintel::report
