#include "inputs.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>

#include <fmt/format.h>

#include "diagnostics.hpp"
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

namespace {
std::optional<double> parseIsoDate(const std::string& s) {
    int y = 0, m = 0, d = 0;
    char tail = 0;
    if (std::sscanf(s.c_str(), "%4d-%2d-%2d%c", &y, &m, &d, &tail) != 3) return std::nullopt;
    if (m < 1 || m > 12 || d < 1 || d > 31) return std::nullopt;
    const double serial = serialFromCivil({y, m, d});
    const CivilDate back = civilFromSerial(serial);
    if (back.month != m || back.day != d) return std::nullopt;  // 2023-02-30
    return serial;
}
}  // namespace

double cellDate(const Cell& c, const CallContext& ctx) {
    if (c.isNumber()) return c.number + ctx.dateOffset;
    if (c.isText()) {
        std::string t = c.text;
        t.erase(std::remove_if(t.begin(), t.end(), [](unsigned char ch) { return std::isspace(ch); }),
                t.end());
        if (auto s = parseIsoDate(t)) return *s;
    }
    return kNoValue;
}

double cellNumber(const Cell& c) { return c.isNumber() ? c.number : kNoValue; }

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

SalesInput readSales(const Call& call, const std::vector<NamedRange>& extra) {
    const Range& dates = call.required("dates");
    const Range& prices = call.required("prices");
    const Arg& includeArg = call.arg("include");
    const Range* include = includeArg ? &*includeArg : nullptr;
    std::vector<NamedRange> all = {{"dates", &dates}, {"prices", &prices}};
    if (include) {
        // A single value for include: 1 (or TRUE, or a blank) means "every row"; 0 or FALSE
        // means none, which is said rather than silently ignored.
        if (include->rows * include->cols == 1 && dates.rows != 1) {
            const Cell& c = include->at(0, 0);
            if (!c.isEmpty() && !cellFlag(c))
                throw InputError(
                    "include is a single 0 or FALSE: no sale is chosen (give a column of 1/0, "
                    "or leave include empty for all sales)");
            include = nullptr;
        } else {
            all.push_back({"include", include});
        }
    }
    std::vector<const char*> multi;
    for (const auto& e : extra) {
        all.push_back(e);
        multi.push_back(e.name);
    }
    const std::size_t n = checkAligned(all, multi);
    const std::size_t h = call.headerRows();
    if (n <= h) throw InputError("the ranges hold no rows below the header");

    SalesInput in;
    in.date = dateColumn(dates, h, call.ctx());
    in.price = numberColumn(prices, h);
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
