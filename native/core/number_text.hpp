// Numbers written as text, as sales exports write prices: "350,000", "350 000", "$350,000",
// "350000 EUR", "EUR 350.000,00", "£1,250,000.50", read with the decimal and thousands
// separators of the document's locale.
//
// Accepted (leading and trailing blanks, also no-break spaces, are ignored):
// - digits with the locale's decimal separator (one, followed by at least one digit);
// - thousands separators between groups of three digits (the first group one to three
//   digits; with Indian grouping the groups before the last three have two digits). The
//   thousands separator is the locale's, or a space (also U+00A0 no-break space, U+202F
//   narrow no-break space, U+2009 thin space), or an apostrophe (' or U+2019), whatever the
//   locale: none of those can be a decimal separator. One kind per number;
// - a sign: "-" or U+2212 before the number (or after a leading currency), or the number in
//   parentheses (accounting style);
// - one currency: a symbol ($ € £ ¥ ₹ ₩ ₽ ₺ ₪ ₫ ₱ ₴ ₦ ₣, kr, zł, Kč, Ft, R$, US$, A$, C$,
//   NZ$, HK$, S$, Fr.) or a three-letter ISO 4217 code known to ICU (EUR, USD, CHF ...),
//   before or after the number, with or without a space.
// Refused with the reason:
// - a thousands separator not between groups of three ("1,5" in a decimal-point locale);
// - a separator the locale does not use ("1.234,56" in a decimal-point locale: the decimal
//   comma of another locale);
// - ambiguous: a single "." or "," followed by exactly three digits and nothing else
//   ("350.000", "1,250") reads as a decimal under one convention and as thousands under the
//   other; a price is never given to a thousandth, so the locale is not trusted there;
// - anything else (letters, two numbers, exponents, a lone separator).
// A lone "-" (or en dash, em dash) is the export's way of writing "no value": Blank.
#pragma once

#include <string>
#include <string_view>

namespace lintel {

// The separators of the document's locale, UTF-8 (the add-in passes them from the
// locale's data). decimal must be "." or ","; group may be ",", ".", a space, U+00A0,
// U+202F, an apostrophe, or empty (the locale groups with nothing: only the always-accepted
// spaces and apostrophes then).
struct NumberFormat {
    std::string decimal = ".";  // decimal separator
    std::string group = ",";    // thousands separator
    bool indianGrouping = false;  // 12,34,567 (two-digit groups before the last three)

    // InputError when the separators are unusable (decimal not "." or ",", the same
    // separator twice, a letter or digit).
    void validate() const;
};

enum class NumberTextStatus {
    Ok,
    Blank,       // empty, only blanks, or a lone dash
    Unreadable,  // not a number in the accepted forms (message says why)
    Ambiguous,   // "350.000" / "1,250": decimal or thousands?
};

struct NumberText {
    NumberTextStatus status = NumberTextStatus::Blank;
    double value = 0;     // when Ok
    std::string message;  // empty when Ok or Blank
    bool ok() const { return status == NumberTextStatus::Ok; }
};

// "accepted: 350000, 350,000, 350 000, 1,250,000.50, $350,000, 350000 EUR (decimal point,
// thousands ',')".
std::string acceptedNumberForms(const NumberFormat& format);

NumberText readNumberText(std::string_view text, const NumberFormat& format);

}  // namespace lintel
