#include "uno_cells.hpp"

#include <algorithm>
#include <optional>

#include <com/sun/star/container/XNamed.hpp>
#include <com/sun/star/sheet/CellFlags.hpp>
#include <com/sun/star/sheet/XCellRangeAddressable.hpp>
#include <com/sun/star/sheet/XCellRangeData.hpp>
#include <com/sun/star/sheet/XCellRangesQuery.hpp>
#include <com/sun/star/sheet/XSheetCellRange.hpp>
#include <com/sun/star/sheet/XSheetCellRanges.hpp>
#include <com/sun/star/sheet/XSpreadsheet.hpp>
#include <com/sun/star/table/XCell.hpp>
#include <com/sun/star/table/XColumnRowRange.hpp>
#include <com/sun/star/table/XTableRows.hpp>
#include <fmt/format.h>
#include <rtl/string.hxx>

#include "column_rows.hpp"
#include "diagnostics.hpp"
#include "result_cost.hpp"

namespace css = com::sun::star;

namespace lintel::addin {

std::string utf8(const OUString& s) {
    const OString o = OUStringToOString(s, RTL_TEXTENCODING_UTF8);
    return std::string(o.getStr(), static_cast<std::size_t>(o.getLength()));
}

OUString ustr(const std::string& s) {
    return OUString(s.data(), static_cast<sal_Int32>(s.size()), RTL_TEXTENCODING_UTF8);
}

namespace {

Cell toCell(const css::uno::Any& a) {
    switch (a.getValueTypeClass()) {
        case css::uno::TypeClass_DOUBLE: return Cell::num(*static_cast<const double*>(a.getValue()));
        case css::uno::TypeClass_BOOLEAN: {
            bool b = false;
            a >>= b;
            return Cell::num(b ? 1.0 : 0.0);
        }
        case css::uno::TypeClass_STRING: {
            OUString s;
            a >>= s;
            return s.isEmpty() ? Cell{} : Cell::str(utf8(s));
        }
        default: {
            double d = 0;  // other numeric types
            if (a >>= d) return Cell::num(d);
            return Cell{};
        }
    }
}

// Whether a value converts to an empty cell (toCell), told from its type without converting it.
bool emptyValue(const css::uno::Any& a) {
    switch (a.getValueTypeClass()) {
        case css::uno::TypeClass_VOID: return true;
        case css::uno::TypeClass_DOUBLE:
        case css::uno::TypeClass_BOOLEAN: return false;
        case css::uno::TypeClass_STRING: return static_cast<const OUString*>(a.getValue())->isEmpty();
        default: {
            double d = 0;
            return !(a >>= d);
        }
    }
}

bool textValue(const css::uno::Any& a) {
    return a.getValueTypeClass() == css::uno::TypeClass_STRING && !emptyValue(a);
}

std::size_t widthOf(const AnyRows& v) {
    std::size_t cols = 0;
    for (const auto& row : v) cols = std::max(cols, static_cast<std::size_t>(row.getLength()));
    return cols;
}

// The plan's view of an array (column_rows.hpp), from the values' types alone.
ValueShape shapeOf(const AnyRows& v) {
    ValueShape s;
    s.rows = static_cast<std::size_t>(v.getLength());
    auto rowHas = [&](std::size_t i, bool (*test)(const css::uno::Any&)) {
        for (const auto& a : v[static_cast<sal_Int32>(i)])
            if (test(a)) return true;
        return false;
    };
    for (std::size_t i = s.rows; i > 0; --i)
        if (rowHas(i - 1, [](const css::uno::Any& a) { return !emptyValue(a); })) {
            s.usedRows = i;
            break;
        }
    for (std::size_t i = s.usedRows; i > 0; --i)
        if (rowHas(i - 1, textValue)) {
            s.textRows = i;
            break;
        }
    return s;
}

// The first `rows` rows of an array as cells, with empty rows added below when it has fewer.
Range toRange(const AnyRows& v, std::size_t rows) {
    Range r;
    r.rows = rows;
    r.cols = widthOf(v);
    r.cells.resize(r.rows * r.cols);
    const std::size_t have = std::min(rows, static_cast<std::size_t>(v.getLength()));
    for (std::size_t i = 0; i < have; ++i) {
        const auto& row = v[static_cast<sal_Int32>(i)];
        for (sal_Int32 j = 0; j < row.getLength(); ++j) r.cells[i * r.cols + static_cast<std::size_t>(j)] = toCell(row[j]);
    }
    return r;
}

css::uno::Any toUno(const OutCell& c) {
    switch (c.kind) {
        case OutCell::Kind::Number: return css::uno::Any(c.number);
        case OutCell::Kind::Text: return css::uno::Any(ustr(c.text));
        case OutCell::Kind::NoValue: break;
    }
    return css::uno::Any(OUString());
}

// A Column argument as Calc passed it, measured before it is read.
struct ColumnSource {
    css::uno::Reference<css::table::XCellRange> range;
    css::table::CellRangeAddress address;
    ColumnExtent extent;
};

ColumnSource measure(const css::uno::Reference<css::table::XCellRange>& range) {
    ColumnSource s;
    s.range = range;
    s.address = css::uno::Reference<css::sheet::XCellRangeAddressable>(range, css::uno::UNO_QUERY_THROW)
                    ->getRangeAddress();
    const auto& a = s.address;
    s.extent.rows = static_cast<std::size_t>(a.EndRow - a.StartRow + 1);
    s.extent.cols = static_cast<std::size_t>(a.EndColumn - a.StartColumn + 1);
    const css::uno::Reference<css::sheet::XSheetCellRange> onSheet(range, css::uno::UNO_QUERY);
    if (onSheet.is()) {
        const css::uno::Reference<css::table::XColumnRowRange> sheet(onSheet->getSpreadsheet(),
                                                                    css::uno::UNO_QUERY);
        if (sheet.is()) s.extent.toSheetEnd = a.EndRow + 1 == sheet->getRows()->getCount();
    }
    // The cells holding anything (values, text, formulas), found by Calc from its own cell
    // storage: empty stretches of a column cost nothing.
    namespace flags = css::sheet::CellFlags;
    const auto found = css::uno::Reference<css::sheet::XCellRangesQuery>(range, css::uno::UNO_QUERY_THROW)
                           ->queryContentCells(static_cast<sal_Int16>(flags::VALUE | flags::DATETIME |
                                                                      flags::STRING | flags::FORMULA));
    if (found.is())
        for (const auto& part : found->getRangeAddresses())
            s.extent.usedRows = std::max(s.extent.usedRows,
                                         static_cast<std::size_t>(part.EndRow - a.StartRow + 1));
    s.extent.usedRows = std::min(s.extent.usedRows, s.extent.rows);
    return s;
}

std::string columnLetters(sal_Int32 col) {
    std::string s;
    for (++col; col > 0; col = (col - 1) / 26) s.insert(s.begin(), static_cast<char>('A' + (col - 1) % 26));
    return s;
}

// Calc's error codes (FormulaError) as the cell shows them.
std::string errorText(sal_Int32 code) {
    switch (code) {
        case 503: return "#NUM!";
        case 519: return "#VALUE!";
        case 524: return "#REF!";
        case 525: return "#NAME?";
        case 532: return "#DIV/0!";
        case 32767: return "#N/A";
        default: return fmt::format("Err:{}", code);
    }
}

[[noreturn]] void errorCell(const ColumnSource& s, const char* name, sal_Int32 row, sal_Int32 col) {
    std::string where = columnLetters(s.address.StartColumn + col) + std::to_string(s.address.StartRow + row + 1);
    std::string shown = "an error";
    try {
        const css::uno::Reference<css::sheet::XSheetCellRange> onSheet(s.range, css::uno::UNO_QUERY);
        const css::uno::Reference<css::container::XNamed> sheet(
            onSheet.is() ? onSheet->getSpreadsheet() : nullptr, css::uno::UNO_QUERY);
        if (sheet.is()) where = utf8(sheet->getName()) + "." + where;
        shown = errorText(s.range->getCellByPosition(col, row)->getError());
    } catch (...) {
        // The address alone still says where.
    }
    throw InputError(fmt::format("{} holds {} in cell {}: correct or clear that cell", name, shown, where));
}

// Reads the first `rows` rows of a Column argument: Calc's values down to its last row with
// data, empty cells below. getDataArray gives an error cell as a void Any: it is left empty
// and its place added to `errors` (refusedError decides whether the call may go on).
Range readColumn(const ColumnSource& s, std::size_t rows, std::size_t arg, std::vector<ErrorAt>& errors) {
    Range r;
    r.cols = s.extent.cols;
    r.rows = rows;
    r.cells.resize(rows * r.cols);
    r.scalar = s.extent.rows == 1 && s.extent.cols == 1;
    r.sheetRow = static_cast<std::size_t>(s.address.StartRow) + 1;
    const std::size_t toRead = std::min(rows, s.extent.usedRows);
    if (toRead == 0) return r;
    const auto part = s.range->getCellRangeByPosition(0, 0, static_cast<sal_Int32>(r.cols) - 1,
                                                      static_cast<sal_Int32>(toRead) - 1);
    const auto data = css::uno::Reference<css::sheet::XCellRangeData>(part, css::uno::UNO_QUERY_THROW)
                          ->getDataArray();
    for (sal_Int32 i = 0; i < data.getLength() && static_cast<std::size_t>(i) < toRead; ++i) {
        const auto& row = data[i];
        for (sal_Int32 j = 0; j < row.getLength() && static_cast<std::size_t>(j) < r.cols; ++j) {
            if (!row[j].hasValue()) {
                errors.push_back({arg, static_cast<std::size_t>(i), static_cast<std::size_t>(j)});
                continue;
            }
            r.cells[static_cast<std::size_t>(i) * r.cols + static_cast<std::size_t>(j)] = toCell(row[j]);
        }
    }
    return r;
}

}  // namespace

Range cellsOf(const AnyRows& v) {
    Range r = toRange(v, static_cast<std::size_t>(v.getLength()));
    r.scalar = r.rows == 1 && r.cols == 1;
    return r;
}

UnoArg toArg(const AnyRows& v) { return UnoArg(v, true); }

UnoArg toArg(const css::uno::Any& v) {
    AnyRows seq;
    if (v >>= seq) return UnoArg(std::move(seq), false);
    if (!v.hasValue()) return UnoArg(std::nullopt);
    Range r;
    r.rows = r.cols = 1;
    r.scalar = true;
    r.cells.push_back(toCell(v));
    return UnoArg(std::move(r));
}

UnoArg toArg(const css::uno::Reference<css::table::XCellRange>& v) noexcept { return UnoArg(v); }

std::vector<Arg> readArguments(const FunctionSpec& f, std::vector<UnoArg> args) {
    const std::size_t n = args.size();
    std::vector<ArgKind> kinds(n, ArgKind::Optional);
    std::vector<std::optional<ColumnSource>> sources(n);
    std::vector<std::optional<ColumnExtent>> extents(n);
    std::vector<std::optional<ValueShape>> shapes(n);
    std::vector<Arg> values(n);
    for (std::size_t i = 0; i < n; ++i) {
        if (i < f.args.size()) kinds[i] = f.args[i].kind;
        if (args[i].range.is()) {
            kinds[i] = ArgKind::Column;
            sources[i] = measure(args[i].range);
            extents[i] = sources[i]->extent;
        } else {
            if (kinds[i] == ArgKind::Column) kinds[i] = ArgKind::Range;  // not passed as a range
            if (args[i].array) shapes[i] = shapeOf(*args[i].array);
            else if (args[i].value) shapes[i] = shapeOf(*args[i].value);
            values[i] = std::move(args[i].value);
        }
    }
    const std::vector<std::size_t> rows = plannedRowsByShape(kinds, extents, shapes);
    std::vector<ErrorAt> errors;
    for (std::size_t i = 0; i < n; ++i) {
        if (sources[i]) {
            values[i] = readColumn(*sources[i], rows[i], i, errors);
        } else if (args[i].array) {
            // Only the rows the call keeps are converted.
            const AnyRows& a = *args[i].array;
            values[i] = toRange(a, rows[i]);
            values[i]->scalar = args[i].arrayScalar && a.getLength() == 1 && values[i]->cols == 1;
            args[i].array.reset();
        } else if (values[i] && values[i]->rows != rows[i]) {
            setRows(*values[i], rows[i]);
        }
    }
    if (const auto k = refusedError(f, values, errors)) {
        const ErrorAt& e = errors[*k];
        errorCell(*sources[e.arg], e.arg < f.args.size() ? f.args[e.arg].name.c_str() : "argument",
                  static_cast<sal_Int32>(e.row), static_cast<sal_Int32>(e.col));
    }
    return values;
}

css::uno::Any toAny(OutTable result) {
    const OutTable t = withinStoreLimits(std::move(result));
    if (t.scalar && t.rows.size() == 1 && t.rows[0].size() == 1) return toUno(t.rows[0][0]);
    std::size_t width = 1;
    for (const auto& row : t.rows) width = std::max(width, row.size());
    // Calc repeats a one-row result down a taller array range, which would show the row again
    // and again; a second, blank row stops that (rows below it show Calc's #N/A).
    const std::size_t height = t.rows.size() == 1 ? 2 : t.rows.size();
    css::uno::Sequence<css::uno::Sequence<css::uno::Any>> out(static_cast<sal_Int32>(height));
    auto* rows = out.getArray();
    for (std::size_t i = 0; i < t.rows.size(); ++i) {
        css::uno::Sequence<css::uno::Any> row(static_cast<sal_Int32>(width));
        auto* cells = row.getArray();
        for (std::size_t j = 0; j < width; ++j)
            cells[j] = j < t.rows[i].size() ? toUno(t.rows[i][j]) : css::uno::Any(OUString());
        rows[i] = row;
    }
    if (height > t.rows.size()) {
        css::uno::Sequence<css::uno::Any> blank(static_cast<sal_Int32>(width));
        auto* cells = blank.getArray();
        for (std::size_t j = 0; j < width; ++j) cells[j] = css::uno::Any(OUString());
        rows[height - 1] = blank;
    }
    return css::uno::Any(out);
}

css::uno::Any failureAny(const std::string& message) noexcept {
    try {
        return css::uno::Any(OUString("Lintel: ") + ustr(message));
    } catch (...) {
        return css::uno::Any();
    }
}

css::uno::Any failureAny(const char* message) noexcept {
    try {
        return css::uno::Any(OUString("Lintel: ") + OUString::createFromAscii(message));
    } catch (...) {
        return css::uno::Any();
    }
}

}  // namespace lintel::addin
