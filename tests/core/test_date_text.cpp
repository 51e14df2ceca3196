// Dates written as text (date_text.hpp).
// Serial anchors are Calc's with the default null date 1899-12-30: =DATE(2024;3;15) is 45366,
// =DATE(2024;2;29) is 45351 (checkable in any Calc sheet). The wider comparison against
// Python's datetime.strptime and pandas.to_datetime is tests/reference/test_sales_text_dates.py.
#include <boost/test/unit_test.hpp>

#include "date_text.hpp"
#include "diagnostics.hpp"
#include "periods.hpp"

using namespace lintel;

namespace {
constexpr double kMar15 = 45366;  // 2024-03-15
const DateOrder DMY = DateOrder::DayMonthYear, MDY = DateOrder::MonthDayYear,
                YMD = DateOrder::YearMonthDay, ANY = DateOrder::Unknown;

double read(const std::string& t, DateOrder o) {
    const DateText r = readDateText(t, o);
    BOOST_TEST_INFO("text: " << t << " message: " << r.message);
    BOOST_REQUIRE(r.ok());
    return r.serial;
}
bool has(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }
}  // namespace

BOOST_AUTO_TEST_SUITE(date_text)

BOOST_AUTO_TEST_CASE(iso_and_times) {
    BOOST_TEST(serialFromCivil({2024, 3, 15}) == kMar15);
    for (const char* t : {"2024-03-15", "2024-3-15", "2024/03/15", "2024.03.15", " 2024-03-15 ",
                          "\xC2\xA0" "2024-03-15\xE2\x80\xAF", "2024-03-15 14:30", "2024-03-15T14:30:00",
                          "2024-03-15T14:30:00Z", "2024-03-15T14:30:00.250+01:00", "2024-03-15 2:30 PM",
                          "2024-03-15 14:30:59", "2024-03-15T23:59:60"})
        for (DateOrder o : {DMY, MDY, YMD, ANY}) BOOST_TEST(read(t, o) == kMar15);
    BOOST_TEST(read("2024-02-29", ANY) == 45351);
}

BOOST_AUTO_TEST_CASE(day_month_orders) {
    for (const char* t : {"15/03/2024", "15.03.2024", "15-03-2024", "15/3/2024", "15/03/2024 14:30"})
        BOOST_TEST(read(t, DMY) == kMar15);
    for (const char* t : {"03/15/2024", "3/15/2024", "03.15.2024", "3-15-2024 2:30 pm"})
        BOOST_TEST(read(t, MDY) == kMar15);
    // Known order decides 03/04/2024.
    BOOST_TEST(read("03/04/2024", DMY) == serialFromCivil({2024, 4, 3}));
    BOOST_TEST(read("03/04/2024", MDY) == serialFromCivil({2024, 3, 4}));
    // No order: one valid reading, or the same day both ways.
    BOOST_TEST(read("15/03/2024", ANY) == kMar15);
    BOOST_TEST(read("03/15/2024", ANY) == kMar15);
    BOOST_TEST(read("05/05/2024", ANY) == serialFromCivil({2024, 5, 5}));
    BOOST_TEST(read("15/03/2024", YMD) == kMar15);
}

BOOST_AUTO_TEST_CASE(month_names) {
    for (const char* t : {"15 March 2024", "15 Mar 2024", "15-Mar-2024", "15 mar. 2024", "15 MARCH 2024",
                          "March 15, 2024", "Mar 15 2024", "Mar. 15, 2024", "march 15 2024 14:30"})
        for (DateOrder o : {DMY, MDY, ANY}) BOOST_TEST(read(t, o) == kMar15);
    BOOST_TEST(read("1 Sept 2024", ANY) == serialFromCivil({2024, 9, 1}));
}

BOOST_AUTO_TEST_CASE(messages) {
    // Every refusal names the accepted forms.
    const auto refused = [](const std::string& t, DateOrder o, DateTextStatus s) {
        const DateText r = readDateText(t, o);
        BOOST_TEST_INFO("text: " << t << " message: " << r.message);
        BOOST_TEST(!r.ok());
        BOOST_TEST((r.status == s));
        BOOST_TEST(has(r.message, "accepted: a date cell, 2024-03-15"));
        BOOST_TEST(has(r.message, "the year with four digits"));
        return r.message;
    };
    std::string m = refused("15/03/24", DMY, DateTextStatus::TwoDigitYear);
    BOOST_TEST(has(m, "\"15/03/24\" has a two-digit year: write the year with four digits"));
    BOOST_TEST(has(m, "15/03/2024 (day/month/year"));
    refused("24-03-15", ANY, DateTextStatus::TwoDigitYear);
    refused("15-Mar-24", ANY, DateTextStatus::TwoDigitYear);
    m = refused("03/15/24", MDY, DateTextStatus::TwoDigitYear);
    BOOST_TEST(has(m, "03/15/2024 (month/day/year"));

    m = refused("31/02/2024", DMY, DateTextStatus::NoSuchDate);
    BOOST_TEST(has(m, "\"31/02/2024\" is not a date in day/month/year order (February 2024 has 29 days)"));
    m = refused("29/02/2023", DMY, DateTextStatus::NoSuchDate);
    BOOST_TEST(has(m, "February 2023 has 28 days"));
    m = refused("2024-13-01", ANY, DateTextStatus::NoSuchDate);
    BOOST_TEST(has(m, "\"2024-13-01\" is not a calendar date (there is no month 13)"));
    m = refused("2024-04-00", ANY, DateTextStatus::NoSuchDate);
    BOOST_TEST(has(m, "there is no day 0"));
    m = refused("12/25/2024", DMY, DateTextStatus::NoSuchDate);
    BOOST_TEST(has(m, "not a date in day/month/year order (there is no month 25); as month/day/year "
                      "it would be 25 December 2024: check the date order"));
    m = refused("25/12/2024", MDY, DateTextStatus::NoSuchDate);
    BOOST_TEST(has(m, "as day/month/year it would be 25 December 2024"));
    m = refused("31/31/2024", ANY, DateTextStatus::NoSuchDate);
    BOOST_TEST(has(m, "as day/month/year: there is no month 31; as month/day/year: there is no month 31"));
    m = refused("0999-03-15", ANY, DateTextStatus::NoSuchDate);
    BOOST_TEST(has(m, "the year 0999 is not a year of sales"));
    refused("15/03/0999", DMY, DateTextStatus::NoSuchDate);

    m = refused("03/04/2024", ANY, DateTextStatus::Ambiguous);
    BOOST_TEST(has(m, "\"03/04/2024\" could be 3 April 2024 (day/month/year) or 4 March 2024 "
                      "(month/day/year): set the date order (dateorder=DMY or MDY) or write the "
                      "date as YYYY-MM-DD"));
    BOOST_TEST(has(m, "where day and month cannot be confused"));
    refused("03/04/2024", YMD, DateTextStatus::Ambiguous);

    for (const char* t : {"15th March 2024", "2024", "March 2024", "15/03-2024", "20240315", "15//03/2024",
                          "2024-03-15 25:00", "2024-03-15 14:61", "2024-03-15 13:00 PM", "2024-03-15 x",
                          "15 Foo 2024", "yesterday", "15.03.2024.", "2024-003-15", "15/03/02024",
                          "\xE2\x80\x94", "15\xC3\xA9/03/2024"}) {
        m = refused(t, DMY, DateTextStatus::Unreadable);
        BOOST_TEST(has(m, "is not a date we can read; accepted:"));
    }
    // Long texts are cut in the message.
    m = refused(std::string(80, 'x'), DMY, DateTextStatus::Unreadable);
    BOOST_TEST(has(m, "\"" + std::string(37, 'x') + "...\""));
}

BOOST_AUTO_TEST_CASE(blank_and_argument) {
    BOOST_TEST((readDateText("", DMY).status == DateTextStatus::Blank));
    BOOST_TEST((readDateText(" \xC2\xA0 ", DMY).status == DateTextStatus::Blank));
    BOOST_TEST(readDateText("  ", DMY).message.empty());
    BOOST_TEST(dateFromText("01/01/2022", DMY, "base") == serialFromCivil({2022, 1, 1}));
    try {
        dateFromText("13/13/2022", DMY, "base");
        BOOST_FAIL("no error");
    } catch (const InputError& e) {
        BOOST_TEST(has(e.what(), "base: \"13/13/2022\" is not a date in day/month/year order (there is no month 13)"));
    }
    try {
        dateFromText(" ", MDY, "base");
        BOOST_FAIL("no error");
    } catch (const InputError& e) {
        BOOST_TEST(has(e.what(), "base is blank; accepted: a date cell"));
    }
}

BOOST_AUTO_TEST_CASE(orders_from_locale) {
    // Common practice, no source (the table is compared with the C library's locale data in
    // tests/reference/test_sales_text_locales.py).
    BOOST_TEST((dateOrderForLocaleTag("en-US") == MDY));
    BOOST_TEST((dateOrderForLocaleTag("en_US.UTF-8") == MDY));
    BOOST_TEST((dateOrderForLocaleTag("es-US") == MDY));
    BOOST_TEST((dateOrderForLocaleTag("en-GB") == DMY));
    BOOST_TEST((dateOrderForLocaleTag("de") == DMY));
    BOOST_TEST((dateOrderForLocaleTag("de-CH") == DMY));
    BOOST_TEST((dateOrderForLocaleTag("fr-FR") == DMY));
    BOOST_TEST((dateOrderForLocaleTag("fr-CA") == YMD));
    BOOST_TEST((dateOrderForLocaleTag("en") == ANY));
    BOOST_TEST((dateOrderForLocaleTag("") == ANY));
    BOOST_TEST((dateOrderForLocaleTag("ja-JP") == YMD));
    BOOST_TEST((dateOrderForLocaleTag("zh-Hant-TW") == YMD));
    BOOST_TEST((dateOrderForLocaleTag("sr-Latn-RS") == DMY));
    BOOST_TEST((dateOrderForLocaleTag("es-419") == DMY));
    BOOST_TEST((dateOrderForLocaleTag("fil") == MDY));
    BOOST_TEST((dateOrderForLocale("EN", "ph") == MDY));
    BOOST_TEST((dateOrderForLocale("", "AU") == DMY));
    // Patterns: LibreOffice acceptance patterns, CLDR patterns, strftime formats.
    BOOST_TEST((dateOrderFromPattern("D/M/Y") == DMY));
    BOOST_TEST((dateOrderFromPattern("M/D/Y") == MDY));
    BOOST_TEST((dateOrderFromPattern("Y-M-D") == YMD));
    BOOST_TEST((dateOrderFromPattern("dd.MM.yyyy") == DMY));
    BOOST_TEST((dateOrderFromPattern("M/d/yy") == MDY));
    BOOST_TEST((dateOrderFromPattern("%d/%m/%Y") == DMY));
    BOOST_TEST((dateOrderFromPattern("%m//%d//%Y") == MDY));
    BOOST_TEST((dateOrderFromPattern("%-d.%-m.%Y") == DMY));
    BOOST_TEST((dateOrderFromPattern("%F") == YMD));
    BOOST_TEST((dateOrderFromPattern("%D") == MDY));
    BOOST_TEST((dateOrderFromPattern("D/M") == ANY));
    BOOST_TEST((parseDateOrder("dmy") == DMY));
    BOOST_TEST((parseDateOrder("M/D/Y") == MDY));
    BOOST_TEST((parseDateOrder("auto") == ANY));
    BOOST_TEST((parseDateOrder("") == ANY));
    BOOST_TEST(!parseDateOrder("DM").has_value());
    BOOST_TEST(!parseDateOrder("dmy2").has_value());
}

BOOST_AUTO_TEST_CASE(column_order) {
    DateOrderEvidence e = inferDateOrder({"03/04/2024", "2024-01-02", "13/04/2024", "", "x", "25/12/2024"});
    BOOST_TEST((e.order == DMY));
    BOOST_TEST(e.dayFirstRows == 2u);
    BOOST_TEST(e.firstDayFirst == 2u);
    e = inferDateOrder({"03/04/2024", "12/25/2024"});
    BOOST_TEST((e.order == MDY));
    BOOST_TEST(e.firstMonthFirst == 1u);
    e = inferDateOrder({"13/04/2024", "12/25/2024"});
    BOOST_TEST((e.order == ANY));
    BOOST_TEST(e.conflict);
    e = inferDateOrder({"03/04/2024", "05/06/2024"});
    BOOST_TEST((e.order == ANY));
    BOOST_TEST(!e.conflict);
}

BOOST_AUTO_TEST_SUITE_END()
