#include "column_rows.hpp"

#include <algorithm>

#include "inputs.hpp"

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

ValueShape shapeOf(const Range& r) {
    ValueShape s;
    s.rows = r.rows;
    s.usedRows = usedRows(r);
    for (std::size_t i = s.usedRows; i > 0 && s.textRows == 0; --i)
        for (std::size_t c = 0; c < r.cols; ++c)
            if (r.at(i - 1, c).isText()) {
                s.textRows = i;
                break;
            }
    return s;
}

std::vector<std::size_t> plannedRows(const std::vector<ArgKind>& kinds,
                                     const std::vector<std::optional<ColumnExtent>>& columns,
                                     const std::vector<Arg>& values) {
    std::vector<std::optional<ValueShape>> shapes(values.size());
    for (std::size_t i = 0; i < values.size(); ++i)
        if (values[i] && (i >= kinds.size() || kinds[i] != ArgKind::Column)) shapes[i] = shapeOf(*values[i]);
    return plannedRowsByShape(kinds, columns, shapes);
}

std::vector<std::size_t> plannedRowsByShape(const std::vector<ArgKind>& kinds,
                                     const std::vector<std::optional<ColumnExtent>>& columns,
                                     const std::vector<std::optional<ValueShape>>& values) {
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
            else if (kinds[i] == ArgKind::Range) keep = std::max(keep, values[i]->usedRows);
        }
        keep = std::min(keep, h);
        for (std::size_t i = 0; i < n; ++i) {
            if (!member(i)) continue;
            if (kinds[i] == ArgKind::Optional && values[i]->textRows > keep) continue;
            rows[i] = keep;
        }
    }
    return rows;
}

std::optional<std::size_t> refusedError(const FunctionSpec& f, const std::vector<Arg>& values,
                                        const std::vector<ErrorAt>& errors) {
    const int includeAt = f.argIndex("include");
    const Range* include = nullptr;
    if (includeAt >= 0 && static_cast<std::size_t>(includeAt) < values.size() &&
        values[static_cast<std::size_t>(includeAt)])
        include = &*values[static_cast<std::size_t>(includeAt)];
    // Without include: the table ends at the last row holding a value (number or text) in any
    // Column argument.
    std::size_t tableEnd = 0;
    for (std::size_t a = 0; a < values.size() && a < f.args.size(); ++a) {
        if (f.args[a].kind != ArgKind::Column || !values[a]) continue;
        const Range& r = *values[a];
        for (std::size_t i = r.rows; i > tableEnd; --i) {
            bool value = false;
            for (std::size_t c = 0; c < r.cols && !value; ++c) value = !r.at(i - 1, c).isEmpty();
            if (value) {
                tableEnd = i;
                break;
            }
        }
    }
    for (std::size_t k = 0; k < errors.size(); ++k) {
        const ErrorAt& e = errors[k];
        if (includeAt >= 0) {
            if (include && e.row < include->rows && include->cols >= 1 &&
                !cellFlag(include->at(e.row, 0)))
                continue;
            return k;
        }
        if (e.row < tableEnd) return k;
    }
    return std::nullopt;
}

}  // namespace lintel::addin
