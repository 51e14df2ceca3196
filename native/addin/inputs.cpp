#include "inputs.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>

#include <fmt/format.h>

#include "diagnostics.hpp"

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

const Range& required(const Arg& a, const char* name) {
    if (!a) throw InputError(fmt::format("{} is required", name));
    return *a;
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
    if (c.isNumber()) return fmt::format("{}", c.number == 0 ? 0.0 : c.number);  // -0 -> "0"
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

namespace {
const Cell* single(const Arg& a, const char* name) {
    if (!a) return nullptr;
    if (a->rows * a->cols != 1)
        throw InputError(fmt::format("{} must be a single value, got {} x {} cells", name,
                                     a->rows, a->cols));
    const Cell& c = a->at(0, 0);
    return c.isEmpty() ? nullptr : &c;
}
}  // namespace

Frequency frequencyArg(const Arg& a) {
    const Cell* c = single(a, "freq");
    if (!c) return Frequency::Month;
    const auto f = c->isText() ? parseFrequency(c->text) : std::nullopt;
    if (!f)
        throw InputError(fmt::format("freq must be \"M\", \"Q\" or \"Y\", got \"{}\"", cellKey(*c)));
    return *f;
}

std::optional<double> dateArg(const Arg& a, const char* name, const CallContext& ctx) {
    const Cell* c = single(a, name);
    if (!c) return std::nullopt;
    const double s = cellDate(*c, ctx);
    if (!isUsableSerial(s))
        throw InputError(fmt::format("{} must be a date, got \"{}\"", name, cellKey(*c)));
    return s;
}

double numberArg(const Arg& a, const char* name, double fallback) {
    const Cell* c = single(a, name);
    if (!c) return fallback;
    if (!c->isNumber())
        throw InputError(fmt::format("{} must be a number, got \"{}\"", name, c->text));
    return c->number;
}

std::string textArg(const Arg& a, const char* name, const std::string& fallback) {
    const Cell* c = single(a, name);
    if (!c) return fallback;
    return cellKey(*c);
}

std::size_t headerRows(const OptionBag& opts) { return opts.flag("header", false) ? 1 : 0; }

SalesInput readSales(const Arg& datesArg, const Arg& pricesArg, const Arg& includeArg,
                     const OptionBag& opts, const CallContext& ctx,
                     const std::vector<NamedRange>& extra) {
    const Range& dates = required(datesArg, "dates");
    const Range& prices = required(pricesArg, "prices");
    const Range* include = includeArg ? &*includeArg : nullptr;
    std::vector<NamedRange> all = {{"dates", &dates}, {"prices", &prices}};
    if (include) {
        // A single value for include (e.g. 1) means "every row".
        if (include->rows * include->cols == 1 && dates.rows != 1) include = nullptr;
        else all.push_back({"include", include});
    }
    std::vector<const char*> multi;
    for (const auto& e : extra) {
        all.push_back(e);
        multi.push_back(e.name);
    }
    const std::size_t n = checkAligned(all, multi);
    const std::size_t h = headerRows(opts);
    if (n <= h) throw InputError("the ranges hold no rows below the header");

    SalesInput in;
    in.date = dateColumn(dates, h, ctx);
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

void readIndexOptions(IndexOptions& o, const Arg& freq, const Arg& base, const OptionBag& opts,
                      const CallContext& ctx) {
    o.freq = frequencyArg(freq);
    o.baseDate = dateArg(base, "base", ctx);
    o.minSales = static_cast<std::size_t>(opts.integer("minsales", 1, 1));
    o.level = opts.number("level", 0.95);
    if (!(o.level > 0 && o.level < 1))
        throw InputError(fmt::format("option level must lie between 0 and 1, got {}", o.level));
}

void titleRow(OutTable& out, const OptionBag& opts, std::initializer_list<const char*> titles) {
    if (!opts.flag("titles", false)) return;
    out.addRow();
    for (const char* s : titles) out.text(s);
}

void labelRow(OutTable& out, const std::string& label, double value, std::size_t width) {
    out.addRow();
    out.text(label);
    out.num(value);
    for (std::size_t i = 2; i < width; ++i) out.none();
}

void appendNotes(OutTable& out, const Diagnostics& d, std::size_t width) {
    labelRow(out, "rows used", static_cast<double>(d.rowsUsed), width);
    for (const auto& [why, n] : d.dropped) labelRow(out, "dropped: " + why, static_cast<double>(n), width);
    for (const auto& w : d.warnings) {
        out.addRow();
        out.text("warning");
        out.text(w);
        for (std::size_t i = 2; i < width; ++i) out.none();
    }
}

OutTable indexTableCells(const IndexResult& r, const OptionBag& opts, const CallContext& ctx,
                         const char* countTitle) {
    OutTable out;
    const IndexTable& t = r.table;
    titleRow(out, opts, {"period", "index", countTitle, "lower", "upper"});
    for (int i = 0; i < t.axis.count; ++i) {
        out.addRow();
        out.num(t.axis.start(i) - ctx.dateOffset);
        out.num(t.index[i]);
        out.num(static_cast<double>(t.count[i]));
        out.num(t.lower[i]);
        out.num(t.upper[i]);
    }
    if (opts.flag("notes", false)) appendNotes(out, r.diag, 5);
    return out;
}

namespace spec {

OptionSpec minsales() {
    return {"minsales", "1",
            "Periods with fewer sales than this show no index value (blank, skipped by AVERAGE "
            "and left as a gap in charts)."};
}
OptionSpec level() {
    return {"level", "0.95", "Confidence level of the lower and upper band, between 0 and 1."};
}
OptionSpec header() {
    return {"header", "0", "1 when the input ranges start with a header row, which is skipped."};
}
OptionSpec titles() {
    return {"titles", "0", "1 to start the output with a row of column titles."};
}
OptionSpec notes() {
    return {"notes", "0",
            "1 to append the diagnostics below the table: rows used, rows dropped by reason, "
            "warnings."};
}
ArgSpec dates() {
    return {"dates", ArgKind::Column,
            "Sale dates, one column (date cells or ISO text such as 2024-03-15)."};
}
ArgSpec prices() {
    return {"prices", ArgKind::Column, "Sale prices, one column aligned with dates."};
}
ArgSpec include() {
    return {"include", ArgKind::Optional,
            "Optional column of 1/0 or TRUE/FALSE choosing the sales to use, e.g. "
            "(C2:C5001=\"North\")*(D2:D5001=\"flat\"). Empty: all sales."};
}
ArgSpec freq() {
    return {"freq", ArgKind::Optional, "Period length: \"M\" month (default), \"Q\" quarter, \"Y\" year."};
}
ArgSpec base() {
    return {"base", ArgKind::Optional,
            "A date; the period that contains it is the base period (index 100). Empty: the "
            "first period with a value."};
}
ArgSpec options() {
    return {"options", ArgKind::Optional,
            "Optional settings as text \"key=value; key=value\" or a two-column range of keys "
            "and values."};
}
std::vector<std::string> indexFormats() { return {"YYYY-MM-DD", "0.0", "0", "0.0", "0.0"}; }

const char* kIndexOutput =
    "One row per period from the first to the last period with a usable sale: period start "
    "date | index (base period = 100) | sales used | lower band | upper band. Select fewer "
    "columns to get the first ones. Periods without enough sales show blank cells.";

}  // namespace spec

}  // namespace lintel::addin
