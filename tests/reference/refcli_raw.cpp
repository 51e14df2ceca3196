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
    const auto o = refcli::specOptions<lintel::RawIndexOptions>(median ? "INDEXMEDIAN" : "INDEXMEAN", a);
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
