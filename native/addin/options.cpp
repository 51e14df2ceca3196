#include "options.hpp"

#include <algorithm>
#include <stdexcept>
#include <vector>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "inputs.hpp"
#include "text.hpp"
#include "text_keys.hpp"

namespace lintel::addin {

std::string shortText(const std::string& s, std::size_t max) {
    if (s.size() <= max) return s;
    std::size_t cut = max;
    while (cut > 0 && (static_cast<unsigned char>(s[cut]) & 0xC0) == 0x80) --cut;  // UTF-8
    return s.substr(0, cut) + "...";
}

OptionBag OptionBag::parse(const Arg& arg, const FunctionSpec& spec) {
    OptionBag bag;
    bag.spec_ = &spec;
    if (!arg) return bag;
    std::vector<std::pair<std::string, Cell>> pairs;
    const Range& r = *arg;
    if (r.rows == 1 && r.cols == 1) {
        const Cell& c = r.at(0, 0);
        if (c.isEmpty()) return bag;
        if (!c.isText())
            throw InputError(std::string("options must be text \"key=value; key=value\" or a two-column range") +
                             emptyCellHint(c));
        const std::string& text = c.text;
        std::size_t pos = 0;
        while (pos <= text.size()) {
            std::size_t end = text.find_first_of(";\n", pos);
            if (end == std::string::npos) end = text.size();
            const std::string item = trim(text.substr(pos, end - pos));
            pos = end + 1;
            if (item.empty()) continue;
            const auto eq = item.find('=');
            if (eq == std::string::npos)
                throw InputError(fmt::format("option \"{}\" has no value (write key=value)",
                                             shortText(item)));
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
        if (!spec.option(k)) {
            std::string list;
            for (const auto& o : spec.options) list += (list.empty() ? "" : ", ") + o.key;
            throw InputError(fmt::format("unknown option \"{}\" for {} (known: {})", shortText(key),
                                         spec.name, list.empty() ? "none" : list));
        }
        if (bag.values_.count(k))
            throw InputError(fmt::format("option \"{}\" is given twice", key));
        bag.values_[k] = value;
    }
    return bag;
}

const Cell* OptionBag::find(const std::string& key) const {
    if (!spec_ || !spec_->option(key))
        throw std::logic_error(fmt::format("option key \"{}\" is not declared in the spec of {}",
                                           key, spec_ ? spec_->name : std::string("?")));
    const auto it = values_.find(key);
    return it == values_.end() || it->second.isEmpty() ? nullptr : &it->second;
}

}  // namespace lintel::addin
