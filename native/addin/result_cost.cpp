#include "result_cost.hpp"

#include <algorithm>
#include <cmath>
#include <vector>

#include <fmt/format.h>

namespace lintel::addin {

namespace {

bool isNumber(const OutTable& t, std::size_t r, std::size_t c) {
    return r < t.rows.size() && c < t.rows[r].size() && t.rows[r][c].kind == OutCell::Kind::Number;
}

}  // namespace

double storeCost(const OutTable& t, double stopAbove) {
    if (t.scalar && t.rows.size() == 1 && t.rows[0].size() == 1) return 0;
    const std::size_t height = t.rows.size() == 1 ? 2 : t.rows.size();
    std::size_t width = 1;
    for (const auto& row : t.rows) width = std::max(width, row.size());
    // firstText[c]: the first row of column c that is not a number (height when none).
    std::vector<std::size_t> firstText(width, height);
    for (std::size_t c = 0; c < width; ++c)
        for (std::size_t r = 0; r < height; ++r)
            if (!isNumber(t, r, c)) {
                firstText[c] = r;
                break;
            }
    // Calc fills row by row; the matrix stores column by column and starts all numbers. When
    // cell (r, c) is set, the numbers after it in storage are the rest of column c (not set
    // yet), then every following column whose rows above r are all numbers (its rows from r
    // down are not set yet either), up to the first text cell above row r of a column.
    double cost = 0;
    for (std::size_t r = 0; r < height; ++r) {
        for (std::size_t c = 0; c < width; ++c) {
            if (isNumber(t, r, c)) continue;
            double run = static_cast<double>(height - 1 - r);
            for (std::size_t c2 = c + 1; c2 < width; ++c2) {
                if (firstText[c2] < r) {
                    run += static_cast<double>(firstText[c2]);
                    break;
                }
                run += static_cast<double>(height);
            }
            cost += run;
            if (cost > stopAbove) return cost;
        }
    }
    return cost;
}

OutTable withinStoreLimits(OutTable t) {
    if (storeCost(t, kTrimBlankTailCost) <= kTrimBlankTailCost) return t;
    auto blank = [](const std::vector<OutCell>& row) {
        return std::all_of(row.begin(), row.end(),
                           [](const OutCell& c) { return c.kind == OutCell::Kind::NoValue; });
    };
    while (t.rows.size() > 1 && blank(t.rows.back())) t.rows.pop_back();
    const double cost = storeCost(t, kMaxStoreCost);
    if (cost <= kMaxStoreCost) return t;
    std::size_t cells = 0;
    for (const auto& row : t.rows)
        for (const auto& c : row) cells += c.kind == OutCell::Kind::Number ? 0 : 1;
    OutTable message;
    message.scalar = true;
    message.rows.push_back({OutCell{OutCell::Kind::Text, 0.0,
                                    fmt::format("Lintel: the result has {} rows with {} text or "
                                                "blank cells, too many for Calc to show in a few "
                                                "seconds; use fewer rows",
                                                t.rows.size(), cells)}});
    return message;
}

std::size_t listRowsWithinLimit(std::size_t textCells) {
    if (textCells == 0) return static_cast<std::size_t>(-1);
    // n rows cost about textCells n (n - 1) / 2, plus about textCells^2 n / 2 for the first row
    // (every later column is still numbers then): the square root, less textCells + 1.
    const double n = std::sqrt(2.0 * kTrimBlankTailCost / static_cast<double>(textCells));
    return static_cast<std::size_t>(std::max(1.0, n - static_cast<double>(textCells) - 1));
}

}  // namespace lintel::addin
