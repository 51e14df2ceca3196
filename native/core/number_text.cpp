#include "number_text.hpp"

#include <charconv>
#include <cmath>
#include <vector>

#include <fmt/format.h>
#include <unicode/ucurr.h>
#include <unicode/utypes.h>

#include "diagnostics.hpp"
#include "text_scan.hpp"

namespace lintel {

namespace {

using U32 = std::u32string;

U32 decode(std::string_view s) {
    U32 out;
    std::size_t i = 0;
    while (i < s.size()) out += text::next(s, i);
    return out;
}

std::string encode(const U32& s) {
    std::string out;
    for (char32_t c : s) text::append(out, c);
    return out;
}

char32_t single(const std::string& sep) {
    const U32 u = decode(sep);
    return u.size() == 1 ? u[0] : 0;
}

bool isDigit(char32_t c) { return c >= '0' && c <= '9'; }
bool isAsciiLetter(char32_t c) { return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z'); }
bool isApostrophe(char32_t c) { return c == '\'' || c == 0x2019; }

// Currency symbols written before or after an amount (longest first where one is a prefix of
// another: "US$" before "$").
const std::vector<U32>& currencySymbols() {
    static const std::vector<U32> symbols = {
        U"US$", U"NZ$", U"HK$", U"R$", U"A$", U"C$", U"S$", U"$", U"\u20AC", U"\u00A3",
        U"\u00A5", U"\u20B9", U"\u20A9", U"\u20BD", U"\u20BA", U"\u20AA", U"\u20AB",
        U"\u20B1", U"\u20B4", U"\u20A6", U"\u20A3", U"kr.", U"kr", U"z\u0142", U"K\u010D",
        U"Ft", U"Fr."};
    return symbols;
}

bool isIsoCurrency(const U32& code) {
    if (code.size() != 3) return false;
    UChar iso[4] = {0, 0, 0, 0};
    for (std::size_t i = 0; i < 3; ++i) {
        char32_t c = code[i];
        if (c >= 'a' && c <= 'z') c -= 'a' - 'A';
        if (c < 'A' || c > 'Z') return false;
        iso[i] = static_cast<UChar>(c);
    }
    UErrorCode err = U_ZERO_ERROR;
    const UBool known = ucurr_isAvailable(iso, U_DATE_MIN, U_DATE_MAX, &err);
    return U_SUCCESS(err) && known;
}

void trimBlanks(U32& s) {
    std::size_t b = 0, e = s.size();
    while (b < e && text::isBlank(s[b])) ++b;
    while (e > b && text::isBlank(s[e - 1])) --e;
    s = s.substr(b, e - b);
}

// Removes a currency at the front (front=true) or the back; returns whether it did.
bool stripCurrency(U32& s, bool front) {
    for (const U32& sym : currencySymbols()) {
        if (s.size() < sym.size()) continue;
        if (front && s.compare(0, sym.size(), sym) == 0) {
            // "kr" or "Ft" must not run into letters ("krone" is no amount).
            if (isAsciiLetter(sym.back()) && s.size() > sym.size() && isAsciiLetter(s[sym.size()]))
                continue;
            s.erase(0, sym.size());
            trimBlanks(s);
            return true;
        }
        if (!front && s.compare(s.size() - sym.size(), sym.size(), sym) == 0) {
            const std::size_t at = s.size() - sym.size();
            if (isAsciiLetter(sym.front()) && at > 0 && isAsciiLetter(s[at - 1])) continue;
            s.erase(at);
            trimBlanks(s);
            return true;
        }
    }
    // A three-letter ISO code, not running into other letters.
    if (s.size() >= 3) {
        const std::size_t at = front ? 0 : s.size() - 3;
        const U32 code = s.substr(at, 3);
        const bool bounded = front ? (s.size() == 3 || !isAsciiLetter(s[3]))
                                   : (at == 0 || !isAsciiLetter(s[at - 1]));
        if (bounded && isIsoCurrency(code)) {
            s.erase(at, 3);
            trimBlanks(s);
            return true;
        }
    }
    return false;
}

bool stripSign(U32& s) {
    if (!s.empty() && (s[0] == '-' || s[0] == 0x2212)) {
        s.erase(0, 1);
        trimBlanks(s);
        return true;
    }
    if (!s.empty() && s[0] == '+') {
        s.erase(0, 1);
        trimBlanks(s);
    }
    return false;
}

std::string describe(char32_t c) {
    switch (c) {
        case '.': return "\".\"";
        case ',': return "\",\"";
        case ' ': return "a space";
        case 0x00A0: return "a no-break space";
        case 0x202F: return "a narrow no-break space";
        case 0x2009: return "a thin space";
        case '\'': case 0x2019: return "an apostrophe";
        case 0: return "none";
        default: break;
    }
    std::string out = "\"";
    text::append(out, c);
    return out + "\"";
}

std::string quoted(std::string_view t) {
    t = text::trim(t);
    if (t.size() <= 40) return fmt::format("\"{}\"", t);
    std::size_t cut = 37;
    while (cut > 0 && (static_cast<unsigned char>(t[cut]) & 0xC0) == 0x80) --cut;
    return fmt::format("\"{}...\"", t.substr(0, cut));
}

std::string separatorsText(const NumberFormat& f) {
    const char32_t d = single(f.decimal), g = single(f.group);
    return fmt::format("this document writes numbers with decimal separator {} and thousands "
                       "separator {}",
                       describe(d), describe(g));
}

NumberText fail(NumberTextStatus status, std::string message) {
    NumberText r;
    r.status = status;
    r.message = std::move(message);
    return r;
}

// A blank of any kind counts as one kind of thousands separator.
char32_t groupKind(char32_t c) {
    if (text::isBlank(c)) return ' ';
    if (isApostrophe(c)) return '\'';
    return c;
}

}  // namespace

void NumberFormat::validate() const {
    const char32_t d = single(decimal);
    if (d != '.' && d != ',')
        throw InputError(fmt::format("the decimal separator must be \".\" or \",\", got \"{}\"", decimal));
    if (group.empty()) return;
    const char32_t g = single(group);
    const bool ok = g == '.' || g == ',' || text::isBlank(g) || isApostrophe(g);
    if (!ok)
        throw InputError(fmt::format("the thousands separator must be \".\", \",\", a space or an "
                                     "apostrophe, got \"{}\"",
                                     group));
    if (g == d)
        throw InputError(fmt::format("the decimal and thousands separators are both \"{}\"", decimal));
}

std::string acceptedNumberForms(const NumberFormat& f) {
    const char32_t d = single(f.decimal), g0 = single(f.group);
    // Examples in the document's own convention; a blank group shows as a plain space.
    const std::string dec = d == ',' ? "," : ".";
    const std::string grp = g0 == 0 ? " " : (text::isBlank(g0) ? " " : f.group);
    return fmt::format("accepted: 350000, 350{g}000, 350 000, 1{g}250{g}000{d}50, $350{g}000, "
                       "350000 EUR, -350000; {s}",
                       fmt::arg("g", grp), fmt::arg("d", dec), fmt::arg("s", separatorsText(f)));
}

NumberText readNumberText(std::string_view raw, const NumberFormat& f) {
    U32 s = decode(text::trim(raw));
    if (s.empty() || s == U"-" || s == U"\u2013" || s == U"\u2014") return {};
    // Messages are built only on failure (most texts of a column read fine).
    const auto q = [&] { return quoted(raw); };
    const auto accepted = [&] { return acceptedNumberForms(f); };
    const auto unreadable = [&](const std::string& why) {
        return fail(NumberTextStatus::Unreadable,
                    fmt::format("{} is not a number we can read ({}); {}", q(), why, accepted()));
    };

    bool negative = false;
    if (s.size() >= 2 && s.front() == '(' && s.back() == ')') {
        negative = true;
        s = s.substr(1, s.size() - 2);
        trimBlanks(s);
    }
    bool signed_ = stripSign(s);
    bool currency = stripCurrency(s, true);
    if (currency && !signed_) signed_ = stripSign(s);
    if (!currency) currency = stripCurrency(s, false);
    if (signed_ && negative) return unreadable("two signs");
    negative = negative || signed_;
    if (s.empty()) return unreadable("no digits");

    const char32_t dec = single(f.decimal);
    const char32_t grp = single(f.group);
    // Split into digit runs and the separators between them.
    std::vector<U32> runs(1);
    std::vector<char32_t> seps;
    for (char32_t c : s) {
        if (isDigit(c)) {
            runs.back() += c;
            continue;
        }
        const bool isSep = c == '.' || c == ',' || text::isBlank(c) || isApostrophe(c);
        if (!isSep) {
            std::string ch;
            text::append(ch, c);
            return unreadable(fmt::format("\"{}\" is neither a digit nor a separator", ch));
        }
        seps.push_back(c);
        runs.emplace_back();
    }
    for (std::size_t i = 1; i < runs.size(); ++i)
        if (runs[i].empty()) return unreadable("two separators in a row or a separator at the end");

    // Which separator is the decimal one: the locale's, at most once, last.
    std::size_t decimalAt = seps.size();  // index into seps
    for (std::size_t i = 0; i < seps.size(); ++i) {
        const char32_t c = seps[i];
        if (c == dec) {
            if (decimalAt != seps.size()) return unreadable(fmt::format("two decimal separators {}", describe(dec)));
            decimalAt = i;
            continue;
        }
        const bool group = c == grp || text::isBlank(c) || isApostrophe(c);
        if (group) {
            if (decimalAt != seps.size())
                return unreadable(fmt::format(
                    "the thousands separator {} comes after the decimal separator {}: the "
                    "separators of another convention? {}",
                    describe(c), describe(dec), separatorsText(f)));
            continue;
        }
        // "." or "," that this locale does not use.
        return unreadable(fmt::format("{} is not a separator of this document's numbers: {}",
                                      describe(c), separatorsText(f)));
    }
    const std::size_t nGroups = decimalAt;  // separators before the decimal one are groups
    if (decimalAt == 0 && runs[0].empty() && seps.size() == 1) {
        // ".5": a fraction without integer digits
    } else if (runs[0].empty()) {
        return unreadable("a separator before the first digit");
    }
    if (nGroups > 0) {
        const char32_t kind = groupKind(seps[0]);
        for (std::size_t i = 1; i < nGroups; ++i)
            if (groupKind(seps[i]) != kind)
                return unreadable("two different thousands separators");
        // Group sizes: first 1..3 digits, then threes; Indian: first 1..2, twos, last three.
        bool ok = runs[0].size() >= 1 && runs[nGroups].size() == 3;
        if (f.indianGrouping && nGroups >= 2) {
            ok = ok && runs[0].size() <= 2;
            for (std::size_t i = 1; i < nGroups; ++i) ok = ok && runs[i].size() == 2;
        } else {
            ok = ok && runs[0].size() <= 3;
            for (std::size_t i = 1; i < nGroups; ++i) ok = ok && runs[i].size() == 3;
        }
        if (!ok)
            return fail(NumberTextStatus::Unreadable,
                        fmt::format("{} has a misplaced thousands separator {} (it goes between "
                                    "groups of three digits, as in 1{}500); {}",
                                    q(), describe(seps[0]),
                                    seps[0] == ',' || seps[0] == '.' ? encode(U32(1, seps[0])) : " ",
                                    accepted()));
    }
    // Ambiguous: one "." or "," as the decimal separator, 1-3 integer digits (not a leading
    // zero) and exactly three decimals: thousands under the other convention.
    if (nGroups == 0 && decimalAt == 0 && seps.size() == 1 && runs[1].size() == 3 &&
        !runs[0].empty() && runs[0].size() <= 3 && runs[0][0] != '0') {
        const std::string whole = encode(runs[0]), frac = encode(runs[1]);
        double small = 0;
        const std::string asDecimal = whole + "." + frac;
        std::from_chars(asDecimal.data(), asDecimal.data() + asDecimal.size(), small);
        return fail(NumberTextStatus::Ambiguous,
                    fmt::format("{} is ambiguous: {} with {} as the decimal separator (as this "
                                "document writes numbers) or {}{} with {} as a thousands "
                                "separator; write it without the separator ({}{}) or with "
                                "fewer decimals; {}",
                                q(), small, describe(dec), whole, frac, describe(dec), whole, frac,
                                accepted()));
    }

    std::string ascii = negative ? "-" : "";
    for (std::size_t i = 0; i < runs.size(); ++i) {
        if (i == decimalAt + 1) ascii += '.';
        ascii += encode(runs[i]);
    }
    if (decimalAt < seps.size() && runs[0].empty()) ascii.insert(negative ? 1 : 0, "0");
    double value = 0;
    const auto [ptr, ec] = std::from_chars(ascii.data(), ascii.data() + ascii.size(), value);
    if (ec != std::errc() || ptr != ascii.data() + ascii.size() || !std::isfinite(value))
        return unreadable("too large");
    NumberText r;
    r.status = NumberTextStatus::Ok;
    r.value = value == 0 ? 0.0 : value;  // no -0
    return r;
}

}  // namespace lintel
