#include "date_text.hpp"

#include <array>
#include <cctype>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "periods.hpp"
#include "text_scan.hpp"

namespace lintel {

namespace {

constexpr std::array<const char*, 12> kMonthNames = {
    "January", "February", "March",     "April",   "May",      "June",
    "July",    "August",   "September", "October", "November", "December"};

char lower(char c) { return static_cast<char>(std::tolower(static_cast<unsigned char>(c))); }
bool isDigit(char c) { return c >= '0' && c <= '9'; }
bool isAlpha(char c) { return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z'); }

bool equalsNoCase(std::string_view a, std::string_view b) {
    if (a.size() != b.size()) return false;
    for (std::size_t i = 0; i < a.size(); ++i)
        if (lower(a[i]) != lower(b[i])) return false;
    return true;
}

// 1..12 for an English month name, its three-letter abbreviation or "Sept"; 0 otherwise.
int monthFromName(std::string_view word) {
    for (int m = 0; m < 12; ++m) {
        const std::string_view full = kMonthNames[static_cast<std::size_t>(m)];
        if (equalsNoCase(word, full) || equalsNoCase(word, full.substr(0, 3))) return m + 1;
    }
    if (equalsNoCase(word, "sept")) return 9;
    return 0;
}

int daysInMonth(int year, int month) {
    const int ny = month == 12 ? year + 1 : year, nm = month == 12 ? 1 : month + 1;
    return static_cast<int>(daysFromCivil(ny, nm, 1) - daysFromCivil(year, month, 1));
}

std::string longDate(int y, int m, int d) {
    return fmt::format("{} {} {}", d, kMonthNames[static_cast<std::size_t>(m - 1)], y);
}

// Why (y, m, d) is no calendar date; empty when it is one.
std::string whyNoDate(int y, int m, int d) {
    if (m < 1 || m > 12) return fmt::format("there is no month {}", m);
    if (d < 1) return fmt::format("there is no day {}", d);
    const int n = daysInMonth(y, m);
    if (d > n) return fmt::format("{} {} has {} days", kMonthNames[static_cast<std::size_t>(m - 1)], y, n);
    return {};
}

// The text as it appears in messages: trimmed, cut after 40 characters.
std::string quoted(std::string_view t) {
    t = text::trim(t);
    if (t.size() <= 40) return fmt::format("\"{}\"", t);
    std::size_t cut = 37;
    while (cut > 0 && (static_cast<unsigned char>(t[cut]) & 0xC0) == 0x80) --cut;  // whole code points
    return fmt::format("\"{}...\"", t.substr(0, cut));
}

// The pieces of a date text before the order of day and month is applied.
struct Parts {
    enum Kind { Unreadable, TwoDigitYear, Full, YearLast } kind = Unreadable;
    int year = 0, month = 0, day = 0;  // Full: the date as written (may be no calendar date)
    int first = 0, second = 0;         // YearLast: the two numbers before the year
};

class Cursor {
public:
    explicit Cursor(std::string_view s) : s_(s) {}
    bool done() const { return i_ >= s_.size(); }
    char peek(std::size_t k = 0) const { return i_ + k < s_.size() ? s_[i_ + k] : '\0'; }
    bool take(char c) {
        if (peek() != c) return false;
        ++i_;
        return true;
    }
    std::string_view digits() { return run(isDigit); }
    std::string_view letters() { return run(isAlpha); }

private:
    template <class Pred>
    std::string_view run(Pred p) {
        const std::size_t b = i_;
        while (i_ < s_.size() && p(s_[i_])) ++i_;
        return s_.substr(b, i_ - b);
    }
    std::string_view s_;
    std::size_t i_ = 0;
};

int toInt(std::string_view d) {
    int v = 0;
    for (char c : d) v = v * 10 + (c - '0');
    return v;
}

// A time of day after the date: " 14:30", "T14:30:00", " 2:30 PM", "T14:30:00.5Z",
// "T14:30:00+01:00". Its value is not used, but it must be a time.
bool readTime(Cursor& c) {
    if (c.done()) return true;
    if (!c.take(' ') && !c.take('T')) return false;
    const std::string_view h = c.digits();
    if (h.empty() || h.size() > 2 || !c.take(':')) return false;
    const std::string_view mi = c.digits();
    if (mi.size() != 2 || toInt(mi) > 59) return false;
    int hour = toInt(h);
    if (c.take(':')) {
        const std::string_view sec = c.digits();
        if (sec.size() != 2 || toInt(sec) > 60) return false;
        if (c.take('.') || c.take(',')) {
            if (c.digits().empty()) return false;
        }
    }
    c.take(' ');
    const std::string_view ampm = c.letters();
    if (!ampm.empty()) {
        if (!equalsNoCase(ampm, "am") && !equalsNoCase(ampm, "pm")) {
            if (!equalsNoCase(ampm, "z")) return false;
        } else {
            if (hour < 1 || hour > 12) return false;
            hour = 0;
        }
    }
    if (hour > 23) return false;
    if (c.peek() == '+' || c.peek() == '-') {  // UTC offset
        c.take(c.peek());
        const std::string_view oh = c.digits();
        if (oh.size() == 4) return c.done();
        if (oh.size() != 2) return false;
        if (c.take(':') && c.digits().size() != 2) return false;
    }
    return c.done();
}

Parts yearPart(Parts p, std::string_view year) {
    if (year.size() == 2) p.kind = Parts::TwoDigitYear;
    else if (year.size() != 4) p.kind = Parts::Unreadable;
    else p.year = toInt(year);
    return p;
}

// "15 March 2024", "15-Mar-2024", "15 Mar. 2024" (the day already read).
Parts dayFirstName(Cursor& c, int day, char sep) {
    Parts p;
    const int month = monthFromName(c.letters());
    if (month == 0) return p;
    if (sep == ' ') c.take('.');
    if (!c.take(sep)) return p;
    p.kind = Parts::Full;
    p.month = month;
    p.day = day;
    p = yearPart(p, c.digits());
    if (p.kind == Parts::Full && !readTime(c)) p.kind = Parts::Unreadable;
    return p;
}

// "March 15, 2024", "Mar 15 2024", "Mar. 15, 2024".
Parts monthFirstName(Cursor& c) {
    Parts p;
    const int month = monthFromName(c.letters());
    if (month == 0) return p;
    c.take('.');
    if (!c.take(' ')) return p;
    const std::string_view d = c.digits();
    if (d.empty() || d.size() > 2) return p;
    c.take(',');
    if (!c.take(' ')) return p;
    p.kind = Parts::Full;
    p.month = month;
    p.day = toInt(d);
    p = yearPart(p, c.digits());
    if (p.kind == Parts::Full && !readTime(c)) p.kind = Parts::Unreadable;
    return p;
}

// The text reduced to ASCII with every run of blanks one space; nullopt when it has another
// non-ASCII character (no accepted form has one).
std::optional<std::string> asciiForm(std::string_view t) {
    std::string out;
    std::size_t i = 0;
    bool blank = false;
    while (i < t.size()) {
        const char32_t c = text::next(t, i);
        if (text::isBlank(c)) {
            blank = true;
            continue;
        }
        if (c >= 0x80) return std::nullopt;
        if (blank && !out.empty()) out += ' ';
        blank = false;
        out += static_cast<char>(c);
    }
    return out;
}

Parts parseParts(std::string_view raw) {
    const auto ascii = asciiForm(text::trim(raw));
    if (!ascii) return {};
    Cursor c(*ascii);
    if (isAlpha(c.peek())) return monthFirstName(c);
    const std::string_view a = c.digits();
    if (a.empty()) return {};
    const char sep = c.peek();
    if (sep == ' ' && a.size() <= 2 && isAlpha(c.peek(1))) {
        c.take(' ');
        return dayFirstName(c, toInt(a), ' ');
    }
    if (sep != '/' && sep != '.' && sep != '-') return {};
    c.take(sep);
    if (sep == '-' && a.size() <= 2 && isAlpha(c.peek())) return dayFirstName(c, toInt(a), '-');
    const std::string_view b = c.digits();
    if (b.empty() || !c.take(sep)) return {};
    const std::string_view y = c.digits();
    if (y.empty()) return {};
    if (!readTime(c)) return {};
    Parts p;
    const auto short2 = [](std::string_view d) { return d.size() >= 1 && d.size() <= 2; };
    if (a.size() == 4 && short2(b) && short2(y)) {
        p.kind = Parts::Full;
        p.year = toInt(a);
        p.month = toInt(b);
        p.day = toInt(y);
    } else if (y.size() == 4 && short2(a) && short2(b)) {
        p.kind = Parts::YearLast;
        p.year = toInt(y);
        p.first = toInt(a);
        p.second = toInt(b);
    } else if (short2(a) && short2(b) && short2(y) && (y.size() == 2 || a.size() == 2)) {
        p.kind = Parts::TwoDigitYear;
    }
    return p;
}

bool isDate(int y, int m, int d) { return whyNoDate(y, m, d).empty(); }

DateText okDate(int y, int m, int d) {
    DateText r;
    r.status = DateTextStatus::Ok;
    r.serial = serialFromCivil({y, m, d});
    return r;
}

DateText failed(DateTextStatus status, std::string message) {
    DateText r;
    r.status = status;
    r.message = std::move(message);
    return r;
}

}  // namespace

const char* dateOrderName(DateOrder order) {
    switch (order) {
        case DateOrder::DayMonthYear: return "day/month/year";
        case DateOrder::MonthDayYear: return "month/day/year";
        case DateOrder::YearMonthDay: return "year/month/day";
        case DateOrder::Unknown: break;
    }
    return "unknown";
}

std::optional<DateOrder> parseDateOrder(std::string_view t) {
    std::string k;
    for (char c : text::trim(t))
        if (isAlpha(c)) k += lower(c);
        else if (c != '/' && c != '-' && c != '.' && c != ' ') return std::nullopt;
    if (k.empty() || k == "auto") return DateOrder::Unknown;
    if (k == "dmy") return DateOrder::DayMonthYear;
    if (k == "mdy") return DateOrder::MonthDayYear;
    if (k == "ymd") return DateOrder::YearMonthDay;
    return std::nullopt;
}

DateOrder dateOrderForLocale(std::string_view language, std::string_view country) {
    std::string lang, ctry;
    for (char c : language) lang += lower(c);
    for (char c : country) ctry += static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
    // Common practice, no source: how dates written with numbers are usually ordered.
    static const char* const monthFirst[] = {"US", "AS", "GU", "MP", "PR", "UM", "VI",
                                             "PH", "FM", "MH", "PW"};
    static const char* const yearFirst[] = {"CN", "TW", "JP", "KR", "KP", "MN", "HU", "LT",
                                            "LV", "SE", "IR", "BT", "CA"};
    static const char* const yearFirstLanguages[] = {"zh", "yue", "ja", "ko", "mn", "hu", "lt", "lv",
                                                     "fa", "dz", "eu", "si", "ne", "my"};
    // A language that writes the year first does so in every country (Chinese in Hong Kong
    // and Singapore, Basque in Spain and France).
    for (const char* l : yearFirstLanguages)
        if (lang == l) return DateOrder::YearMonthDay;
    if (!ctry.empty()) {
        for (const char* c : monthFirst)
            if (ctry == c) return DateOrder::MonthDayYear;
        for (const char* c : yearFirst)
            if (ctry == c) return DateOrder::YearMonthDay;
        return DateOrder::DayMonthYear;
    }
    if (lang.empty() || lang == "en") return DateOrder::Unknown;
    if (lang == "fil" || lang == "tl") return DateOrder::MonthDayYear;
    if (lang == "sv") return DateOrder::YearMonthDay;  // Sweden; Swedish in Finland: day first
    return DateOrder::DayMonthYear;
}

DateOrder dateOrderForLocaleTag(std::string_view tag) {
    // language[-script][-region][-...] or language[_REGION][.codeset][@modifier]
    std::vector<std::string> parts;
    std::string cur;
    for (char c : tag) {
        if (c == '.' || c == '@') break;
        if (c == '-' || c == '_') {
            parts.push_back(cur);
            cur.clear();
        } else {
            cur += c;
        }
    }
    parts.push_back(cur);
    const std::string language = parts[0];
    std::string country;
    for (std::size_t i = 1; i < parts.size(); ++i) {
        const std::string& p = parts[i];
        const bool region = (p.size() == 2 && isAlpha(p[0]) && isAlpha(p[1])) ||
                            (p.size() == 3 && isDigit(p[0]) && isDigit(p[1]) && isDigit(p[2]));
        if (region) {
            if (isAlpha(p[0])) country = p;
            break;
        }
        if (p.size() != 4) break;  // not a script subtag: the region cannot follow
    }
    return dateOrderForLocale(language, country);
}

DateOrder dateOrderFromPattern(std::string_view pattern) {
    // Position of the first day, month and year element.
    int day = -1, month = -1, year = -1, pos = 0;
    const auto mark = [&](int& slot) {
        if (slot < 0) slot = pos++;
    };
    for (std::size_t i = 0; i < pattern.size(); ++i) {
        const char c = pattern[i];
        if (c == '%' && i + 1 < pattern.size()) {
            std::size_t j = i + 1;
            while (j < pattern.size() && (pattern[j] == '-' || pattern[j] == '_' ||
                                          pattern[j] == '0' || pattern[j] == 'O' ||
                                          pattern[j] == 'E' || pattern[j] == '^' ||
                                          pattern[j] == '#'))
                ++j;
            if (j >= pattern.size()) break;
            switch (pattern[j]) {
                case 'd': case 'e': mark(day); break;
                case 'm': case 'b': case 'B': case 'h': mark(month); break;
                case 'Y': case 'y': case 'C': case 'G': mark(year); break;
                case 'F': mark(year); mark(month); mark(day); break;
                case 'D': mark(month); mark(day); mark(year); break;
                default: break;
            }
            i = j;
            continue;
        }
        switch (c) {
            case 'D': case 'd': mark(day); break;
            case 'M': case 'L': mark(month); break;
            case 'Y': case 'y': mark(year); break;
            default: break;
        }
    }
    if (day < 0 || month < 0 || year < 0) return DateOrder::Unknown;
    if (year == 0) return DateOrder::YearMonthDay;
    return day < month ? DateOrder::DayMonthYear : DateOrder::MonthDayYear;
}

std::string acceptedDateForms(DateOrder order) {
    std::string local;
    switch (order) {
        case DateOrder::DayMonthYear: local = "15/03/2024 (day/month/year; also with . or -)"; break;
        case DateOrder::MonthDayYear: local = "03/15/2024 (month/day/year; also with . or -)"; break;
        default:
            local = "15/03/2024 or 03/15/2024 where day and month cannot be confused (set the date "
                    "order for the others; also with . or -)";
            break;
    }
    return fmt::format("accepted: a date cell, 2024-03-15, {}, 15 March 2024, March 15, 2024; "
                       "the year with four digits; a time after the date is ignored",
                       local);
}

DateText readDateText(std::string_view raw, DateOrder order) {
    if (text::trim(raw).empty()) return {};
    const Parts p = parseParts(raw);
    // Messages are built only on failure (most texts of a column read fine).
    const auto q = [&] { return quoted(raw); };
    const auto accepted = [&] { return acceptedDateForms(order); };
    switch (p.kind) {
        case Parts::Unreadable:
            return failed(DateTextStatus::Unreadable,
                          fmt::format("{} is not a date we can read; {}", q(), accepted()));
        case Parts::TwoDigitYear:
            return failed(DateTextStatus::TwoDigitYear,
                          fmt::format("{} has a two-digit year: write the year with four digits; {}",
                                      q(), accepted()));
        case Parts::Full: {
            if (p.year < 1000)
                return failed(DateTextStatus::NoSuchDate,
                              fmt::format("{}: the year {:04d} is not a year of sales; {}", q(),
                                          p.year, accepted()));
            const std::string why = whyNoDate(p.year, p.month, p.day);
            if (!why.empty())
                return failed(DateTextStatus::NoSuchDate,
                              fmt::format("{} is not a calendar date ({}); {}", q(), why, accepted()));
            return okDate(p.year, p.month, p.day);
        }
        case Parts::YearLast: break;
    }
    const int y = p.year;
    if (y < 1000)
        return failed(DateTextStatus::NoSuchDate,
                      fmt::format("{}: the year {:04d} is not a year of sales; {}", q(), y, accepted()));
    // first/second are day/month or month/day.
    const bool asDmy = isDate(y, p.second, p.first), asMdy = isDate(y, p.first, p.second);
    const auto wrongOrder = [&](DateOrder want) {
        const bool dmy = want == DateOrder::DayMonthYear;
        const int m = dmy ? p.second : p.first, d = dmy ? p.first : p.second;
        std::string msg = fmt::format("{} is not a date in {} order ({})", q(), dateOrderName(want),
                                      whyNoDate(y, m, d));
        if (dmy ? asMdy : asDmy)
            msg += fmt::format("; as {} it would be {}: check the date order",
                               dateOrderName(dmy ? DateOrder::MonthDayYear : DateOrder::DayMonthYear),
                               longDate(y, d, m));
        return failed(DateTextStatus::NoSuchDate, fmt::format("{}; {}", msg, accepted()));
    };
    if (order == DateOrder::DayMonthYear)
        return asDmy ? okDate(y, p.second, p.first) : wrongOrder(DateOrder::DayMonthYear);
    if (order == DateOrder::MonthDayYear)
        return asMdy ? okDate(y, p.first, p.second) : wrongOrder(DateOrder::MonthDayYear);
    // No order known (or a year-first locale): read it when only one order gives a date, or
    // both give the same day.
    if (asDmy && asMdy) {
        if (p.first == p.second) return okDate(y, p.first, p.second);
        return failed(DateTextStatus::Ambiguous,
                      fmt::format("{} could be {} (day/month/year) or {} (month/day/year): set the "
                                  "date order (dateorder=DMY or MDY) or write the date as "
                                  "YYYY-MM-DD; {}",
                                  q(), longDate(y, p.second, p.first), longDate(y, p.first, p.second),
                                  accepted()));
    }
    if (asDmy) return okDate(y, p.second, p.first);
    if (asMdy) return okDate(y, p.first, p.second);
    // Neither: explain with day/month/year unless month/day/year only fails on the day.
    const std::string whyDmy = whyNoDate(y, p.second, p.first), whyMdy = whyNoDate(y, p.first, p.second);
    return failed(DateTextStatus::NoSuchDate,
                  fmt::format("{} is not a calendar date (as day/month/year: {}; as "
                              "month/day/year: {}); {}",
                              q(), whyDmy, whyMdy, accepted()));
}

double dateFromText(std::string_view raw, DateOrder order, std::string_view what) {
    const DateText r = readDateText(raw, order);
    if (r.ok()) return r.serial;
    if (r.status == DateTextStatus::Blank)
        throw InputError(fmt::format("{} is blank; {}", what, acceptedDateForms(order)));
    throw InputError(fmt::format("{}: {}", what, r.message));
}

DateOrderEvidence inferDateOrder(const std::vector<std::string>& texts) {
    DateOrderEvidence e;
    for (std::size_t i = 0; i < texts.size(); ++i) {
        const Parts p = parseParts(texts[i]);
        if (p.kind != Parts::YearLast || p.year < 1000) continue;
        const bool dmy = isDate(p.year, p.second, p.first), mdy = isDate(p.year, p.first, p.second);
        if (dmy && !mdy) {
            if (e.dayFirstRows++ == 0) e.firstDayFirst = i;
        } else if (mdy && !dmy) {
            if (e.monthFirstRows++ == 0) e.firstMonthFirst = i;
        }
    }
    e.conflict = e.dayFirstRows > 0 && e.monthFirstRows > 0;
    if (!e.conflict) {
        if (e.dayFirstRows > 0) e.order = DateOrder::DayMonthYear;
        else if (e.monthFirstRows > 0) e.order = DateOrder::MonthDayYear;
    }
    return e;
}

}  // namespace lintel
