// Dates written as text, as sales exports write them, read into date serials (day 0 =
// 1899-12-30, as periods.hpp).
//
// Accepted forms (leading and trailing blanks, also no-break spaces, are ignored):
// - ISO: 2024-03-15, also 2024-3-5; year first with / or . as well (2024/03/15);
// - day, month and year in the document's order: 15/03/2024 (day/month/year) or 03/15/2024
//   (month/day/year), separated by /, . or - (the same one twice), day and month with one or
//   two digits, the year with four;
// - an English month name or its three-letter abbreviation: 15 March 2024, 15-Mar-2024,
//   15 Mar. 2024, March 15, 2024, Mar 15 2024;
// - any of these followed by a time of day, which is ignored: 2024-03-15 14:30,
//   2024-03-15T14:30:00, 2024-03-15T14:30:00Z, 15/03/2024 2:30 PM.
// Refused with a message that lists the accepted forms: two-digit years (15/03/24: the
// century is a guess), days that do not exist (31/02/2024), a day/month text that reads
// validly both ways when the order is unknown (03/04/2024), anything else.
//
// The order of day and month is a convention of the country (common practice, no source):
// dateOrderForLocale() maps a language-country pair to it. Where no order is known, a text
// is still read when only one order gives a real date (13/04/2024 is 13 April) or both give
// the same day (05/05/2024); inferDateOrder() derives the order of a whole column from such
// texts.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace lintel {

enum class DateOrder {
    Unknown,       // not known: a text valid both ways is ambiguous
    DayMonthYear,  // 15/03/2024 (most of the world)
    MonthDayYear,  // 03/15/2024 (United States and a few others)
    YearMonthDay,  // 2024/03/15 (East Asia, Hungary, Lithuania, Sweden, Canada ...); texts
                   // with the year last are then read as with Unknown
};

// "day/month/year", "month/day/year", "year/month/day", "unknown".
const char* dateOrderName(DateOrder order);
// "DMY", "MDY", "YMD" (any case; also "D/M/Y" and the like); "auto" or empty text: Unknown.
// nullopt for anything else.
std::optional<DateOrder> parseDateOrder(std::string_view text);

// The usual order of dates written with numbers in a country (common practice, no source;
// checked against the C library's locale data in tests/reference). language and country
// are ISO 639 / ISO 3166 codes in any case ("en", "US"); either may be empty. Year first:
// Chinese, Cantonese, Japanese, Korean, Mongolian, Hungarian, Lithuanian, Latvian, Persian, Dzongkha, Basque, Sinhala, Nepali and Burmese in any country, and China, Taiwan,
// Japan, both Koreas, Mongolia, Hungary, Lithuania, Latvia, Sweden, Iran, Bhutan and Canada
// (where day/month and month/day are both common). Month first: the United States and its
// territories, the Philippines, Micronesia, the Marshall Islands, Palau. Day first
// everywhere else. Without a country: Unknown for English (US or GB?), the language's usual
// order otherwise (Swedish alone: year first).
DateOrder dateOrderForLocale(std::string_view language, std::string_view country);
// The same for a BCP-47 tag or a POSIX locale name: "en-US", "en_GB", "de", "zh-Hant-TW",
// "sr-Latn-RS", "fr_CA.UTF-8".
DateOrder dateOrderForLocaleTag(std::string_view tag);
// The order of a date pattern: LibreOffice's date acceptance patterns ("D/M/Y", "M/D/Y",
// "Y-M-D"), ICU / CLDR patterns ("dd.MM.yyyy", "M/d/yy") or C strftime formats ("%d/%m/%Y",
// "%m/%d/%y", "%F", "%D"). Unknown when the pattern has no day, month and year.
DateOrder dateOrderFromPattern(std::string_view pattern);

// What reading one text gave.
enum class DateTextStatus {
    Ok,
    Blank,         // empty or only blanks
    Unreadable,    // not one of the accepted forms
    TwoDigitYear,  // 15/03/24, 15-Mar-24
    NoSuchDate,    // 31/02/2024, 2024-13-01, 29/02/2023
    Ambiguous,     // 03/04/2024 with no order known
};

struct DateText {
    DateTextStatus status = DateTextStatus::Blank;
    double serial = 0;     // the date serial when status is Ok
    std::string message;   // empty when Ok or Blank; else what is wrong and what is accepted
    bool ok() const { return status == DateTextStatus::Ok; }
};

// The accepted forms, for messages: "accepted: 2024-03-15, 15/03/2024 (day/month/year) ...".
std::string acceptedDateForms(DateOrder order);

DateText readDateText(std::string_view text, DateOrder order);

// For an argument such as a base date: the serial, or InputError "<what>: <message>".
// Blank text is an error too ("<what> is blank").
double dateFromText(std::string_view text, DateOrder order, std::string_view what);

// The order a column of date texts shows: DayMonthYear when some texts read only as
// day/month/year (13/04/2024) and none only as month/day/year, and the reverse; Unknown
// when no text decides (all could be either) or when the texts contradict each other (then
// `conflict` is set). Texts with the year first, month names and unreadable texts do not
// count.
struct DateOrderEvidence {
    DateOrder order = DateOrder::Unknown;
    std::size_t dayFirstRows = 0;    // texts that read only as day/month/year
    std::size_t monthFirstRows = 0;  // texts that read only as month/day/year
    bool conflict = false;
    std::size_t firstDayFirst = 0, firstMonthFirst = 0;  // row indices of the first of each
};
DateOrderEvidence inferDateOrder(const std::vector<std::string>& texts);

}  // namespace lintel
