#include "column_rows.hpp"

#include <algorithm>

namespace lintel::addin {

std::size_t usedRows(const Range& r) {
    for (std::size_t i = r.rows; i > 0; --i)
        for (std::size_t c = 0; c < r.cols; ++c)
            if (!r.at(i - 1, c).isEmpty()) return i;
    return 0;
}

void setRows(Range& r, std::size_t n) {
    r.cells.resize(n * r.cols);
    r.rows = n;
}

namespace {
bool textBelow(const Range& r, std::size_t n) {
    for (std::size_t i = n; i < r.rows; ++i)
        for (std::size_t c = 0; c < r.cols; ++c)
            if (r.at(i, c).isText()) return true;
    return false;
}
}  // namespace

std::vector<std::size_t> plannedRows(const std::vector<ArgKind>& kinds,
                                     const std::vector<std::optional<ColumnExtent>>& columns,
                                     const std::vector<Arg>& values) {
    const std::size_t n = kinds.size();
    std::vector<std::size_t> rows(n, 0);
    for (std::size_t i = 0; i < n; ++i) {
        if (kinds[i] == ArgKind::Column) rows[i] = columns[i] ? columns[i]->rows : 0;
        else if (i < values.size() && values[i]) rows[i] = values[i]->rows;
    }
    // One group per height of the Column arguments that reach the sheet's end.
    std::vector<std::size_t> heights;
    for (std::size_t i = 0; i < n; ++i)
        if (kinds[i] == ArgKind::Column && columns[i] && columns[i]->toSheetEnd &&
            std::find(heights.begin(), heights.end(), columns[i]->rows) == heights.end())
            heights.push_back(columns[i]->rows);
    for (const std::size_t h : heights) {
        auto member = [&](std::size_t i) {
            if (kinds[i] == ArgKind::Column)
                return columns[i] && columns[i]->toSheetEnd && columns[i]->rows == h;
            return i < values.size() && values[i] && values[i]->rows == h;
        };
        std::size_t keep = 1;
        for (std::size_t i = 0; i < n; ++i) {
            if (!member(i)) continue;
            if (kinds[i] == ArgKind::Column) keep = std::max(keep, columns[i]->usedRows);
            else if (kinds[i] == ArgKind::Range) keep = std::max(keep, usedRows(*values[i]));
        }
        keep = std::min(keep, h);
        for (std::size_t i = 0; i < n; ++i) {
            if (!member(i)) continue;
            if (kinds[i] == ArgKind::Optional && textBelow(*values[i], keep)) continue;
            rows[i] = keep;
        }
    }
    return rows;
}

}  // namespace lintel::addin
