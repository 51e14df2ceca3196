#include "inputs.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>

#include <fmt/format.h>

#include <array>
#include <stdexcept>

#include "diagnostics.hpp"
#include "label_text.hpp"
#include "options.hpp"
#include "text.hpp"
#include "text_keys.hpp"

namespace lintel::addin {

void OutTable::num(double x) {
    OutCell c;
    if (std::isfinite(x)) {
        c.kind = OutCell::Kind::Number;
        c.number = x;
    }
    rows.back().push_back(std::move(c));
}

void OutTable::text(std::string s) {
    OutCell c;
    c.kind = OutCell::Kind::Text;
    c.text = std::move(s);
    rows.back().push_back(std::move(c));
}

void OutTable::none() { rows.back().push_back(OutCell{}); }

std::size_t checkAligned(const std::vector<NamedRange>& ranges,
                         const std::vector<const char*>& multiColumn) {
    std::size_t n = 0;
    const char* first = nullptr;
    for (const auto& nr : ranges) {
        if (!nr.range) continue;
        const bool multi = std::find_if(multiColumn.begin(), multiColumn.end(), [&](const char* m) {
                               return std::string(m) == nr.name;
                           }) != multiColumn.end();
        if (!multi && nr.range->cols != 1)
            throw InputError(fmt::format("{} must be one column, got {} columns", nr.name,
                                         nr.range->cols));
        if (!first) {
            first = nr.name;
            n = nr.range->rows;
        } else if (nr.range->rows != n) {
            throw InputError(fmt::format("{} has {} rows, {} has {}", first, n, nr.name,
                                         nr.range->rows));
        }
    }
    return n;
}

double cellDate(const Cell& c, const CallContext& ctx) {
    if (c.isNumber()) return c.number + ctx.dateOffset;
    if (c.isText()) {
        const DateText t = readDateText(c.text, ctx.dateOrder);
        if (t.ok()) return t.serial;
    }
    return kNoValue;
}

double cellNumber(const Cell& c) { return c.isNumber() ? c.number : kNoValue; }

std::string emptyCellHint(const Cell& c) {
    return c.isNumber() && c.number == 0 ? " (an empty cell reads as 0)" : "";
}

double cellNumber(const Cell& c, const NumberFormat& numbers) {
    if (c.isNumber()) return c.number;
    if (c.isText()) {
        const NumberText t = readNumberText(c.text, numbers);
        if (t.ok()) return t.value;
    }
    return kNoValue;
}

char cellFlag(const Cell& c) {
    if (c.isNumber()) return c.number != 0 ? 1 : 0;
    if (c.isText()) {
        std::string t = c.text;
        for (char& ch : t) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
        return (t == "true" || t == "1" || t == "yes") ? 1 : 0;
    }
    return 0;
}

std::string cellKey(const Cell& c) {
    if (c.isNumber()) return keyText(c.number);  // the core's rule: -0 and 0 are "0"
    if (c.isText()) return c.text;
    return {};
}

std::vector<double> dateColumn(const Range& r, std::size_t first, const CallContext& ctx,
                               std::size_t c) {
    std::vector<double> v;
    v.reserve(r.rows > first ? r.rows - first : 0);
    for (std::size_t i = first; i < r.rows; ++i) v.push_back(cellDate(r.at(i, c), ctx));
    return v;
}

std::vector<double> numberColumn(const Range& r, std::size_t first, std::size_t c) {
    std::vector<double> v;
    v.reserve(r.rows > first ? r.rows - first : 0);
    for (std::size_t i = first; i < r.rows; ++i) v.push_back(cellNumber(r.at(i, c)));
    return v;
}

std::vector<std::string> keyColumn(const Range& r, std::size_t first, std::size_t c) {
    std::vector<std::string> v;
    v.reserve(r.rows > first ? r.rows - first : 0);
    for (std::size_t i = first; i < r.rows; ++i) v.push_back(cellKey(r.at(i, c)));
    return v;
}

TableReading tableReading(const Call& call, const Range& first) {
    const ReadOptions o = call.options<ReadOptions>();
    const CallContext& ctx = call.ctx();
    TableReading t;
    t.read.dateOrder = o.dateOrder ? *o.dateOrder : ctx.dateOrder;
    t.read.numbers = ctx.numbers;
    t.read.currentYear = ctx.currentYear;
    t.labels = o.labels;
    t.firstRowNumber = (first.sheetRow ? first.sheetRow : 1) + call.headerRows();
    return t;
}

std::vector<RawValue> rawColumn(const Range& r, std::size_t first, std::size_t c) {
    std::vector<RawValue> v;
    v.reserve(r.rows > first ? r.rows - first : 0);
    for (std::size_t i = first; i < r.rows; ++i) {
        const Cell& cell = r.at(i, c);
        if (cell.isNumber()) v.push_back(RawValue::of(cell.number));
        else if (cell.isText()) v.push_back(RawValue::of(cell.text));
        else v.push_back(RawValue::empty());
    }
    return v;
}

std::vector<RawValue> rawDates(const Range& r, std::size_t first, const CallContext& ctx, std::size_t c) {
    std::vector<RawValue> v = rawColumn(r, first, c);
    if (ctx.dateOffset != 0)
        for (RawValue& x : v)
            if (x.kind == RawValue::Kind::Number) x.number += ctx.dateOffset;
    return v;
}

void cleanLabels(std::vector<std::string>& labels) {
    const LabelGroups g = groupLabels(labels);
    for (std::size_t i = 0; i < labels.size(); ++i)
        labels[i] = g.groupOfRow[i] < 0 ? std::string() : g.groups[static_cast<std::size_t>(g.groupOfRow[i])].display;
}

std::vector<std::string> labelColumn(const Range& r, std::size_t first, std::size_t c, LabelMode mode) {
    std::vector<std::string> v = keyColumn(r, first, c);
    if (mode == LabelMode::Clean) cleanLabels(v);
    return v;
}

namespace {

// The drop reason of a cell the conversion could not read (the sales check's problem of the
// same words; a blank cell keeps the screening's "blank or non-... " reason).
DropReason readReason(SaleProblem p) {
    switch (p) {
        case SaleProblem::BlankDate: return DropReason::BadDate;
        case SaleProblem::UnreadableDate: return DropReason::UnreadableDate;
        case SaleProblem::TwoDigitYear: return DropReason::TwoDigitYear;
        case SaleProblem::NoSuchDate: return DropReason::NoSuchDate;
        case SaleProblem::AmbiguousDate: return DropReason::AmbiguousDate;
        case SaleProblem::BlankPrice: return DropReason::BadPrice;
        case SaleProblem::UnreadablePrice: return DropReason::UnreadablePrice;
        case SaleProblem::AmbiguousNumber: return DropReason::AmbiguousNumber;
        case SaleProblem::NonPositivePrice: return DropReason::NonPositivePrice;
        default: break;
    }
    throw std::logic_error(fmt::format("no drop reason for \"{}\"", saleProblemText(p)));
}

// Notes on what could not be read: per problem its count and the first row with the reason
// (which names the forms accepted). Dates implausible for a sale are used: listed by row.
void readingNotes(const std::vector<CellIssue>& issues, const std::vector<double>& serials,
                  const TableReading& t, const Range& dates, const Range& prices, std::size_t header,
                  std::vector<std::string>& notes) {
    std::array<std::size_t, kSaleProblemCount> count{};
    std::array<const CellIssue*, kSaleProblemCount> first{};
    std::vector<const CellIssue*> doubtful;
    for (const CellIssue& c : issues) {
        const auto k = static_cast<std::size_t>(c.problem);
        if (c.problem == SaleProblem::ImplausibleDate) doubtful.push_back(&c);
        else if (c.problem == SaleProblem::BlankDate || c.problem == SaleProblem::BlankPrice ||
                 c.problem == SaleProblem::NonPositivePrice)
            continue;  // said well enough by the count of the drop reason
        if (!count[k]++) first[k] = &c;
    }
    for (std::size_t k = 0; k < kSaleProblemCount; ++k) {
        if (!count[k] || static_cast<SaleProblem>(k) == SaleProblem::ImplausibleDate) continue;
        const CellIssue& c = *first[k];
        std::string hint;
        if (c.index == 0 && header == 0 && dates.at(0, 0).isText() && prices.at(0, 0).isText())
            hint = " (a header row? add header=1 to the options)";
        notes.push_back(fmt::format("{} ({} row{}), first row {}: {}{}", saleProblemText(static_cast<SaleProblem>(k)),
                                    count[k], count[k] == 1 ? "" : "s", t.firstRowNumber + c.index, c.detail, hint));
    }
    if (!doubtful.empty()) {
        constexpr std::size_t kListed = 5;
        std::string rows;
        for (std::size_t i = 0; i < doubtful.size() && i < kListed; ++i) {
            rows += fmt::format("{}row {} ({})", i ? ", " : "", t.firstRowNumber + doubtful[i]->index,
                                isoDate(serials[doubtful[i]->index]));
        }
        if (doubtful.size() > kListed) rows += fmt::format(" and {} more", doubtful.size() - kListed);
        notes.push_back(fmt::format("{} ({} row{}, used as given: a price or another number in the date "
                                    "column?): {}; the dates must lie from 1900 to {}",
                                    saleProblemText(SaleProblem::ImplausibleDate), doubtful.size(),
                                    doubtful.size() == 1 ? "" : "s", rows,
                                    t.read.currentYear > 0 ? std::to_string(t.read.currentYear + 1)
                                                           : std::string("any later year")));
    }
}

}  // namespace

const Range* changedColumn(const Call& call, const Range& dates) {
    const Arg& arg = call.arg("changed");
    if (!arg) return nullptr;
    const Range* changed = &*arg;
    if (changed->rows * changed->cols == 1 && dates.rows != 1) {
        if (cellFlag(changed->at(0, 0)))
            throw InputError(
                "changed must be a column aligned with dates (1 where the property changed "
                "before that sale), got a single value");
        return nullptr;
    }
    return changed;
}

std::vector<char> changedFlags(const Range& changed, std::size_t first) {
    std::vector<char> out;
    out.reserve(changed.rows > first ? changed.rows - first : 0);
    for (std::size_t i = first; i < changed.rows; ++i) {
        const Cell& c = changed.at(i, 0);
        if (!c.isText()) {
            out.push_back(cellFlag(c));
            continue;
        }
        const std::string t = lower(trim(c.text));
        if (t == "1" || t == "true" || t == "yes") out.push_back(1);
        else if (t.empty() || t == "0" || t == "false" || t == "no") out.push_back(0);
        else
            throw InputError(fmt::format(
                "changed holds \"{}\" in row {}: write 1 (or TRUE) where the property changed "
                "before that sale, 0 or nothing otherwise",
                shortText(c.text), changed.sheetRow ? changed.sheetRow + i : i + 1));
    }
    return out;
}

const Range* includeMask(const Call& call, std::size_t rows) {
    const Arg& includeArg = call.arg("include");
    if (!includeArg) return nullptr;
    const Range* include = &*includeArg;
    // A single value for include: 1 (or TRUE, or a blank) means "every row"; 0 or FALSE
    // means none, which is said rather than silently ignored.
    if (include->rows * include->cols == 1 && rows != 1) {
        const Cell& c = include->at(0, 0);
        if (!c.isEmpty() && !cellFlag(c))
            throw InputError(
                "include is a single 0 or FALSE: no sale is chosen (give a column of 1/0, "
                "or leave include empty for all sales)");
        return nullptr;
    }
    return include;
}

SalesInput readSales(const Call& call, const std::vector<NamedRange>& extra) {
    const Range& dates = call.required("dates");
    const Range& prices = call.required("prices");
    const Range* include = includeMask(call, dates.rows);
    std::vector<NamedRange> all = {{"dates", &dates}, {"prices", &prices}};
    if (include) all.push_back({"include", include});
    std::vector<const char*> multi;
    for (const auto& e : extra) {
        all.push_back(e);
        multi.push_back(e.name);
    }
    const std::size_t n = checkAligned(all, multi);
    const std::size_t h = call.headerRows();
    if (n <= h) throw InputError("the ranges hold no rows below the header");

    SalesInput in;
    if (include) {
        in.include.reserve(n - h);
        for (std::size_t i = h; i < n; ++i) in.include.push_back(cellFlag(include->at(i, 0)));
    }
    in.emptyRow.assign(n - h, 0);
    for (std::size_t i = h; i < n; ++i) {
        bool empty = dates.at(i, 0).isEmpty() && prices.at(i, 0).isEmpty();
        for (const auto& e : extra)
            for (std::size_t c = 0; empty && c < e.range->cols; ++c)
                empty = e.range->at(i, c).isEmpty();
        in.emptyRow[i - h] = empty ? 1 : 0;
    }

    // Dates and prices as the sales check reads them; empty rows are not read.
    const TableReading t = tableReading(call, dates);
    const CallContext& ctx = call.ctx();
    ColumnReading d = readDateColumn(rawDates(dates, h, ctx), t.read, in.emptyRow, t.firstRowNumber);
    ColumnReading p = readPriceColumn(rawColumn(prices, h), t.read.numbers, in.emptyRow);
    in.date = std::move(d.value);
    in.price = std::move(p.value);
    in.readProblem.assign(n - h, std::nullopt);
    // A row's reason is its date's, else its price's (the screening's order).
    for (const CellIssue& c : d.issues)
        if (c.problem != SaleProblem::ImplausibleDate) in.readProblem[c.index] = readReason(c.problem);
    for (const CellIssue& c : p.issues)
        if (!in.readProblem[c.index]) in.readProblem[c.index] = readReason(c.problem);
    in.notes = std::move(d.notes);
    std::vector<CellIssue> issues = std::move(d.issues);
    for (CellIssue& c : p.issues) issues.push_back(std::move(c));
    readingNotes(issues, in.date, t, dates, prices, h, in.notes);
    return in;
}

void titleRow(OutTable& out, const Call& call) {
    if (!call.layout().titles) return;
    out.addRow();
    for (const auto& c : call.spec().columns) out.text(c.title);
}

void titleRow(OutTable& out, const Call& call, std::initializer_list<const char*> titles) {
    if (!call.layout().titles) return;
    out.addRow();
    for (const char* s : titles) out.text(s);
}

void labelRow(OutTable& out, const std::string& label, double value, std::size_t width) {
    out.addRow();
    out.text(label);
    out.num(value);
    for (std::size_t i = 2; i < width; ++i) out.none();
}

void labelTextRow(OutTable& out, const std::string& label, const std::string& text,
                  std::size_t width) {
    out.addRow();
    out.text(label);
    out.text(text);
    for (std::size_t i = 2; i < width; ++i) out.none();
}

void appendNotes(OutTable& out, const Diagnostics& d, std::size_t width) {
    labelRow(out, "rows used", static_cast<double>(d.rowsUsed), width);
    for (const auto& [why, n] : d.dropped)
        labelRow(out, std::string("dropped: ") + dropReasonText(why), static_cast<double>(n), width);
    for (const auto& w : d.warnings) {
        out.addRow();
        out.text("warning");
        out.text(w);
        for (std::size_t i = 2; i < width; ++i) out.none();
    }
}

OutTable indexTableCells(const IndexResult& r, const Call& call) {
    OutTable out;
    const IndexTable& t = r.table;
    titleRow(out, call);
    const double offset = call.ctx().dateOffset;
    for (int i = 0; i < t.axis.count; ++i) {
        // An index beyond the range of numbers (100 exp(1418) from prices 1e616 apart) exists:
        // a message, never a blank cell or a 0 in its place.
        const double v = t.index[static_cast<std::size_t>(i)];
        if (std::isinf(v) || v == 0)
            throw InputError(fmt::format(
                "the index of period {} is {}: the prices span too far",
                t.axis.label(i), v == 0 ? "below the smallest number (about 1e-308)"
                                        : "beyond the largest number (about 1.8e308)"));
        out.addRow();
        out.num(t.axis.start(i) - offset);
        out.num(t.index[i]);
        out.num(static_cast<double>(t.count[i]));
        out.num(t.lower[i]);
        out.num(t.upper[i]);
    }
    if (call.layout().notes) appendNotes(out, r.diag, call.spec().width());
    return out;
}

}  // namespace lintel::addin
