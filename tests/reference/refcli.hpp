// lintel_refcli: runs core estimators on CSV files so the Python reference checks can compare
// them with pandas, statsmodels and R on the same data. Test tooling only.
//
//   lintel_refcli <command> <input.csv> [key=value ...]
//
// Input: a CSV file with a header row; numbers in C locale; an empty field is NaN.
// Output: CSV on stdout (header row, then numbers printed with 17 significant digits).
// Each estimator area registers its commands in its own refcli_<area>.cpp.
#pragma once

#include <functional>
#include <map>
#include <string>
#include <vector>

#include <initializer_list>
#include <stdexcept>

#include "call.hpp"
#include "index_table.hpp"

namespace refcli {

struct Table {
    std::vector<std::string> names;
    std::vector<std::vector<std::string>> cells;  // rows of raw text

    std::size_t rows() const { return cells.size(); }
    int find(const std::string& name) const;          // -1 if absent
    std::vector<double> numbers(const std::string& name) const;  // NaN for empty/non-numeric
    std::vector<std::string> text(const std::string& name) const;
};

using Args = std::map<std::string, std::string>;
using Command = std::function<int(const Table&, const Args&)>;

// Registers a command at static-initialisation time.
struct Register {
    Register(const std::string& name, Command cmd);
};

double number(const Args& a, const std::string& key, double fallback);
std::string text(const Args& a, const std::string& key, const std::string& fallback);
// The Options struct O as the spreadsheet function `function` (its name as users type it)
// would get it from these key=value arguments: the add-in's own bindings read them
// (native/addin/bind.hpp, call.hpp optionsFromText), so the checks against outside libraries
// exercise the mapping Calc uses. A key that is neither an argument or option of the function
// nor one of the command's own keys is an error.
template <class O>
O specOptions(const char* function, const Args& a, std::initializer_list<const char*> own = {}) {
    const lintel::addin::FunctionSpec& f = lintel::addin::functionSpec(function);
    for (const auto& [key, value] : a) {
        bool known = f.option(key) != nullptr || (f.argIndex(key) >= 0 && f.args[static_cast<std::size_t>(f.argIndex(key))].binding);
        for (const char* k : own) known = known || key == k;
        if (!known) throw std::runtime_error("refcli: " + std::string(function) + " takes no key " + key);
    }
    return lintel::addin::optionsFromText<O>(f, a);
}

// Prints a CSV table: names then columns of equal length.
void printColumns(const std::vector<std::string>& names,
                  const std::vector<std::vector<double>>& columns);
// The period start serials of an axis, and counts as numbers, for printColumns.
std::vector<double> periodStarts(const lintel::PeriodAxis& axis);
std::vector<double> asNumbers(const std::vector<std::size_t>& counts);
// The shared index layout: period, index, sales, lower, upper.
int printIndexTable(const lintel::IndexTable& table);

}  // namespace refcli
