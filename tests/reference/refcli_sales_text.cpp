// refcli commands for reading sales exports (dates and numbers as text, labels, the sales
// check).
//   date_text    <csv: text>  order=DMY|MDY|YMD|auto     -> serial, status
//   number_text  <csv: text>  decimal=. group=,|.|space|nbsp|nnbsp|apostrophe|none indian=0
//                                                         -> value, status
//   label_groups <csv: label>                             -> key, display, count, first (text)
//   date_order   <csv: tag>                               -> order (0 unknown, 1 DMY, 2 MDY, 3 YMD)
//   date_order_pattern <csv: pattern>                     -> order
//   sales_check  <csv: date, price[, id][, segment][, include]> order=DMY freq=M year=0
//                minGroup=10 threshold=3.5 decimal=. group=,
//                -> one line per problem: row, problem, z
//   sales_rows   (same input and options) -> per row: date, price, used, z
// Status codes are the enum values (DateTextStatus, NumberTextStatus, SaleProblem). A cell
// written "=<number>" is a number cell (a date serial or a price); anything else is text.
#include <cmath>
#include <cstdio>
#include <limits>

#include "date_text.hpp"
#include "label_text.hpp"
#include "number_text.hpp"
#include "refcli.hpp"
#include "sales_check.hpp"

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

lintel::DateOrder orderArg(const refcli::Args& a) {
    return lintel::parseDateOrder(refcli::text(a, "order", "auto")).value();
}

lintel::NumberFormat formatArg(const refcli::Args& a) {
    lintel::NumberFormat f;
    f.decimal = refcli::text(a, "decimal", ".");
    const std::string g = refcli::text(a, "group", ",");
    if (g == "space") f.group = " ";
    else if (g == "nbsp") f.group = "\xC2\xA0";
    else if (g == "nnbsp") f.group = "\xE2\x80\xAF";
    else if (g == "apostrophe") f.group = "'";
    else if (g == "none") f.group = "";
    else f.group = g;
    f.indianGrouping = refcli::number(a, "indian", 0) != 0;
    f.validate();
    return f;
}

lintel::RawValue cell(const std::string& s) {
    if (s.empty()) return lintel::RawValue::empty();
    if (s[0] == '=') return lintel::RawValue::of(std::strtod(s.c_str() + 1, nullptr));
    return lintel::RawValue::of(s);
}

std::vector<lintel::RawValue> cells(const refcli::Table& t, const std::string& name) {
    std::vector<lintel::RawValue> v;
    for (const std::string& s : t.text(name)) v.push_back(cell(s));
    return v;
}

// A CSV text field, quoted.
void printText(const std::string& s) {
    std::putchar('"');
    for (char c : s) {
        if (c == '"') std::putchar('"');
        std::putchar(c);
    }
    std::putchar('"');
}

const refcli::Register regDate("date_text", [](const refcli::Table& t, const refcli::Args& a) {
    const lintel::DateOrder order = orderArg(a);
    std::vector<double> serial, status;
    for (const std::string& s : t.text("text")) {
        const lintel::DateText r = lintel::readDateText(s, order);
        serial.push_back(r.ok() ? r.serial : kNaN);
        status.push_back(static_cast<double>(r.status));
    }
    refcli::printColumns({"serial", "status"}, {serial, status});
    return 0;
});

const refcli::Register regNumber("number_text", [](const refcli::Table& t, const refcli::Args& a) {
    const lintel::NumberFormat f = formatArg(a);
    std::vector<double> value, status;
    for (const std::string& s : t.text("text")) {
        const lintel::NumberText r = lintel::readNumberText(s, f);
        value.push_back(r.ok() ? r.value : kNaN);
        status.push_back(static_cast<double>(r.status));
    }
    refcli::printColumns({"value", "status"}, {value, status});
    return 0;
});

const refcli::Register regLabels("label_groups", [](const refcli::Table& t, const refcli::Args&) {
    const lintel::LabelGroups g = lintel::groupLabels(t.text("label"));
    std::printf("key,display,count,first\n");
    for (const auto& grp : g.groups) {
        printText(grp.key);
        std::putchar(',');
        printText(grp.display);
        std::printf(",%zu,%zu\n", grp.count, grp.firstRow);
    }
    return 0;
});

const refcli::Register regOrder("date_order", [](const refcli::Table& t, const refcli::Args&) {
    std::vector<double> order;
    for (const std::string& s : t.text("tag"))
        order.push_back(static_cast<double>(lintel::dateOrderForLocaleTag(s)));
    refcli::printColumns({"order"}, {order});
    return 0;
});

const refcli::Register regPattern("date_order_pattern", [](const refcli::Table& t, const refcli::Args&) {
    std::vector<double> order;
    for (const std::string& s : t.text("pattern"))
        order.push_back(static_cast<double>(lintel::dateOrderFromPattern(s)));
    refcli::printColumns({"order"}, {order});
    return 0;
});

lintel::SalesCheck runCheck(const refcli::Table& t, const refcli::Args& a) {
    lintel::SalesCheckInput in;
    in.dates = cells(t, "date");
    in.prices = cells(t, "price");
    if (t.find("id") >= 0) in.ids = cells(t, "id");
    if (t.find("segment") >= 0) in.segments.push_back(cells(t, "segment"));
    if (t.find("include") >= 0)
        for (double x : t.numbers("include")) in.include.push_back(x != 0 ? 1 : 0);
    lintel::SalesCheckOptions o;
    o.read.dateOrder = orderArg(a);
    o.read.numbers = formatArg(a);
    o.read.currentYear = static_cast<int>(refcli::number(a, "year", 0));
    o.freq = *lintel::parseFrequency(refcli::text(a, "freq", "M"));
    o.outliers.minGroup = static_cast<std::size_t>(refcli::number(a, "minGroup", 10));
    o.outliers.threshold = refcli::number(a, "threshold", 3.5);
    return lintel::checkSales(in, o);
}

const refcli::Register regCheck("sales_check", [](const refcli::Table& t, const refcli::Args& a) {
    const lintel::SalesCheck r = runCheck(t, a);
    std::vector<double> row, problem, z;
    for (const auto& p : r.problems) {
        row.push_back(static_cast<double>(p.row));
        problem.push_back(static_cast<double>(p.problem));
        z.push_back(p.z);
    }
    refcli::printColumns({"row", "problem", "z"}, {row, problem, z});
    return 0;
});

const refcli::Register regRows("sales_rows", [](const refcli::Table& t, const refcli::Args& a) {
    const lintel::SalesCheck r = runCheck(t, a);
    std::vector<double> used;
    for (char u : r.used) used.push_back(u);
    refcli::printColumns({"date", "price", "used", "z"}, {r.date, r.price, used, r.z});
    return 0;
});

}  // namespace
