#include "diagnostics.hpp"

#include <fmt/format.h>

namespace lintel {

void Diagnostics::drop(const std::string& why, std::size_t n) {
    if (n == 0) return;
    for (auto& [r, c] : dropped)
        if (r == why) {
            c += n;
            return;
        }
    dropped.emplace_back(why, n);
}

std::size_t Diagnostics::rowsDropped() const {
    std::size_t n = 0;
    for (const auto& d : dropped) n += d.second;
    return n;
}

std::size_t Diagnostics::droppedFor(const std::string& why) const {
    for (const auto& [r, c] : dropped)
        if (r == why) return c;
    return 0;
}

std::string droppedText(const std::vector<std::pair<std::string, std::size_t>>& dropped) {
    std::string s;
    if (dropped.empty()) return s;
    s += "; dropped:";
    const char* sep = " ";
    for (const auto& [r, c] : dropped) {
        s += fmt::format("{}{} {}", sep, c, r);
        sep = ", ";
    }
    return s;
}

std::string Diagnostics::summary() const {
    std::string s = fmt::format("{} of {} rows used", rowsUsed, rowsIn) + droppedText(dropped);
    if (!warnings.empty()) s += fmt::format("; {} warning(s)", warnings.size());
    return s;
}

}  // namespace lintel
