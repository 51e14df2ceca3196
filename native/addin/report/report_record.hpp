// What a report build wrote, so that an update can rewrite the report in place without ever
// overwriting a cell the user typed. No UNO here (the builder reads the sheet through
// SheetView; tests use a fake one).
//
// The record is kept in the report sheet itself (a hidden cell named Lintel_<id>_record), so
// an Edit > Undo of a build or an update restores it together with the cells it describes.
//
// A report owns blocks: rectangles of the sheet (the settings, the comparison, each index
// table, the chart data ...). Inside its blocks it wrote single cells (text, numbers,
// formulas) and array formulas; every other cell of a block is empty by construction. On
// update, a non-empty cell inside an old block that is neither one of ours unchanged nor an
// editable settings cell was typed by the user: the update stops and names it. Cells outside
// the old blocks that a new block would cover must be empty for the same reason.
#pragma once

#include <cstdint>
#include <string>
#include <utility>
#include <vector>

namespace lintel::report {

struct Rect {
    int row0 = 0, col0 = 0, row1 = -1, col1 = -1;  // inclusive, 0-based; row1 < row0: empty
    bool isEmpty() const { return row1 < row0 || col1 < col0; }
    bool contains(int r, int c) const { return r >= row0 && r <= row1 && c >= col0 && c <= col1; }
    void include(int r, int c);  // grows to cover the cell
};

// A 16-bit digest of a cell's content as Calc gives it back (its formula, or its constant
// written as text): enough to tell an edited cell from ours.
std::uint16_t contentHash(const std::string& content);

struct ReportRecord {
    struct Block {
        std::string key;    // stable within the report ("settings", "table_median" ...)
        std::string title;  // for messages ("index table: Median")
        Rect rect;
    };
    struct Written {  // a single cell the report wrote
        int row = 0, col = 0;
        std::uint16_t hash = 0;
    };
    struct Array {  // an array formula the report wrote
        Rect rect;
        std::uint16_t hash = 0;
    };
    struct Editable {  // a settings cell the user may change (read back on update)
        int row = 0, col = 0;
        std::string setting;  // the report setting it holds ("base", "level")
    };

    std::string reportId;
    std::string settings;  // ReportSettings::serialize() of the build
    std::vector<Block> blocks;
    std::vector<Written> cells;
    std::vector<Array> arrays;
    std::vector<Editable> editable;
    std::vector<std::string> charts;  // chart object names
    std::vector<std::string> names;   // named ranges the report defined

    std::string serialize() const;
    static ReportRecord parse(const std::string& text);  // throws lintel::InputError
};

// The sheet as the update check reads it.
class SheetView {
public:
    virtual ~SheetView() = default;
    // The non-empty cells of a rectangle (row, col).
    virtual std::vector<std::pair<int, int>> contentCells(const Rect& r) = 0;
    // A cell's content as Calc gives it back (formula or constant as text).
    virtual std::string content(int row, int col) = 0;
    // The array formula whose top-left cell is (row, col), or "" when there is none there.
    virtual std::string arrayFormula(const Rect& r) = 0;
};

// "" when the update may go ahead: every non-empty cell inside the old blocks is ours and
// unchanged (or an editable settings cell), and the new blocks cover no non-empty cell outside
// the old ones. Otherwise the message naming the first such cell, e.g.
//   cell $'Report East'.D80 holds "my note", which the report did not write (inside its
//   block "index table: Median"): move it outside the report's blocks, then update again
std::string findUserCell(const ReportRecord& old, const std::vector<ReportRecord::Block>& next,
                         SheetView& sheet, const std::string& sheetName);

// "$'Report East'.D80"
std::string cellAddress(const std::string& sheet, int row, int col);

}  // namespace lintel::report
