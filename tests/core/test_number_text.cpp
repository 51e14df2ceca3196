// Numbers written as text (number_text.hpp). The values are the numbers the texts spell
// under the stated separators; the wider comparison against Python parsing and
// pandas.read_csv(thousands=..., decimal=...) is tests/reference/test_sales_text_numbers.py.
#include <boost/test/unit_test.hpp>

#include "diagnostics.hpp"
#include "number_text.hpp"

using namespace lintel;

namespace {
NumberFormat pointLocale() { return {}; }  // decimal ".", thousands "," (en-US, en-GB)
NumberFormat commaLocale() {               // decimal ",", thousands "." (de-DE)
    NumberFormat f;
    f.decimal = ",";
    f.group = ".";
    return f;
}
NumberFormat spaceLocale() {  // decimal ",", thousands U+202F (fr-FR)
    NumberFormat f;
    f.decimal = ",";
    f.group = "\xE2\x80\xAF";
    return f;
}
double read(const std::string& t, const NumberFormat& f) {
    const NumberText r = readNumberText(t, f);
    BOOST_TEST_INFO("text: " << t << " message: " << r.message);
    BOOST_REQUIRE(r.ok());
    return r.value;
}
bool has(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }
std::string refused(const std::string& t, const NumberFormat& f, NumberTextStatus s) {
    const NumberText r = readNumberText(t, f);
    BOOST_TEST_INFO("text: " << t << " message: " << r.message);
    BOOST_TEST(!r.ok());
    BOOST_TEST((r.status == s));
    BOOST_TEST(has(r.message, "accepted: 350000, "));
    BOOST_TEST(has(r.message, "this document writes numbers with decimal separator"));
    return r.message;
}
}  // namespace

BOOST_AUTO_TEST_SUITE(number_text)

BOOST_AUTO_TEST_CASE(decimal_point_locale) {
    const NumberFormat f = pointLocale();
    BOOST_TEST(read("350000", f) == 350000.0);
    BOOST_TEST(read("350,000", f) == 350000.0);
    BOOST_TEST(read("350 000", f) == 350000.0);
    BOOST_TEST(read("350\xC2\xA0" "000", f) == 350000.0);      // no-break space
    BOOST_TEST(read("350\xE2\x80\xAF" "000", f) == 350000.0);  // narrow no-break space
    BOOST_TEST(read("1'250'000", f) == 1250000.0);
    BOOST_TEST(read("$350,000", f) == 350000.0);
    BOOST_TEST(read("US$ 350,000", f) == 350000.0);
    BOOST_TEST(read("350000 EUR", f) == 350000.0);
    BOOST_TEST(read("350000EUR", f) == 350000.0);
    BOOST_TEST(read("eur 350000", f) == 350000.0);
    BOOST_TEST(read("\xC2\xA3" "1,250,000.50", f) == 1250000.5);  // £
    BOOST_TEST(read("1,250,000.50 \xE2\x82\xAC", f) == 1250000.5);  // €
    BOOST_TEST(read("  350000.5  ", f) == 350000.5);
    BOOST_TEST(read("-350,000", f) == -350000.0);
    BOOST_TEST(read("-$350,000", f) == -350000.0);
    BOOST_TEST(read("$-350,000", f) == -350000.0);
    BOOST_TEST(read("\xE2\x88\x92" "5", f) == -5.0);  // U+2212 minus
    BOOST_TEST(read("(350,000)", f) == -350000.0);
    BOOST_TEST(read(".5", f) == 0.5);
    BOOST_TEST(read("0.125", f) == 0.125);     // a leading zero is not a thousands group
    BOOST_TEST(read("1.2345", f) == 1.2345);
    BOOST_TEST(read("1.25", f) == 1.25);
    BOOST_TEST(read("350 000 kr", f) == 350000.0);
    BOOST_TEST(read("CHF 1'250'000.50", f) == 1250000.5);
    BOOST_TEST(read("0", f) == 0.0);
    BOOST_TEST(read("-0", f) == 0.0);
    // Blank: nothing, blanks, a dash.
    for (const char* t : {"", "  ", "-", "\xE2\x80\x93", "\xE2\x80\x94"}) {
        const NumberText r = readNumberText(t, f);
        BOOST_TEST((r.status == NumberTextStatus::Blank));
        BOOST_TEST(r.message.empty());
    }
}

BOOST_AUTO_TEST_CASE(decimal_comma_locale) {
    const NumberFormat f = commaLocale();
    BOOST_TEST(read("EUR 350.000,00", f) == 350000.0);
    BOOST_TEST(read("350.000", f) == 350000.0);
    BOOST_TEST(read("1.250.000,50 \xE2\x82\xAC", f) == 1250000.5);
    BOOST_TEST(read("350 000,5", f) == 350000.5);
    BOOST_TEST(read("1,25", f) == 1.25);
    const NumberFormat s = spaceLocale();
    BOOST_TEST(read("350\xE2\x80\xAF" "000,00 \xE2\x82\xAC", s) == 350000.0);
    BOOST_TEST(read("350 000", s) == 350000.0);
    NumberFormat in = pointLocale();
    in.indianGrouping = true;
    BOOST_TEST(read("\xE2\x82\xB9" "3,50,000", in) == 350000.0);  // ₹ lakh grouping
    BOOST_TEST(read("12,34,567.5", in) == 1234567.5);
    BOOST_TEST(read("350,000", in) == 350000.0);
}

BOOST_AUTO_TEST_CASE(messages) {
    const NumberFormat p = pointLocale(), c = commaLocale(), s = spaceLocale();
    std::string m = refused("1,5", p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "\"1,5\" has a misplaced thousands separator \",\" (it goes between groups of "
                      "three digits, as in 1,500)"));
    refused("12,34,567", p, NumberTextStatus::Unreadable);
    refused("1,2345", p, NumberTextStatus::Unreadable);
    refused("1234,567", p, NumberTextStatus::Unreadable);
    m = refused("1.234,56", p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "the thousands separator \",\" comes after the decimal separator \".\": the "
                      "separators of another convention?"));
    m = refused("1.234,56", s, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "\".\" is not a separator of this document's numbers: this document writes "
                      "numbers with decimal separator \",\" and thousands separator a narrow no-break space"));
    m = refused("350.000", p, NumberTextStatus::Ambiguous);
    BOOST_TEST(has(m, "\"350.000\" is ambiguous: 350 with \".\" as the decimal separator (as this "
                      "document writes numbers) or 350000 with \".\" as a thousands separator; write "
                      "it without the separator (350000) or with fewer decimals"));
    m = refused("1,250", c, NumberTextStatus::Ambiguous);
    BOOST_TEST(has(m, "1.25 with \",\" as the decimal separator"));
    BOOST_TEST(has(m, "accepted: 350000, 350.000, 350 000, 1.250.000,50, $350.000"));
    refused("$1,250", c, NumberTextStatus::Ambiguous);
    m = refused("1.2.3", p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "two decimal separators \".\""));
    m = refused("1,234 567", p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "two different thousands separators"));
    m = refused("350k", p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "\"k\" is neither a digit nor a separator"));
    m = refused("3.5E5", p, NumberTextStatus::Unreadable);
    refused("ABC 350", p, NumberTextStatus::Unreadable);  // not an ISO 4217 code
    refused("$350 EUR", p, NumberTextStatus::Unreadable);  // two currencies
    m = refused("-(350)", p, NumberTextStatus::Unreadable);
    m = refused("(-350)", p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "two signs"));
    m = refused("$", p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "no digits"));
    m = refused("350,", p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "a separator at the end"));
    m = refused(",350", p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "a separator before the first digit"));
    std::string huge = "1";
    for (int k = 0; k < 110; ++k) huge += " 000";  // 1e330: beyond the largest double
    m = refused(huge, p, NumberTextStatus::Unreadable);
    BOOST_TEST(has(m, "too large"));
    BOOST_TEST(has(m, "...\""));  // long text cut in the message
}

BOOST_AUTO_TEST_CASE(format_validation) {
    NumberFormat f;
    BOOST_CHECK_NO_THROW(f.validate());
    const auto message = [](const NumberFormat& bad) {
        try {
            bad.validate();
        } catch (const InputError& e) {
            return std::string(e.what());
        }
        return std::string("no error");
    };
    f.decimal = ";";
    BOOST_TEST(message(f) == "the decimal separator must be \".\" or \",\", got \";\"");
    f = NumberFormat{};
    f.group = ".";
    f.decimal = ".";
    try {
        f.validate();
        BOOST_FAIL("no error");
    } catch (const InputError& e) {
        BOOST_TEST(has(e.what(), "the decimal and thousands separators are both \".\""));
    }
    f = NumberFormat{};
    f.group = "x";
    BOOST_TEST(message(f) == "the thousands separator must be \".\", \",\", a space or an apostrophe, got \"x\"");
    f.group = "";
    BOOST_CHECK_NO_THROW(f.validate());
    BOOST_TEST(read("350 000", f) == 350000.0);
    BOOST_TEST((readNumberText("350,000", f).status == NumberTextStatus::Unreadable));
}

BOOST_AUTO_TEST_SUITE_END()
