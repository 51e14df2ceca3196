#include "bind.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdlib>

#include "inputs.hpp"
#include "options.hpp"
#include "text.hpp"

namespace lintel::addin {

namespace read {

namespace {

// The text of a value for messages.
std::string shown(const Cell& c) {
    if (c.isNumber()) return fmt::format("{}", c.number);
    return shortText(c.text);
}

// inputs.hpp emptyCellHint, for an argument (an option's value is text, or a cell of an
// options range, where an empty cell stays empty).
std::string emptyCellHint(const Cell& c, const std::string& what) {
    return what.rfind("option", 0) == 0 ? "" : emptyCellHint(c);
}

bool digits(const std::string& s, std::size_t& i) {
    const std::size_t start = i;
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) ++i;
    return i > start;
}

// A plain decimal number: [+-] digits [sep digits] [e [+-] digits], or [+-] sep digits, with
// sep '.' or ','. Returns nullopt for anything else (hex, inf, nan, group separators, text).
// `comma` tells whether the decimal separator was a comma, `fraction` the digits after it.
std::optional<double> plainNumber(const std::string& t, bool& comma, std::size_t& fraction) {
    std::size_t i = 0;
    if (i < t.size() && (t[i] == '+' || t[i] == '-')) ++i;
    const bool whole = digits(t, i);
    comma = false;
    fraction = 0;
    if (i < t.size() && (t[i] == '.' || t[i] == ',')) {
        comma = t[i] == ',';
        ++i;
        const std::size_t f0 = i;
        const bool frac = digits(t, i);
        fraction = i - f0;
        if (!whole && !frac) return std::nullopt;
    } else if (!whole) {
        return std::nullopt;
    }
    if (i < t.size() && (t[i] == 'e' || t[i] == 'E')) {
        ++i;
        if (i < t.size() && (t[i] == '+' || t[i] == '-')) ++i;
        if (!digits(t, i)) return std::nullopt;
    }
    if (i != t.size()) return std::nullopt;
    std::string c = t;
    std::replace(c.begin(), c.end(), ',', '.');
    return std::strtod(c.c_str(), nullptr);
}

}  // namespace

double number(const Cell& c, const std::string& what) {
    if (c.isNumber()) {
        if (!std::isfinite(c.number)) throw InputError(fmt::format("{} must be a finite number", what));
        return c.number;
    }
    const std::string t = trim(c.text);
    bool comma = false;
    std::size_t fraction = 0;
    const auto x = plainNumber(t, comma, fraction);
    // "1,000" could be a thousand or one (a decimal comma): refuse rather than guess. A
    // decimal comma is accepted otherwise ("level="&B9 gives "level=0,9" in many languages).
    if (x && comma && fraction == 3 && t.find_first_of("eE") == std::string::npos)
        throw InputError(fmt::format(
            "{}: \"{}\" is ambiguous (a thousands separator or a decimal comma?); write it "
            "without a separator, e.g. {}",
            what, shortText(t), fmt::format("{}", *x * 1000)));
    if (!x || !std::isfinite(*x))
        throw InputError(fmt::format("{} must be a number, got \"{}\"", what, shortText(t)));
    return *x;
}

long whole(const Cell& c, const std::string& what, long min, long max) {
    const double x = number(c, what);
    if (x != std::floor(x) || x < static_cast<double>(min) || x > static_cast<double>(max)) {
        if (x > static_cast<double>(max) && x == std::floor(x))
            throw InputError(fmt::format("{} must be a whole number from {} to {}, got {}", what,
                                         min, max, x));
        throw InputError(fmt::format("{} must be a whole number of at least {}, got {}{}", what,
                                     min, x, x < static_cast<double>(min) ? emptyCellHint(c, what) : ""));
    }
    return static_cast<long>(x);
}

bool flag(const Cell& c, const std::string& what) {
    if (c.isNumber()) {
        if (c.number == 0 || c.number == 1) return c.number != 0;
    } else {
        const std::string t = lower(trim(c.text));
        if (t == "1" || t == "true" || t == "yes" || t == "on") return true;
        if (t == "0" || t == "false" || t == "no" || t == "off") return false;
    }
    throw InputError(fmt::format("{} must be 1 or 0 (TRUE or FALSE), got \"{}\"", what, shown(c)));
}

std::size_t word(const Cell& c, const std::string& what, const std::vector<std::string>& allowed) {
    const std::string v = lower(trim(c.isNumber() ? fmt::format("{}", c.number) : c.text));
    for (std::size_t i = 0; i < allowed.size(); ++i)
        if (allowed[i] == v) return i;
    std::string list;
    for (std::size_t i = 0; i < allowed.size(); ++i)
        list += (i == 0 ? "" : i + 1 == allowed.size() ? " or " : ", ") + ("\"" + allowed[i] + "\"");
    throw InputError(fmt::format("{} must be {}, got \"{}\"{}", what, list, shortText(v),
                                 emptyCellHint(c, what)));
}

Frequency frequency(const Cell& c, const std::string& what) {
    const auto f = c.isText() ? parseFrequency(trim(c.text)) : std::nullopt;
    if (!f)
        throw InputError(fmt::format("{} must be \"M\", \"Q\" or \"Y\", got \"{}\"{}", what, shown(c),
                                     emptyCellHint(c, what)));
    return *f;
}

double date(const Cell& c, const std::string& what, const CallContext& ctx) {
    // An option value is text: "45473" is the document serial a date cell would give.
    bool comma = false;
    std::size_t fraction = 0;
    const auto serial = c.isText() ? plainNumber(trim(c.text), comma, fraction) : std::nullopt;
    if (c.isText() && !(serial && !comma)) {
        // A date written as text, in the document's order (or the dateorder option's).
        const DateText t = readDateText(c.text, ctx.dateOrder);
        if (t.ok()) return t.serial;
        if (t.status == DateTextStatus::Unreadable || t.status == DateTextStatus::Blank)
            throw InputError(fmt::format("{} must be a date, got \"{}\"; {}", what, shown(c),
                                         acceptedDateForms(ctx.dateOrder)));
        throw InputError(fmt::format("{}: {}", what, t.message));
    }
    if (!emptyCellHint(c, what).empty())  // serial 0, 1899-12-30: no date anyone means
        throw InputError(fmt::format("{} must be a date, got 0{}", what, emptyCellHint(c, what)));
    const double s = serial && !comma ? *serial + ctx.dateOffset : cellDate(c, ctx);
    if (!isUsableSerial(s))
        throw InputError(fmt::format("{} must be a date, got \"{}\"", what, shown(c)));
    return s;
}

std::optional<DateOrder> dateOrder(const Cell& c, const std::string& what) {
    const std::string t = trim(c.isText() ? c.text : std::string());
    const std::optional<DateOrder> o = parseDateOrder(t);
    if (!o)
        throw InputError(fmt::format("{} must be \"auto\", \"DMY\", \"MDY\" or \"YMD\", got \"{}\"", what,
                                     shown(c)));
    if (*o == DateOrder::Unknown) return std::nullopt;  // auto
    return o;
}

std::vector<int> columns(const Cell& c, const std::string& what) {
    std::vector<int> out;
    if (c.isNumber()) {
        out.push_back(static_cast<int>(whole(c, what, 1, 1'000'000)));
        return out;
    }
    std::string t = c.text;
    std::replace_if(t.begin(), t.end(), [](char ch) { return ch == ',' || ch == ' '; }, ';');
    std::size_t pos = 0;
    while (pos <= t.size()) {
        std::size_t end = t.find(';', pos);
        if (end == std::string::npos) end = t.size();
        const std::string item = trim(t.substr(pos, end - pos));
        pos = end + 1;
        if (item.empty()) continue;
        std::size_t i = 0;
        if (!digits(item, i) || i != item.size() || item.size() > 7 || std::atol(item.c_str()) < 1)
            throw InputError(fmt::format("{} must list column numbers like \"1,3\", got \"{}\"", what,
                                         shortText(c.text)));
        out.push_back(std::atoi(item.c_str()));
    }
    return out;
}

}  // namespace read

OptionSpec option(std::string key, Param p, std::string description) {
    OptionSpec o;
    o.key = std::move(key);
    o.defaultText = std::move(p.defaultText);
    o.description = std::move(description);
    o.binding = std::move(p.binding);
    return o;
}

ArgSpec param(std::string name, Param p, std::string description) {
    ArgSpec a;
    a.name = std::move(name);
    a.kind = ArgKind::Optional;
    a.description = std::move(description);
    a.binding = std::move(p.binding);
    a.defaultText = std::move(p.defaultText);
    return a;
}

namespace spec {

OptionSpec header() {
    return option("header", flag<TableLayout>(&TableLayout::header),
                  "1 when the input ranges start with a header row, which is skipped.");
}
OptionSpec titles() {
    return option("titles", flag<TableLayout>(&TableLayout::titles),
                  "1 to start the output with a row of column titles.");
}
OptionSpec notes() {
    return option("notes", flag<TableLayout>(&TableLayout::notes),
                  "1 to append the diagnostics below the table: rows used, rows dropped by "
                  "reason, warnings.");
}
ArgSpec dates() {
    return {"dates", ArgKind::Column,
            "Sale dates, one column: date cells, or text such as 2024-03-15 or 15/03/2024 (day "
            "and month in the document's order, or as the option dateorder says)."};
}
ArgSpec prices() {
    return {"prices", ArgKind::Column,
            "Sale prices, one column aligned with dates: numbers, or text such as 350,000 or "
            "$350,000 (with the document's decimal separator)."};
}
ArgSpec include() {
    return {"include", ArgKind::Optional,
            "Optional column of 1/0 or TRUE/FALSE choosing the sales to use, e.g. "
            "(C2:C5001=\"North\")*(D2:D5001=\"flat\"), or ISSEGMENT(C2:C5001;\"North\") to "
            "ignore case and stray blanks. Empty: all sales."};
}
ArgSpec options() {
    return {"options", ArgKind::Optional,
            "Optional settings as text \"key=value; key=value\" or a two-column range of keys "
            "and values."};
}
std::string levelCheck(double x) {
    return x > 0 && x < 1 ? std::string() : std::string("must lie between 0 and 1");
}
std::vector<OutputColumn> indexColumns(const char* countTitle) {
    return {{"period", "YYYY-MM-DD"}, {"index", "0.0"}, {countTitle, "0"}, {"lower", "0.0"},
            {"upper", "0.0"}};
}
std::string indexOutput() {
    return "One row per period from the first to the last period with a usable sale: period "
           "start date | index (base period = 100) | sales used | lower band | upper band. "
           "Select fewer columns to get the first ones. Periods without enough sales show "
           "blank cells.";
}

}  // namespace spec

}  // namespace lintel::addin
