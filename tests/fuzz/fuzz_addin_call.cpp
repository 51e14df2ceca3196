// libFuzzer harness: bytes -> one call of a spreadsheet function through the add-in's UNO-free
// call boundary (lintel::addin::callFunction), as Calc would make it.
//
// The bytes choose the function (any entry of the function table), then for each of its
// arguments: omitted, a single value, or a range of some rows and columns whose cells are
// numbers (dates, prices, small whole numbers, extremes: 0, -0, huge, tiny, infinities, NaN,
// or any 8 bytes), texts (dates and numbers written as text, labels, option words, any bytes)
// or empty; the options argument is a text of key=value pairs with the function's own keys;
// the call context (null date, day/month order, separators) too. The call must return a table
// or a "Lintel: ..." message, never throw, and never answer "internal fault" (a programming
// error, which callFunction turns into that message): that is a finding, as is a crash, a
// sanitizer report or a hang (tests/fuzz/README.md).
#include <fuzzer/FuzzedDataProvider.h>

#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <limits>
#include <string>
#include <vector>

#include "function_table.hpp"

using namespace lintel::addin;

namespace {

constexpr std::size_t kMaxRows = 48;  // keeps one call to milliseconds
constexpr std::size_t kMaxCols = 4;

const char* const kTexts[] = {
    "", " ", "North", "north ", "Ellenford", "x", "2024-02-30", "2024-03-15", "15/03/2024",
    "03/15/2024", "2024/03/15", "31.12.2023", "350,000", "350.000,00", "1e308", "-1", "0",
    "NaN", "inf", "TRUE", "Q", "M", "Y", "W", "mean", "median", "hedonic", "repeat", "mix",
    "hedonic window=2", "repeat method=bmn", "repeat smooth=trend", "mix stat=mean",
    "median minsales=2", "\xC2\xA0" "12\xE2\x80\xAF" "500", "\xFF\xFE", "id-1", "A1"};

const char* const kOptionValues[] = {
    "0", "1", "2", "3", "-1", "3,4", "1,2", "x", "", "0.5", "0.999", "1e12", "1e308", "nan",
    "kennedy", "hc1", "classical", "bmn", "cs", "cs2", "mean", "median", "value", "all",
    "carry", "reweight", "bootstrap", "none", "table", "adjusted", "factors", "detail",
    "ratio", "lognormal", "smearing", "level", "trend", "clean", "exact", "DMY", "MDY", "YMD",
    "auto", "M", "Q", "Y", "2020-01-01", "43831", "99999999999", "list", "use", "log", "pct",
    "annual", "20", "10000"};

template <class T, std::size_t N>
const T& pickFrom(FuzzedDataProvider& fdp, const T (&list)[N]) {
    return list[fdp.ConsumeIntegralInRange<std::size_t>(0, N - 1)];
}

double number(FuzzedDataProvider& fdp) {
    static const double kExtremes[] = {0.0, -0.0, 1.0, -1.0, 1e300, -1e300, 1e-300, 4.9e-324,
                                       std::numeric_limits<double>::max(),
                                       std::numeric_limits<double>::infinity(),
                                       -std::numeric_limits<double>::infinity(),
                                       std::numeric_limits<double>::quiet_NaN(), 2958465.0,
                                       2958466.0, -693594.0, 60.0, 0.5, 2147483648.0};
    switch (fdp.ConsumeIntegralInRange<int>(0, 5)) {
        case 0: return 43100.0 + fdp.ConsumeIntegralInRange<int>(0, 2500);  // dates 2018 .. 2024
        case 1: return 50000.0 + fdp.ConsumeIntegralInRange<int>(0, 900000);  // prices
        case 2: return fdp.ConsumeIntegralInRange<int>(-3, 12);
        case 3: return pickFrom(fdp, kExtremes);
        case 4: return fdp.ConsumeFloatingPoint<double>();
        default: {
            double x = 0;
            const std::vector<std::uint8_t> b = fdp.ConsumeBytes<std::uint8_t>(sizeof x);
            for (std::size_t i = 0; i < b.size(); ++i)
                reinterpret_cast<std::uint8_t*>(&x)[i] = b[i];
            return x;
        }
    }
}

Cell cell(FuzzedDataProvider& fdp) {
    switch (fdp.ConsumeIntegralInRange<int>(0, 5)) {
        case 0: return Cell{};
        case 1: return Cell::str(pickFrom(fdp, kTexts));
        case 2: return Cell::str(fdp.ConsumeRandomLengthString(24));
        default: return Cell::num(number(fdp));
    }
}

Range range(FuzzedDataProvider& fdp, std::size_t rows, std::size_t cols) {
    Range r;
    r.rows = rows;
    r.cols = cols;
    // A column of similar cells is what a sheet holds: a run repeats one cell, so the
    // estimators see columns of dates and prices, not only noise.
    while (r.cells.size() < rows * cols) {
        const Cell c = cell(fdp);
        const std::size_t run = fdp.ConsumeIntegralInRange<std::size_t>(1, 4);
        for (std::size_t i = 0; i < run && r.cells.size() < rows * cols; ++i) {
            r.cells.push_back(c);
            if (c.isNumber() && fdp.ConsumeBool()) r.cells.back().number += static_cast<double>(30 * i);
        }
    }
    r.scalar = rows * cols == 1 && fdp.ConsumeBool();
    r.sheetRow = fdp.ConsumeBool() ? 0 : fdp.ConsumeIntegralInRange<std::size_t>(1, 1048576);
    return r;
}

std::string options(FuzzedDataProvider& fdp, const FunctionSpec& f) {
    std::string text;
    const int n = fdp.ConsumeIntegralInRange<int>(0, 5);
    for (int i = 0; i < n; ++i) {
        std::string key;
        if (f.options.empty() || fdp.ConsumeIntegralInRange<int>(0, 15) == 0)
            key = fdp.ConsumeRandomLengthString(8);
        else
            key = f.options[fdp.ConsumeIntegralInRange<std::size_t>(0, f.options.size() - 1)].key;
        const std::string value = fdp.ConsumeBool() ? std::string(pickFrom(fdp, kOptionValues))
                                                    : fdp.ConsumeRandomLengthString(12);
        text += key + (fdp.ConsumeIntegralInRange<int>(0, 20) ? "=" : "") + value;
        text += fdp.ConsumeIntegralInRange<int>(0, 10) ? "; " : ",";
    }
    return text;
}

CallContext context(FuzzedDataProvider& fdp) {
    CallContext ctx;
    if (!fdp.ConsumeIntegralInRange<int>(0, 3)) ctx.dateOffset = fdp.ConsumeBool() ? 1462.0 : number(fdp);
    ctx.dateOrder = static_cast<lintel::DateOrder>(fdp.ConsumeIntegralInRange<int>(0, 3));
    if (!fdp.ConsumeIntegralInRange<int>(0, 3)) {
        ctx.numbers.decimal = fdp.ConsumeBool() ? "," : ".";
        static const char* const kGroups[] = {",", ".", " ", "'", "", "\xC2\xA0", "\xE2\x80\xAF"};
        ctx.numbers.group = pickFrom(fdp, kGroups);
        ctx.numbers.indianGrouping = fdp.ConsumeBool();
    }
    ctx.currentYear = fdp.ConsumeBool() ? 2026 : fdp.ConsumeIntegralInRange<int>(-1, 10000);
    return ctx;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    FuzzedDataProvider fdp(data, size);
    const std::vector<FunctionSpec>& table = functionTable();
    const FunctionSpec& f = table[fdp.ConsumeIntegralInRange<std::size_t>(0, table.size() - 1)];
    CallContext ctx = context(fdp);
    // A CallContext whose separators are not usable is the UNO layer's to refuse; keep the
    // ones the layer can hand over.
    try {
        ctx.numbers.validate();
    } catch (const std::exception&) {
        ctx.numbers = {};
    }

    const std::size_t rows = fdp.ConsumeIntegralInRange<std::size_t>(1, kMaxRows);
    std::vector<Arg> args;
    for (const ArgSpec& spec : f.args) {
        if (spec.name == "options") {
            if (fdp.ConsumeIntegralInRange<int>(0, 3) == 0) args.emplace_back(std::nullopt);
            else {
                Range r;
                r.rows = r.cols = 1;
                r.scalar = true;
                r.cells.push_back(Cell::str(options(fdp, f)));
                args.emplace_back(r);
            }
            continue;
        }
        switch (fdp.ConsumeIntegralInRange<int>(0, 9)) {
            case 0: args.emplace_back(std::nullopt); break;
            case 1: args.emplace_back(range(fdp, 1, 1)); break;
            case 2: {  // another shape: misaligned rows, several columns
                const std::size_t r = fdp.ConsumeIntegralInRange<std::size_t>(1, kMaxRows);
                args.emplace_back(range(fdp, r, fdp.ConsumeIntegralInRange<std::size_t>(1, kMaxCols)));
                break;
            }
            default: {
                const bool block = spec.name == "characteristics" || spec.name == "strata" ||
                                   spec.name == "indexes" || spec.name == "home";
                args.emplace_back(range(fdp, rows, block ? fdp.ConsumeIntegralInRange<std::size_t>(1, kMaxCols) : 1));
            }
        }
    }
    // The argument count is the UNO interface's: Calc always passes every argument.
    const OutTable t = callFunction(f, args, ctx);
    if (t.rows.empty()) {
        std::fprintf(stderr, "%s returned no rows\n", f.name.c_str());
        std::abort();
    }
    // A message is a scalar single text cell (a table may echo a user's text, so only the
    // message is checked).
    const bool message = t.scalar && t.rows.size() == 1 && t.rows[0].size() == 1 &&
                         t.rows[0][0].kind == OutCell::Kind::Text;
    if (message && t.rows[0][0].text.rfind(kInternalFault, 0) == 0) {
        std::fprintf(stderr, "%s: %s\n", f.name.c_str(), t.rows[0][0].text.c_str());
        std::abort();
    }
    return 0;
}
