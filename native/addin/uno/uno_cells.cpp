#include "uno_cells.hpp"

#include <algorithm>

#include <rtl/string.hxx>

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

Range toRange(const css::uno::Sequence<css::uno::Sequence<css::uno::Any>>& v) {
    Range r;
    r.rows = static_cast<std::size_t>(v.getLength());
    for (const auto& row : v) r.cols = std::max(r.cols, static_cast<std::size_t>(row.getLength()));
    r.cells.resize(r.rows * r.cols);
    for (std::size_t i = 0; i < r.rows; ++i) {
        const auto& row = v[static_cast<sal_Int32>(i)];
        for (sal_Int32 j = 0; j < row.getLength(); ++j) r.cells[i * r.cols + j] = toCell(row[j]);
    }
    r.scalar = r.rows == 1 && r.cols == 1;
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

}  // namespace

Arg toArg(const css::uno::Sequence<css::uno::Sequence<css::uno::Any>>& v) { return toRange(v); }

Arg toArg(const css::uno::Any& v) {
    css::uno::Sequence<css::uno::Sequence<css::uno::Any>> seq;
    if (v >>= seq) {
        Range r = toRange(seq);
        r.scalar = false;
        return r;
    }
    if (!v.hasValue()) return std::nullopt;
    Range r;
    r.rows = r.cols = 1;
    r.scalar = true;
    r.cells.push_back(toCell(v));
    return r;
}

css::uno::Any toAny(const OutTable& t) {
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

css::uno::Any failureAny(const char* message) noexcept {
    try {
        return css::uno::Any(OUString("Lintel: ") + OUString::createFromAscii(message));
    } catch (...) {
        return css::uno::Any();
    }
}

}  // namespace lintel::addin
