#include "work_limits.hpp"

#include <cmath>

#include <fmt/format.h>

#include "diagnostics.hpp"

namespace lintel::limits {

std::string grouped(double x) {
    const double r = std::round(std::fabs(x));
    std::string digits = r < 1e18 ? fmt::format("{:.0f}", r) : fmt::format("{:.3g}", r);
    if (r >= 1e18) return (x < 0 ? "-" : "") + digits;
    std::string out;
    const std::size_t n = digits.size();
    for (std::size_t i = 0; i < n; ++i) {
        if (i > 0 && (n - i) % 3 == 0) out += ',';
        out += digits[i];
    }
    return (x < 0 && r > 0 ? "-" : "") + out;
}

std::string spanText(const PeriodAxis& axis) {
    const char* unit = axis.freq == Frequency::Month     ? "months"
                       : axis.freq == Frequency::Quarter ? "quarters"
                                                         : "years";
    return fmt::format("the dates span {} ({} {})", axis.rangeText(), grouped(axis.count), unit);
}

void refuseWork(const std::string& what, double work, const std::string& unit, double limit,
                const std::string& advice) {
    throw InputError(fmt::format("too much work: {} = {} {}; at most {} (a few seconds): {}", what,
                                 grouped(work), unit, grouped(limit), advice));
}

}  // namespace lintel::limits
