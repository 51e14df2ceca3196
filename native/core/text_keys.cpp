#include "text_keys.hpp"

#include <cctype>
#include <cmath>

#include <fmt/format.h>

namespace lintel {

namespace {
// Length of a blank starting at s[i]: ASCII white space, or the UTF-8 no-break space U+00A0
// and narrow no-break space U+202F that spreadsheets and exports put around values; 0 if none.
std::size_t blankAt(std::string_view s, std::size_t i) {
    const auto u = [&](std::size_t k) { return static_cast<unsigned char>(s[k]); };
    if (std::isspace(u(i))) return 1;
    if (u(i) == 0xC2 && i + 1 < s.size() && u(i + 1) == 0xA0) return 2;
    if (u(i) == 0xE2 && i + 2 < s.size() && u(i + 1) == 0x80 && u(i + 2) == 0xAF) return 3;
    return 0;
}
}  // namespace

std::string_view trimBlanks(std::string_view s) {
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

bool isBlankText(std::string_view s) { return trimBlanks(s).empty(); }

std::string keyText(double v) {
    if (!std::isfinite(v)) return "";
    if (v == 0) return "0";  // -0 too
    return fmt::format("{}", v);
}

}  // namespace lintel
