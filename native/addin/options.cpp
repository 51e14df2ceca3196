#include "options.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdlib>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "text.hpp"
#include "text_keys.hpp"

namespace lintel::addin {

namespace {

std::optional<double> toNumber(const Cell& c) {
    if (c.isNumber()) return c.number;
    if (!c.isText()) return std::nullopt;
    std::string t = trim(c.text);
    // A decimal comma, as Calc writes numbers into text ("level="&B9) in many languages.
    if (std::count(t.begin(), t.end(), ',') == 1 && t.find('.') == std::string::npos)
        std::replace(t.begin(), t.end(), ',', '.');
    char* end = nullptr;
    const double x = std::strtod(t.c_str(), &end);
    if (t.empty() || *end) return std::nullopt;
    return x;
}

}  // namespace

OptionBag OptionBag::parse(const Arg& arg, const FunctionSpec& spec) {
    OptionBag bag;
    if (!arg) return bag;
    std::vector<std::pair<std::string, Cell>> pairs;
    const Range& r = *arg;
    if (r.rows == 1 && r.cols == 1) {
        const Cell& c = r.at(0, 0);
        if (c.isEmpty()) return bag;
        if (!c.isText())
            throw InputError("options must be text \"key=value; key=value\" or a two-column range");
        std::string text = c.text;
        std::size_t pos = 0;
        while (pos <= text.size()) {
            std::size_t end = text.find_first_of(";\n", pos);
            if (end == std::string::npos) end = text.size();
            const std::string item = trim(text.substr(pos, end - pos));
            pos = end + 1;
            if (item.empty()) continue;
            const auto eq = item.find('=');
            if (eq == std::string::npos)
                throw InputError(fmt::format("option \"{}\" has no value (write key=value)", item));
            pairs.emplace_back(trim(item.substr(0, eq)), Cell::str(trim(item.substr(eq + 1))));
        }
    } else if (r.cols == 2) {
        for (std::size_t i = 0; i < r.rows; ++i) {
            const Cell& k = r.at(i, 0);
            if (k.isEmpty()) continue;
            if (!k.isText())
                throw InputError(fmt::format("options row {}: the key must be text", i + 1));
            pairs.emplace_back(trim(k.text), r.at(i, 1));
        }
    } else {
        throw InputError(fmt::format(
            "options must be text \"key=value; key=value\" or a two-column range, got {} x {} cells",
            r.rows, r.cols));
    }
    for (auto& [key, value] : pairs) {
        const std::string k = lower(key);
        const bool known = std::any_of(spec.options.begin(), spec.options.end(),
                                       [&](const OptionSpec& o) { return o.key == k; });
        if (!known) {
            std::string list;
            for (const auto& o : spec.options) list += (list.empty() ? "" : ", ") + o.key;
            throw InputError(fmt::format("unknown option \"{}\" for {} (known: {})", key,
                                         spec.name, list.empty() ? "none" : list));
        }
        if (bag.values_.count(k))
            throw InputError(fmt::format("option \"{}\" is given twice", key));
        bag.values_[k] = value;
    }
    return bag;
}

double OptionBag::number(const std::string& key, double fallback) const {
    auto it = values_.find(key);
    if (it == values_.end() || it->second.isEmpty()) return fallback;
    const auto x = toNumber(it->second);
    if (!x || !std::isfinite(*x))
        throw InputError(fmt::format("option {} must be a number, got \"{}\"", key, it->second.text));
    return *x;
}

long OptionBag::integer(const std::string& key, long fallback, long minimum) const {
    const double x = number(key, static_cast<double>(fallback));
    if (x > 9e18)  // beyond long: keeps the conversion below defined
        throw InputError(fmt::format("option {} is too large: {}", key, x));
    if (x != std::floor(x) || x < static_cast<double>(minimum))
        throw InputError(fmt::format("option {} must be a whole number of at least {}, got {}",
                                     key, minimum, x));
    return static_cast<long>(x);
}

bool OptionBag::flag(const std::string& key, bool fallback) const {
    auto it = values_.find(key);
    if (it == values_.end() || it->second.isEmpty()) return fallback;
    const Cell& c = it->second;
    if (c.isNumber()) return c.number != 0;
    const std::string t = lower(trim(c.text));
    if (t == "1" || t == "true" || t == "yes" || t == "on") return true;
    if (t == "0" || t == "false" || t == "no" || t == "off") return false;
    throw InputError(fmt::format("option {} must be 1 or 0 (TRUE or FALSE), got \"{}\"", key, c.text));
}

std::string OptionBag::text(const std::string& key, const std::string& fallback) const {
    auto it = values_.find(key);
    if (it == values_.end() || it->second.isEmpty()) return fallback;
    if (it->second.isNumber()) return keyText(it->second.number);  // the core's number text
    return trim(it->second.text);
}

std::string OptionBag::choice(const std::string& key, const std::string& fallback,
                              const std::vector<std::string>& allowed) const {
    const std::string v = lower(text(key, fallback));
    if (std::find(allowed.begin(), allowed.end(), v) != allowed.end()) return v;
    std::string list;
    for (const auto& a : allowed) list += (list.empty() ? "" : ", ") + a;
    throw InputError(fmt::format("option {} must be one of {}, got \"{}\"", key, list, v));
}

std::vector<long> OptionBag::integerList(const std::string& key) const {
    std::vector<long> out;
    auto it = values_.find(key);
    if (it == values_.end() || it->second.isEmpty()) return out;
    if (it->second.isNumber()) {
        out.push_back(integer(key, 0, 1));
        return out;
    }
    std::string t = it->second.text;
    std::replace_if(t.begin(), t.end(), [](char c) { return c == ',' || c == ' '; }, ';');
    std::size_t pos = 0;
    while (pos <= t.size()) {
        std::size_t end = t.find(';', pos);
        if (end == std::string::npos) end = t.size();
        const std::string item = trim(t.substr(pos, end - pos));
        pos = end + 1;
        if (item.empty()) continue;
        char* e = nullptr;
        const long v = std::strtol(item.c_str(), &e, 10);
        if (*e || v < 1)
            throw InputError(fmt::format("option {} must list column numbers like \"1,3\", got \"{}\"",
                                         key, it->second.text));
        out.push_back(v);
    }
    return out;
}

}  // namespace lintel::addin
