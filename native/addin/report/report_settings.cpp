#include "report_settings.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <sstream>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "options.hpp"
#include "text.hpp"

namespace lintel::report {

using addin::trim;
using addin::shortText;

namespace {

std::vector<std::string> splitList(const std::string& s) {
    std::vector<std::string> out;
    std::size_t pos = 0;
    while (pos <= s.size()) {
        std::size_t end = s.find('|', pos);
        if (end == std::string::npos) end = s.size();
        const std::string item = trim(s.substr(pos, end - pos));
        if (!item.empty()) out.push_back(item);
        pos = end + 1;
    }
    return out;
}

std::string joinList(const std::vector<std::string>& v) {
    std::string s;
    for (const auto& x : v) s += (s.empty() ? "" : "|") + x;
    return s;
}

}  // namespace

const std::vector<Method>& allMethods() {
    static const std::vector<Method> m = {Method::Median, Method::Mean,        Method::Mix,
                                          Method::Hedonic, Method::RepeatSales, Method::ReferenceHome};
    return m;
}

const char* methodKey(Method m) {
    switch (m) {
        case Method::Median: return "median";
        case Method::Mean: return "mean";
        case Method::Mix: return "mix";
        case Method::Hedonic: return "hedonic";
        case Method::RepeatSales: return "repeat";
        case Method::ReferenceHome: return "refhome";
    }
    return "";
}

const char* methodLabel(Method m) {
    switch (m) {
        case Method::Median: return "Median";
        case Method::Mean: return "Mean";
        case Method::Mix: return "Mix-adjusted median";
        case Method::Hedonic: return "Hedonic time dummy";
        case Method::RepeatSales: return "Repeat sales";
        case Method::ReferenceHome: return "Reference home value";
    }
    return "";
}

bool ReportSettings::has(Method m) const {
    return std::find(methods.begin(), methods.end(), m) != methods.end();
}

std::string ReportSettings::serialize() const {
    std::ostringstream o;
    o << "data=" << dataRange << "\n"
      << "date=" << dateColumn << "\n"
      << "price=" << priceColumn << "\n"
      << "id=" << idColumn << "\n"
      << "changed=" << changedColumn << "\n"
      << "characteristics=" << joinList(characteristics) << "\n"
      << "strata=" << joinList(strata) << "\n"
      << "freq=" << freq << "\n"
      << "base=" << baseDate << "\n"
      << "level=" << fmt::format("{}", level) << "\n";
    std::vector<std::string> keys;
    for (Method m : methods) keys.push_back(methodKey(m));
    o << "methods=" << joinList(keys) << "\n";
    for (const auto& [k, v] : advanced)
        if (!v.empty()) o << "options." << k << "=" << v << "\n";
    for (const auto& s : segment) o << "segment." << s.column << "=" << joinList(s.values) << "\n";
    o << "segments=" << joinList(segmentColumns) << "\n";
    o << "segmentmin=" << segmentMin << "\n";
    o << "maxsegments=" << maxSegments << "\n";
    if (!segmentList.empty()) o << "segmentlist=" << joinList(segmentList) << "\n";
    o << "quote=" << quote << "\n";
    o << "partial=" << (includePartial ? "include" : "exclude") << "\n";
    o << "thin=" << thin << "\n";
    o << "sheet=" << sheetName << "\n";
    if (!reportId.empty()) o << "report=" << reportId << "\n";
    return o.str();
}

ReportSettings ReportSettings::parse(const std::string& text) {
    ReportSettings s;
    std::istringstream in(text);
    std::string line;
    while (std::getline(in, line)) {
        line = trim(line);
        if (line.empty() || line[0] == '#') continue;
        const auto eq = line.find('=');
        if (eq == std::string::npos)
            throw InputError(fmt::format("report setting \"{}\" has no value (write key=value)", shortText(line)));
        const std::string key = trim(line.substr(0, eq));
        const std::string value = trim(line.substr(eq + 1));
        if (key == "data") s.dataRange = value;
        else if (key == "date") s.dateColumn = value;
        else if (key == "price") s.priceColumn = value;
        else if (key == "id") s.idColumn = value;
        else if (key == "changed") s.changedColumn = value;
        else if (key == "characteristics") s.characteristics = splitList(value);
        else if (key == "strata") s.strata = splitList(value);
        else if (key == "freq") s.freq = value.empty() ? "M" : value;
        else if (key == "base") s.baseDate = value;
        else if (key == "sheet") s.sheetName = value;
        else if (key == "report") s.reportId = value;
        else if (key == "segments") s.segmentColumns = splitList(value);
        else if (key == "segmentlist") {
            s.segmentList = splitList(value);
            if (s.segmentList.size() > 12)
                throw InputError(fmt::format("report setting segmentlist names {} segments; the client page holds 12 "
                                             "besides the whole scope: build a second report for the others",
                                             s.segmentList.size()));
        }
        else if (key == "quote") {
            bool ok = value == "auto";
            for (Method m : allMethods()) ok = ok || value == methodKey(m);
            if (!ok || value == "refhome")
                throw InputError(fmt::format(
                    "report setting quote must be auto, median, mean, mix, hedonic or repeat, got \"{}\"", shortText(value)));
            s.quote = value;
        } else if (key == "segmentmin" || key == "maxsegments") {
            char* end = nullptr;
            const long n = std::strtol(value.c_str(), &end, 10);
            if (value.empty() || *end || n < 1 || n > 1000000)
                throw InputError(fmt::format("report setting {} must be a whole number of at least 1, got \"{}\"", key, shortText(value)));
            if (key == "maxsegments" && n > 12)
                throw InputError(fmt::format("report setting maxsegments is at most 12 (the segments the client page "
                                             "holds besides the whole market), got {}; build a second report for the "
                                             "others with segmentlist=", n));
            (key == "segmentmin" ? s.segmentMin : s.maxSegments) = static_cast<int>(n);
        }
        else if (key == "partial") {
            if (value != "include" && value != "exclude" && !value.empty())
                throw InputError(fmt::format("report setting partial must be include or exclude, got \"{}\"", shortText(value)));
            s.includePartial = value == "include";
        } else if (key == "thin") {
            char* end = nullptr;
            const long n = std::strtol(value.c_str(), &end, 10);
            if (value.empty() || *end || n < 0 || n > 1000000)
                throw InputError(fmt::format("report setting thin must be a whole number of sales, got \"{}\"", shortText(value)));
            s.thin = static_cast<int>(n);
        }
        else if (key == "level") {
            char* end = nullptr;
            s.level = std::strtod(value.c_str(), &end);
            if (value.empty() || *end || !(s.level > 0 && s.level < 1))
                throw InputError(fmt::format("report setting level must lie between 0 and 1, got \"{}\"", shortText(value)));
        } else if (key == "methods") {
            s.methods.clear();
            for (const auto& k : splitList(value)) {
                auto it = std::find_if(allMethods().begin(), allMethods().end(),
                                       [&](Method m) { return k == methodKey(m); });
                if (it == allMethods().end())
                    throw InputError(fmt::format(
                        "unknown method \"{}\" (known: median, mean, mix, hedonic, repeat, refhome)", shortText(k)));
                if (!s.has(*it)) s.methods.push_back(*it);
            }
        } else if (key.rfind("options.", 0) == 0) {
            const std::string m = key.substr(8);
            if (std::none_of(allMethods().begin(), allMethods().end(),
                             [&](Method x) { return m == methodKey(x); }))
                throw InputError(fmt::format(
                    "unknown report setting \"{}\": options. is followed by a method (median, mean, "
                    "mix, hedonic, repeat, refhome)", shortText(key)));
            s.advanced[m] = value;
        } else if (key.rfind("segment.", 0) == 0) {
            s.segment.push_back({key.substr(8), splitList(value)});
        } else {
            throw InputError(fmt::format("unknown report setting \"{}\"", shortText(key)));
        }
    }
    // Keep report order whatever order the text listed.
    std::vector<Method> ordered;
    for (Method m : allMethods())
        if (s.has(m)) ordered.push_back(m);
    s.methods = ordered;
    return s;
}

std::string ReportSettings::segmentText() const {
    std::string out;
    for (const auto& f : segment) {
        if (f.values.empty()) continue;
        std::string vals;
        for (const auto& v : f.values) vals += (vals.empty() ? "" : ", ") + v;
        out += (out.empty() ? "" : "; ") + f.column + " = " + vals;
    }
    return out.empty() ? "all sales" : out;
}

std::string ReportSettings::defaultSheetName() const {
    std::string name;
    for (const auto& f : segment)
        for (const auto& v : f.values) name += (name.empty() ? "" : " ") + v;
    if (name.empty()) name = "All sales";
    name = "Report " + name;
    // Calc sheet names: at most 31 characters, none of []*?:/\ .
    std::string clean;
    for (char c : name)
        clean += std::string("[]*?:/\\'").find(c) == std::string::npos ? c : '-';
    if (clean.size() > 31) clean.resize(31);
    return trim(clean);
}

}  // namespace lintel::report
