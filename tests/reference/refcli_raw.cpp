// refcli commands for the raw mean / median indexes.
//   raw_mean|raw_median <csv with columns date, price[, include]> freq=M base=<serial>
//                        minsales=1 trim=0 level=0.95
#include <cmath>

#include "raw_index.hpp"
#include "refcli.hpp"

namespace {

int runRaw(const refcli::Table& t, const refcli::Args& a, bool median) {
    lintel::SalesInput in;
    in.date = t.numbers("date");
    in.price = t.numbers("price");
    if (t.find("include") >= 0)
        for (double x : t.numbers("include")) in.include.push_back(x != 0 ? 1 : 0);
    lintel::RawIndexOptions o;
    o.freq = *lintel::parseFrequency(refcli::text(a, "freq", "M"));
    const double base = refcli::number(a, "base", NAN);
    if (std::isfinite(base)) o.baseDate = base;
    o.minSales = static_cast<std::size_t>(refcli::number(a, "minsales", 1));
    o.trim = refcli::number(a, "trim", 0);
    o.level = refcli::number(a, "level", 0.95);
    const lintel::IndexResult r = median ? lintel::indexMedian(in, o) : lintel::indexMean(in, o);
    return refcli::printIndexTable(r.table);
}

const refcli::Register regMean("raw_mean", [](const auto& t, const auto& a) {
    return runRaw(t, a, false);
});
const refcli::Register regMedian("raw_median", [](const auto& t, const auto& a) {
    return runRaw(t, a, true);
});

}  // namespace
