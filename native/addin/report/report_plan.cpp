#include "report_plan.hpp"

#include <algorithm>
#include <climits>
#include <cmath>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "label_text.hpp"
#include "periods.hpp"

namespace lintel::report {

using addin::Cell;
using addin::CallContext;

std::string columnName(int col) {
    std::string s;
    for (int c = col + 1; c > 0; c = (c - 1) / 26) s.insert(s.begin(), static_cast<char>('A' + (c - 1) % 26));
    return s;
}

namespace {

std::string quoteSheet(const std::string& sheet) {
    bool plain = !sheet.empty() && !std::isdigit(static_cast<unsigned char>(sheet[0]));
    for (char c : sheet) plain = plain && (std::isalnum(static_cast<unsigned char>(c)) || c == '_');
    if (plain) return sheet;
    std::string q = "'";
    for (char c : sheet) q += c == '\'' ? std::string("''") : std::string(1, c);
    return q + "'";
}

std::string cellRef(int row, int col) { return fmt::format("${}${}", columnName(col), row + 1); }

std::string localRange(int row0, int col0, int row1, int col1) {
    return fmt::format("{}:{}", cellRef(row0, col0), cellRef(row1, col1));
}

// "Index" for "index": a column title as a heading.
std::string capitalised(std::string s) {
    if (!s.empty()) s[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(s[0])));
    return s;
}

// The function a report method's table calls.
const char* methodFunction(Method m) {
    switch (m) {
        case Method::Median: return "INDEXMEDIAN";
        case Method::Mean: return "INDEXMEAN";
        case Method::Mix: return "INDEXMIX";
        case Method::Hedonic: return "INDEXHEDONIC";
        case Method::RepeatSales: return "CHAINRS";
        case Method::ReferenceHome: return "REFHOMEVALUE";
    }
    return "";
}

std::string formulaText(const std::string& s) {  // a Calc string literal
    std::string q = "\"";
    for (char c : s) q += c == '"' ? std::string("\"\"") : std::string(1, c);
    return q + "\"";
}

struct Layout {
    // Settings block (column A labels, column B values).
    static constexpr int kSettingsRow = 3;
    // Charts, then the tables.
    static constexpr int kChartRow = 24;
    static constexpr int kChartRowStep = 18;
    static constexpr int kRecordRow = 78;  // hidden: the report's record
    static constexpr int kTableTitleRow = 80;
    static constexpr int kTableHeadRow = 81;
    static constexpr int kTableFirstRow = 82;
};

class Planner {
public:
    Planner(const ReportSettings& s, const SheetData& d) : s_(s), d_(d) {}

    ReportPlan run();

private:
    int column(const std::string& name, const char* role, bool required) const;
    std::string dataColumn(int c) const {
        const int r0 = d_.firstRow + 1, r1 = d_.firstRow + static_cast<int>(d_.cells.rows) - 1;
        return absoluteRange(d_.sheet, r0, d_.firstCol + c, r1, d_.firstCol + c);
    }
    // A block of data columns as one range: direct when contiguous, else copied by formula
    // into a helper block of the report sheet.
    std::string columnsBlock(const std::vector<int>& cols, const std::string& what);
    std::string includeExpression(const std::string& dates, const std::string& prices, int idc);
    void countSegment();

    // Every write belongs to the block begun last; a block owns the bounding box of its writes.
    void block(const std::string& key, const std::string& title) {
        for (std::size_t i = 0; i < plan_.blocks.size(); ++i)
            if (plan_.blocks[i].key == key) {
                block_ = static_cast<int>(i);
                return;
            }
        PlanBlock b;
        b.key = key;
        b.title = title;
        plan_.blocks.push_back(b);
        block_ = static_cast<int>(plan_.blocks.size()) - 1;
    }
    // The named range of the current block covers these cells (a table's values).
    void nameCells(int r, int c, int rows, int cols) {
        plan_.blocks[static_cast<std::size_t>(block_)].named = Rect{r, c, r + rows - 1, c + cols - 1};
    }
    CellWrite& add(CellWrite w) {
        w.block = block_;
        plan_.cells.push_back(std::move(w));
        return plan_.cells.back();
    }
    void text(int r, int c, const std::string& t, bool bold = false, double height = 0) {
        CellWrite w;
        w.kind = CellWrite::Kind::Text;
        w.row = r; w.col = c; w.value = t; w.bold = bold; w.charHeight = height;
        add(w);
    }
    CellWrite& number(int r, int c, double x, const std::string& format = {}) {
        CellWrite w;
        w.kind = CellWrite::Kind::Number;
        w.row = r; w.col = c; w.number = x; w.format = format;
        return add(w);
    }
    void formula(int r, int c, const std::string& f, const std::string& format = {}) {
        CellWrite w;
        w.kind = CellWrite::Kind::Formula;
        w.row = r; w.col = c; w.value = f; w.format = format;
        add(w);
    }
    void array(int r, int c, int rows, int cols, const std::string& f) {
        CellWrite w;
        w.kind = CellWrite::Kind::ArrayFormula;
        w.row = r; w.col = c; w.rows = rows; w.cols = cols; w.value = f;
        add(w);
    }
    void format(int r, int c, int rows, int cols, const std::string& f) {
        CellWrite w;
        w.kind = CellWrite::Kind::Format;
        w.row = r; w.col = c; w.rows = rows; w.cols = cols; w.format = f;
        add(w);
    }
    // The period start serials of the chart data as one array formula (EDATE from the first).
    void periodColumn(int r, int c, int T) {
        array(r, c, T, 1,
              fmt::format("=EDATE({};(ROW($A$1:$A${})-1)*{})",
                          periodStartOfKey(firstKey_, freq_) - d_.dateOffset, T, monthsPerPeriod(freq_)));
        format(r, c, T, 1, "YYYY-MM");
    }
    void finishBlocks();

    const ReportSettings& s_;
    const SheetData& d_;
    ReportPlan plan_;
    Frequency freq_ = Frequency::Month;
    long firstKey_ = 0;
    int helperCol_ = 0;
    int helperUsed_ = 0;
    int block_ = -1;
    double lastSale_ = 0;  // the latest sale date of the segment (serial from 1899-12-30)
};

void Planner::finishBlocks() {
    for (const auto& w : plan_.cells) {
        if (w.block < 0) continue;
        Rect& r = plan_.blocks[static_cast<std::size_t>(w.block)].rect;
        r.include(w.row, w.col);
        r.include(w.row + w.rows - 1, w.col + w.cols - 1);
    }
}

int Planner::column(const std::string& name, const char* role, bool required) const {
    if (name.empty()) {
        if (required) throw InputError(fmt::format("choose the {} column", role));
        return -1;
    }
    for (std::size_t c = 0; c < d_.cells.cols; ++c)
        if (addin::cellKey(d_.cells.at(0, c)) == name) return static_cast<int>(c);
    throw InputError(fmt::format("the {} column \"{}\" is not in the header of {}", role, name,
                                 s_.dataRange));
}

std::string Planner::columnsBlock(const std::vector<int>& cols, const std::string& what) {
    bool contiguous = true;
    for (std::size_t i = 1; i < cols.size(); ++i) contiguous = contiguous && cols[i] == cols[i - 1] + 1;
    const int r0 = d_.firstRow + 1, r1 = d_.firstRow + static_cast<int>(d_.cells.rows) - 1;
    if (contiguous)
        return absoluteRange(d_.sheet, r0, d_.firstCol + cols.front(), r1, d_.firstCol + cols.back());
    // Helper block: one array formula per column, so the block is contiguous.
    const int n = static_cast<int>(d_.cells.rows) - 1;
    const int c0 = helperCol_ + helperUsed_;
    const int saved = block_;
    block(what == "Characteristics" ? "copy_characteristics" : "copy_strata",
          what + " (copied by formula into one block)");
    text(Layout::kTableTitleRow, c0, fmt::format("{} (copied by formula into one block)", what), true);
    for (std::size_t i = 0; i < cols.size(); ++i) {
        text(Layout::kTableHeadRow, c0 + static_cast<int>(i), addin::cellKey(d_.cells.at(0, cols[i])), true);
        array(Layout::kTableFirstRow, c0 + static_cast<int>(i), n, 1, "=" + dataColumn(cols[i]));
    }
    helperUsed_ += static_cast<int>(cols.size()) + 1;
    block_ = saved;
    return localRange(Layout::kTableFirstRow, c0, Layout::kTableFirstRow + n - 1,
                      c0 + static_cast<int>(cols.size()) - 1);
}

// The segment as ISSEGMENT masks (labels compared cleaned: "North ", "north" and "North" are
// one value), times SALESCHECK's use mask when there are ids, so a sale entered twice counts
// once and conflicting prices are left out.
std::string Planner::includeExpression(const std::string& dates, const std::string& prices, int idc) {
    std::string expr;
    const addin::FunctionSpec& isSegment = addin::functionSpec("ISSEGMENT");
    for (const auto& f : s_.segment) {
        if (f.values.empty()) continue;
        const int c = column(f.column, "segment", true);
        const std::string col = dataColumn(c);
        auto mask = [&](const std::string& v) {
            return addin::formulaCall(isSegment, {{"labels", col}, {"values", formulaText(v)}});
        };
        std::string term;
        if (f.values.size() == 1) {
            term = mask(f.values[0]);
        } else {
            std::string sum;
            for (const auto& v : f.values) sum += (sum.empty() ? "" : "+") + mask(v);
            term = "((" + sum + ")>0)";
        }
        expr += (expr.empty() ? "" : "*") + term;
    }
    if (idc >= 0)
        expr += (expr.empty() ? "" : "*") +
                addin::formulaCall(addin::functionSpec("SALESCHECK"),
                                   {{"dates", dates}, {"prices", prices}, {"ids", dataColumn(idc)},
                                    {"options", formulaText("output=use; labels=clean")}});
    return expr;
}

void Planner::countSegment() {
    const int dc = column(s_.dateColumn, "sale date", true);
    const int pc = column(s_.priceColumn, "price", true);
    std::vector<std::pair<int, const SegmentFilter*>> seg;
    for (const auto& f : s_.segment)
        if (!f.values.empty()) seg.emplace_back(column(f.column, "segment", true), &f);
    long lo = LONG_MAX, hi = LONG_MIN;
    CallContext ctx;
    ctx.dateOffset = d_.dateOffset;
    ctx.dateOrder = d_.dateOrder;
    ctx.numbers = d_.numbers;
    // The segment's values as ISSEGMENT compares them.
    std::vector<std::vector<std::string>> wanted;
    for (const auto& [c, f] : seg) {
        wanted.emplace_back();
        for (const auto& v : f->values) wanted.back().push_back(labelKey(v));
    }
    for (std::size_t r = 1; r < d_.cells.rows; ++r) {
        const double date = addin::cellDate(d_.cells.at(r, dc), ctx);
        const double price = addin::cellNumber(d_.cells.at(r, pc), ctx.numbers);
        if (!isUsableSerial(date) || !(price > 0)) continue;
        bool keep = true;
        for (std::size_t k = 0; k < seg.size() && keep; ++k) {
            const std::string v = labelKey(addin::cellKey(d_.cells.at(r, seg[k].first)));
            keep = std::find(wanted[k].begin(), wanted[k].end(), v) != wanted[k].end();
        }
        if (!keep) continue;
        ++plan_.salesUsed;
        lastSale_ = std::max(lastSale_, std::floor(date));
        const long k = periodKey(date, freq_);
        lo = std::min(lo, k);
        hi = std::max(hi, k);
    }
    if (plan_.salesUsed == 0)
        throw InputError(fmt::format("the segment ({}) keeps no sale with a date and a price",
                                     s_.segmentText()));
    firstKey_ = lo;
    plan_.periods = static_cast<int>(hi - lo + 1);
}

ReportPlan Planner::run() {
    if (d_.cells.rows < 2) throw InputError("the sales table needs a header row and at least one sale");
    const auto f = parseFrequency(s_.freq);
    if (!f) throw InputError(fmt::format("frequency must be M, Q or Y, got \"{}\"", s_.freq));
    freq_ = *f;
    countSegment();
    const int T = plan_.periods;
    plan_.sheetName = s_.sheetName.empty() ? s_.defaultSheetName() : s_.sheetName;

    std::vector<Method> methods;
    const int idc = column(s_.idColumn, "property id", false);
    const int chc = column(s_.changedColumn, "changed flag", false);
    std::vector<int> chars, strata;
    for (const auto& n : s_.characteristics) chars.push_back(column(n, "characteristic", true));
    for (const auto& n : s_.strata) strata.push_back(column(n, "stratum", true));
    for (Method m : s_.methods) {
        const bool ok = (m == Method::Mix && !strata.empty()) ||
                        ((m == Method::Hedonic || m == Method::ReferenceHome) && !chars.empty()) ||
                        (m == Method::RepeatSales && idc >= 0) ||
                        m == Method::Median || m == Method::Mean;
        if (ok) methods.push_back(m);
        else plan_.warnings.push_back(fmt::format("{} left out: choose the columns it needs", methodLabel(m)));
    }
    if (methods.empty()) throw InputError("choose at least one method");
    std::vector<Method> indexMethods;  // those on the index scale (not the reference home's value)
    for (Method m : methods)
        if (m != Method::ReferenceHome) indexMethods.push_back(m);

    const int M = static_cast<int>(methods.size());
    // Method tables side by side, each its function's width plus a blank column; the chart
    // data block after them.
    std::vector<int> tableCol(M);
    int blockCol = 0;
    for (int i = 0; i < M; ++i) {
        tableCol[i] = blockCol;
        blockCol += static_cast<int>(addin::functionSpec(methodFunction(methods[i])).width()) + 1;
    }
    const int K = static_cast<int>(indexMethods.size());
    helperCol_ = blockCol + 4 * (K + 2) + 2;

    // The latest period is partial when the last sale falls before its last day: headline
    // changes then use the period before it, unless the settings include it.
    const long lastKey = firstKey_ + T - 1;
    const bool partial = lastSale_ < periodStartOfKey(lastKey + 1, freq_) - 1;
    const int headlineOffset = partial && !s_.includePartial && T > 1 ? 1 : 0;
    const std::string salesUpTo = isoDate(lastSale_);

    // Title, caution.
    block("title", "title and caution");
    const std::string range = fmt::format("{} .. {}", periodLabel(firstKey_, freq_), periodLabel(lastKey, freq_));
    text(0, 0, fmt::format("Price indexes: {} ({}), sales up to {}", s_.segmentText(), range, salesUpTo), true, 16);
    text(1, 0, "Caution: an index describes a market, not one home. Time-adjusting a sale is no "
               "substitute for an appraisal by a licensed professional; follow local appraisal "
               "standards and regulations.");

    // Settings block: the values every formula refers to; base date, band level and
    // frequency may be edited here (Update report keeps them).
    const int sr = Layout::kSettingsRow;
    block("settings", "settings");
    text(sr, 0, "Settings", true);
    const std::string dates = dataColumn(column(s_.dateColumn, "sale date", true));
    const std::string prices = dataColumn(column(s_.priceColumn, "price", true));
    const std::string include = includeExpression(dates, prices, idc);
    const int rowFreq = sr + 4, rowBase = sr + 5, rowLevel = sr + 6;
    text(sr + 1, 0, "Sales data"); text(sr + 1, 1, s_.dataRange);
    text(sr + 2, 0, "Segment"); text(sr + 2, 1, s_.segmentText());
    text(sr + 3, 0, "Include expression"); text(sr + 3, 1, include.empty() ? "(all sales)" : include);
    text(rowFreq, 0, "Frequency");
    {
        CellWrite w;
        w.kind = CellWrite::Kind::Text;
        w.row = rowFreq; w.col = 1; w.value = frequencyCode(freq_); w.setting = "freq";
        add(w);
    }
    text(rowBase, 0, "Base date");
    double base = periodStartOfKey(firstKey_, freq_);
    if (!s_.baseDate.empty()) {
        const double b = addin::cellDate(Cell::str(s_.baseDate), {});
        if (!isUsableSerial(b)) throw InputError(fmt::format("base date \"{}\" is not a date (use YYYY-MM-DD)", s_.baseDate));
        base = b;
    }
    number(rowBase, 1, base - d_.dateOffset, "YYYY-MM-DD").setting = "base";
    text(rowLevel, 0, "Band level");
    number(rowLevel, 1, s_.level, "0%").setting = "level";
    text(sr + 7, 0, "Sales used");
    text(sr + 8, 0, "Sales up to");
    number(sr + 8, 1, lastSale_ - d_.dateOffset, "YYYY-MM-DD");
    text(sr + 9, 0, "Headline period");
    const long headlineKey = lastKey - headlineOffset;
    text(sr + 9, 1,
         !partial ? periodLabel(headlineKey, freq_)
         : headlineOffset ? fmt::format("{} ({} is partial: sales up to {})", periodLabel(headlineKey, freq_),
                                        periodLabel(lastKey, freq_), salesUpTo)
                          : fmt::format("{} (partial: sales up to {}; included by the settings)",
                                        periodLabel(headlineKey, freq_), salesUpTo));
    text(sr + 10, 0, "Built with");
    text(sr + 10, 1, "Lintel " LINTEL_VERSION " (Update report in the Lintel sidebar updates this sheet in place)");
    const int statusRow = sr + 11;
    text(statusRow, 0, "Method status", true);

    const std::string freqRef = cellRef(rowFreq, 1), baseRef = cellRef(rowBase, 1);
    std::string charsBlock, strataBlock, idRange, changedRange;
    if (!chars.empty()) charsBlock = columnsBlock(chars, "Characteristics");
    if (!strata.empty()) strataBlock = columnsBlock(strata, "Strata");
    if (idc >= 0) idRange = dataColumn(idc);
    if (chc >= 0) changedRange = dataColumn(chc);

    // Method tables.
    const int first = Layout::kTableFirstRow;
    const int last = first + T - 1;
    for (int i = 0; i < M; ++i) {
        const Method m = methods[i];
        const int c = tableCol[i];
        block(fmt::format("table_{}", methodKey(m)), fmt::format("index table: {}", methodLabel(m)));
        if (i == 0) text(Layout::kTableTitleRow - 1, 0, "Index tables (array formulas; base period = 100)", true);
        std::string opts = "\"level=\"&" + cellRef(rowLevel, 1);
        // Strata, categories and ids compared cleaned, as the segment.
        if (m == Method::Mix || m == Method::Hedonic || m == Method::ReferenceHome || m == Method::RepeatSales)
            opts += "&" + formulaText("; labels=clean");
        auto adv = s_.advanced.find(methodKey(m));
        if (adv != s_.advanced.end() && !adv->second.empty())
            opts += "&" + formulaText("; " + adv->second);
        const addin::FunctionSpec& fn = addin::functionSpec(methodFunction(m));
        std::vector<std::pair<std::string, std::string>> named = {
            {"dates", dates}, {"prices", prices}, {"include", include},
            {"freq", freqRef}, {"base", baseRef}, {"options", opts}};
        if (m == Method::Mix) named.emplace_back("strata", strataBlock);
        if (m == Method::Hedonic || m == Method::ReferenceHome) named.emplace_back("characteristics", charsBlock);
        if (m == Method::RepeatSales) {
            named.emplace_back("ids", idRange);
            named.emplace_back("changed", changedRange);
        }
        const std::string call = addin::formulaCall(fn, named);
        text(Layout::kTableTitleRow, c, methodLabel(m), true);
        const int width = static_cast<int>(fn.width());
        for (int h = 0; h < width; ++h) {
            text(Layout::kTableHeadRow, c + h, capitalised(fn.columns[static_cast<std::size_t>(h)].title), true);
            const std::string& fm = fn.columns[static_cast<std::size_t>(h)].format;
            format(first, c + h, T, 1, h == 0 ? "YYYY-MM" : fm);
        }
        array(first, c, T, width, "=" + call);
        nameCells(first, c, T, width);
        plan_.methodCells.push_back({methodLabel(m), {first, c}});
    }
    // Method status rows (live: a method whose table shows a message says it here).
    block("settings", "settings");
    for (int i = 0; i < M; ++i) {
        const int r = statusRow + 1 + i;
        const std::string tl = cellRef(first, tableCol[i]);
        text(r, 0, methodLabel(methods[i]));
        formula(r, 1, fmt::format("=IF(ISTEXT({0});{0};\"ok\")", tl));
    }
    for (std::size_t i = 0; i < plan_.warnings.size(); ++i)
        text(statusRow + 1 + M + static_cast<int>(i), 0, "Warning: " + plan_.warnings[i]);
    if (!methods.empty() && methods[0] != Method::ReferenceHome)
        formula(sr + 7, 1, fmt::format("=SUM({})", localRange(first, tableCol[0] + 2, last, tableCol[0] + 2)), "0");

    // Chart data: the methods lined up by period (IFERROR leaves "" = a gap in the chart).
    const int bc = blockCol;
    block("chartdata", "chart data");
    text(Layout::kTableTitleRow - 1, bc, "Chart data (methods lined up by period)", true);
    const int lag = periodsPerYear(freq_);
    struct Columns { int col; const char* title; };
    const std::vector<Columns> blocks = {{bc, "Index level"},
                                         {bc + (K + 2), "Change over a year (%)"},
                                         {bc + 2 * (K + 2), "Change over one period (%)"}};
    for (const auto& b : blocks) {
        text(Layout::kTableTitleRow, b.col, b.title, true);
        text(Layout::kTableHeadRow, b.col, "Period", true);
        periodColumn(first, b.col, T);
    }
    const std::string chartPeriods = localRange(first, bc, last, bc);
    for (int k = 0; k < K; ++k) {
        const Method m = indexMethods[k];
        const int tc = tableCol[std::find(methods.begin(), methods.end(), m) - methods.begin()];
        const int lc = bc + 1 + k;
        for (const auto& b : blocks) text(Layout::kTableHeadRow, b.col + 1 + k, methodLabel(m), true);
        const std::string periodsCol = localRange(first, tc, last, tc);
        const std::string indexCol = localRange(first, tc + 1, last, tc + 1);
        array(first, lc, T, 1,
              fmt::format("=IFERROR(INDEX({};MATCH({};{};0));\"\")", indexCol, chartPeriods, periodsCol));
        format(first, lc, T, 1, "0.0");
        const std::string levels = localRange(first, lc, last, lc);
        const addin::FunctionSpec& changeFn = addin::functionSpec("INDEXCHANGE");
        array(first, blocks[1].col + 1 + k, T, 1,
              "=" + addin::formulaCall(changeFn, {{"index", levels}, {"lag", std::to_string(lag)}}));
        array(first, blocks[2].col + 1 + k, T, 1,
              "=" + addin::formulaCall(changeFn, {{"index", levels}, {"lag", "1"}}));
        format(first, blocks[1].col + 1 + k, T, 1, "0.0");
        format(first, blocks[2].col + 1 + k, T, 1, "0.0");
    }
    // Sales per period, from the first raw table.
    const int salesBlock = bc + 3 * (K + 2);
    text(Layout::kTableTitleRow, salesBlock, "Sales per period", true);
    text(Layout::kTableHeadRow, salesBlock, "Period", true);
    text(Layout::kTableHeadRow, salesBlock + 1, "Sales", true);
    periodColumn(first, salesBlock, T);
    array(first, salesBlock + 1, T, 1,
          fmt::format("=IFERROR(INDEX({};MATCH({};{};0));0)",
                      localRange(first, tableCol[0] + 2, last, tableCol[0] + 2),
                      localRange(first, salesBlock, last, salesBlock),
                      localRange(first, tableCol[0], last, tableCol[0])));
    format(first, salesBlock + 1, T, 1, "0");
    const std::string salesCol = localRange(first, salesBlock + 1, last, salesBlock + 1);

    // Comparison table: one row per index method, with the headline changes and their flags.
    const int cr = Layout::kSettingsRow, cc = 3;
    block("comparison", "comparison");
    const addin::FunctionSpec& compareFn = addin::functionSpec("INDEXCOMPARE");
    const int compareCols = static_cast<int>(compareFn.width());
    text(cr, cc, fmt::format("Comparison (INDEXCOMPARE over the chart data; headline period {})",
                             periodLabel(headlineKey, freq_)), true);
    const int sc = cc + compareCols + 5;  // method | signal-to-noise, for the bar chart
    if (K > 0) {
        const std::string levelsWithNames = localRange(Layout::kTableHeadRow, bc + 1, last, bc + K);
        array(cr + 1, cc, K + 1, compareCols,
              "=" + addin::formulaCall(compareFn, {{"indexes", levelsWithNames},
                                                   {"freq", freqRef},
                                                   {"options", "\"header=1; titles=1\""}}));
        const int hc = cc + compareCols;
        text(cr + 1, hc, "Latest period (%)", true);
        text(cr + 1, hc + 2, fmt::format("Over {} periods (%)", lag), true);
        // The sales behind a headline: fewer than `thin` are flagged beside it.
        const std::string salesAt = fmt::format("INDEX({0};ROWS({0})-{1})", salesCol, headlineOffset);
        const std::string salesYearAgo =
            fmt::format("INDEX({0};ROWS({0})-{1})", salesCol, headlineOffset + lag);
        for (int k = 0; k < K; ++k) {
            const std::string pop = localRange(first, blocks[2].col + 1 + k, last, blocks[2].col + 1 + k);
            const std::string yoy = localRange(first, blocks[1].col + 1 + k, last, blocks[1].col + 1 + k);
            formula(cr + 2 + k, hc, fmt::format("=IFERROR(INDEX({0};ROWS({0})-{1});\"\")", pop, headlineOffset), "0.0");
            formula(cr + 2 + k, hc + 1,
                    fmt::format("=IFERROR(IF({0}<{1};\"thin: \"&{0}&\" sales\";\"\");\"\")", salesAt, s_.thin));
            formula(cr + 2 + k, hc + 2, fmt::format("=IFERROR(INDEX({0};ROWS({0})-{1});\"\")", yoy, headlineOffset), "0.0");
            formula(cr + 2 + k, hc + 3,
                    fmt::format("=IFERROR(IF(MIN({0};{1})<{2};\"thin: \"&MIN({0};{1})&\" sales\";\"\");\"\")",
                                salesAt, salesYearAgo, s_.thin));
        }
        format(cr + 2, cc + 1, K, compareCols - 1, "0.00");
        format(cr + 2, cc + 2, K, 1, "0.000");  // signal-to-noise: small numbers
        nameCells(cr + 1, cc, K + 1, compareCols + 4);
        text(cr + 1, sc, "Method", true);
        text(cr + 1, sc + 1, "Signal-to-noise", true);
        for (int k = 0; k < K; ++k) {
            text(cr + 2 + k, sc, methodLabel(indexMethods[k]));
            formula(cr + 2 + k, sc + 1, fmt::format("={}", cellRef(cr + 2 + k, cc + 2)), "0.000");
        }
    }

    // The record (hidden row): written by the builder.
    block("record", "record");
    plan_.recordRow = Layout::kRecordRow;
    plan_.recordCol = 0;

    // Charts: 3 rows of 2, each reading one contiguous block.
    auto chart = [&](const std::string& name, const std::string& title, ChartSpec::Type type,
                     int row, int col, int rows, int cols, int slot) {
        ChartSpec c;
        c.name = name; c.title = title; c.type = type;
        c.row = row; c.col = col; c.rows = rows; c.cols = cols;
        c.anchorRow = Layout::kChartRow + (slot / 2) * Layout::kChartRowStep;
        c.anchorCol = (slot % 2) * 8;
        plan_.charts.push_back(c);
    };
    if (K > 0) {
        chart("levels", "Index levels (base period = 100)", ChartSpec::Type::Line,
              Layout::kTableHeadRow, bc, T + 1, K + 1, 0);
        chart("yearchange", "Change over a year (%)", ChartSpec::Type::Line,
              Layout::kTableHeadRow, blocks[1].col, T + 1, K + 1, 1);
        chart("periodchange", "Change over one period (%)", ChartSpec::Type::Line,
              Layout::kTableHeadRow, blocks[2].col, T + 1, K + 1, 2);
        chart("signalnoise", "Signal-to-noise ratio per method (higher = smoother)", ChartSpec::Type::Bar,
              cr + 1, sc, K + 1, 2, 3);
    }
    chart("sales", "Sales per period", ChartSpec::Type::Bar, Layout::kTableHeadRow, salesBlock,
          T + 1, 2, 4);

    finishBlocks();
    // The record block owns its one cell.
    for (auto& b : plan_.blocks)
        if (b.key == "record") b.rect = Rect{plan_.recordRow, plan_.recordCol, plan_.recordRow, plan_.recordCol};
    plan_.printRows = last + 1;
    plan_.printCols = 16;
    plan_.status = fmt::format("{}: {} sales, {} periods ({}), sales up to {}{}", plan_.sheetName,
                               plan_.salesUsed, T, range, salesUpTo,
                               plan_.warnings.empty() ? "" : fmt::format(", {} warning(s)", plan_.warnings.size()));
    return plan_;
}

}  // namespace

std::string absoluteRange(const std::string& sheet, int row0, int col0, int row1, int col1) {
    return fmt::format("${}.{}:{}", quoteSheet(sheet), cellRef(row0, col0), cellRef(row1, col1));
}

ReportPlan planReport(const ReportSettings& settings, const SheetData& data) {
    return Planner(settings, data).run();
}

}  // namespace lintel::report
