// The one declarative table of Lintel's spreadsheet functions. Each entry (a FunctionSpec) is
// what the code runs on, not only what the docs show:
//  - its arguments and options, each with a name, a kind, a default, a validator and a typed
//    setter into the estimator's Options struct (a Binding, see bind.hpp), so an
//    implementation reads its arguments by name and gets a filled, validated Options struct
//    from Call::options<O>() (call.hpp);
//  - its output columns (titles and number formats), which the titles row, the report
//    planner and the panel's "Format index table" use;
// and it drives the UNO interface (idl/org/lintel/XLintel.idl, generated), the component's
// methods (generated), the function wizard texts and docs/functions.md (generated).
// A description is written here and nowhere else.
#pragma once

#include <functional>
#include <memory>
#include <string>
#include <string_view>
#include <typeindex>
#include <utility>
#include <vector>

#include "cell_model.hpp"

namespace lintel::addin {

class Call;

enum class ArgKind {
    Range,     // required cell range (UNO sequence<sequence<any>>); a single value also works
    Optional,  // optional value or range (UNO any): may be omitted or left empty
    Column,    // required column(s) of cells (UNO table::XCellRange): Calc passes the range
               // itself and only its rows up to the last one holding data are read, so a whole
               // column costs what its data costs. A value or an expression is refused by Calc
               // (Err:504): use Range for arguments that may be a value.
};

// Writes the value of one argument or option into a field of a struct: the estimator's
// Options, or a presentation struct (TableLayout). `target` is the struct's type, so one
// function's spec can hold setters for several structs and Call::options<O>() applies the
// ones for O. The setter checks the value (its validator) and throws InputError naming
// `what` ("freq", "option minsales") when it is not acceptable.
struct Binding {
    std::type_index target = typeid(void);
    std::function<std::shared_ptr<void>()> make;  // a default-constructed target struct
    std::function<void(void* object, const Cell& value, const CallContext& ctx,
                       const std::string& what)>
        set;
    explicit operator bool() const { return static_cast<bool>(set); }
};

struct ArgSpec {
    std::string name;         // shown in the wizard, lower case as in the docs
    ArgKind kind = ArgKind::Range;
    std::string description;  // one or two sentences
    Binding binding;          // a parameter (freq, base, lag ...) sets an Options field; a data
                              // range (dates, prices ...) has none and is read by name
    std::string defaultText;  // docs: the default of an optional parameter ("" = none)
};

struct OptionSpec {
    std::string key;
    std::string defaultText;  // from the Options struct's own default where it has one
    std::string description;
    Binding binding;          // every option has one
};

// One column of a function's output table.
struct OutputColumn {
    std::string title;   // the titles row (titles=1) and the report's headings
    std::string format;  // number format code ("" = leave it); the panel's "Format index
                         // table" and the report apply it (Calc gives an array result the
                         // date format of its first input)
};

using Implementation = OutTable (*)(const Call& call);

struct FunctionSpec {
    std::string method;       // programmatic name in the UNO interface, e.g. "indexMedian"
    std::string name;         // what users type, e.g. "INDEXMEDIAN"
    std::string description;  // the wizard's description
    std::vector<ArgSpec> args;
    std::vector<OptionSpec> options;  // keys the `options` argument accepts
    std::vector<OutputColumn> columns;  // the output table's columns (the widest layout)
    std::string output;       // docs: what the result looks like
    std::string example;      // docs: a formula
    Implementation impl = nullptr;

    std::size_t width() const { return columns.size(); }
    // Position of an argument, or -1.
    int argIndex(std::string_view argName) const;
    const OptionSpec* option(std::string_view key) const;
};

const std::vector<FunctionSpec>& functionTable();
const FunctionSpec* findFunctionByMethod(std::string_view method);
const FunctionSpec* findFunctionByName(std::string_view name);
// The spec of a function that must exist (for code that calls one by name: the report
// planner, refcli). Throws std::logic_error for an unknown name.
const FunctionSpec& functionSpec(std::string_view name);

// Category of every Lintel function (Calc lists add-in functions under "Add-in").
inline const char* kCategory = "Add-In";
inline const char* kCategoryDisplay = "Lintel";

// Runs a function: checks the argument count, calls the implementation, and turns any
// failure into the single-cell message "Lintel: <what is wrong>". An input problem says what
// is wrong; a programming fault says so ("Lintel: internal fault in F: ...; please report
// it") and is never dressed as an input error. Never throws.
OutTable callFunction(const FunctionSpec& spec, const std::vector<Arg>& args,
                      const CallContext& ctx) noexcept;
// The prefix of the message of a programming fault (tests count them).
inline const char* kInternalFault = "Lintel: internal fault";

// A formula call laid out from named arguments in the spec's order, e.g.
//   formulaCall(functionSpec("INDEXMEDIAN"), {{"dates", "A2:A9"}, {"prices", "B2:B9"},
//                                             {"freq", "\"Q\""}})
//   -> "INDEXMEDIAN(A2:A9;B2:B9;;\"Q\")"
// Arguments not named are left empty; trailing empty ones are dropped. Each value is formula
// text as is. Throws std::logic_error for a name the function does not take.
std::string formulaCall(const FunctionSpec& spec,
                        const std::vector<std::pair<std::string, std::string>>& named);

// Per-area lists, concatenated in this order by functionTable().
std::vector<FunctionSpec> rawIndexFunctions();
std::vector<FunctionSpec> arithmeticFunctions();
std::vector<FunctionSpec> analyticsFunctions();
std::vector<FunctionSpec> hedonicFunctions();
std::vector<FunctionSpec> repeatSalesFunctions();
std::vector<FunctionSpec> salesCheckFunctions();
std::vector<FunctionSpec> backtestFunctions();

}  // namespace lintel::addin
