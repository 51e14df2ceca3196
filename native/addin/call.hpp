// One call of a spreadsheet function as its implementation sees it: the arguments by name,
// the options applied to the structs they are bound to, the presentation options.
//
//   OutTable indexHedonic(const Call& call) {
//       const HedonicOptions o = call.options<HedonicOptions>();  // args + options, validated
//       const HedonicInput in = readHedonicInput(call);            // call.required("dates") ...
//       return indexTableCells(hedonicIndex(in, o), call);
//   }
//
// At construction every argument and option that has a binding is applied to a fresh
// instance of its target struct, so an invalid option is reported before any data is read.
// After a successful call, callFunction() checks that the implementation asked for every
// struct an option or argument was applied to: a declared option the code never reads is a
// programming fault, caught by the tests (test_addin_robustness, test_addin_spec).
#pragma once

#include <map>
#include <memory>
#include <set>
#include <stdexcept>
#include <string>
#include <string_view>
#include <type_traits>
#include <typeindex>
#include <vector>

#include "bind.hpp"
#include "cell_model.hpp"
#include "function_table.hpp"

namespace lintel::addin {

namespace detail {
template <class O, class = void> struct HasValidate : std::false_type {};
template <class O>
struct HasValidate<O, std::void_t<decltype(std::declval<const O&>().validate())>> : std::true_type {};
}  // namespace detail

class Call {
public:
    // Parses the options (unknown keys, bad values: InputError) and applies every binding.
    Call(const FunctionSpec& spec, const std::vector<Arg>& args, const CallContext& ctx);

    const FunctionSpec& spec() const { return *spec_; }
    const CallContext& ctx() const { return ctx_; }

    // The argument of that name (std::logic_error when the function has none of that name).
    const Arg& arg(std::string_view name) const;
    // The range of a required argument; InputError "<name> is required" when missing.
    const Range& required(std::string_view name) const;
    // Given with a value: not omitted and not a single blank cell.
    bool given(std::string_view name) const;

    // The struct O with every argument and option bound to it applied, validated (when O has
    // validate()).
    template <class O>
    O options() const {
        requested_.insert(std::type_index(typeid(O)));
        const auto it = built_.find(std::type_index(typeid(O)));
        O o = it == built_.end() ? O{} : *static_cast<const O*>(it->second.get());
        if constexpr (detail::HasValidate<O>::value) o.validate();
        return o;
    }
    const TableLayout& layout() const { return layout_; }
    std::size_t headerRows() const { return layout_.header ? 1 : 0; }

    // Throws std::logic_error when an argument or option was applied to a struct the
    // implementation never asked for (it would be silently ignored).
    void checkEverythingRead() const;

private:
    const FunctionSpec* spec_;
    const std::vector<Arg>* args_;
    CallContext ctx_;
    std::map<std::type_index, std::shared_ptr<void>> built_;
    std::map<std::type_index, std::string> appliedBy_;  // a key that was applied, per struct
    mutable std::set<std::type_index> requested_;
    TableLayout layout_;
};

// The struct O as a call of `spec` would get it from these named values: arguments (freq,
// base, lag ...) and option keys, each as text as a user would type it ("Q", "0.9",
// "2020-01-01", "43831"). Names the function does not declare are left to the caller. The
// reference driver (tests/reference/refcli) reads its options this way, so the checks against
// outside libraries use the same mapping as Calc. Throws InputError for a bad value.
template <class O>
O optionsFromText(const FunctionSpec& spec, const std::map<std::string, std::string>& named) {
    std::vector<Arg> args(spec.args.size());
    std::string options;
    for (const auto& [name, value] : named) {
        const int i = spec.argIndex(name);
        if (i >= 0 && name != "options" && spec.args[static_cast<std::size_t>(i)].binding) {
            Range r;
            r.rows = r.cols = 1;
            r.scalar = true;
            r.cells.push_back(Cell::str(value));
            args[static_cast<std::size_t>(i)] = r;
        } else if (spec.option(name)) {
            options += name + "=" + value + ";";
        }
    }
    const int o = spec.argIndex("options");
    if (o >= 0 && !options.empty()) {
        Range r;
        r.rows = r.cols = 1;
        r.scalar = true;
        r.cells.push_back(Cell::str(options));
        args[static_cast<std::size_t>(o)] = r;
    }
    return Call(spec, args, CallContext{}).options<O>();
}

}  // namespace lintel::addin
