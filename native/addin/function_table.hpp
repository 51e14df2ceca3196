// The one declarative table of Lintel's spreadsheet functions. It drives:
//  - the UNO interface (idl/org/lintel/XLintel.idl is generated from it),
//  - the component's methods (generated include, forwarding each to its implementation),
//  - the function wizard (XAddIn display names and descriptions),
//  - the function reference docs/functions.md (generated).
// A description is written here and nowhere else.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "cell_model.hpp"

namespace lintel::addin {

enum class ArgKind {
    Range,     // required cell range (UNO sequence<sequence<any>>); a single value also works
    Optional,  // optional value or range (UNO any): may be omitted or left empty
    Column,    // required column(s) of cells (UNO table::XCellRange): Calc passes the range
               // itself and only its rows up to the last one holding data are read, so a whole
               // column costs what its data costs. A value or an expression is refused by Calc
               // (Err:504): use Range for arguments that may be a value.
};

struct ArgSpec {
    std::string name;         // shown in the wizard, lower case as in the docs
    ArgKind kind;
    std::string description;  // one or two sentences
};

struct OptionSpec {
    std::string key;
    std::string defaultText;  // as the docs show it
    std::string description;
};

using Implementation = OutTable (*)(const std::vector<Arg>& args, const CallContext& ctx);

struct FunctionSpec {
    std::string method;       // programmatic name in the UNO interface, e.g. "indexMedian"
    std::string name;         // what users type, e.g. "INDEXMEDIAN"
    std::string description;  // the wizard's description
    std::vector<ArgSpec> args;
    std::vector<OptionSpec> options;  // keys the `options` argument accepts
    std::string output;       // docs: what the result looks like
    std::string example;      // docs: a formula
    Implementation impl = nullptr;
    // Number format of each output column ("" = leave it): the panel's "Format index table"
    // applies them, since Calc gives an array result the date format of its first input.
    std::vector<std::string> formats;
};

const std::vector<FunctionSpec>& functionTable();
const FunctionSpec* findFunctionByMethod(std::string_view method);
const FunctionSpec* findFunctionByName(std::string_view name);

// Category of every Lintel function (Calc lists add-in functions under "Add-in").
inline const char* kCategory = "Add-In";
inline const char* kCategoryDisplay = "Lintel";

// Runs a function: checks the argument count, calls the implementation, and turns any
// failure into the single-cell message "Lintel: <what is wrong>". Never throws.
OutTable callFunction(const FunctionSpec& spec, const std::vector<Arg>& args,
                      const CallContext& ctx) noexcept;

// Per-area lists, concatenated in this order by functionTable().
std::vector<FunctionSpec> rawIndexFunctions();
std::vector<FunctionSpec> arithmeticFunctions();
std::vector<FunctionSpec> analyticsFunctions();
std::vector<FunctionSpec> hedonicFunctions();
std::vector<FunctionSpec> repeatSalesFunctions();

}  // namespace lintel::addin
