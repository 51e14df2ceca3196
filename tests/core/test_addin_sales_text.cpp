// Sales exports as they come, through the functions: dates and prices written as text read
// with the document's locale facts (CallContext), the dateorder and labels options, ISSEGMENT
// and SALESCHECK.
//
// The reference for every index value here is the same function on the clean version of the
// same sales (date cells, number cells, one spelling per label), whose values are checked
// against pandas / statsmodels / R in tests/reference; what a text means is a calendar fact
// ("15/03/2024" in day/month/year is 15 March 2024) or the document's separators ("350.000,00"
// with a decimal comma is 350000). The readers themselves are checked against Python's
// datetime and locale data and pandas in tests/reference/test_sales_text_*.py.
//
// Generated test data (sales()): sale i of n falls in month i / per of 2023-01 .. on day
// 3 + 7 (i % 4); its price is round(200000 (1 + 0.01 month) (1 + 0.05 sin(i))); its property
// id is "P" + (i % 40) and its district North (i % 3 == 0) or South.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <functional>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "addin_test_cells.hpp"

#include "call.hpp"
#include "diagnostics.hpp"
#include "function_table.hpp"
#include "inputs.hpp"
#include "periods.hpp"
#include "result_cost.hpp"

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;

namespace {

struct Sale {
    double date;
    double price;
    std::string id;
    std::string district;
};

std::vector<Sale> sales(std::size_t n = 120, std::size_t per = 5) {
    std::vector<Sale> v;
    for (std::size_t i = 0; i < n; ++i) {
        const int month = static_cast<int>(i / per);
        const double date = serialFromCivil({2023 + month / 12, 1 + month % 12, 3 + 7 * static_cast<int>(i % 4)});
        const double price = std::round(200000 * (1 + 0.01 * month) * (1 + 0.05 * std::sin(static_cast<double>(i))));
        v.push_back({date, price, "P" + std::to_string(i % 40), i % 3 == 0 ? "North" : "South"});
    }
    return v;
}

// "15/03/2024" (day/month/year) or "03/15/2024" (month/day/year), with separator sep.
std::string dateText(double serial, bool dayFirst, char sep = '/') {
    const CivilDate c = civilFromSerial(serial);
    return dayFirst ? fmt::format("{:02d}{}{:02d}{}{:04d}", c.day, sep, c.month, sep, c.year)
                    : fmt::format("{:02d}{}{:02d}{}{:04d}", c.month, sep, c.day, sep, c.year);
}

Arg col(const std::vector<Sale>& s, const std::function<Cell(const Sale&, std::size_t)>& f) {
    std::vector<Cell> cells;
    for (std::size_t i = 0; i < s.size(); ++i) cells.push_back(f(s[i], i));
    return column(std::move(cells));
}
Arg dateCells(const std::vector<Sale>& s) {
    return col(s, [](const Sale& x, std::size_t) { return Cell::num(x.date); });
}
Arg priceCells(const std::vector<Sale>& s) {
    return col(s, [](const Sale& x, std::size_t) { return Cell::num(x.price); });
}

CallContext locale(DateOrder order, std::string decimal = ".", std::string group = ",") {
    CallContext ctx;
    ctx.dateOrder = order;
    ctx.numbers.decimal = std::move(decimal);
    ctx.numbers.group = std::move(group);
    return ctx;
}

const std::vector<OutCell>* rowOf(const OutTable& t, const std::string& label) {
    for (const auto& r : t.rows)
        if (!r.empty() && r[0].kind == OutCell::Kind::Text && r[0].text == label) return &r;
    return nullptr;
}
// The warnings of a notes=1 table.
std::vector<std::string> warnings(const OutTable& t) {
    std::vector<std::string> w;
    for (const auto& r : t.rows)
        if (r.size() > 1 && r[0].kind == OutCell::Kind::Text && r[0].text == "warning") w.push_back(r[1].text);
    return w;
}
bool has(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

// The rows of the index table (before any notes).
void requireSameTable(const OutTable& a, const OutTable& b, std::size_t rows) {
    BOOST_REQUIRE(a.rows.size() >= rows);
    BOOST_REQUIRE(b.rows.size() >= rows);
    for (std::size_t i = 0; i < rows; ++i) {
        BOOST_REQUIRE_EQUAL(a.rows[i].size(), b.rows[i].size());
        for (std::size_t j = 0; j < a.rows[i].size(); ++j) {
            BOOST_TEST_CONTEXT("row " << i << " column " << j) {
                BOOST_TEST((a.rows[i][j].kind == b.rows[i][j].kind));
                if (a.rows[i][j].kind == OutCell::Kind::Number)
                    BOOST_TEST(a.rows[i][j].number == b.rows[i][j].number);
                else
                    BOOST_TEST(a.rows[i][j].text == b.rows[i][j].text);
            }
        }
    }
}

std::string message(const OutTable& t) { return t.rows.size() == 1 && t.rows[0].size() == 1 ? t.rows[0][0].text : ""; }

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_sales_text)

BOOST_AUTO_TEST_CASE(text_dates_in_the_documents_order_read_as_date_cells) {
    const auto s = sales();
    const OutTable clean = callOmitting("INDEXMEDIAN", {dateCells(s), priceCells(s)});
    BOOST_REQUIRE(clean.rows.size() == 24u);
    // Day first, with the three separators and a few month names and ISO texts among them.
    const Arg dmy = col(s, [](const Sale& x, std::size_t i) {
        if (i % 10 == 1) return Cell::str(isoDate(x.date));
        if (i % 10 == 2) {
            const CivilDate c = civilFromSerial(x.date);
            static const char* months[] = {"January", "February", "March",     "April",   "May",      "June",
                                           "July",    "August",   "September", "October", "November", "December"};
            return Cell::str(fmt::format("{} {} {}", c.day, months[c.month - 1], c.year));
        }
        return Cell::str(dateText(x.date, true, "/.-"[i % 3]));
    });
    requireSameTable(callOmitting("INDEXMEDIAN", {dmy, priceCells(s)}, locale(DateOrder::DayMonthYear)), clean, 24);
    // Month first in a month-first document.
    const Arg mdy = col(s, [](const Sale& x, std::size_t) { return Cell::str(dateText(x.date, false)); });
    requireSameTable(callOmitting("INDEXMEDIAN", {mdy, priceCells(s)}, locale(DateOrder::MonthDayYear)), clean, 24);
    // The option states the order where the document does not (or says otherwise).
    requireSameTable(callOmitting("INDEXMEDIAN", {dmy, priceCells(s), {}, {}, {}, text("dateorder=DMY")},
                                  locale(DateOrder::MonthDayYear)),
                     clean, 24);
    requireSameTable(callOmitting("INDEXMEDIAN", {mdy, priceCells(s), {}, {}, {}, text("dateorder=mdy")}), clean, 24);
    // No order known: the column's texts with a day above 12 tell it, and the notes say so.
    const OutTable inferred =
        callOmitting("INDEXMEDIAN", {dmy, priceCells(s), {}, {}, {}, text("notes=1")}, locale(DateOrder::Unknown));
    requireSameTable(inferred, clean, 24);
    const auto w = warnings(inferred);
    BOOST_REQUIRE(!w.empty());
    BOOST_TEST(has(w[0], "dates read as day/month/year"));
}

BOOST_AUTO_TEST_CASE(text_prices_with_separators_and_currency) {
    const auto s = sales();
    const OutTable clean = callOmitting("INDEXMEAN", {dateCells(s), priceCells(s)});
    // Decimal point, comma thousands (en-GB, en-US): the forms an export writes.
    const Arg point = col(s, [](const Sale& x, std::size_t i) {
        const long p = static_cast<long>(x.price);
        const std::string g = fmt::format("{},{:03d}", p / 1000, p % 1000);
        switch (i % 6) {
            case 0: return Cell::str(g);                                   // 213,456
            case 1: return Cell::str("$" + g);                             // $213,456
            case 2: return Cell::str(fmt::format("{} EUR", p));            // 213456 EUR
            case 3: return Cell::str(fmt::format("{} {:03d}", p / 1000, p % 1000));  // 213 456
            case 4: return Cell::str("\xc2\xa3" + g + ".00");              // £213,456.00
            default: return Cell::num(x.price);
        }
    });
    requireSameTable(callOmitting("INDEXMEAN", {dateCells(s), point}, locale(DateOrder::DayMonthYear)), clean, 24);
    // Decimal comma, point thousands (de-DE): 350.000,00.
    const Arg comma = col(s, [](const Sale& x, std::size_t i) {
        const long p = static_cast<long>(x.price);
        const std::string g = fmt::format("{}.{:03d}", p / 1000, p % 1000);
        switch (i % 3) {
            case 0: return Cell::str(g + ",00");                           // 213.456,00
            case 1: return Cell::str("\xe2\x82\xac " + g);                 // € 213.456
            default: return Cell::str(fmt::format("{},0", p));             // 213456,0
        }
    });
    requireSameTable(callOmitting("INDEXMEAN", {dateCells(s), comma}, locale(DateOrder::DayMonthYear, ",", ".")), clean,
                     24);
}

BOOST_AUTO_TEST_CASE(unreadable_cells_are_dropped_with_reason_and_first_row) {
    auto s = sales(20, 5);
    std::vector<Cell> d, p;
    for (const Sale& x : s) {
        d.push_back(Cell::str(dateText(x.date, true)));
        p.push_back(Cell::num(x.price));
    }
    d[3] = Cell::str("15/03/23");     // two-digit year
    d[7] = Cell::str("31/02/2023");   // no such date
    d[8] = Cell::str("soon");         // unreadable
    p[11] = Cell::str("350.000");     // ambiguous with a decimal point
    p[12] = Cell::str("n/a");         // unreadable price
    p[13] = Cell{};                   // blank price
    Arg dates = column(d);
    dates->sheetRow = 5;  // the range starts at row 5 of its sheet: rows are named as the sheet numbers them
    const OutTable t = callOmitting("INDEXMEDIAN", {dates, column(p), {}, {}, {}, text("notes=1")},
                                    locale(DateOrder::DayMonthYear));
    BOOST_TEST((*rowOf(t, "rows used"))[1].number == 14.0);
    BOOST_TEST((*rowOf(t, "dropped: two-digit year"))[1].number == 1.0);
    BOOST_TEST((*rowOf(t, "dropped: no such date"))[1].number == 1.0);
    BOOST_TEST((*rowOf(t, "dropped: unreadable date"))[1].number == 1.0);
    BOOST_TEST((*rowOf(t, "dropped: ambiguous number"))[1].number == 1.0);
    BOOST_TEST((*rowOf(t, "dropped: unreadable price"))[1].number == 1.0);
    BOOST_TEST((*rowOf(t, "dropped: blank or non-numeric price"))[1].number == 1.0);
    const auto w = warnings(t);
    BOOST_REQUIRE(w.size() >= 5u);
    // Row 3 of the range is row 8 of the sheet.
    BOOST_TEST(w[0] == "unreadable date (1 row), first row 13: \"soon\" is not a date we can read; accepted: a "
                       "date cell, 2024-03-15, 15/03/2024 (day/month/year; also with . or -), 15 March 2024, "
                       "March 15, 2024; the year with four digits; a time after the date is ignored");
    BOOST_TEST(has(w[1], "two-digit year (1 row), first row 8: \"15/03/23\" has a two-digit year: write the year "
                         "with four digits"));
    BOOST_TEST(has(w[2], "no such date (1 row), first row 12: \"31/02/2023\" is not a date in day/month/year "
                         "order (February 2023 has 28 days)"));
    BOOST_TEST(has(w[3], "unreadable price (1 row), first row 17: \"n/a\""));
    BOOST_TEST(has(w[3], "accepted: 350000, 350,000"));
    BOOST_TEST(has(w[4], "ambiguous number (1 row), first row 16: \"350.000\""));
}

BOOST_AUTO_TEST_CASE(nothing_usable_says_why_and_what_is_accepted) {
    const Arg dates = column({Cell::str("15/03/24"), Cell::str("16/03/24"), Cell::str("17/03/24")});
    const Arg prices = column({Cell::num(1), Cell::num(2), Cell::num(3)});
    BOOST_TEST(message(callOmitting("INDEXMEDIAN", {dates, prices}, locale(DateOrder::DayMonthYear))) ==
               "Lintel: no usable sale: 0 of 3 rows used; dropped: 3 two-digit year; 1 warning(s); two-digit "
               "year (3 rows), first row 1: \"15/03/24\" has a two-digit year: write the year with four digits; "
               "accepted: a date cell, 2024-03-15, 15/03/2024 (day/month/year; also with . or -), 15 March "
               "2024, March 15, 2024; the year with four digits; a time after the date is ignored");
    // A header row given without header=1 is named as one.
    const Arg d2 = column({Cell::str("date"), Cell::num(45000)});
    const Arg p2 = column({Cell::str("price"), Cell::num(100)});
    const OutTable t = callOmitting("INDEXMEDIAN", {d2, p2, {}, {}, {}, text("notes=1")});
    BOOST_TEST(has(warnings(t).at(0), "first row 1: \"date\" is not a date we can read"));
    BOOST_TEST(has(warnings(t).at(0), "(a header row? add header=1 to the options)"));
}

BOOST_AUTO_TEST_CASE(base_date_as_text_in_the_documents_order) {
    const auto s = sales();
    // 01/02/2024 is 1 February 2024 day first, 2 January 2024 month first.
    const auto indexAt = [](const OutTable& t, double period) {
        for (const auto& r : t.rows)
            if (r[0].number == period) return r[1].number;
        return -1.0;
    };
    const double feb = serialFromCivil({2024, 2, 1}), jan = serialFromCivil({2024, 1, 1});
    const OutTable d = callOmitting("INDEXMEDIAN", {dateCells(s), priceCells(s), {}, {}, text("01/02/2024")},
                                    locale(DateOrder::DayMonthYear));
    BOOST_TEST(indexAt(d, feb) == 100.0);
    BOOST_TEST(indexAt(d, jan) != 100.0);
    const OutTable m = callOmitting("INDEXMEDIAN", {dateCells(s), priceCells(s), {}, {}, text("01/02/2024")},
                                    locale(DateOrder::MonthDayYear));
    BOOST_TEST(indexAt(m, jan) == 100.0);
    // dateorder= applies to the base as well.
    const OutTable o = callOmitting("INDEXMEDIAN",
                                    {dateCells(s), priceCells(s), {}, {}, text("01/02/2024"), text("dateorder=MDY")},
                                    locale(DateOrder::DayMonthYear));
    BOOST_TEST(indexAt(o, jan) == 100.0);
    BOOST_TEST(message(callOmitting("INDEXMEDIAN", {dateCells(s), priceCells(s), {}, {}, text("01/02/24")},
                                    locale(DateOrder::DayMonthYear))) ==
               "Lintel: base: \"01/02/24\" has a two-digit year: write the year with four digits; accepted: a "
               "date cell, 2024-03-15, 15/03/2024 (day/month/year; also with . or -), 15 March 2024, March "
               "15, 2024; the year with four digits; a time after the date is ignored");
    // Without an order, 01/02/2024 could be either.
    BOOST_TEST(has(message(callOmitting("INDEXMEDIAN", {dateCells(s), priceCells(s), {}, {}, text("01/02/2024")})),
                   "Lintel: base: \"01/02/2024\""));
}

BOOST_AUTO_TEST_CASE(implausible_dates_are_used_and_listed) {
    auto s = sales(20, 5);
    std::vector<Cell> d;
    for (const Sale& x : s) d.push_back(Cell::num(x.date));
    d[2] = Cell::num(serialFromCivil({1899, 6, 1}));
    d[6] = Cell::str("2031-01-15");
    CallContext ctx;
    ctx.currentYear = 2029;
    const OutTable t = callOmitting("INDEXMEAN", {column(d), priceCells(s), {}, text("Y"), {}, text("notes=1")}, ctx);
    // Used as given: the yearly table runs from 1899 to 2031.
    BOOST_TEST(t.rows[0][0].number == serialFromCivil({1899, 1, 1}));
    BOOST_TEST((*rowOf(t, "rows used"))[1].number == 20.0);
    const auto w = warnings(t);
    BOOST_REQUIRE(!w.empty());
    BOOST_TEST(w[0] == "date implausible for a sale (2 rows, used as given: a price or another number in the date "
                       "column?): row 3 (1899-06-01), row 7 (2031-01-15); the dates must lie from 1900 to 2030");
}

BOOST_AUTO_TEST_CASE(labels_clean_in_strata_categories_and_ids) {
    const auto s = sales();
    // Strata: "North" and "South" as typed by hand one row in four.
    const auto messy = [](const std::string& v, std::size_t i) {
        switch (i % 8) {
            case 1: return v + " ";
            case 3: return std::string("\xc2\xa0") + v;  // a no-break space in front
            case 5: {
                std::string u = v;
                for (char& c : u) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
                return u;
            }
            default: return v;
        }
    };
    const Arg strata = col(s, [](const Sale& x, std::size_t) { return Cell::str(x.district); });
    const Arg strataMessy = col(s, [&](const Sale& x, std::size_t i) { return Cell::str(messy(x.district, i)); });
    const OutTable clean = callOmitting("INDEXMIX", {dateCells(s), priceCells(s), strata});
    requireSameTable(
        callOmitting("INDEXMIX", {dateCells(s), priceCells(s), strataMessy, {}, {}, {}, text("labels=clean")}), clean,
        24);
    // As written, the spellings are strata of their own: another index.
    const OutTable exact = callOmitting("INDEXMIX", {dateCells(s), priceCells(s), strataMessy, {}, {}, {}, text("notes=1")});
    BOOST_TEST((*rowOf(exact, "strata"))[1].number == 8.0);

    // Ids of the repeat-sales index.
    const Arg ids = col(s, [](const Sale& x, std::size_t) { return Cell::str(x.id); });
    const Arg idsMessy = col(s, [&](const Sale& x, std::size_t i) { return Cell::str(messy(x.id, i / 40)); });
    const OutTable rs = callOmitting("CHAINRS", {ids, dateCells(s), priceCells(s), {}, {}, text("Q")});
    requireSameTable(callOmitting("CHAINRS", {idsMessy, dateCells(s), priceCells(s), {}, {}, text("Q"), {},
                                              text("labels=clean")}),
                     rs, 8);

    // A category of the hedonic model: the term keeps the most frequent spelling.
    Range chars;
    chars.rows = s.size();
    chars.cols = 2;
    Range charsMessy = chars;
    for (std::size_t i = 0; i < s.size(); ++i) {
        const double area = 60 + static_cast<double>((i * 7) % 50);
        chars.cells.push_back(Cell::num(area));
        chars.cells.push_back(Cell::str(s[i].district));
        charsMessy.cells.push_back(Cell::num(area));
        charsMessy.cells.push_back(Cell::str(messy(s[i].district, i)));
    }
    std::vector<Arg> args = {dateCells(s), priceCells(s), chars, {}, {}, {}, text("log=1")};
    const OutTable coefs = call("HEDONICCOEFS", args);
    args[2] = charsMessy;
    args[6] = text("log=1; labels=clean");
    const OutTable coefsMessy = call("HEDONICCOEFS", args);
    requireSameTable(coefsMessy, coefs, coefs.rows.size());
    BOOST_TEST(coefs.rows[2][0].text == "x2=North");
}

BOOST_AUTO_TEST_CASE(characteristics_written_as_text) {
    const auto s = sales();
    Range numbers, texts;
    numbers.rows = texts.rows = s.size();
    numbers.cols = texts.cols = 2;
    for (std::size_t i = 0; i < s.size(); ++i) {
        const double area = 900 + static_cast<double>((i * 37) % 700);
        const int code = 101 + static_cast<int>(i % 3);
        numbers.cells.push_back(Cell::num(area));
        numbers.cells.push_back(Cell::str(std::to_string(code)));
        // Floor area as an export writes it ("1,250"); the district code as text stays a code.
        texts.cells.push_back(Cell::str(fmt::format("{},{:03d}", static_cast<int>(area) / 1000, static_cast<int>(area) % 1000)));
        texts.cells.push_back(Cell::str(std::to_string(code)));
    }
    std::vector<Arg> args = {dateCells(s), priceCells(s), numbers, {}, {}, {}, text("log=1")};
    const OutTable a = call("HEDONICCOEFS", args);
    args[2] = texts;
    const OutTable b = call("HEDONICCOEFS", args);
    requireSameTable(b, a, a.rows.size());
    BOOST_TEST(a.rows[1][0].text == "log(x1)");
    BOOST_TEST(a.rows[2][0].text == "x2=102");
}

BOOST_AUTO_TEST_CASE(issegment_compares_cleaned_labels) {
    const Arg labels = column({Cell::str("Ellenford"), Cell::str("Ellenford "), Cell::str("ellenford"),
                               Cell::str("\xc2\xa0" "ELLENFORD"), Cell::str("Ellen ford"), Cell{}, Cell::str("Marsh"),
                               Cell::num(3)});
    const auto values = [](const OutTable& t) {
        std::vector<double> v;
        for (const auto& r : t.rows) v.push_back(r[0].number);
        return v;
    };
    BOOST_TEST(values(callOmitting("ISSEGMENT", {labels, text("Ellenford")})) ==
               (std::vector<double>{1, 1, 1, 1, 0, 0, 0, 0}));
    // Several values (a range), a number label.
    BOOST_TEST(values(callOmitting("ISSEGMENT", {labels, column({Cell::str(" marsh"), Cell::num(3)})})) ==
               (std::vector<double>{0, 0, 0, 0, 0, 0, 1, 1}));
    // As written.
    BOOST_TEST(values(callOmitting("ISSEGMENT", {labels, text("Ellenford"), text("labels=exact")})) ==
               (std::vector<double>{1, 0, 0, 0, 0, 0, 0, 0}));
    BOOST_TEST(message(callOmitting("ISSEGMENT", {labels, text(" ")})) ==
               "Lintel: values holds no label: give the segment's value, e.g. \"North\", or a range of values");
}

namespace {
// A messy table: 30 sales of 2024 (months 1..3, ten a month) written as a day-first export,
// with planted problems. Row k of the sheet is index k - 2 (a header row above).
struct Messy {
    std::vector<Cell> dates, prices, ids, districts;
    void add(Cell d, Cell p, Cell id, Cell district) {
        dates.push_back(std::move(d));
        prices.push_back(std::move(p));
        ids.push_back(std::move(id));
        districts.push_back(std::move(district));
    }
};
Messy messyTable() {
    Messy m;
    m.add(Cell::str("date"), Cell::str("price"), Cell::str("id"), Cell::str("district"));
    for (int i = 0; i < 30; ++i) {
        const int month = 1 + i / 10;
        const double price = 300000 + 2000 * (i % 7);
        m.add(Cell::str(fmt::format("{:02d}/{:02d}/2024", 2 + i % 10, month)),
              Cell::str(fmt::format("{},{:03d}", static_cast<int>(price) / 1000, static_cast<int>(price) % 1000)),
              Cell::str(fmt::format("H{}", i)), Cell::str(i % 2 ? "Ellenford" : "ellenford "));
    }
    m.add(Cell::str("02/01/2024"), Cell::str("300,000"), Cell::str("h0 "), Cell::str("Ellenford"));  // row 32: duplicate of row 2
    m.add(Cell::str("05/02/24"), Cell::num(310000), Cell::str("H40"), Cell::str("Ellenford"));       // row 33: two-digit year
    m.add(Cell::str("06/02/2024"), Cell::num(3100000), Cell::str("H41"), Cell::str("Ellenford"));    // row 34: extra zero
    m.add(Cell::str("07/03/2024"), Cell::num(305000), Cell::str("H42"), Cell::str("Ellenford"));     // row 35: conflict
    m.add(Cell::str("07/03/2024"), Cell::num(350000), Cell::str("H42"), Cell::str("Ellenford"));     // row 36: conflict
    return m;
}
std::vector<Arg> checkArgs(const Messy& m, const std::string& options, std::size_t sheetRow = 1) {
    Arg dates = column(m.dates);
    dates->sheetRow = sheetRow;
    Range districts;
    districts.rows = m.districts.size();
    districts.cols = 1;
    districts.cells = m.districts;
    return {dates, column(m.prices), column(m.ids), districts, {}, text("M"), text(options)};
}
}  // namespace

BOOST_AUTO_TEST_CASE(salescheck_lists_every_planted_problem) {
    const Messy m = messyTable();
    const OutTable t = call("SALESCHECK", checkArgs(m, "header=1; titles=1; labels=clean"),
                            locale(DateOrder::DayMonthYear));
    BOOST_REQUIRE(t.rows.size() == 6u);  // titles and the five planted problems
    BOOST_TEST(txt(t.rows[0][0]) == "row");
    BOOST_TEST(txt(t.rows[0][5]) == "detail");
    struct Want {
        double row;
        const char* column;
        const char* problem;
        const char* value;
    };
    const std::vector<Want> want = {{32, "id", "duplicate", "h0 "},
                                    {33, "date", "two-digit year", "05/02/24"},
                                    {34, "price", "price outlier", "3100000"},
                                    {35, "price", "conflicting prices", "305000"},
                                    {36, "price", "conflicting prices", "350000"}};
    std::size_t k = 1;
    for (const Want& w : want) {
        BOOST_TEST_CONTEXT("row " << w.row) {
            BOOST_TEST(num(t.rows[k][0]) == w.row);
            BOOST_TEST(txt(t.rows[k][1]) == w.column);
            BOOST_TEST(txt(t.rows[k][2]) == w.problem);
            BOOST_TEST(txt(t.rows[k][3]) == w.value);
        }
        ++k;
    }
    // The duplicate names the row it repeats; the outlier has its z.
    BOOST_TEST(has(txt(t.rows[1][5]), "same id, date and price as row 2: used once"));
    BOOST_TEST((t.rows[3][4].kind == OutCell::Kind::Number));
    BOOST_TEST(num(t.rows[3][4]) > 3.5);
    BOOST_TEST((t.rows[1][4].kind == OutCell::Kind::NoValue));

    // Without label cleaning, "h0 " (blanks ignored) is another property than "H0": no duplicate.
    const OutTable exact = call("SALESCHECK", checkArgs(m, "header=1"), locale(DateOrder::DayMonthYear));
    for (const auto& r : exact.rows) BOOST_TEST(txt(r[2]) != "duplicate");
}

BOOST_AUTO_TEST_CASE(salescheck_use_mask_and_counts) {
    const Messy m = messyTable();
    const OutTable use = call("SALESCHECK", checkArgs(m, "header=1; labels=clean; output=use"),
                              locale(DateOrder::DayMonthYear));
    BOOST_REQUIRE(use.rows.size() == m.dates.size());  // aligned with the input, header row included
    std::vector<double> v;
    for (const auto& r : use.rows) v.push_back(num(r[0]));
    BOOST_TEST(v[0] == 0.0);  // the header row
    for (std::size_t i = 1; i <= 30; ++i) BOOST_TEST(v[i] == 1.0);
    BOOST_TEST(v[31] == 0.0);  // duplicate
    BOOST_TEST(v[32] == 0.0);  // two-digit year
    BOOST_TEST(v[33] == 1.0);  // the outlier is used
    BOOST_TEST(v[34] == 0.0);  // conflicting prices
    BOOST_TEST(v[35] == 0.0);

    const OutTable counts = call("SALESCHECK", checkArgs(m, "header=1; labels=clean; output=counts"),
                                 locale(DateOrder::DayMonthYear));
    BOOST_REQUIRE(counts.rows.size() == 17u);
    BOOST_TEST(txt(counts.rows[0][0]) == "rows checked");
    BOOST_TEST(num(counts.rows[0][1]) == 35.0);
    BOOST_TEST(txt(counts.rows[1][0]) == "rows used");
    BOOST_TEST(num(counts.rows[1][1]) == 31.0);
    BOOST_TEST(num((*rowOf(counts, "conflicting prices"))[1]) == 2.0);
    BOOST_TEST(num((*rowOf(counts, "duplicate"))[1]) == 1.0);
    BOOST_TEST(num((*rowOf(counts, "blank price"))[1]) == 0.0);

    // The mask times ISSEGMENT in an index function's include: each sale once, the segment
    // cleaned (every row here is Ellenford in some spelling).
    std::vector<Cell> mask;
    for (double x : v) mask.push_back(Cell::num(x));
    const std::vector<Arg> ca = checkArgs(m, "");
    const OutTable t = call("INDEXMEDIAN", {ca[0], ca[1], column(mask), {}, {}, text("header=1; notes=1")},
                            locale(DateOrder::DayMonthYear));
    BOOST_TEST(num((*rowOf(t, "rows used"))[1]) == 31.0);
}

BOOST_AUTO_TEST_CASE(salescheck_with_nothing_wrong_and_a_bounded_list) {
    Messy m;
    for (int i = 0; i < 12; ++i)
        m.add(Cell::num(45300 + i), Cell::num(300000 + 1000 * i), Cell::str(fmt::format("H{}", i)), Cell::str("North"));
    const OutTable t = call("SALESCHECK", checkArgs(m, ""));
    BOOST_REQUIRE(t.rows.size() == 1u);
    BOOST_TEST(txt(t.rows[0][2]) == "no problem found in 12 rows");
    // The list's length limit keeps its cost below the trim threshold: the cost of a list of
    // that many rows (5 text cells after the row number) against the store-cost model.
    const std::size_t room = listRowsWithinLimit(5);
    OutTable list;
    for (std::size_t i = 0; i < room; ++i) {
        list.addRow();
        list.num(static_cast<double>(i));
        for (int c = 0; c < 5; ++c) list.text("x");
    }
    BOOST_TEST(storeCost(list, 1e300) <= kTrimBlankTailCost);
    for (std::size_t i = 0; i < room / 10; ++i) {
        list.addRow();
        list.num(0);
        for (int c = 0; c < 5; ++c) list.text("x");
    }
    BOOST_TEST(storeCost(list, 1e300) > kTrimBlankTailCost);
}

BOOST_AUTO_TEST_SUITE_END()
