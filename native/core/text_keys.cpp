#include "text_keys.hpp"

#include <cctype>
#include <cmath>

#include <fmt/format.h>

namespace lintel {

namespace {
bool blank(char c) { return std::isspace(static_cast<unsigned char>(c)) != 0; }
}  // namespace

std::string_view trimBlanks(std::string_view s) {
    std::size_t a = 0, b = s.size();
    while (a < b && blank(s[a])) ++a;
    while (b > a && blank(s[b - 1])) --b;
    return s.substr(a, b - a);
}

bool isBlankText(std::string_view s) { return trimBlanks(s).empty(); }

std::string keyText(double v) {
    if (!std::isfinite(v)) return "";
    if (v == 0) return "0";  // -0 too
    return fmt::format("{}", v);
}

}  // namespace lintel
