#include "refcli.hpp"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <iostream>
#include <limits>
#include <sstream>

#include "csv_line.hpp"
#include "diagnostics.hpp"

namespace refcli {

namespace {
std::map<std::string, Command>& registry() {
    static std::map<std::string, Command> r;
    return r;
}

using lintel::testcsv::splitCsvLine;

Table readCsv(const std::string& path) {
    std::ifstream f(path);
    if (!f) throw std::runtime_error("cannot open " + path);
    Table t;
    std::string line;
    if (std::getline(f, line)) t.names = splitCsvLine(line);
    while (std::getline(f, line)) {
        if (line.empty()) continue;
        t.cells.push_back(splitCsvLine(line));
        t.cells.back().resize(t.names.size());
    }
    return t;
}
}  // namespace

Register::Register(const std::string& name, Command cmd) { registry()[name] = std::move(cmd); }

int Table::find(const std::string& name) const {
    for (std::size_t i = 0; i < names.size(); ++i)
        if (names[i] == name) return static_cast<int>(i);
    return -1;
}

std::vector<double> Table::numbers(const std::string& name) const {
    const int c = find(name);
    if (c < 0) throw std::runtime_error("no column " + name);
    std::vector<double> v;
    v.reserve(rows());
    for (const auto& r : cells) {
        const std::string& s = r[c];
        char* end = nullptr;
        const double x = std::strtod(s.c_str(), &end);
        v.push_back(s.empty() || *end ? std::numeric_limits<double>::quiet_NaN() : x);
    }
    return v;
}

std::vector<std::string> Table::text(const std::string& name) const {
    const int c = find(name);
    if (c < 0) throw std::runtime_error("no column " + name);
    std::vector<std::string> v;
    for (const auto& r : cells) v.push_back(r[c]);
    return v;
}

double number(const Args& a, const std::string& key, double fallback) {
    auto it = a.find(key);
    return it == a.end() ? fallback : std::strtod(it->second.c_str(), nullptr);
}

std::string text(const Args& a, const std::string& key, const std::string& fallback) {
    auto it = a.find(key);
    return it == a.end() ? fallback : it->second;
}

void printColumns(const std::vector<std::string>& names,
                  const std::vector<std::vector<double>>& columns) {
    for (std::size_t i = 0; i < names.size(); ++i)
        std::printf("%s%s", i ? "," : "", names[i].c_str());
    std::printf("\n");
    const std::size_t n = columns.empty() ? 0 : columns[0].size();
    for (std::size_t r = 0; r < n; ++r) {
        for (std::size_t c = 0; c < columns.size(); ++c) {
            const double x = columns[c][r];
            if (std::isfinite(x)) std::printf("%s%.17g", c ? "," : "", x);
            else std::printf("%s", c ? "," : "");
        }
        std::printf("\n");
    }
}

std::vector<double> periodStarts(const lintel::PeriodAxis& axis) {
    std::vector<double> v;
    for (int i = 0; i < axis.count; ++i) v.push_back(axis.start(i));
    return v;
}

std::vector<double> asNumbers(const std::vector<std::size_t>& counts) {
    return std::vector<double>(counts.begin(), counts.end());
}

int printIndexTable(const lintel::IndexTable& tb) {
    printColumns({"period", "index", "sales", "lower", "upper"},
                 {periodStarts(tb.axis), tb.index, asNumbers(tb.count), tb.lower, tb.upper});
    return 0;
}

}  // namespace refcli

int main(int argc, char** argv) {
    if (argc < 3) {
        std::cerr << "usage: lintel_refcli <command> <input.csv> [key=value ...]\ncommands:";
        for (const auto& [name, cmd] : refcli::registry()) std::cerr << ' ' << name;
        std::cerr << '\n';
        return 2;
    }
    refcli::Args args;
    for (int i = 3; i < argc; ++i) {
        std::string s = argv[i];
        const auto eq = s.find('=');
        if (eq != std::string::npos) args[s.substr(0, eq)] = s.substr(eq + 1);
    }
    auto it = refcli::registry().find(argv[1]);
    if (it == refcli::registry().end()) {
        std::cerr << "unknown command " << argv[1] << '\n';
        return 2;
    }
    try {
        return it->second(refcli::readCsv(argv[2]), args);
    } catch (const lintel::InputError& e) {
        std::cerr << "InputError: " << e.what() << '\n';
        return 3;
    } catch (const std::exception& e) {
        std::cerr << "error: " << e.what() << '\n';
        return 4;
    }
}
