#include "call.hpp"

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "options.hpp"

namespace lintel::addin {

namespace {
bool blankSingle(const Arg& a) { return a && a->rows * a->cols == 1 && a->at(0, 0).isEmpty(); }
}  // namespace

Call::Call(const FunctionSpec& spec, const std::vector<Arg>& args, const CallContext& ctx)
    : spec_(&spec), args_(&args), ctx_(ctx) {
    if (args.size() != spec.args.size())
        throw std::logic_error(fmt::format("{} takes {} arguments, got {}", spec.name,
                                           spec.args.size(), args.size()));
    auto apply = [&](const Binding& b, const Cell& value, const std::string& what,
                     const std::string& key) {
        auto& object = built_[b.target];
        if (!object) object = b.make();
        b.set(object.get(), value, ctx_, what);
        appliedBy_[b.target] = key;
    };
    const int optionsArg = spec.argIndex("options");
    const OptionBag bag = OptionBag::parse(optionsArg >= 0 ? args[static_cast<std::size_t>(optionsArg)] : Arg{}, spec);
    // dateorder= stands for the document's order in this call: every date it reads as text
    // (the dates column, and the base date bound below) uses it.
    if (spec.option("dateorder"))
        if (const Cell* v = bag.find("dateorder"); v && v->isText())
            if (const auto order = parseDateOrder(v->text); order && *order != DateOrder::Unknown)
                ctx_.dateOrder = *order;
    // Arguments bound to a field, in argument order (their messages name the argument).
    for (std::size_t i = 0; i < spec.args.size(); ++i) {
        const ArgSpec& a = spec.args[i];
        if (!a.binding || !args[i] || blankSingle(args[i])) continue;
        const Range& r = *args[i];
        if (r.rows * r.cols != 1)
            throw InputError(fmt::format("{} must be a single value, got {} x {} cells", a.name,
                                         r.rows, r.cols));
        apply(a.binding, r.at(0, 0), a.name, a.name);
    }
    // Options.
    for (const OptionSpec& o : spec.options) {
        if (!o.binding) throw std::logic_error(fmt::format("option {} of {} has no binding", o.key, spec.name));
        if (const Cell* v = bag.find(o.key)) apply(o.binding, *v, "option " + o.key, o.key);
    }
    layout_ = options<TableLayout>();
}

const Arg& Call::arg(std::string_view name) const {
    const int i = spec_->argIndex(name);
    if (i < 0)
        throw std::logic_error(fmt::format("{} has no argument \"{}\"", spec_->name, name));
    return (*args_)[static_cast<std::size_t>(i)];
}

const Range& Call::required(std::string_view name) const {
    const Arg& a = arg(name);
    if (!a) throw InputError(fmt::format("{} is required", name));
    return *a;
}

bool Call::given(std::string_view name) const {
    const Arg& a = arg(name);
    return a && !blankSingle(a);
}

void Call::checkEverythingRead() const {
    for (const auto& [type, key] : appliedBy_)
        if (!requested_.count(type))
            throw std::logic_error(fmt::format("{}: \"{}\" was given but the function never read it",
                                               spec_->name, key));
}

}  // namespace lintel::addin
