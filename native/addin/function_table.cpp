#include "function_table.hpp"

#include <exception>
#include <stdexcept>

#include <fmt/format.h>

#include "call.hpp"
#include "diagnostics.hpp"

namespace lintel::addin {

const std::vector<FunctionSpec>& functionTable() {
    static const std::vector<FunctionSpec> table = [] {
        std::vector<FunctionSpec> t;
        for (auto part : {rawIndexFunctions, arithmeticFunctions, hedonicFunctions, analyticsFunctions,
                           repeatSalesFunctions, salesCheckFunctions, backtestFunctions})
            for (auto& f : part()) t.push_back(std::move(f));
        return t;
    }();
    return table;
}

const FunctionSpec* findFunctionByMethod(std::string_view method) {
    for (const auto& f : functionTable())
        if (f.method == method) return &f;
    return nullptr;
}

const FunctionSpec* findFunctionByName(std::string_view name) {
    for (const auto& f : functionTable())
        if (f.name == name) return &f;
    return nullptr;
}

const FunctionSpec& functionSpec(std::string_view name) {
    const FunctionSpec* f = findFunctionByName(name);
    if (!f) throw std::logic_error(fmt::format("no Lintel function {}", name));
    return *f;
}

int FunctionSpec::argIndex(std::string_view argName) const {
    for (std::size_t i = 0; i < args.size(); ++i)
        if (args[i].name == argName) return static_cast<int>(i);
    return -1;
}

const OptionSpec* FunctionSpec::option(std::string_view key) const {
    for (const auto& o : options)
        if (o.key == key) return &o;
    return nullptr;
}

std::string formulaCall(const FunctionSpec& spec,
                        const std::vector<std::pair<std::string, std::string>>& named) {
    std::vector<std::string> values(spec.args.size());
    for (const auto& [name, value] : named) {
        const int i = spec.argIndex(name);
        if (i < 0) throw std::logic_error(fmt::format("{} has no argument \"{}\"", spec.name, name));
        values[static_cast<std::size_t>(i)] = value;
    }
    while (!values.empty() && values.back().empty()) values.pop_back();
    std::string out = spec.name + "(";
    for (std::size_t i = 0; i < values.size(); ++i) out += (i ? ";" : "") + values[i];
    return out + ")";
}

namespace {
OutTable message(const std::string& text) {
    OutTable t;
    t.scalar = true;
    t.addRow();
    t.text(text);
    return t;
}
}  // namespace

OutTable callFunction(const FunctionSpec& spec, const std::vector<Arg>& args,
                      const CallContext& ctx) noexcept {
    try {
        if (args.size() != spec.args.size())
            return message(fmt::format("Lintel: {} takes {} arguments, got {}", spec.name,
                                       spec.args.size(), args.size()));
        const Call call(spec, args, ctx);
        OutTable t = spec.impl(call);
        call.checkEverythingRead();
        if (t.rows.empty()) return message("Lintel: the result is empty");
        return t;
    } catch (const InputError& e) {
        return message(std::string("Lintel: ") + e.what());
    } catch (const std::bad_alloc&) {
        return message("Lintel: out of memory: the ranges are too large");
    } catch (const std::exception& e) {
        return message(fmt::format("{} in {} (a bug in Lintel; please report it): {}",
                                   kInternalFault, spec.name, e.what()));
    } catch (...) {
        return message(fmt::format("{} in {} (a bug in Lintel; please report it)", kInternalFault,
                                   spec.name));
    }
}

}  // namespace lintel::addin
