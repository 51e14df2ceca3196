#include "report_record.hpp"

#include <algorithm>
#include <cstdio>
#include <sstream>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "options.hpp"
#include "report_plan.hpp"

namespace lintel::report {

void Rect::include(int r, int c) {
    if (isEmpty()) {
        row0 = row1 = r;
        col0 = col1 = c;
        return;
    }
    row0 = std::min(row0, r);
    row1 = std::max(row1, r);
    col0 = std::min(col0, c);
    col1 = std::max(col1, c);
}

std::uint16_t contentHash(const std::string& content) {
    std::uint32_t h = 2166136261u;  // FNV-1a, folded to 16 bits
    for (unsigned char c : content) {
        h ^= c;
        h *= 16777619u;
    }
    return static_cast<std::uint16_t>((h >> 16) ^ (h & 0xFFFFu));
}

namespace {

std::string rectText(const Rect& r) { return fmt::format("{},{},{},{}", r.row0, r.col0, r.row1, r.col1); }

Rect parseRect(const std::string& s) {
    Rect r;
    if (std::sscanf(s.c_str(), "%d,%d,%d,%d", &r.row0, &r.col0, &r.row1, &r.col1) != 4)
        throw InputError("the report's record is damaged: build the report again");
    return r;
}

std::vector<std::string> split(const std::string& s, char sep) {
    std::vector<std::string> out;
    std::size_t pos = 0;
    while (true) {
        const std::size_t end = s.find(sep, pos);
        out.push_back(s.substr(pos, end == std::string::npos ? std::string::npos : end - pos));
        if (end == std::string::npos) break;
        pos = end + 1;
    }
    return out;
}

}  // namespace

std::string ReportRecord::serialize() const {
    std::ostringstream o;
    o << "lintel-report-record 1\n";
    o << "report=" << reportId << "\n";
    for (const auto& b : blocks) o << "block=" << b.key << "|" << b.title << "|" << rectText(b.rect) << "\n";
    for (const auto& c : cells) o << "cell=" << c.row << "," << c.col << "," << c.hash << "\n";
    for (const auto& a : arrays) o << "array=" << rectText(a.rect) << "," << a.hash << "\n";
    for (const auto& e : editable) o << "edit=" << e.row << "," << e.col << "," << e.setting << "\n";
    for (const auto& c : charts) o << "chart=" << c << "\n";
    for (const auto& n : names) o << "name=" << n << "\n";
    o << "settings:\n" << settings;
    return o.str();
}

ReportRecord ReportRecord::parse(const std::string& text) {
    ReportRecord r;
    std::istringstream in(text);
    std::string line;
    if (!std::getline(in, line) || line != "lintel-report-record 1")
        throw InputError("the report's record is damaged or from another version: build the report again");
    while (std::getline(in, line)) {
        if (line == "settings:") {
            std::ostringstream rest;
            rest << in.rdbuf();
            r.settings = rest.str();
            break;
        }
        const auto eq = line.find('=');
        if (eq == std::string::npos) continue;
        const std::string key = line.substr(0, eq), value = line.substr(eq + 1);
        if (key == "report") {
            r.reportId = value;
        } else if (key == "block") {
            const auto parts = split(value, '|');
            if (parts.size() != 3) throw InputError("the report's record is damaged: build the report again");
            r.blocks.push_back({parts[0], parts[1], parseRect(parts[2])});
        } else if (key == "cell") {
            Written w;
            unsigned h = 0;
            if (std::sscanf(value.c_str(), "%d,%d,%u", &w.row, &w.col, &h) != 3)
                throw InputError("the report's record is damaged: build the report again");
            w.hash = static_cast<std::uint16_t>(h);
            r.cells.push_back(w);
        } else if (key == "array") {
            const auto cut = value.rfind(',');
            Array a;
            a.rect = parseRect(value.substr(0, cut));
            a.hash = static_cast<std::uint16_t>(std::strtoul(value.c_str() + cut + 1, nullptr, 10));
            r.arrays.push_back(a);
        } else if (key == "edit") {
            const auto parts = split(value, ',');
            if (parts.size() != 3) throw InputError("the report's record is damaged: build the report again");
            r.editable.push_back({std::atoi(parts[0].c_str()), std::atoi(parts[1].c_str()), parts[2]});
        } else if (key == "chart") {
            r.charts.push_back(value);
        } else if (key == "name") {
            r.names.push_back(value);
        }
    }
    return r;
}

std::string cellAddress(const std::string& sheet, int row, int col) {
    const std::string a = absoluteRange(sheet, row, col, row, col);
    return a.substr(0, a.find(':'));
}

std::string findUserCell(const ReportRecord& old, const std::vector<ReportRecord::Block>& next,
                         SheetView& sheet, const std::string& sheetName) {
    const auto where = [&](int r, int c) { return cellAddress(sheetName, r, c); };
    const auto shown = [&](int r, int c) {
        std::string t = sheet.content(r, c);
        return addin::shortText(t, 30);
    };
    // Arrays still in place (a user may have deleted one and typed in its cells).
    std::vector<char> arrayIntact(old.arrays.size(), 0);
    for (std::size_t i = 0; i < old.arrays.size(); ++i) {
        const std::string f = sheet.arrayFormula(old.arrays[i].rect);
        arrayIntact[i] = !f.empty() && contentHash(f) == old.arrays[i].hash;
    }
    for (const auto& b : old.blocks) {
        for (const auto& [r, c] : sheet.contentCells(b.rect)) {
            bool ours = false;
            for (std::size_t i = 0; i < old.arrays.size() && !ours; ++i)
                ours = arrayIntact[i] && old.arrays[i].rect.contains(r, c);
            for (const auto& e : old.editable)
                ours = ours || (e.row == r && e.col == c);
            for (const auto& w : old.cells)
                ours = ours || (w.row == r && w.col == c && contentHash(sheet.content(r, c)) == w.hash);
            if (!ours)
                return fmt::format(
                    "cell {} holds \"{}\", which the report did not write (inside its block "
                    "\"{}\"): move it outside the report's blocks, then update again",
                    where(r, c), shown(r, c), b.title);
        }
    }
    // Where the report grows: cells outside every old block must be empty.
    for (const auto& b : next) {
        for (const auto& [r, c] : sheet.contentCells(b.rect)) {
            bool inOld = false;
            for (const auto& o : old.blocks) inOld = inOld || o.rect.contains(r, c);
            if (!inOld)
                return fmt::format(
                    "cell {} holds \"{}\" where the report's block \"{}\" now needs room: move "
                    "it, then update again",
                    where(r, c), shown(r, c), b.title);
        }
    }
    return {};
}

}  // namespace lintel::report
