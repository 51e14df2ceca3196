#include "sales_check.hpp"

#include <stdexcept>

#include <algorithm>
#include <array>
#include <cmath>
#include <map>

#include <fmt/format.h>

#include "label_text.hpp"
#include "sale_duplicates.hpp"
#include "text_scan.hpp"

namespace lintel {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

struct ProblemInfo {
    SaleProblem problem;
    const char* text;
    bool keepsRow;
};

// The one table of problem wordings.
constexpr std::array<ProblemInfo, kSaleProblemCount> kProblems = {{
    {SaleProblem::BlankDate, "blank date", false},
    {SaleProblem::UnreadableDate, "unreadable date", false},
    {SaleProblem::TwoDigitYear, "two-digit year", false},
    {SaleProblem::NoSuchDate, "no such date", false},
    {SaleProblem::AmbiguousDate, "ambiguous date", false},
    {SaleProblem::ImplausibleDate, "date implausible for a sale", false},
    {SaleProblem::BlankPrice, "blank price", false},
    {SaleProblem::UnreadablePrice, "unreadable price", false},
    {SaleProblem::AmbiguousNumber, "ambiguous number", false},
    {SaleProblem::NonPositivePrice, "price zero or negative", false},
    {SaleProblem::BlankId, "blank id", true},
    {SaleProblem::BlankSegment, "blank segment", true},
    {SaleProblem::DuplicateSale, "duplicate", false},
    {SaleProblem::ConflictingPrices, "conflicting prices", false},
    {SaleProblem::PriceOutlier, "price outlier", true},
}};

const ProblemInfo& info(SaleProblem p) { return kProblems[static_cast<std::size_t>(p)]; }

std::string numberText(double x) { return fmt::format("{}", x == 0 ? 0.0 : x); }

std::string shown(const RawValue& v, bool isDate) {
    switch (v.kind) {
        case RawValue::Kind::Empty: return {};
        case RawValue::Kind::Text: return v.text;
        case RawValue::Kind::Number:
            return isDate && isUsableSerial(v.number) ? isoDate(v.number) : numberText(v.number);
    }
    return {};
}

// An id or label as compared: its label key, or with clean = false the text as written
// without blanks at both ends (as the repeat-sales ids are compared).
std::string keyOf(const RawValue& v, bool clean) {
    switch (v.kind) {
        case RawValue::Kind::Empty: return {};
        case RawValue::Kind::Text: return clean ? labelKey(v.text) : std::string(text::trim(v.text));
        case RawValue::Kind::Number: return numberText(v.number);
    }
    return {};
}

SaleProblem dateProblem(DateTextStatus s) {
    switch (s) {
        case DateTextStatus::Blank: return SaleProblem::BlankDate;
        case DateTextStatus::TwoDigitYear: return SaleProblem::TwoDigitYear;
        case DateTextStatus::NoSuchDate: return SaleProblem::NoSuchDate;
        case DateTextStatus::Ambiguous: return SaleProblem::AmbiguousDate;
        default: return SaleProblem::UnreadableDate;
    }
}

}  // namespace

bool RawValue::isBlank() const {
    return kind == Kind::Empty || (kind == Kind::Text && text::trim(text).empty());
}

const char* saleProblemText(SaleProblem p) { return info(p).text; }

namespace {
// The drop reason of a problem that drops its row (the same words).
DropReason dropReasonOf(SaleProblem p) {
    switch (p) {
        case SaleProblem::BlankDate: return DropReason::BadDate;
        case SaleProblem::UnreadableDate: return DropReason::UnreadableDate;
        case SaleProblem::TwoDigitYear: return DropReason::TwoDigitYear;
        case SaleProblem::NoSuchDate: return DropReason::NoSuchDate;
        case SaleProblem::AmbiguousDate: return DropReason::AmbiguousDate;
        case SaleProblem::ImplausibleDate: return DropReason::ImplausibleDate;
        case SaleProblem::BlankPrice: return DropReason::BadPrice;
        case SaleProblem::UnreadablePrice: return DropReason::UnreadablePrice;
        case SaleProblem::AmbiguousNumber: return DropReason::AmbiguousNumber;
        case SaleProblem::NonPositivePrice: return DropReason::NonPositivePrice;
        case SaleProblem::BlankId: return DropReason::BlankId;
        case SaleProblem::BlankSegment: return DropReason::BlankSegment;
        case SaleProblem::DuplicateSale: return DropReason::DuplicateRow;
        case SaleProblem::ConflictingPrices: return DropReason::ConflictingPrices;
        case SaleProblem::PriceOutlier: break;  // kept
    }
    throw std::logic_error("a price outlier is not dropped");
}
}  // namespace
bool saleProblemKeepsRow(SaleProblem p) { return info(p).keepsRow; }

void SalesReadOptions::validate() const {
    numbers.validate();
    if (currentYear != 0 && (currentYear < 1900 || currentYear > 9998))
        throw InputError(fmt::format("the current year must lie within 1900..9998, got {}", currentYear));
}

void SalesCheckOptions::validate() const {
    read.validate();
    outliers.validate();
    if (firstRowNumber < 1) throw InputError("the first row number must be at least 1");
}

std::size_t SalesCheck::count(SaleProblem p) const {
    for (const auto& [q, n] : counts)
        if (q == p) return n;
    return 0;
}

namespace {
bool skipped(const std::vector<char>& skip, std::size_t i) { return !skip.empty() && skip[i]; }
}  // namespace

ColumnReading readDateColumn(const std::vector<RawValue>& cells, const SalesReadOptions& o,
                             const std::vector<char>& skip, std::size_t firstRowNumber) {
    const std::size_t n = cells.size();
    if (!skip.empty() && skip.size() != n) throw std::logic_error("readDateColumn: skip differs in length");
    ColumnReading r;
    r.value.assign(n, kNaN);

    // The day/month order of the texts: as given, else as the column shows it.
    r.dateOrder = o.dateOrder;
    {
        std::vector<std::string> texts(n);
        bool anyText = false;
        for (std::size_t i = 0; i < n; ++i)
            if (!skipped(skip, i) && cells[i].kind == RawValue::Kind::Text) {
                texts[i] = cells[i].text;
                anyText = true;
            }
        const DateOrderEvidence e = anyText ? inferDateOrder(texts) : DateOrderEvidence{};
        const bool known = r.dateOrder == DateOrder::DayMonthYear || r.dateOrder == DateOrder::MonthDayYear;
        const auto row = [&](std::size_t i) { return firstRowNumber + i; };
        if (!known && o.inferOrder && e.order != DateOrder::Unknown) {
            r.dateOrder = e.order;
            r.notes.push_back(fmt::format("dates read as {}: {} of them can only be read that way (first: row {})",
                                          dateOrderName(e.order),
                                          e.order == DateOrder::DayMonthYear ? e.dayFirstRows : e.monthFirstRows,
                                          row(e.order == DateOrder::DayMonthYear ? e.firstDayFirst : e.firstMonthFirst)));
        } else if (e.conflict) {
            r.notes.push_back(fmt::format("the dates mix day/month/year (first: row {}) and month/day/year "
                                          "(first: row {}): check the source",
                                          row(e.firstDayFirst), row(e.firstMonthFirst)));
        } else if (r.dateOrder == DateOrder::DayMonthYear && e.order == DateOrder::MonthDayYear) {
            r.notes.push_back(fmt::format("{} dates can only be read as month/day/year (first: row {}) but the "
                                          "date order is day/month/year: check the date order",
                                          e.monthFirstRows, row(e.firstMonthFirst)));
        } else if (r.dateOrder == DateOrder::MonthDayYear && e.order == DateOrder::DayMonthYear) {
            r.notes.push_back(fmt::format("{} dates can only be read as day/month/year (first: row {}) but the "
                                          "date order is month/day/year: check the date order",
                                          e.dayFirstRows, row(e.firstDayFirst)));
        }
    }

    const double earliest = serialFromCivil({1900, 1, 1});
    const double latest = o.currentYear > 0 ? serialFromCivil({o.currentYear + 2, 1, 1})
                                            : std::numeric_limits<double>::infinity();
    for (std::size_t i = 0; i < n; ++i) {
        if (skipped(skip, i)) continue;
        const RawValue& d = cells[i];
        double serial = kNaN;
        if (d.kind == RawValue::Kind::Number) {
            if (!isUsableSerial(d.number)) {
                r.issues.push_back({i, SaleProblem::UnreadableDate,
                                    fmt::format("the number {} is not a date (a date cell counts days from "
                                                "1899-12-30)",
                                                numberText(d.number))});
                continue;
            }
            serial = d.number;
        } else {
            const DateText t = readDateText(d.kind == RawValue::Kind::Text ? d.text : std::string(), r.dateOrder);
            if (!t.ok()) {
                const SaleProblem p = dateProblem(t.status);
                r.issues.push_back({i, p, p == SaleProblem::BlankDate
                                              ? "no date: the sale cannot be placed in a period"
                                              : t.message});
                continue;
            }
            serial = t.serial;
        }
        r.value[i] = serial;
        if (serial < earliest || serial >= latest)
            r.issues.push_back({i, SaleProblem::ImplausibleDate,
                                o.currentYear > 0
                                    ? fmt::format("{} lies before 1900 or after {}", isoDate(serial), o.currentYear + 1)
                                    : fmt::format("{} lies before 1900", isoDate(serial))});
    }
    return r;
}

ColumnReading readPriceColumn(const std::vector<RawValue>& cells, const NumberFormat& numbers,
                              const std::vector<char>& skip) {
    const std::size_t n = cells.size();
    if (!skip.empty() && skip.size() != n) throw std::logic_error("readPriceColumn: skip differs in length");
    ColumnReading r;
    r.value.assign(n, kNaN);
    for (std::size_t i = 0; i < n; ++i) {
        if (skipped(skip, i)) continue;
        const RawValue& p = cells[i];
        double price = kNaN;
        SaleProblem problem = SaleProblem::BlankPrice;
        std::string detail;
        if (p.kind == RawValue::Kind::Number) {
            price = p.number;
        } else if (p.kind == RawValue::Kind::Text) {
            NumberText t = readNumberText(p.text, numbers);
            if (t.ok()) price = t.value;
            else if (t.status == NumberTextStatus::Ambiguous) problem = SaleProblem::AmbiguousNumber;
            else if (t.status == NumberTextStatus::Unreadable) problem = SaleProblem::UnreadablePrice;
            detail = std::move(t.message);
        }
        if (std::isfinite(price) && price <= 0) {
            r.value[i] = price;
            r.issues.push_back({i, SaleProblem::NonPositivePrice, "a sale price must be more than 0"});
            continue;
        }
        if (!std::isfinite(price)) {
            if (problem == SaleProblem::BlankPrice) detail = "no price (a dash or an empty cell)";
            r.issues.push_back({i, problem, std::move(detail)});
            continue;
        }
        r.value[i] = price;
    }
    return r;
}

SalesCheck checkSales(const SalesCheckInput& in, const SalesCheckOptions& o) {
    o.validate();
    const std::size_t n = in.dates.size();
    const auto aligned = [&](std::size_t size, const std::string& name) {
        if (size != n)
            throw InputError(fmt::format("{} has {} rows, {} has {}", o.datesName, n, name, size));
    };
    aligned(in.prices.size(), o.pricesName);
    if (!in.ids.empty()) aligned(in.ids.size(), o.idsName);
    std::vector<std::string> segNames;
    for (std::size_t k = 0; k < in.segments.size(); ++k) {
        std::string name = k < in.segmentNames.size() && !in.segmentNames[k].empty()
                               ? in.segmentNames[k]
                               : (in.segments.size() == 1 ? std::string("segment")
                                                          : fmt::format("segment {}", k + 1));
        aligned(in.segments[k].size(), name);
        segNames.push_back(std::move(name));
    }
    if (!in.include.empty()) aligned(in.include.size(), "include");

    SalesCheck r;
    r.date.assign(n, kNaN);
    r.price.assign(n, kNaN);
    r.idKeys.assign(in.ids.empty() ? 0 : n, std::string());
    r.segmentKeys.assign(in.segments.empty() ? 0 : n, std::string());
    r.used.assign(n, 0);
    r.skipped.assign(n, 0);
    r.z.assign(n, kNaN);
    Diagnostics& diag = r.diagnostics;
    diag.rowsIn = n;

    // Rows not checked at all.
    for (std::size_t i = 0; i < n; ++i) {
        if (!in.include.empty() && !in.include[i]) {
            r.skipped[i] = 1;
            diag.drop(DropReason::Excluded);
            continue;
        }
        bool blank = in.dates[i].isBlank() && in.prices[i].isBlank();
        if (blank && !in.ids.empty()) blank = in.ids[i].isBlank();
        for (const auto& seg : in.segments) blank = blank && seg[i].isBlank();
        if (blank) {
            r.skipped[i] = 1;
            diag.drop(DropReason::EmptyRow);
        }
    }

    // Dates and prices.
    const ColumnReading dates = readDateColumn(in.dates, o.read, r.skipped, o.firstRowNumber);
    const ColumnReading prices = readPriceColumn(in.prices, o.read.numbers, r.skipped);
    r.dateOrder = dates.dateOrder;
    for (const std::string& note : dates.notes) diag.warn(note);

    // Per-row problems, in row order; the table keeps them grouped by row at the end.
    std::vector<std::vector<SalesProblemRow>> perRow(n);
    std::array<std::size_t, kSaleProblemCount> counts{};
    const auto list = [&](std::size_t i, const std::string& column, SaleProblem p, std::string value,
                          std::string detail, double z = kNaN) {
        SalesProblemRow pr;
        pr.row = o.firstRowNumber + i;
        pr.column = column;
        pr.problem = p;
        pr.value = std::move(value);
        pr.z = z;
        pr.detail = std::move(detail);
        perRow[i].push_back(std::move(pr));
        ++counts[static_cast<std::size_t>(p)];
    };

    std::vector<char> readable(n, 0);  // date and price usable
    std::vector<SaleProblem> dropFor(n, SaleProblem::BlankDate);
    for (std::size_t i = 0; i < n; ++i) readable[i] = r.skipped[i] ? 0 : 1;
    // The first problem of a row is the reason it is dropped (date before price).
    const auto drop = [&](std::size_t i, SaleProblem p) {
        if (readable[i]) dropFor[i] = p;
        readable[i] = 0;
    };
    std::vector<char> dateListed(n, 0);
    for (const CellIssue& c : dates.issues) {
        dateListed[c.index] = 1;
        list(c.index, o.datesName, c.problem, shown(in.dates[c.index], true), c.detail);
        drop(c.index, c.problem);  // an implausible date is left out of the check's used rows
    }
    std::vector<char> priceListed(n, 0);
    for (const CellIssue& c : prices.issues) {
        priceListed[c.index] = 1;
        list(c.index, o.pricesName, c.problem, shown(in.prices[c.index], false), c.detail);
        drop(c.index, c.problem);
    }
    for (std::size_t i = 0; i < n; ++i) {
        if (r.skipped[i]) continue;
        r.date[i] = dateListed[i] ? kNaN : dates.value[i];
        r.price[i] = priceListed[i] ? kNaN : prices.value[i];
        // Id and segment labels (blank ones are listed; the row stays).
        if (!in.ids.empty()) {
            r.idKeys[i] = keyOf(in.ids[i], o.cleanLabels);
            if (r.idKeys[i].empty())
                list(i, o.idsName, SaleProblem::BlankId, shown(in.ids[i], false),
                     "no id: the row is used, but cannot be checked for duplicates or paired");
        }
        for (std::size_t k = 0; k < in.segments.size(); ++k) {
            const std::string key = keyOf(in.segments[k][i], o.cleanLabels);
            if (k > 0) r.segmentKeys[i] += '\x1f';
            r.segmentKeys[i] += key;
            if (key.empty())
                list(i, segNames[k], SaleProblem::BlankSegment, shown(in.segments[k][i], false),
                     "no label: the sale belongs to no segment of this column");
        }
    }

    // Duplicates and conflicting prices (only with ids).
    if (!in.ids.empty()) {
        const DuplicateCheck dup = findDuplicateSales(r.idKeys, r.date, r.price, &readable);
        std::map<std::size_t, std::vector<std::size_t>> conflictRows;  // first row -> rows
        for (std::size_t i = 0; i < n; ++i)
            if (dup.mark[i] == DuplicateMark::Conflict) conflictRows[dup.firstOf[i]].push_back(i);
        for (std::size_t i = 0; i < n; ++i) {
            if (dup.mark[i] == DuplicateMark::Duplicate) {
                list(i, o.idsName, SaleProblem::DuplicateSale, shown(in.ids[i], false),
                     fmt::format("same id, date and price as row {}: used once", o.firstRowNumber + dup.firstOf[i]));
                dropFor[i] = SaleProblem::DuplicateSale;
                readable[i] = 0;
            } else if (dup.mark[i] == DuplicateMark::Conflict) {
                std::string rows, amounts;
                for (std::size_t j : conflictRows[dup.firstOf[i]]) {
                    rows += fmt::format("{}{}", rows.empty() ? "" : ", ", o.firstRowNumber + j);
                    amounts += fmt::format("{}{}", amounts.empty() ? "" : ", ", numberText(r.price[j]));
                }
                list(i, o.pricesName, SaleProblem::ConflictingPrices, shown(in.prices[i], false),
                     fmt::format("id {} sold on {} at different prices ({}) in rows {}: none is used "
                                 "until the source is fixed",
                                 shown(in.ids[i], false), isoDate(r.date[i]), amounts, rows));
                dropFor[i] = SaleProblem::ConflictingPrices;
                readable[i] = 0;
            }
        }
    }

    // Used rows and the outlier test within period and segment.
    std::vector<long> group(n, -1);
    std::map<std::pair<long, std::string>, long> groupIds;
    for (std::size_t i = 0; i < n; ++i) {
        if (r.skipped[i]) continue;
        if (!readable[i]) {
            diag.drop(dropReasonOf(dropFor[i]));
            continue;
        }
        r.used[i] = 1;
        ++diag.rowsUsed;
        const std::pair<long, std::string> key{periodKey(r.date[i], o.freq),
                                               r.segmentKeys.empty() ? std::string() : r.segmentKeys[i]};
        group[i] = groupIds.emplace(key, static_cast<long>(groupIds.size())).first->second;
    }
    r.outlierGroups = findPriceOutliers(r.price, group, o.outliers);
    r.z = r.outlierGroups.z;
    if (r.outlierGroups.groupsTooSmall > 0)
        diag.warn(fmt::format("{} sales in {} period-and-segment groups of fewer than {} sales were "
                              "not tested for outliers",
                              r.outlierGroups.rowsNotTested, r.outlierGroups.groupsTooSmall,
                              o.outliers.minGroup));
    if (r.outlierGroups.outliers > 0) {
        // Group medians for the detail text.
        std::map<long, std::vector<double>> members;
        for (std::size_t i = 0; i < n; ++i)
            if (r.outlierGroups.outlier[i] || (group[i] >= 0 && !std::isnan(r.z[i])))
                members[group[i]].push_back(r.price[i]);
        for (std::size_t i = 0; i < n; ++i) {
            if (!r.outlierGroups.outlier[i]) continue;
            std::vector<double> v = members[group[i]];
            std::sort(v.begin(), v.end());
            const double med = v.size() % 2 ? v[v.size() / 2] : 0.5 * (v[v.size() / 2 - 1] + v[v.size() / 2]);
            const std::string where =
                r.segmentKeys.empty() ? periodLabel(periodKey(r.date[i], o.freq), o.freq)
                                      : fmt::format("{} in its segment", periodLabel(periodKey(r.date[i], o.freq), o.freq));
            list(i, o.pricesName, SaleProblem::PriceOutlier, shown(in.prices[i], false),
                 fmt::format("{:.3g} times the median price {} of {} ({} sales); check the price and "
                             "whether it was a market sale",
                             r.price[i] / med, numberText(med), where, v.size()),
                 r.z[i]);
        }
    }

    for (auto& rows : perRow)
        for (auto& pr : rows) r.problems.push_back(std::move(pr));
    for (std::size_t k = 0; k < kSaleProblemCount; ++k) r.counts.emplace_back(kProblems[k].problem, counts[k]);
    return r;
}

}  // namespace lintel
