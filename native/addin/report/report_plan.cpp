#include "report_plan.hpp"

#include <algorithm>
#include <cctype>
#include <climits>
#include <cmath>
#include <map>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "label_text.hpp"
#include "periods.hpp"

namespace lintel::report {

using addin::CallContext;
using addin::Cell;

std::string columnName(int col) {
    std::string s;
    for (int c = col + 1; c > 0; c = (c - 1) / 26) s.insert(s.begin(), static_cast<char>('A' + (c - 1) % 26));
    return s;
}

std::string quoteSheet(const std::string& sheet) {
    bool plain = !sheet.empty() && !std::isdigit(static_cast<unsigned char>(sheet[0]));
    for (char c : sheet) plain = plain && (std::isalnum(static_cast<unsigned char>(c)) || c == '_');
    if (plain) return sheet;
    std::string q = "'";
    for (char c : sheet) q += c == '\'' ? std::string("''") : std::string(1, c);
    return q + "'";
}

std::string absoluteRange(const std::string& sheet, int row0, int col0, int row1, int col1) {
    return fmt::format("${}.${}${}:${}${}", quoteSheet(sheet), columnName(col0), row0 + 1,
                       columnName(col1), row1 + 1);
}

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

namespace {

std::string cellRef(int row, int col) { return fmt::format("${}${}", columnName(col), row + 1); }

std::string localRange(int row0, int col0, int row1, int col1) {
    return fmt::format("{}:{}", cellRef(row0, col0), cellRef(row1, col1));
}

std::string formulaText(const std::string& s) {  // a Calc string literal
    std::string q = "\"";
    for (char c : s) q += c == '"' ? std::string("\"\"") : std::string(1, c);
    return q + "\"";
}

// "Index" for "index": a column title as a heading.
std::string capitalised(std::string s) {
    if (!s.empty()) s[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(s[0])));
    return s;
}

bool haveFunction(const char* name) { return addin::findFunctionByName(name) != nullptr; }
// 12002 -> "12,002" (the report's counts).
std::string grouped(std::size_t n) {
    std::string d = std::to_string(n), out;
    for (std::size_t i = 0; i < d.size(); ++i) {
        if (i && (d.size() - i) % 3 == 0) out += ',';
        out += d[i];
    }
    return out;
}

[[maybe_unused]] bool haveOption(const char* function, const char* key) {
    const addin::FunctionSpec* f = addin::findFunctionByName(function);
    return f && f->option(key);
}

// A name part made of letters, digits and underscores ("Varnholt, flat" -> "varnholt_flat").
std::string nameKey(const std::string& label) {
    std::string k;
    for (unsigned char c : label) {
        if (std::isalnum(c)) k += static_cast<char>(std::tolower(c));
        else if (!k.empty() && k.back() != '_') k += '_';
    }
    while (!k.empty() && k.back() == '_') k.pop_back();
    if (k.empty() || std::isdigit(static_cast<unsigned char>(k[0]))) k = "s" + k;
    return k.substr(0, 40);
}

// The sheet's rows and columns (0-based). The first two pages are what a client reads
// (landscape, columns A..L, 40 rows each); the worksheet area below holds the settings and
// one section per segment with its tables and chart data.
struct Layout {
    static constexpr int kCols = 12;             // A..L: the printed width
    static constexpr int kPageRows = 40;
    static constexpr int kSummaryHeadRow = 5;
    static constexpr int kSummaryFirstRow = 6;
    static constexpr int kPage2 = kPageRows;     // second page: the charts
    static constexpr int kRecordRow = 2 * kPageRows;  // hidden: the report's record
    static constexpr int kWorkRow = kRecordRow + 2;   // the worksheet area
};

// A segment of the report: the whole scope, or one combination of the segment columns.
struct Segment {
    std::string label;  // "All sales" / "Varnholt, flat"
    std::string key;    // "all" / "varnholt_flat" (named ranges)
    std::vector<std::pair<int, std::string>> match;  // data column, value (as displayed)
    std::size_t sales = 0;
    long firstKey = 0, lastKey = 0;
    bool whole = false;
};

// One method's place in a segment section.
struct MethodCells {
    Method method;
    int col = 0, width = 0;
    int rows = 0;         // the table's rows (the segment's periods)
    int bandCol = -1;     // the year-band table (index methods)
    bool borrows = false; // hedonic of a thin segment: smoothed, borrowing from the whole range
};

class Planner {
public:
    Planner(const ReportSettings& s, const SheetData& d) : s_(s), d_(d) {}
    ReportPlan run();

private:
    // ---- reading the data -------------------------------------------------------------
    int column(const std::string& name, const char* role, bool required) const;
    std::string dataColumn(int c) const {
        const int r0 = d_.firstRow + 1, r1 = d_.firstRow + static_cast<int>(d_.cells.rows) - 1;
        return absoluteRange(d_.sheet, r0, d_.firstCol + c, r1, d_.firstCol + c);
    }
    std::string columnsBlock(const std::vector<int>& cols, const std::string& what, int row);
    void findScopeAndSegments();
    std::string includeExpression(const Segment& s);
    std::string matchTerm(int col, const std::vector<std::string>& values);

    // ---- the parts of the sheet ---------------------------------------------------------
    void titleAndCaution();
    int settingsBlock(int row);
    void segmentSection(std::size_t si, int row);
    void quotedBlock(int row);
    void summary();
    void charts();
    int comparablesBlock(int row, int col);
    void dataCheckBlock(int row, int col);
    std::string methodSentence() const;

    // ---- writing --------------------------------------------------------------------------
    void block(const std::string& key, const std::string& title);
    void nameCells(int r, int c, int rows, int cols) {
        plan_.blocks[static_cast<std::size_t>(block_)].named = Rect{r, c, r + rows - 1, c + cols - 1};
    }
    CellWrite& add(CellWrite w) {
        w.block = block_;
        plan_.cells.push_back(std::move(w));
        return plan_.cells.back();
    }
    CellWrite& text(int r, int c, const std::string& t, bool bold = false, double height = 0) {
        CellWrite w;
        w.kind = CellWrite::Kind::Text;
        w.row = r; w.col = c; w.value = t; w.bold = bold; w.charHeight = height;
        return add(w);
    }
    CellWrite& number(int r, int c, double x, const std::string& format = {}) {
        CellWrite w;
        w.kind = CellWrite::Kind::Number;
        w.row = r; w.col = c; w.number = x; w.format = format;
        return add(w);
    }
    CellWrite& formula(int r, int c, const std::string& f, const std::string& format = {}) {
        CellWrite w;
        w.kind = CellWrite::Kind::Formula;
        w.row = r; w.col = c; w.value = f; w.format = format;
        return add(w);
    }
    CellWrite& array(int r, int c, int rows, int cols, const std::string& f) {
        CellWrite w;
        w.kind = CellWrite::Kind::ArrayFormula;
        w.row = r; w.col = c; w.rows = rows; w.cols = cols; w.value = f;
        return add(w);
    }
    void format(int r, int c, int rows, int cols, const std::string& f) {
        CellWrite w;
        w.kind = CellWrite::Kind::Format;
        w.row = r; w.col = c; w.rows = rows; w.cols = cols; w.format = f;
        add(w);
    }
    // The period starts of the report's axis as one array formula.
    void periodColumn(int r, int c) {
        array(r, c, T_, 1,
              fmt::format("=EDATE({};(ROW($A$1:$A${})-1)*{})",
                          periodStartOfKey(firstKey_, freq_) - d_.dateOffset, T_, monthsPerPeriod(freq_)));
        format(r, c, T_, 1, "YYYY-MM");
    }
    void finishBlocks();

    const ReportSettings& s_;
    const SheetData& d_;
    ReportPlan plan_;
    Frequency freq_ = Frequency::Month;
    long firstKey_ = 0;  // the report's period axis (the scope's first to last period)
    int T_ = 0;
    long headlineKey_ = 0;
    int headlineOffset_ = 0;  // 1 when the last period is partial and left out
    bool partial_ = false;
    double lastSale_ = 0;     // serial from 1899-12-30
    int block_ = -1;

    // Column roles.
    int dateCol_ = -1, priceCol_ = -1, idCol_ = -1, changedCol_ = -1;
    std::vector<int> chars_, strata_;
    std::string homeCaption_;
    int statusRow_ = 0;
    bool backtestUsed_ = false;
    bool borrowUsed_ = false;  // a thin segment's hedonic index borrows strength  // a segment's quoted measure comes from INDEXBACKTEST  // first method status row of the settings block  // formula describing the reference home (whole scope), or empty
    std::vector<Method> methods_, indexMethods_;
    std::vector<Segment> segments_;
    std::vector<std::size_t> scopeRows_;  // usable rows of the scope (data rows, 1-based)

    // Cells every formula refers to (set by settingsBlock).
    std::string freqRef_, baseRef_, levelRef_, thinRef_;
    std::string dates_, prices_, charsBlock_, strataBlock_, idRange_, changedRange_;
    int helperCol_ = 0;

    // Per segment: where its quoted measure is (filled by segmentSection).
    struct SegmentCells {
        int row = 0;                 // section's first row
        int chartCol = 0;            // chart data block: period | levels K | lower K | upper K | yoy K | pop K | sales
        int quotedCell[2] = {0, 0};  // row, col of the quoted method's number (1..K)
        int reasonCell[2] = {0, 0};
        int quotedIndex = 1;          // the quoted method's number as planned (1..K)
        int borrowPosition = 0;       // 1..K: the hedonic index borrows strength (thin segment)
        std::vector<MethodCells> tables;
    };
    std::vector<SegmentCells> cells_;
    int quotedRow_ = 0, quotedCol_ = 0;  // the quoted block: period | one column per segment
    int wholeBandCol_ = 0;               // whole market: quoted lower | upper beside it
};

void Planner::block(const std::string& key, const std::string& title) {
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

// A block of data columns as one range: direct when contiguous, else copied by formula into
// a helper block of the report sheet (a function takes one rectangular range).
std::string Planner::columnsBlock(const std::vector<int>& cols, const std::string& what, int row) {
    bool contiguous = true;
    for (std::size_t i = 1; i < cols.size(); ++i) contiguous = contiguous && cols[i] == cols[i - 1] + 1;
    const int r0 = d_.firstRow + 1, r1 = d_.firstRow + static_cast<int>(d_.cells.rows) - 1;
    if (contiguous)
        return absoluteRange(d_.sheet, r0, d_.firstCol + cols.front(), r1, d_.firstCol + cols.back());
    const int n = static_cast<int>(d_.cells.rows) - 1;
    const int c0 = helperCol_;
    const int saved = block_;
    block("copy_" + nameKey(what), what + " (copied by formula into one block)");
    text(row, c0, fmt::format("{} (copied by formula into one block)", what), true);
    for (std::size_t i = 0; i < cols.size(); ++i) {
        text(row + 1, c0 + static_cast<int>(i), addin::cellKey(d_.cells.at(0, static_cast<std::size_t>(cols[i]))), true);
        array(row + 2, c0 + static_cast<int>(i), n, 1, "=" + dataColumn(cols[i]));
    }
    helperCol_ += static_cast<int>(cols.size()) + 1;
    block_ = saved;
    return localRange(row + 2, c0, row + 1 + n, c0 + static_cast<int>(cols.size()) - 1);
}

// The include term of one column and its values: ISSEGMENT (labels compared cleaned) where
// the function exists, else an equality test.
std::string Planner::matchTerm(int col, const std::vector<std::string>& values) {
    bool numeric = false;
    for (std::size_t r = 1; r < d_.cells.rows; ++r) {
        const Cell& cell = d_.cells.at(r, static_cast<std::size_t>(col));
        if (!cell.isEmpty()) { numeric = cell.isNumber(); break; }
    }
    const std::string range = dataColumn(col);
    if (!numeric && haveFunction("ISSEGMENT")) {
        std::string list;
        if (values.size() == 1) list = formulaText(values[0]);
        else {
            for (const auto& v : values) list += (list.empty() ? "" : ";") + formulaText(v);
            list = "{" + list + "}";
        }
        return fmt::format("ISSEGMENT({};{})", range, list);
    }
    auto lit = [&](const std::string& v) { return numeric ? v : formulaText(v); };
    if (values.size() == 1) return fmt::format("({}={})", range, lit(values[0]));
    std::string sum;
    for (const auto& v : values) sum += (sum.empty() ? "" : "+") + fmt::format("({}={})", range, lit(v));
    return "((" + sum + ")>0)";
}

std::string Planner::includeExpression(const Segment& seg) {
    std::string expr;
    for (const auto& f : s_.segment) {
        if (f.values.empty()) continue;
        expr += (expr.empty() ? "" : "*") + matchTerm(column(f.column, "segment", true), f.values);
    }
    for (const auto& [col, value] : seg.match)
        expr += (expr.empty() ? "" : "*") + matchTerm(col, {value});
    // With ids, SALESCHECK's use mask: a sale entered twice counts once, conflicting prices
    // and unreadable rows are left out.
    if (idCol_ >= 0 && haveFunction("SALESCHECK"))
        expr += (expr.empty() ? "" : "*") +
                addin::formulaCall(addin::functionSpec("SALESCHECK"),
                                   {{"dates", dates_}, {"prices", prices_}, {"ids", idRange_},
                                    {"options", formulaText("output=use; labels=clean")}});
    return expr;
}

// The scope (the settings' segment filter) and the segments: every combination of the
// segment columns with enough sales, most first; labels compared cleaned (labelKey).
void Planner::findScopeAndSegments() {
    dateCol_ = column(s_.dateColumn, "sale date", true);
    priceCol_ = column(s_.priceColumn, "price", true);
    std::vector<std::pair<int, std::vector<std::string>>> scope;
    for (const auto& f : s_.segment) {
        if (f.values.empty()) continue;
        std::vector<std::string> keys;
        for (const auto& v : f.values) keys.push_back(labelKey(v));
        scope.emplace_back(column(f.column, "segment", true), keys);
    }
    std::vector<int> segCols;
    for (const auto& n : s_.segmentColumns) segCols.push_back(column(n, "segment", true));

    CallContext ctx;
    ctx.dateOffset = d_.dateOffset;
    ctx.dateOrder = d_.dateOrder;
    ctx.numbers = d_.numbers;
    long lo = LONG_MAX, hi = LONG_MIN;
    struct Combo {
        std::size_t sales = 0;
        long lo = LONG_MAX, hi = LONG_MIN;
        std::vector<std::map<std::string, std::size_t>> spellings;
    };
    std::map<std::vector<std::string>, Combo> combos;
    for (std::size_t r = 1; r < d_.cells.rows; ++r) {
        const double date = addin::cellDate(d_.cells.at(r, static_cast<std::size_t>(dateCol_)), ctx);
        const double price = addin::cellNumber(d_.cells.at(r, static_cast<std::size_t>(priceCol_)), ctx.numbers);
        if (!isUsableSerial(date) || !(price > 0)) continue;
        bool keep = true;
        for (const auto& [c, keys] : scope) {
            const std::string v = labelKey(addin::cellKey(d_.cells.at(r, static_cast<std::size_t>(c))));
            keep = keep && std::find(keys.begin(), keys.end(), v) != keys.end();
        }
        if (!keep) continue;
        scopeRows_.push_back(r);
        lastSale_ = std::max(lastSale_, std::floor(date));
        const long k = periodKey(date, freq_);
        lo = std::min(lo, k);
        hi = std::max(hi, k);
        if (segCols.empty()) continue;
        std::vector<std::string> key;
        std::vector<std::string> shown;
        for (int c : segCols) {
            const std::string raw = addin::cellKey(d_.cells.at(r, static_cast<std::size_t>(c)));
            key.push_back(labelKey(raw));
            shown.push_back(tidyLabel(raw));
        }
        if (std::any_of(key.begin(), key.end(), [](const std::string& x) { return x.empty(); })) continue;
        Combo& cb = combos[key];
        cb.spellings.resize(segCols.size());
        for (std::size_t i = 0; i < segCols.size(); ++i) ++cb.spellings[i][shown[i]];
        ++cb.sales;
        cb.lo = std::min(cb.lo, k);
        cb.hi = std::max(cb.hi, k);
    }
    if (scopeRows_.empty())
        throw InputError(fmt::format("the scope ({}) keeps no sale with a date and a price", s_.segmentText()));
    firstKey_ = lo;
    T_ = static_cast<int>(hi - lo + 1);
    plan_.salesUsed = scopeRows_.size();
    plan_.periods = T_;

    Segment whole;
    whole.label = s_.segment.empty() ? "All sales" : s_.segmentText();
    whole.key = "all";
    whole.whole = true;
    whole.sales = scopeRows_.size();
    whole.firstKey = lo;
    whole.lastKey = hi;
    segments_.push_back(whole);

    // Listed segments ("v1/v2" in column order), or the combinations with enough sales.
    std::vector<std::pair<std::vector<std::string>, const Combo*>> chosen;
    if (!s_.segmentList.empty()) {
        for (const auto& entry : s_.segmentList) {
            std::vector<std::string> key;
            std::size_t pos = 0;
            while (true) {
                const std::size_t end = entry.find('/', pos);
                key.push_back(labelKey(entry.substr(pos, end == std::string::npos ? std::string::npos : end - pos)));
                if (end == std::string::npos) break;
                pos = end + 1;
            }
            if (key.size() != segCols.size())
                throw InputError(fmt::format("segment \"{}\" needs one value per segment column ({})", entry,
                                             segCols.size()));
            const auto it = combos.find(key);
            if (it == combos.end())
                throw InputError(fmt::format("segment \"{}\" has no sale in the scope", entry));
            chosen.emplace_back(key, &it->second);
        }
    } else {
        for (const auto& [key, cb] : combos)
            if (static_cast<int>(cb.sales) >= s_.segmentMin) chosen.emplace_back(key, &cb);
        std::stable_sort(chosen.begin(), chosen.end(),
                         [](const auto& a, const auto& b) { return a.second->sales > b.second->sales; });
        if (static_cast<int>(chosen.size()) > s_.maxSegments) chosen.resize(static_cast<std::size_t>(s_.maxSegments));
    }
    std::map<std::string, int> used = {{"all", 1}};
    for (const auto& [key, cb] : chosen) {
        Segment seg;
        for (std::size_t i = 0; i < segCols.size(); ++i) {
            // The display form: the most frequent spelling (ties: the first in text order).
            std::string best;
            std::size_t n = 0;
            for (const auto& [spelling, count] : cb->spellings[i])
                if (count > n) { best = spelling; n = count; }
            seg.match.emplace_back(segCols[i], best);
            seg.label += (seg.label.empty() ? "" : ", ") + best;
        }
        seg.key = nameKey(seg.label);
        if (used[seg.key]++) seg.key += fmt::format("_{}", used[seg.key]);
        seg.sales = cb->sales;
        seg.firstKey = cb->lo;
        seg.lastKey = cb->hi;
        segments_.push_back(seg);
    }
}

void Planner::titleAndCaution() {
    block("title", "title and caution");
    const std::string range =
        fmt::format("{} .. {}", periodLabel(firstKey_, freq_), periodLabel(firstKey_ + T_ - 1, freq_));
    const char* unit = freq_ == Frequency::Month ? "monthly" : freq_ == Frequency::Quarter ? "quarterly" : "yearly";
    text(0, 0, fmt::format("Residential prices: {}", segments_.front().label), true, 18);
    long baseKey = firstKey_;
    if (!s_.baseDate.empty()) {
        const double b = addin::cellDate(Cell::str(s_.baseDate), {});
        if (isUsableSerial(b)) baseKey = periodKey(b, freq_);
    }
    text(1, 0, fmt::format("Sales up to {} · {} ({}) · latest full period {} · index = 100 in {}",
                           isoDate(lastSale_), unit, range, periodLabel(headlineKey_, freq_),
                           periodLabel(baseKey, freq_)));
    CellWrite& caution =
        text(2, 0, "Caution: a price index describes a market, not one home. Time-adjusting a sale with "
                   "it is no substitute for an appraisal by a licensed professional; follow local "
                   "appraisal standards and regulations.");
    caution.charHeight = 9;
    caution.wrap = true;
    caution.mergeCols = Layout::kCols;
}

// The values every formula refers to; base date, band level and frequency may be edited here
// (Update report keeps them). Returns the next free row.
int Planner::settingsBlock(int row) {
    block("settings", "settings");
    text(row, 0, "Settings", true, 12);
    int r = row + 1;
    auto line = [&](const std::string& label) {
        text(r, 0, label);
        return r++;
    };
    text(line("Sales data"), 1, s_.dataRange);
    text(line("Scope"), 1, s_.segment.empty() ? "all sales" : s_.segmentText());
    text(line("Segments"), 1,
         s_.segmentColumns.empty()
             ? "none (the whole scope only)"
             : fmt::format("by {} (at least {} sales each)", [&] {
                   std::string j;
                   for (const auto& c : s_.segmentColumns) j += (j.empty() ? "" : ", ") + c;
                   return j;
               }(), s_.segmentMin));
    const int rowFreq = line("Frequency");
    {
        CellWrite w;
        w.kind = CellWrite::Kind::Text;
        w.row = rowFreq; w.col = 1; w.value = frequencyCode(freq_); w.setting = "freq";
        add(w);
    }
    const int rowBase = line("Index base date");
    double base = periodStartOfKey(firstKey_, freq_);
    if (!s_.baseDate.empty()) {
        const double b = addin::cellDate(Cell::str(s_.baseDate), {});
        if (!isUsableSerial(b)) throw InputError(fmt::format("base date \"{}\" is not a date (use YYYY-MM-DD)", s_.baseDate));
        base = b;
    }
    number(rowBase, 1, base - d_.dateOffset, "YYYY-MM-DD").setting = "base";
    const int rowLevel = line("Band level");
    number(rowLevel, 1, s_.level, "0%").setting = "level";
    const int rowThin = line("Thin below (sales in a period)");
    number(rowThin, 1, s_.thin, "0");
    number(line("Sales in the scope"), 1, static_cast<double>(scopeRows_.size()), "#,##0");
    number(line("Sales up to"), 1, lastSale_ - d_.dateOffset, "YYYY-MM-DD");
    const long lastKey = firstKey_ + T_ - 1;
    text(line("Headline period"), 1,
         !partial_ ? periodLabel(headlineKey_, freq_)
         : headlineOffset_ ? fmt::format("{} ({} is partial: sales up to {})", periodLabel(headlineKey_, freq_),
                                         periodLabel(lastKey, freq_), isoDate(lastSale_))
                           : fmt::format("{} (partial: sales up to {}; included by the settings)",
                                         periodLabel(headlineKey_, freq_), isoDate(lastSale_)));
    text(line("Built with"), 1, "Lintel " LINTEL_VERSION " (Update report in the Lintel sidebar updates this sheet in place)");
    freqRef_ = cellRef(rowFreq, 1);
    baseRef_ = cellRef(rowBase, 1);
    levelRef_ = cellRef(rowLevel, 1);
    thinRef_ = cellRef(rowThin, 1);
    // Method status rows (live: a method whose table shows a message says it here); the
    // formulas are written once the whole scope's tables are placed.
    text(r++, 0, "Methods (whole scope)", true);
    statusRow_ = r;
    for (Method m : methods_) text(r++, 0, methodLabel(m));
    for (const auto& w : plan_.warnings) text(r++, 0, "Warning: " + w);
    return r + 1;
}

// One segment's section: its index tables (one per method), the year-band tables (base a
// year before the headline period, so each table's band there is the band of the yearly
// change), the chart data lined up on the report's period axis, and the quoted measure.
void Planner::segmentSection(std::size_t si, int row) {
    const Segment& seg = segments_[si];
    SegmentCells sc;
    sc.row = row;
    const std::string include = includeExpression(seg);
    const int Ts = static_cast<int>(seg.lastKey - seg.firstKey + 1);
    const int K = static_cast<int>(indexMethods_.size());

    // A thin segment (fewer sales a period on average than "thin below") borrows strength from
    // the whole range in its hedonic index: the market's period effects plus the segment's
    // own smoothed deviation (INDEXHEDONIC smooth=trend; borrow=1; docs/methods/smoothing.md).
    const auto hedonicAdv = s_.advanced.find(methodKey(Method::Hedonic));
    const std::string hedonicOptions = hedonicAdv == s_.advanced.end() ? std::string() : hedonicAdv->second;
    const bool borrow = !seg.whole && !include.empty() && haveOption("INDEXHEDONIC", "borrow") &&
                        hedonicOptions.find("window") == std::string::npos &&
                        hedonicOptions.find("bias") == std::string::npos &&
                        hedonicOptions.find("smooth") == std::string::npos &&
                        static_cast<double>(seg.sales) < static_cast<double>(s_.thin) * Ts;

    block(seg.key + "_title", "section title: " + seg.label);
    text(row, 0, fmt::format("{}: {} sales", seg.label, seg.sales), true, 12);
    text(row + 1, 0, "Include expression");
    text(row + 1, 1, include.empty() ? "(all sales)" : include);
    text(row + 2, 0, "Quoted measure");
    text(row + 3, 0, "Why");

    const int head = row + 5, first = row + 6;
    int col = 0;
    const std::string yearAgo = fmt::format("EDATE({};-12)", periodStartOfKey(headlineKey_, freq_) - d_.dateOffset);
    for (Method m : methods_) {
        const addin::FunctionSpec& fn = addin::functionSpec(methodFunction(m));
        MethodCells mc;
        mc.method = m;
        mc.col = col;
        mc.width = static_cast<int>(fn.width());
        mc.rows = Ts;
        std::string opts = "\"level=\"&" + levelRef_;
        // Strata, categories and ids compared cleaned, as the segment.
        if (m == Method::Mix || m == Method::Hedonic || m == Method::ReferenceHome || m == Method::RepeatSales)
            opts += "&" + formulaText("; labels=clean");
        auto adv = s_.advanced.find(methodKey(m));
        if (adv != s_.advanced.end() && !adv->second.empty()) opts += "&" + formulaText("; " + adv->second);
        std::vector<std::pair<std::string, std::string>> named = {
            {"dates", dates_}, {"prices", prices_}, {"include", include}, {"freq", freqRef_}, {"base", baseRef_},
            {"options", opts}};
        if (m == Method::Mix) named.emplace_back("strata", strataBlock_);
        if (m == Method::Hedonic || m == Method::ReferenceHome) named.emplace_back("characteristics", charsBlock_);
        if (m == Method::Hedonic && borrow) {
            mc.borrows = true;
            for (auto& [k, v] : named)
                if (k == "options") v += "&" + formulaText("; smooth=trend; borrow=1");
        }
        if (m == Method::RepeatSales) {
            named.emplace_back("ids", idRange_);
            named.emplace_back("changed", changedRange_);
        }
        block(seg.key + "_" + methodKey(m), fmt::format("index table: {}, {}", seg.label, methodLabel(m)));
        text(head - 1, col, methodLabel(m), true);
        for (int h = 0; h < mc.width; ++h) {
            text(head, col + h, capitalised(fn.columns[static_cast<std::size_t>(h)].title), true);
            const std::string& fm = fn.columns[static_cast<std::size_t>(h)].format;
            format(first, col + h, Ts, 1, h == 0 ? "YYYY-MM" : (m == Method::ReferenceHome && h > 0 ? d_.priceFormat : fm));
        }
        if (m == Method::ReferenceHome && seg.whole && !chars_.empty()) {
            // With notes=1 the rows below the periods say which home was valued: one row per
            // characteristic (name | value | whether the base period's median home filled it).
            auto withNotes = named;
            for (auto& [k, v] : withNotes)
                if (k == "options") v += "&\"; notes=1\"";
            const int n = static_cast<int>(chars_.size());
            array(first, col, Ts + n, mc.width, "=" + addin::formulaCall(fn, withNotes));
            std::string parts;
            for (int j = 0; j < n; ++j) {
                const std::string x = cellRef(first + Ts + j, col + 1);
                const std::string name =
                    addin::cellKey(d_.cells.at(0, static_cast<std::size_t>(chars_[static_cast<std::size_t>(j)])));
                parts += fmt::format("{0}{1}&IF(ISNUMBER({2});ROUND({2};1);{2})", j ? "&\"; \"&" : "",
                                     formulaText(name + " "), x);
            }
            homeCaption_ = fmt::format("=IFERROR(\"Reference home: \"&{}&\" (prices in the sales' currency; blank characteristics "
                                       "take the base period's median home)\";\"\")", parts);
        } else {
            array(first, col, Ts, mc.width, "=" + addin::formulaCall(fn, named));
        }
        nameCells(first, col, Ts, mc.width);
        if (seg.whole) plan_.methodCells.push_back({methodLabel(m), {first, col}});
        col += mc.width + 1;
        if (m != Method::ReferenceHome) {
            // The same measure with its base a year before the headline period.
            for (auto& [k, v] : named)
                if (k == "base") v = yearAgo;
            block(seg.key + "_" + methodKey(m) + "_year", fmt::format("yearly change: {}, {}", seg.label, methodLabel(m)));
            text(head - 1, col, fmt::format("{}: base a year before", methodLabel(m)), true);
            for (int h = 0; h < mc.width; ++h)
                text(head, col + h, capitalised(fn.columns[static_cast<std::size_t>(h)].title), true);
            array(first, col, Ts, mc.width, "=" + addin::formulaCall(fn, named));
            format(first, col, Ts, 1, "YYYY-MM");
            format(first, col + 1, Ts, mc.width - 1, "0.0");
            mc.bandCol = col;
            col += mc.width + 1;
        }
        sc.tables.push_back(mc);
    }

    // Chart data on the report's axis: period | levels | lower | upper | yearly | period | sales.
    block(seg.key + "_chartdata", "chart data: " + seg.label);
    const int bc = col;
    sc.chartCol = bc;
    const int last = first + T_ - 1;
    text(head - 1, bc, "Chart data (lined up by period)", true);
    text(head, bc, "Period", true);
    periodColumn(first, bc);
    const std::string axis = localRange(first, bc, last, bc);
    const char* parts[] = {"", " lower", " upper", " yearly %", " period %"};
    int k = 0;
    for (const MethodCells& mc : sc.tables) {
        if (mc.method == Method::ReferenceHome) continue;
        const std::string periods = localRange(first, mc.col, first + mc.rows - 1, mc.col);
        for (int part = 0; part < 3; ++part) {
            const int c = bc + 1 + part * K + k;
            text(head, c, std::string(mc.borrows ? "Hedonic, borrowing" : methodLabel(mc.method)) + parts[part], true);
            const int src = mc.col + (part == 0 ? 1 : part + 2);  // index, lower, upper
            array(first, c, T_, 1,
                  fmt::format("=IFERROR(INDEX({};MATCH({};{};0));\"\")",
                              localRange(first, src, first + mc.rows - 1, src), axis, periods));
            format(first, c, T_, 1, "0.0");
        }
        const std::string levels = localRange(first, bc + 1 + k, last, bc + 1 + k);
        const addin::FunctionSpec& changeFn = addin::functionSpec("INDEXCHANGE");
        for (int part = 3; part < 5; ++part) {
            const int c = bc + 1 + part * K + k;
            text(head, c, std::string(mc.borrows ? "Hedonic, borrowing" : methodLabel(mc.method)) + parts[part], true);
            array(first, c, T_, 1,
                  "=" + addin::formulaCall(changeFn, {{"index", levels},
                                                      {"lag", part == 3 ? std::to_string(periodsPerYear(freq_)) : "1"}}));
            format(first, c, T_, 1, "0.0");
        }
        ++k;
    }
    const int salesC = bc + 1 + 5 * K;
    text(head, salesC, "Sales", true);
    {
        const MethodCells& t0 = sc.tables.front();
        array(first, salesC, T_, 1,
              fmt::format("=IFERROR(INDEX({};MATCH({};{};0));0)",
                          localRange(first, t0.col + 2, first + t0.rows - 1, t0.col + 2), axis,
                          localRange(first, t0.col, first + t0.rows - 1, t0.col)));
        format(first, salesC, T_, 1, "0");
    }
    nameCells(head, bc, T_ + 1, 5 * K + 2);

    // The quoted measure: the best by INDEXBACKTEST when the report may choose (quote=auto)
    // and the function exists; else the settings' choice or the report's rule.
    block(seg.key + "_title", "");
    int quoted = 1;
    std::string why;
    auto position = [&](Method m) {
        for (int i = 0; i < K; ++i)
            if (indexMethods_[static_cast<std::size_t>(i)] == m) return i + 1;
        return 0;
    };
    if (s_.quote != "auto") {
        for (Method m : indexMethods_)
            if (s_.quote == methodKey(m)) quoted = position(m);
        why = "chosen in the report's settings";
    } else {
        for (Method m : {Method::Hedonic, Method::Mix, Method::RepeatSales, Method::Median, Method::Mean})
            if (position(m)) {
                quoted = position(m);
                break;
            }
        why = indexMethods_[static_cast<std::size_t>(quoted - 1)] == Method::Hedonic
                  ? "adjusts for the homes' features"
              : indexMethods_[static_cast<std::size_t>(quoted - 1)] == Method::Mix
                  ? "holds the mix of homes sold fixed"
              : indexMethods_[static_cast<std::size_t>(quoted - 1)] == Method::RepeatSales
                  ? "compares the same homes sold twice"
                  : "the first measure the settings list";
    }
    // Which measure to quote, measured on the segment's own sales: INDEXBACKTEST's
    // recommended row (held-out resales predicted, revision, missing periods); the rule above
    // when it cannot say (no resales, a method failing).
    const bool backtest = s_.quote == "auto" && idCol_ >= 0 && K > 1 && haveFunction("INDEXBACKTEST");
    std::string quotedFormula, whyFormula;
    if (backtest) {
        backtestUsed_ = true;
        block(seg.key + "_backtest", "which measure to quote: " + seg.label);
        const int btc = salesC + 2;
        const addin::FunctionSpec& bt = addin::functionSpec("INDEXBACKTEST");
        const int width = static_cast<int>(bt.width());
        text(head - 1, btc, "Which measure to quote (INDEXBACKTEST on this segment's sales)", true);
        text(head, btc, "Candidate", true);
        for (int i = 0; i < K; ++i) {
            const Method m = indexMethods_[static_cast<std::size_t>(i)];
            std::string candidate = methodKey(m);
            auto adv = s_.advanced.find(methodKey(m));
            if (adv != s_.advanced.end() && !adv->second.empty()) candidate += " " + adv->second;
            if (m == Method::Hedonic && borrow) candidate += " smooth=trend borrow=1";
            text(first + i, btc, candidate);
        }
        for (int h = 0; h < width; ++h)
            text(head, btc + 1 + h, capitalised(bt.columns[static_cast<std::size_t>(h)].title), true);
        std::vector<std::pair<std::string, std::string>> named = {
            {"ids", idRange_}, {"dates", dates_}, {"prices", prices_}, {"include", include},
            {"freq", freqRef_}, {"methods", localRange(first, btc, first + K - 1, btc)}};
        if (!charsBlock_.empty()) named.emplace_back("characteristics", charsBlock_);
        if (!strataBlock_.empty()) named.emplace_back("strata", strataBlock_);
        if (!changedRange_.empty()) named.emplace_back("changed", changedRange_);
        array(first, btc + 1, K, width, "=" + addin::formulaCall(bt, named));
        for (int h = 0; h < width; ++h)
            if (!bt.columns[static_cast<std::size_t>(h)].format.empty())
                format(first, btc + 1 + h, K, 1, bt.columns[static_cast<std::size_t>(h)].format);
        nameCells(first, btc + 1, K, width);
        const std::string rec = localRange(first, btc + 10, first + K - 1, btc + 10);
        const std::string err = localRange(first, btc + 3, first + K - 1, btc + 3);
        quotedFormula = fmt::format("=IFERROR(MATCH(1;{};0);{})", rec, quoted);
        // In a few words for the summary (the full reason is in the table's last column).
        whyFormula = fmt::format(
            "=IFERROR(IF(INDEX({1};MATCH(1;{0};0))=MIN({1});\"most accurate on unseen resales\";"
            "\"as accurate within noise, steadier\")&\" (error \"&ROUND(INDEX({1};MATCH(1;{0};0));1)&\" %)\";{2})",
            rec, err, formulaText(why));
        helperCol_ = std::max(helperCol_, btc + width + 3);
        block(seg.key + "_title", "");
    }
    if (borrow) {
        for (int i = 0; i < K; ++i)
            if (indexMethods_[static_cast<std::size_t>(i)] == Method::Hedonic) sc.borrowPosition = i + 1;
        if (sc.borrowPosition) {
            borrowUsed_ = true;
            text(row + 2, 4, fmt::format("Thin: {:.1f} sales a period on average, below the {} the report asks; its "
                                         "hedonic index borrows strength from the whole range (the market's period "
                                         "effects plus this segment's smoothed deviation).",
                                         static_cast<double>(seg.sales) / Ts, s_.thin));
        }
    }
    sc.quotedIndex = quoted;
    sc.quotedCell[0] = row + 2;
    sc.quotedCell[1] = 2;
    if (backtest) formula(row + 2, 2, quotedFormula, "0");
    else number(row + 2, 2, quoted, "0");
    formula(row + 2, 1, fmt::format("=INDEX({};1;{})", localRange(head, bc + 1, head, bc + K), cellRef(row + 2, 2)));
    if (backtest) formula(row + 3, 1, whyFormula);
    else text(row + 3, 1, why);
    sc.reasonCell[0] = row + 3;
    sc.reasonCell[1] = 1;
    helperCol_ = std::max(helperCol_, salesC + 2);
    cells_.push_back(sc);
}

// The quoted measure of every segment on one period axis (the small multiples and the
// comparables read it), with the whole scope's band.
void Planner::quotedBlock(int row) {
    block("quoted", "quoted measures");
    const int K = static_cast<int>(indexMethods_.size());
    const int S = static_cast<int>(segments_.size());
    quotedRow_ = row;
    quotedCol_ = 0;
    text(row - 1, 0, "Quoted measure of each segment (lined up by period)", true);
    text(row, 0, "Period", true);
    periodColumn(row + 1, 0);
    for (int s = 0; s < S; ++s) {
        const SegmentCells& sc = cells_[static_cast<std::size_t>(s)];
        text(row, 1 + s, segments_[static_cast<std::size_t>(s)].label, true);
        const int first = sc.row + 6;
        array(row + 1, 1 + s, T_, 1,
              fmt::format("=INDEX({};0;{})",
                          localRange(first, sc.chartCol + 1, first + T_ - 1, sc.chartCol + K),
                          cellRef(sc.quotedCell[0], sc.quotedCell[1])));
        format(row + 1, 1 + s, T_, 1, "0.0");
    }
    // The whole scope: quoted level, lower, upper side by side for its chart.
    const SegmentCells& w = cells_.front();
    const int first = w.row + 6;
    wholeBandCol_ = S + 2;
    text(row, wholeBandCol_, "Period", true);
    periodColumn(row + 1, wholeBandCol_);
    const char* heads[] = {"Index", "Lower", "Upper", "Yearly %"};
    for (int part = 0; part < 4; ++part) {
        text(row, wholeBandCol_ + 1 + part, heads[part], true);
        array(row + 1, wholeBandCol_ + 1 + part, T_, 1,
              fmt::format("=INDEX({};0;{})",
                          localRange(first, w.chartCol + 1 + part * K, first + T_ - 1, w.chartCol + K + part * K),
                          cellRef(w.quotedCell[0], w.quotedCell[1])));
        format(row + 1, wholeBandCol_ + 1 + part, T_, 1, "0.0");
    }
    nameCells(row, 0, T_ + 1, S + 1);
}

// The market summary: one row per segment, the headline figures of its quoted measure.
void Planner::summary() {
    block("summary", "market summary");
    const int r0 = Layout::kSummaryHeadRow;
    const int K = static_cast<int>(indexMethods_.size());
    text(r0 - 1, 0, fmt::format("Market summary, {}", periodLabel(headlineKey_, freq_)), true, 13);
    const char* unit = freq_ == Frequency::Month ? "month" : freq_ == Frequency::Quarter ? "quarter" : "year";
    const std::vector<std::string> heads = {"Segment", "Measure quoted", "Median price", "Index",
                                            fmt::format("Change, {} %", unit), "Change, year %",
                                            fmt::format("{:.0f} % band, year change", 100 * s_.level), "",
                                            fmt::format("Sales, {}", unit), "Flags", "Why this measure", ""};
    for (std::size_t h = 0; h < heads.size(); ++h) {
        if (heads[h].empty()) continue;
        CellWrite& w = text(r0, static_cast<int>(h), heads[h], true);
        w.wrap = true;
        w.rule = true;
        w.charHeight = 9;
        if (h == 6) w.mergeCols = 2;  // the band: low | high
    }
    const double headStart = periodStartOfKey(headlineKey_, freq_) - d_.dateOffset;
    for (std::size_t s = 0; s < segments_.size(); ++s) {
        const Segment& seg = segments_[s];
        const SegmentCells& sc = cells_[s];
        const int r = Layout::kSummaryFirstRow + static_cast<int>(s);
        const int first = sc.row + 6, last = first + T_ - 1;
        const std::string q = cellRef(sc.quotedCell[0], sc.quotedCell[1]);
        const std::string axis = localRange(first, sc.chartCol, last, sc.chartCol);
        const std::string at = fmt::format("MATCH({};{};0)", headStart, axis);
        auto lined = [&](int part) {  // the quoted measure's column of a chart-data part
            return fmt::format("INDEX({};0;{})",
                               localRange(first, sc.chartCol + 1 + part * K, last, sc.chartCol + K + part * K), q);
        };
        text(r, 0, seg.label, seg.whole).charHeight = 9;
        formula(r, 1, fmt::format("={}", cellRef(sc.quotedCell[0], 1))).shrink = true;
        // Median price of the headline period in money (the sales of the segment).
        array(r, 2, 1, 1,
              fmt::format("=IFERROR(MEDIAN(IF(({}={})*({});{};\"\"));\"\")",
                          addin::formulaCall(addin::functionSpec("PERIODOF"), {{"date", dates_}, {"freq", freqRef_}}),
                          headStart, includeExpression(seg).empty() ? "1" : includeExpression(seg), prices_))
            .format = d_.priceFormat;
        formula(r, 3, fmt::format("=IFERROR(INDEX({};{});\"\")", lined(0), at), "0.0");
        formula(r, 4, fmt::format("=IFERROR(INDEX({};{});\"\")", lined(4), at), "+0.0;-0.0;0.0");
        formula(r, 5, fmt::format("=IFERROR(INDEX({};{});\"\")", lined(3), at), "+0.0;-0.0;0.0");
        // The band of the yearly change: the year-band table of the quoted measure at the
        // headline period (its base is a year earlier, so its band is the change's band).
        std::string lowers, uppers;
        for (const MethodCells& mc : sc.tables) {
            if (mc.bandCol < 0) continue;
            const std::string periods = localRange(first, mc.bandCol, first + mc.rows - 1, mc.bandCol);
            auto col = [&](int off) {
                return fmt::format("INDEX({};MATCH({};{};0))",
                                   localRange(first, mc.bandCol + off, first + mc.rows - 1, mc.bandCol + off),
                                   headStart, periods);
            };
            lowers += ";" + col(3);
            uppers += ";" + col(4);
        }
        formula(r, 6, fmt::format("=IFERROR(CHOOSE({}{})-100;\"\")", q, lowers), "+0.0;-0.0;0.0");
        formula(r, 7, fmt::format("=IFERROR(CHOOSE({}{})-100;\"\")", q, uppers), "+0.0;-0.0;0.0");
        const std::string sales = localRange(first, sc.chartCol + 1 + 5 * K, last, sc.chartCol + 1 + 5 * K);
        formula(r, 8, fmt::format("=IFERROR(INDEX({};{});0)", sales, at), "#,##0");
        // Flags: thin (fewer sales than the threshold), partial (the latest period left out).
        CellWrite& flags = formula(r, 9, fmt::format("=TRIM(IF(IFERROR(INDEX({0};{1});0)<{2};\"thin \";\"\")&\"{3}\"{4})", sales, at,
                                  thinRef_, headlineOffset_ ? "partial" : "",
                                  sc.borrowPosition ? fmt::format("&IF({}={};\" borrowed\";\"\")", q, sc.borrowPosition)
                                                    : std::string()));
        flags.center = true;
        flags.shrink = true;
        formula(r, 10, fmt::format("={}", cellRef(sc.reasonCell[0], sc.reasonCell[1]))).shrink = true;
    }
    CellWrite f;
    f.kind = CellWrite::Kind::Format;
    f.row = Layout::kSummaryFirstRow; f.col = 1;
    f.rows = static_cast<int>(segments_.size()); f.cols = 10;
    f.charHeight = 9;
    add(f);
    nameCells(r0, 0, static_cast<int>(segments_.size()) + 1, 11);
}

std::string Planner::methodSentence() const {
    std::string band = fmt::format("the band is the {:.0f} % confidence interval of the year's change", 100 * s_.level);
    if (borrowUsed_)
        band += "; a segment flagged \"borrowed\" is thin: its hedonic index borrows strength from the market";
    if (backtestUsed_)
        return fmt::format("Method: each segment quotes the measure that best predicted resales of its own sales "
                           "that it had not seen (Lintel's INDEXBACKTEST: accuracy first, then revision, then "
                           "missing periods); changes are of that index between periods; {}.", band);
    if (s_.quote != "auto")
        return fmt::format("Method: every segment quotes the measure the report's settings choose ({}); changes are "
                           "of that index between periods; {}.", s_.quote, band);
    return fmt::format("Method: each segment quotes, of the measures computed, the first that suits the data in this "
                       "order: hedonic time dummy, mix-adjusted median, repeat sales, median; changes are of that "
                       "index between periods; {}.", band);
}

// The data check: SALESCHECK's counts over the whole sales table (unreadable dates and prices,
// duplicates, conflicting prices, extreme prices), and the formula that lists the rows.
void Planner::dataCheckBlock(int row, int col) {
    block("datacheck", "data check");
    text(row, col, "Data check (every row of the sales data)", true, 12);
    const addin::FunctionSpec& check = addin::functionSpec("SALESCHECK");
    std::vector<std::pair<std::string, std::string>> named = {{"dates", dates_}, {"prices", prices_}, {"freq", freqRef_}};
    if (!idRange_.empty()) named.emplace_back("ids", idRange_);
    auto counts = named;
    counts.emplace_back("options", formulaText("output=counts; labels=clean; titles=1"));
    constexpr int kRows = 14;
    array(row + 1, col, kRows, 2, "=IFERROR(" + addin::formulaCall(check, counts) + ";\"\")");
    nameCells(row + 1, col, kRows, 2);
    auto list = named;
    list.emplace_back("options", formulaText("labels=clean; titles=1"));
    CellWrite& how = text(row + kRows + 1, col,
                          "The rows themselves (row, column, problem, value): type on a sheet of your own " +
                              std::string("=") + addin::formulaCall(check, list));
    how.charHeight = 8;
}

// Time-adjusted comparables: rows the analyst fills in (address, segment, sale date, price),
// adjusted to the valuation date with the quoted index of their segment.
int Planner::comparablesBlock(int row, int col) {
    block("comparables", "time-adjusted comparables");
    text(row, col, "Time-adjusted comparables (fill in the white cells)", true, 12);
    text(row + 1, col, "Valuation date");
    number(row + 1, col + 1, lastSale_ - d_.dateOffset, "YYYY-MM-DD").setting = "valuation";
    const std::vector<std::string> heads = {"Address", "Segment", "Sale date", "Sale price", "Adjusted price",
                                            "Index used"};
    for (std::size_t h = 0; h < heads.size(); ++h) text(row + 2, col + static_cast<int>(h), heads[h], true);
    const int n = 8;
    const std::string segs = localRange(quotedRow_, 1, quotedRow_, static_cast<int>(segments_.size()));
    const std::string periods = localRange(quotedRow_ + 1, 0, quotedRow_ + T_, 0);
    const std::string quoted = localRange(quotedRow_ + 1, 1, quotedRow_ + T_, static_cast<int>(segments_.size()));
    for (int i = 0; i < n; ++i) {
        const int r = row + 3 + i;
        for (int c = 0; c < 4; ++c) {
            CellWrite w;
            w.kind = CellWrite::Kind::Text;
            w.row = r; w.col = col + c; w.value = ""; w.setting = "input";
            add(w);
        }
        format(r, col + 2, 1, 1, "YYYY-MM-DD");
        format(r, col + 3, 1, 1, d_.priceFormat);
        const std::string seg = cellRef(r, col + 1), date = cellRef(r, col + 2), price = cellRef(r, col + 3);
        const std::string column = fmt::format("MATCH(IF({0}=\"\";{1};{0});{2};0)", seg,
                                               formulaText(segments_.front().label), segs);
        formula(r, col + 4,
                fmt::format("=IF(OR({0}=\"\";{1}=\"\");\"\";{2})", price, date,
                            addin::formulaCall(addin::functionSpec("PRICEADJUST"),
                                               {{"price", price}, {"saledate", date},
                                                {"targetdate", cellRef(row + 1, col + 1)},
                                                {"periods", periods},
                                                {"index", fmt::format("INDEX({};0;{})", quoted, column)}})),
                d_.priceFormat);
        formula(r, col + 5, fmt::format("=IF({0}=\"\";\"\";IFERROR(INDEX({1};1;{2})&\" segment\";\"unknown segment\"))",
                                        price, segs, column));
    }
    text(row + 4 + n, col,
         "Caution: an index describes a market, not one home. A time-adjusted price is no substitute "
         "for an appraisal by a licensed professional.");
    return row + 6 + n;
}

void Planner::charts() {
    const int S = static_cast<int>(segments_.size());
    const int K = static_cast<int>(indexMethods_.size());
    auto chart = [&](const std::string& name, const std::string& title, ChartSpec::Type type,
                     std::vector<Rect> ranges, int anchorRow, int anchorCol, int widthMm, int heightMm) -> ChartSpec& {
        ChartSpec c;
        c.name = name;
        c.title = title;
        c.type = type;
        c.ranges = std::move(ranges);
        c.row = c.ranges.front().row0;
        c.col = c.ranges.front().col0;
        c.rows = c.ranges.front().row1 - c.ranges.front().row0 + 1;
        c.cols = c.ranges.front().col1 - c.ranges.front().col0 + 1;
        c.anchorRow = anchorRow;
        c.anchorCol = anchorCol;
        c.widthMm = widthMm;
        c.heightMm = heightMm;
        c.freq = frequencyCode(freq_);
        c.periods = T_;
        plan_.charts.push_back(c);
        return plan_.charts.back();
    };
    const int summaryEnd = Layout::kSummaryFirstRow + S;
    const int chartRow = summaryEnd + 1;
    // Page 1 is 170 mm high (A4 and Letter landscape, within the margins and the footer):
    // fixed rows above and below, the summary's rows, and the rest for the charts.
    const double top[] = {8.5, 5, 9, 1, 7, 10.5};  // title, subtitle, caution, gap, heading, column heads
    const double fixedTop = top[0] + top[1] + top[2] + top[3] + top[4] + top[5], summaryRow = 4.3, foot = 11 + 4.5 + 1;
    const int fillRows = Layout::kPageRows - 3 - summaryEnd;
    const double fill = 170.0 - fixedTop - summaryRow * S - foot;
    const double fillRow = fill / std::max(fillRows, 1);
    const int chartH = static_cast<int>(std::min(85.0, fill - fillRow - 2));
    for (int r = 0; r < 6; ++r) plan_.rowHeightsMm.push_back({r, top[r]});
    for (int r = Layout::kSummaryFirstRow; r < summaryEnd; ++r) plan_.rowHeightsMm.push_back({r, summaryRow});
    for (int r = summaryEnd; r < Layout::kPageRows - 3; ++r) plan_.rowHeightsMm.push_back({r, fillRow});
    plan_.rowHeightsMm.push_back({Layout::kPageRows - 3, 11});
    plan_.rowHeightsMm.push_back({Layout::kPageRows - 2, 4.5});
    plan_.rowHeightsMm.push_back({Layout::kPageRows - 1, 1});
    // Page 2: 40 rows of 4.25 mm.
    for (int r = Layout::kPage2; r < Layout::kRecordRow; ++r) plan_.rowHeightsMm.push_back({r, 4.25});
    // Page 1: the whole scope's quoted index with its band; its sales per period.
    ChartSpec& q = chart("quoted", fmt::format("{}: quoted index with its {:.0f} % band", segments_.front().label, 100 * s_.level),
                         ChartSpec::Type::Line,
                         {Rect{quotedRow_, wholeBandCol_, quotedRow_ + T_, wholeBandCol_ + 3}}, chartRow, 0, 150, chartH);
    q.yTitle = "Index (base period = 100)";
    q.bandSeries = {1, 2};
    const SegmentCells& w = cells_.front();
    const int wFirst = w.row + 6;
    ChartSpec& sl = chart("sales", "Sales per period", ChartSpec::Type::Bar,
                          {Rect{wFirst - 1, w.chartCol, wFirst + T_ - 1, w.chartCol},
                           Rect{wFirst - 1, w.chartCol + 1 + 5 * K, wFirst + T_ - 1, w.chartCol + 1 + 5 * K}},
                          chartRow, 7, 95, chartH);
    sl.yTitle = "Sales";
    sl.legend = false;
    // Page 2: the measures compared (whole scope), and one small chart per segment.
    ChartSpec& m = chart("measures", fmt::format("{}: the measures compared", segments_.front().label),
                         ChartSpec::Type::Line,
                         {Rect{wFirst - 1, w.chartCol, wFirst + T_ - 1, w.chartCol + K}}, Layout::kPage2 + 1, 0, 150, 72);
    m.yTitle = "Index (base period = 100)";
    m.emphasis = w.quotedIndex - 1;
    ChartSpec& y = chart("yearly", "Change over a year (%)", ChartSpec::Type::Line,
                         {Rect{quotedRow_, wholeBandCol_, quotedRow_ + T_, wholeBandCol_},
                          Rect{quotedRow_, wholeBandCol_ + 4, quotedRow_ + T_, wholeBandCol_ + 4}},
                         Layout::kPage2 + 1, 7, 95, 72);
    y.yTitle = "% over a year";
    y.legend = false;
    const int perRow = 4;
    bool refhome = false;
    for (const MethodCells& mc : w.tables) refhome = refhome || mc.method == Method::ReferenceHome;
    // Two rows of four small charts; the reference home's chart takes the second row.
    for (int s = 1; s < S && s <= (refhome ? 4 : 8); ++s) {
        const int i = s - 1;
        ChartSpec& sm = chart(fmt::format("segment{}", s), segments_[static_cast<std::size_t>(s)].label,
                              ChartSpec::Type::Line,
                              {Rect{quotedRow_, 0, quotedRow_ + T_, 0}, Rect{quotedRow_, s + 1, quotedRow_ + T_, s + 1}},
                              Layout::kPage2 + 20 + (i / perRow) * 10, 0, 62, 38);
        sm.offsetMm = (i % perRow) * 66;
        sm.legend = false;
        sm.small = true;
        sm.commonScale = true;
    }
    // The reference home's value in money, when it is one of the methods.
    for (const MethodCells& mc : w.tables)
        if (mc.method == Method::ReferenceHome) {
            ChartSpec& h = chart("refhome", "Value of the reference home", ChartSpec::Type::Line,
                                 {Rect{wFirst - 1, mc.col, wFirst + mc.rows - 1, mc.col + 3}}, Layout::kPage2 + 30, 0,
                                 150, 38);
            h.yTitle = "Value";
            h.bandSeries = {1, 2};
            h.money = true;
            if (!homeCaption_.empty()) {
                block("title", "");
                CellWrite& cap = formula(Layout::kRecordRow - 1, 0, homeCaption_);
                cap.charHeight = 8;
                cap.mergeCols = Layout::kCols;
            }
        }
}

ReportPlan Planner::run() {
    if (d_.cells.rows < 2) throw InputError("the sales table needs a header row and at least one sale");
    const auto f = parseFrequency(s_.freq);
    if (!f) throw InputError(fmt::format("frequency must be M, Q or Y, got \"{}\"", s_.freq));
    freq_ = *f;
    findScopeAndSegments();
    plan_.sheetName = s_.sheetName.empty() ? s_.defaultSheetName() : s_.sheetName;

    idCol_ = column(s_.idColumn, "property id", false);
    changedCol_ = column(s_.changedColumn, "changed flag", false);
    for (const auto& n : s_.characteristics) chars_.push_back(column(n, "characteristic", true));
    for (const auto& n : s_.strata) strata_.push_back(column(n, "stratum", true));
    for (Method m : s_.methods) {
        const bool ok = (m == Method::Mix && !strata_.empty()) ||
                        ((m == Method::Hedonic || m == Method::ReferenceHome) && !chars_.empty()) ||
                        (m == Method::RepeatSales && idCol_ >= 0) || m == Method::Median || m == Method::Mean;
        if (ok) methods_.push_back(m);
        else plan_.warnings.push_back(fmt::format("{} left out: choose the columns it needs", methodLabel(m)));
    }
    for (Method m : methods_)
        if (m != Method::ReferenceHome) indexMethods_.push_back(m);
    if (indexMethods_.empty()) throw InputError("choose at least one index method (the reference home alone is not an index)");

    // The latest period is partial when the last sale falls before its last day: headline
    // changes then use the period before it, unless the settings include it.
    const long lastKey = firstKey_ + T_ - 1;
    partial_ = lastSale_ < periodStartOfKey(lastKey + 1, freq_) - 1;
    headlineOffset_ = partial_ && !s_.includePartial && T_ > 1 ? 1 : 0;
    headlineKey_ = lastKey - headlineOffset_;

    titleAndCaution();
    dates_ = dataColumn(dateCol_);
    prices_ = dataColumn(priceCol_);
    if (idCol_ >= 0) idRange_ = dataColumn(idCol_);
    if (changedCol_ >= 0) changedRange_ = dataColumn(changedCol_);

    // Worksheet area: settings, then comparables beside them, then the sections.
    int row = settingsBlock(Layout::kWorkRow);
    const int S = static_cast<int>(segments_.size());
    const int quotedRow = row + 1;
    int sectionRow = quotedRow + T_ + 3;
    helperCol_ = 40;  // copies of non-adjacent columns go to the right of everything
    if (!chars_.empty()) charsBlock_ = columnsBlock(chars_, "Characteristics", Layout::kWorkRow);
    if (!strata_.empty()) strataBlock_ = columnsBlock(strata_, "Strata", Layout::kWorkRow);
    for (int s = 0; s < S; ++s) {
        segmentSection(static_cast<std::size_t>(s), sectionRow);
        sectionRow += std::max(T_, static_cast<int>(segments_[static_cast<std::size_t>(s)].lastKey -
                                                    segments_[static_cast<std::size_t>(s)].firstKey + 1)) + 9 +
                      (s == 0 ? static_cast<int>(chars_.size()) : 0);
    }
    quotedBlock(quotedRow);
    block("settings", "settings");
    {
        const SegmentCells& w = cells_.front();
        for (std::size_t i = 0; i < w.tables.size(); ++i) {
            const std::string tl = cellRef(w.row + 6, w.tables[i].col);
            formula(statusRow_ + static_cast<int>(i), 1, fmt::format("=IF(ISTEXT({0});{0};\"ok\")", tl));
        }
    }
    comparablesBlock(Layout::kWorkRow, 4);
    if (haveFunction("SALESCHECK")) dataCheckBlock(Layout::kWorkRow, 11);
    summary();

    // Page 1 foot: the method in one sentence and the data line.
    block("title", "");
    for (int i = 0; i < 2; ++i) {
        CellWrite& w = text(Layout::kPageRows - 3 + i, 0,
                            i == 0 ? methodSentence()
                                   : fmt::format("Data: {} sales in the scope, up to {}. Built with Lintel " LINTEL_VERSION ".",
                                                 grouped(scopeRows_.size()), isoDate(lastSale_)));
        w.charHeight = 8;
        w.wrap = true;
        w.mergeCols = Layout::kCols;
    }
    charts();

    block("record", "record");
    plan_.recordRow = Layout::kRecordRow;
    plan_.recordCol = 0;
    finishBlocks();
    for (auto& b : plan_.blocks)
        if (b.key == "record") b.rect = Rect{plan_.recordRow, plan_.recordCol, plan_.recordRow, plan_.recordCol};
    plan_.printRows = 2 * Layout::kPageRows;
    plan_.printCols = Layout::kCols;
    plan_.pageBreakRows = {Layout::kPageRows, Layout::kWorkRow};
    // Segment | measure | median price | index | change | change | band low | high | sales |
    // flags | why | (margin): 26 cm, fitted to the landscape page's width.
    plan_.columnWidthsMm = {42, 34, 22, 14, 17, 17, 14, 14, 15, 22, 53, 4};
    const std::string range =
        fmt::format("{} .. {}", periodLabel(firstKey_, freq_), periodLabel(lastKey, freq_));
    plan_.status = fmt::format("{}: {} sales, {} segment{}, {} periods ({}), sales up to {}{}", plan_.sheetName,
                               plan_.salesUsed, S, S == 1 ? "" : "s", T_, range, isoDate(lastSale_),
                               plan_.warnings.empty() ? "" : fmt::format(", {} warning(s)", plan_.warnings.size()));
    return plan_;
}

}  // namespace

ReportPlan planReport(const ReportSettings& settings, const SheetData& data) {
    return Planner(settings, data).run();
}

}  // namespace lintel::report
