#include "backtest_methods.hpp"

#include <cctype>
#include <map>
#include <typeindex>

#include <fmt/format.h>

#include "call.hpp"
#include "diagnostics.hpp"
#include "function_table.hpp"
#include "options.hpp"
#include "text.hpp"

namespace lintel::addin {

namespace {

// One entry per kind a row may name: its word, the function whose options it takes, and how
// those options become the core's CandidateMethod options.
struct RowKind {
    const char* word;
    IndexMethodKind kind;
    const char* function;
    std::type_index target;  // the Options struct the function's options bind to
    IndexMethodOptions (*read)(const FunctionSpec&, const std::map<std::string, std::string>&);
};

template <class O>
IndexMethodOptions readAs(const FunctionSpec& spec, const std::map<std::string, std::string>& named) {
    return optionsFromText<O>(spec, named);
}

const std::vector<RowKind>& rowKinds() {
    static const std::vector<RowKind> kinds = {
        {"median", IndexMethodKind::Median, "INDEXMEDIAN", typeid(RawIndexOptions), &readAs<RawIndexOptions>},
        {"mean", IndexMethodKind::Mean, "INDEXMEAN", typeid(RawIndexOptions), &readAs<RawIndexOptions>},
        {"mix", IndexMethodKind::Mix, "INDEXMIX", typeid(MixOptions), &readAs<MixOptions>},
        {"hedonic", IndexMethodKind::Hedonic, "INDEXHEDONIC", typeid(HedonicOptions), &readAs<HedonicOptions>},
        {"repeat", IndexMethodKind::RepeatSales, "CHAINRS", typeid(RepeatSalesOptions), &readAs<RepeatSalesOptions>},
    };
    return kinds;
}

bool isKeyChar(char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; }

// "log=1, 3 window=2; se=hc1" -> {log: "1, 3", window: "2", se: "hc1"}; keys in lower case.
std::vector<std::pair<std::string, std::string>> splitItems(const std::string& text) {
    std::vector<std::pair<std::string, std::string>> items;
    std::size_t pos = 0;
    while (pos < text.size()) {
        std::size_t end = text.find_first_of(";\n\r", pos);
        if (end == std::string::npos) end = text.size();
        const std::string chunk = text.substr(pos, end - pos);
        pos = end + 1;
        // Keys: a word followed by '=' at the start of the chunk or after a blank.
        std::vector<std::pair<std::size_t, std::size_t>> keys;  // (key start, '=' position)
        for (std::size_t i = 0; i < chunk.size(); ++i) {
            if (chunk[i] != '=') continue;
            std::size_t k = i;
            while (k > 0 && chunk[k - 1] == ' ') --k;
            std::size_t s = k;
            while (s > 0 && isKeyChar(chunk[s - 1])) --s;
            if (s == k) throw InputError(fmt::format("\"{}\" has no key before =", shortText(trim(chunk))));
            if (s > 0 && !std::isspace(static_cast<unsigned char>(chunk[s - 1])) && chunk[s - 1] != ',')
                continue;  // inside a value
            keys.emplace_back(s, i);
        }
        if (keys.empty()) {
            if (!trim(chunk).empty())
                throw InputError(fmt::format("\"{}\" has no value (write key=value)", shortText(trim(chunk))));
            continue;
        }
        if (!trim(chunk.substr(0, keys.front().first)).empty())
            throw InputError(fmt::format("\"{}\" has no value (write key=value)",
                                         shortText(trim(chunk.substr(0, keys.front().first)))));
        for (std::size_t j = 0; j < keys.size(); ++j) {
            const auto [s, eq] = keys[j];
            const std::size_t valueEnd = j + 1 < keys.size() ? keys[j + 1].first : chunk.size();
            std::string value = trim(chunk.substr(eq + 1, valueEnd - eq - 1));
            while (!value.empty() && value.back() == ',') value = trim(value.substr(0, value.size() - 1));
            items.emplace_back(lower(trim(chunk.substr(s, eq - s))), value);
        }
    }
    return items;
}

std::string optionKeys(const FunctionSpec& spec, std::type_index target) {
    std::string list;
    for (const auto& o : spec.options)
        if (o.binding.target == target && o.key != "freq" && o.key != "base")
            list += (list.empty() ? "" : ", ") + o.key;
    return list.empty() ? "none" : list;
}

}  // namespace

std::string methodKindList() {
    std::string list;
    for (const auto& k : rowKinds()) list += (list.empty() ? "" : ", ") + std::string(k.word);
    return list;
}

CandidateMethod parseMethodRow(const std::string& text, std::size_t rowNumber) {
    const std::string row = trim(text);
    try {
        std::size_t cut = 0;
        while (cut < row.size() && !std::isspace(static_cast<unsigned char>(row[cut])) && row[cut] != ';')
            ++cut;
        const std::string word = lower(row.substr(0, cut));
        const RowKind* kind = nullptr;
        for (const auto& k : rowKinds())
            if (word == k.word || word == lower(k.function)) kind = &k;
        if (!kind)
            throw InputError(fmt::format("unknown method \"{}\" (known: {}; the reference home's "
                                         "value is not an index and is not tested)",
                                         shortText(row.substr(0, cut)), methodKindList()));
        const FunctionSpec& spec = functionSpec(kind->function);
        std::map<std::string, std::string> named;
        bool ownMinSales = false;
        for (const auto& [key, value] : splitItems(row.substr(cut))) {
            if (key == "freq")
                throw InputError("freq is set once for every method by INDEXBACKTEST's freq");
            if (key == "base")
                throw InputError("base does not apply: the backtest compares ratios of index "
                                 "values, which do not depend on the base period");
            const OptionSpec* o = spec.option(key);
            if (!o || o->binding.target != kind->target)
                throw InputError(fmt::format("unknown option \"{}\" for {} (known: {})", shortText(key),
                                             kind->word, optionKeys(spec, kind->target)));
            if (named.count(key)) throw InputError(fmt::format("option \"{}\" is given twice", key));
            if (value.empty()) throw InputError(fmt::format("option \"{}\" has no value", key));
            named[key] = value;
            ownMinSales = ownMinSales || key == "minsales";
        }
        CandidateMethod m;
        m.label = row;
        m.kind = kind->kind;
        m.options = kind->read(spec, named);
        m.ownMinSales = ownMinSales;
        return m;
    } catch (const InputError& e) {
        throw InputError(fmt::format("methods row {} (\"{}\"): {}", rowNumber, shortText(row), e.what()));
    }
}

std::vector<CandidateMethod> parseMethodRows(const std::vector<std::string>& rows) {
    std::vector<CandidateMethod> out;
    std::map<std::string, std::size_t> seen;
    for (std::size_t i = 0; i < rows.size(); ++i) {
        if (isBlankText(rows[i])) continue;
        CandidateMethod m = parseMethodRow(rows[i], i + 1);
        if (const auto it = seen.find(m.label); it != seen.end())
            throw InputError(fmt::format("methods rows {} and {} are the same (\"{}\")", it->second,
                                         i + 1, shortText(m.label)));
        seen[m.label] = i + 1;
        out.push_back(std::move(m));
    }
    if (out.empty()) throw InputError("methods holds no method (one per row, e.g. \"median\")");
    return out;
}

std::vector<std::string> defaultMethodRows(bool characteristics, bool strata) {
    std::vector<std::string> rows = {"median", "mean"};
    if (strata) rows.push_back("mix");
    if (characteristics) rows.push_back("hedonic");
    rows.push_back("repeat");
    return rows;
}

}  // namespace lintel::addin
