// The `options` argument: text "key=value; key=value" or a two-column range of keys and
// values. Keys are case-insensitive; an unknown key is an error that names it.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "cell_model.hpp"
#include "function_table.hpp"

namespace lintel::addin {

class OptionBag {
public:
    // Parses and checks the keys against spec.options. Throws lintel::InputError.
    static OptionBag parse(const Arg& arg, const FunctionSpec& spec);

    bool has(const std::string& key) const { return values_.count(key) != 0; }
    double number(const std::string& key, double fallback) const;
    // A whole number >= minimum.
    long integer(const std::string& key, long fallback, long minimum) const;
    bool flag(const std::string& key, bool fallback) const;
    std::string text(const std::string& key, const std::string& fallback) const;
    // A choice among allowed (lower-cased) words.
    std::string choice(const std::string& key, const std::string& fallback,
                       const std::vector<std::string>& allowed) const;
    // A list of whole numbers "1,3" or "1 3" (e.g. column numbers).
    std::vector<long> integerList(const std::string& key) const;

private:
    std::map<std::string, Cell> values_;
};

}  // namespace lintel::addin
