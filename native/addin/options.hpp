// The `options` argument: text "key=value; key=value" or a two-column range of keys and
// values. Keys are case-insensitive and trimmed (no-break spaces too); an unknown key is an
// error that names it. The values are read by the options' bindings (bind.hpp), not here.
#pragma once

#include <map>
#include <string>

#include "cell_model.hpp"
#include "function_table.hpp"

namespace lintel::addin {

class OptionBag {
public:
    // Parses and checks the keys against spec.options. Throws lintel::InputError.
    static OptionBag parse(const Arg& arg, const FunctionSpec& spec);

    // The value given for a declared key (lower case), or nullptr. A key the spec does not
    // declare is a programming fault (std::logic_error).
    const Cell* find(const std::string& key) const;

private:
    const FunctionSpec* spec_ = nullptr;
    std::map<std::string, Cell> values_;
};

// A user's text in a message: as is when short, else its start and "..." (a 10 KB options
// text must not be echoed into every cell).
std::string shortText(const std::string& s, std::size_t max = 40);

}  // namespace lintel::addin
