// refcli commands for the analytics area (mix-adjusted index and index-series measures).
//   mix        <date, price[, include], strata columns> strata=a|b stat=median weights=sales
//              chain=0 empty=reweight minsales=1 freq=M base=<serial>
//              bands=none|bootstrap reps=200 seed=1 level=0.95
//              -> period, index, sales, lower, upper
//   hp         <y> freq=Q lambda=<default>              -> trend, cycle
//   volatility <index> lag=1 annual=0 freq=M             -> volatility, changes
//   snr        <index> freq=M lambda=<default>           -> snr, signal, noise, pairs
//   leadlag    <a, b> freq=M lag=0 maxlag=-1 minpairs=3  -> lag, corr, pairs, best (1 on the best row)
//   turns      <period, index> freq=<inferred> window minphase mincycle ends
//              -> period, peak (1 peak, 0 trough), value, months
//   seasonal   <index> freq=M                            -> factor, adjusted, trend
//   compare    <one column per index> freq=M lag=1 leadlag=0 maxlag=-1
//              -> volatility, snr, maxchange, lag, corr, missing (one row per column)
// Diagnostics go to stderr.
#include <cmath>
#include <cstdio>
#include <sstream>

#include "index_compare.hpp"
#include "hodrick_prescott.hpp"
#include "lead_lag.hpp"
#include "mix_adjusted.hpp"
#include "refcli.hpp"
#include "seasonal.hpp"
#include "turning_points.hpp"

namespace {

using namespace lintel;

void report(const Diagnostics& d) {
    std::fprintf(stderr, "%s\n", d.summary().c_str());
    for (const auto& w : d.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());
}

std::vector<std::string> splitBar(const std::string& s) {
    std::vector<std::string> out;
    std::stringstream in(s);
    std::string item;
    while (std::getline(in, item, '|'))
        if (!item.empty()) out.push_back(item);
    return out;
}

const refcli::Register regMix("mix", [](const refcli::Table& t, const refcli::Args& a) {
    MixInput in;
    in.sales.date = t.numbers("date");
    in.sales.price = t.numbers("price");
    if (t.find("include") >= 0)
        for (double x : t.numbers("include")) in.sales.include.push_back(x != 0 ? 1 : 0);
    for (const auto& name : splitBar(refcli::text(a, "strata", "stratum")))
        in.strata.push_back(t.text(name));
    refcli::Args spec = a;
    spec.erase("strata");  // the command's own key: which CSV columns are the strata
    const auto o = refcli::specOptions<MixOptions>("INDEXMIX", spec);
    const MixResult r = indexMix(in, o);
    report(r.diag);
    std::fprintf(stderr, "strata=%zu weighted=%zu links=%zu empty=%zu thin=%zu unpriced=%zu\n",
                 r.strata, r.strataWeighted, r.links, r.emptyCells, r.thinCells,
                 r.unpricedAtReference);
    return refcli::printIndexTable(r.table);
});

const refcli::Register regHp("hp", [](const refcli::Table& t, const refcli::Args& a) {
    refcli::Args spec = a;
    spec.emplace("freq", "Q");  // this command's default (statsmodels' macrodata is quarterly)
    const auto o = refcli::specOptions<HpOptions>("INDEXTREND", spec);
    const HpResult r = hodrickPrescott(t.numbers(t.find("y") >= 0 ? "y" : "index"), o);
    report(r.diag);
    refcli::printColumns({"trend", "cycle"}, {r.trend, r.cycle});
    return 0;
});

const refcli::Register regVol("volatility", [](const refcli::Table& t, const refcli::Args& a) {
    const auto o = refcli::specOptions<VolatilityOptions>("INDEXVOLATILITY", a);
    const VolatilityResult r = indexVolatility(t.numbers("index"), o);
    report(r.diag);
    refcli::printColumns({"volatility", "changes"}, {{r.volatility}, {double(r.changes)}});
    return 0;
});

const refcli::Register regSnr("snr", [](const refcli::Table& t, const refcli::Args& a) {
    const auto o = refcli::specOptions<SnrOptions>("INDEXSNR", a);
    const SnrResult r = indexSnr(t.numbers("index"), o);
    report(r.diag);
    refcli::printColumns({"snr", "signal", "noise", "pairs"},
                         {{r.snr}, {r.signal}, {r.noise}, {double(r.pairs)}});
    return 0;
});

const refcli::Register regLeadLag("leadlag", [](const refcli::Table& t, const refcli::Args& a) {
    const auto o = refcli::specOptions<LeadLagOptions>("INDEXLEADLAG", a);
    const LeadLagResult r = indexLeadLag({t.numbers("a"), t.numbers("b")}, o);
    report(r.diag);
    std::vector<double> lag, corr, pairs, best;
    for (const auto& row : r.rows) {
        lag.push_back(row.lag);
        corr.push_back(row.corr);
        pairs.push_back(double(row.pairs));
        best.push_back(row.lag == r.bestLag ? 1 : 0);
    }
    refcli::printColumns({"lag", "corr", "pairs", "best"}, {lag, corr, pairs, best});
    return 0;
});

const refcli::Register regTurns("turns", [](const refcli::Table& t, const refcli::Args& a) {
    const auto o = refcli::specOptions<TurnsOptions>("INDEXTURNS", a);
    const TurnsResult r = indexTurns({t.numbers("period"), t.numbers("index")}, o);
    report(r.diag);
    std::vector<double> period, peak, value, months;
    for (const auto& row : r.rows) {
        period.push_back(row.periodStart);
        peak.push_back(row.peak ? 1 : 0);
        value.push_back(row.value);
        months.push_back(row.monthsSincePrevious);
    }
    refcli::printColumns({"period", "peak", "value", "months"}, {period, peak, value, months});
    return 0;
});

const refcli::Register regSeasonal("seasonal", [](const refcli::Table& t, const refcli::Args& a) {
    const auto o = refcli::specOptions<SeasonalOptions>("INDEXSEASONAL", a);
    const SeasonalResult r = seasonalFactors(t.numbers("index"), o);
    report(r.diag);
    refcli::printColumns({"factor", "adjusted", "trend"}, {r.factor, r.adjusted, r.trend});
    return 0;
});

const refcli::Register regCompare("compare", [](const refcli::Table& t, const refcli::Args& a) {
    CompareInput in;
    for (const auto& name : t.names) {
        in.columns.push_back(t.numbers(name));
        in.names.push_back(name);
    }
    const auto o = refcli::specOptions<CompareOptions>("INDEXCOMPARE", a);
    const CompareResult r = indexCompare(in, o);
    report(r.diag);
    std::vector<double> vol, snr, maxch, lag, corr, missing;
    for (const auto& row : r.rows) {
        vol.push_back(row.volatility);
        snr.push_back(row.snr);
        maxch.push_back(row.maxAbsChange);
        lag.push_back(row.lag);
        corr.push_back(row.corr);
        missing.push_back(double(row.missing));
    }
    refcli::printColumns({"volatility", "snr", "maxchange", "lag", "corr", "missing"},
                         {vol, snr, maxch, lag, corr, missing});
    return 0;
});

}  // namespace
