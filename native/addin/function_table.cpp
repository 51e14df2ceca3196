#include "function_table.hpp"

#include <exception>

#include <fmt/format.h>

#include "diagnostics.hpp"

namespace lintel::addin {

const std::vector<FunctionSpec>& functionTable() {
    static const std::vector<FunctionSpec> table = [] {
        std::vector<FunctionSpec> t;
        for (auto part : {rawIndexFunctions, arithmeticFunctions, hedonicFunctions, analyticsFunctions,
                           repeatSalesFunctions})
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

namespace {
OutTable message(const std::string& text) {
    OutTable t;
    t.scalar = true;
    t.addRow();
    t.text("Lintel: " + text);
    return t;
}
}  // namespace

OutTable callFunction(const FunctionSpec& spec, const std::vector<Arg>& args,
                      const CallContext& ctx) noexcept {
    try {
        if (args.size() != spec.args.size())
            return message(fmt::format("{} takes {} arguments, got {}", spec.name,
                                       spec.args.size(), args.size()));
        OutTable t = spec.impl(args, ctx);
        if (t.rows.empty()) return message("the result is empty");
        return t;
    } catch (const InputError& e) {
        return message(e.what());
    } catch (const std::bad_alloc&) {
        return message("out of memory: the ranges are too large");
    } catch (const std::exception& e) {
        return message(fmt::format("internal error in {}: {}", spec.name, e.what()));
    } catch (...) {
        return message(fmt::format("internal error in {}", spec.name));
    }
}

}  // namespace lintel::addin
