// Small text helpers of the add-in (option keys, settings, column names).
#pragma once

#include <cctype>
#include <string>

namespace lintel::addin {

// Length of a blank at s[i] (ASCII white space, or the UTF-8 no-break space U+00A0 and narrow
// no-break space U+202F that spreadsheets and exports put around values), or 0.
inline std::size_t blankAt(const std::string& s, std::size_t i) {
    const auto u = [&](std::size_t k) { return static_cast<unsigned char>(s[k]); };
    if (std::isspace(u(i))) return 1;
    if (u(i) == 0xC2 && i + 1 < s.size() && u(i + 1) == 0xA0) return 2;
    if (u(i) == 0xE2 && i + 2 < s.size() && u(i + 1) == 0x80 && u(i + 2) == 0xAF) return 3;
    return 0;
}

// Without leading and trailing blanks (see blankAt).
inline std::string trim(const std::string& s) {
    std::size_t a = 0, b = s.size();
    while (a < b) {
        const std::size_t n = blankAt(s, a);
        if (!n) break;
        a += n;
    }
    while (b > a) {
        std::size_t n = 0;
        for (std::size_t k = 1; k <= 3 && k <= b - a && !n; ++k)
            if (blankAt(s, b - k) == k) n = k;
        if (!n) break;
        b -= n;
    }
    return s.substr(a, b - a);
}

inline std::string lower(std::string s) {
    for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return s;
}

}  // namespace lintel::addin
