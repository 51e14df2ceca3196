// INDEXMIX, INDEXVOLATILITY, INDEXTREND, INDEXSNR, INDEXLEADLAG, INDEXTURNS, INDEXSEASONAL,
// INDEXCOMPARE: table entries and implementations (conversion and layout only; the
// statistics are in native/core, see docs/methods/analytics.md; each argument's and option's
// binding to the Options structs is in the entries below).
#include <climits>
#include <cmath>
#include <optional>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "bind.hpp"
#include "function_table.hpp"
#include "hodrick_prescott.hpp"
#include "index_analytics.hpp"
#include "index_compare.hpp"
#include "inputs.hpp"
#include "lead_lag.hpp"
#include "mix_adjusted.hpp"
#include "seasonal.hpp"
#include "turning_points.hpp"

namespace lintel::addin {

namespace {

// One index column below the header rows.
std::vector<double> indexColumn(const Call& call, const char* name) {
    const Range& r = call.required(name);
    checkAligned({{name, &r}});
    const std::size_t first = call.headerRows();
    if (r.rows <= first) throw InputError(fmt::format("{} holds no rows below the header", name));
    return numberColumn(r, first);
}

OutTable scalarResult(double x) {
    OutTable out;
    out.scalar = true;
    out.addRow();
    out.num(x);
    return out;
}

// ---- INDEXMIX ---------------------------------------------------------------------------
OutTable mix(const Call& call) {
    const MixOptions o = call.options<MixOptions>();
    const Range& strata = call.required("strata");
    MixInput in;
    in.sales = readSales(call, {{"strata", &strata}});
    const LabelMode labels = call.options<ReadOptions>().labels;
    for (std::size_t c = 0; c < strata.cols; ++c)
        in.strata.push_back(labelColumn(strata, call.headerRows(), c, labels));
    const MixResult r = indexMix(in, o);
    OutTable out = indexTableCells(r, call);
    if (call.layout().notes) {
        // The mix's own counts go between the table and the shared diagnostics.
        const std::size_t w = call.spec().width();
        OutTable extra;
        labelRow(extra, "strata", static_cast<double>(r.strata), w);
        labelRow(extra, "strata weighted", static_cast<double>(r.strataWeighted), w);
        labelRow(extra, "links", static_cast<double>(r.links), w);
        labelRow(extra, "stratum-periods imputed", static_cast<double>(r.emptyCells), w);
        labelRow(extra, "thin stratum-periods", static_cast<double>(r.thinCells), w);
        labelRow(extra, "weights left out", static_cast<double>(r.unpricedAtReference), w);
        const std::size_t at =
            static_cast<std::size_t>(r.table.axis.count) + (call.layout().titles ? 1 : 0);
        out.rows.insert(out.rows.begin() + static_cast<std::ptrdiff_t>(at), extra.rows.begin(),
                        extra.rows.end());
    }
    return out;
}

// ---- INDEXVOLATILITY --------------------------------------------------------------------
OutTable volatility(const Call& call) {
    const VolatilityOptions o = call.options<VolatilityOptions>();
    const VolatilityResult r = indexVolatility(indexColumn(call, "index"), o);
    if (!call.layout().notes) return scalarResult(r.volatility);
    OutTable out;
    labelRow(out, "volatility", r.volatility, 2);
    labelRow(out, "changes used", static_cast<double>(r.changes), 2);
    appendNotes(out, r.diag, 2);
    return out;
}

// ---- INDEXTREND -------------------------------------------------------------------------
OutTable trend(const Call& call) {
    const HpOptions o = call.options<HpOptions>();
    const HpResult r = hodrickPrescott(indexColumn(call, "index"), o);
    OutTable out;
    for (double x : r.trend) {
        out.addRow();
        out.num(x);
    }
    return out;
}

// ---- INDEXSNR ---------------------------------------------------------------------------
struct SnrShow {
    bool detail = false;  // output: "ratio" (default) or "detail"
};

OutTable snr(const Call& call) {
    const SnrOptions o = call.options<SnrOptions>();
    const bool detail = call.options<SnrShow>().detail;
    const bool notes = call.layout().notes;
    const SnrResult r = indexSnr(indexColumn(call, "index"), o);
    if (!detail && !notes) return scalarResult(r.snr);
    OutTable out;
    labelRow(out, "signal-to-noise", r.snr, 2);
    if (detail) {
        labelRow(out, "signal (rms trend change)", r.signal, 2);
        labelRow(out, "noise (rms noise change)", r.noise, 2);
        labelRow(out, "pairs", static_cast<double>(r.pairs), 2);
        labelRow(out, "lambda", r.lambda, 2);
    }
    if (notes) appendNotes(out, r.diag, 2);
    return out;
}

// ---- INDEXLEADLAG -----------------------------------------------------------------------
OutTable leadLag(const Call& call) {
    const LeadLagOptions o = call.options<LeadLagOptions>();
    const LeadLagInput in{indexColumn(call, "a"), indexColumn(call, "b")};
    const LeadLagResult r = indexLeadLag(in, o);
    OutTable out;
    titleRow(out, call);
    for (const auto& row : r.rows) {
        out.addRow();
        out.num(row.lag);
        out.num(row.corr);
        out.num(static_cast<double>(row.pairs));
    }
    out.addRow();
    out.text("best lag");
    out.num(r.bestLag);
    out.num(r.bestCorr);
    if (call.layout().notes) appendNotes(out, r.diag, call.spec().width());
    return out;
}

// ---- INDEXTURNS -------------------------------------------------------------------------
OutTable turns(const Call& call) {
    const TurnsOptions o = call.options<TurnsOptions>();
    const std::size_t first = call.headerRows();
    const Range& periods = call.required("periods");
    const Range& index = call.required("index");
    checkAligned({{"periods", &periods}, {"index", &index}});
    if (periods.rows <= first) throw InputError("periods holds no rows below the header");
    const TurnsInput in{dateColumn(periods, first, call.ctx()), numberColumn(index, first)};
    const TurnsResult r = indexTurns(in, o);
    const std::size_t w = call.spec().width();
    OutTable out;
    titleRow(out, call);
    for (const auto& row : r.rows) {
        out.addRow();
        out.num(row.periodStart - call.ctx().dateOffset);
        out.text(row.peak ? "peak" : "trough");
        out.num(row.value);
        out.num(row.monthsSincePrevious);
    }
    if (r.rows.empty()) {
        out.addRow();
        out.text("no turning point");
        for (std::size_t i = 1; i < w; ++i) out.none();
    }
    if (call.layout().notes) {
        labelRow(out, "candidates", static_cast<double>(r.candidates), w);
        labelRow(out, "removed: alternation", static_cast<double>(r.removedAlternation), w);
        labelRow(out, "removed: ends", static_cast<double>(r.removedEnds), w);
        labelRow(out, "removed: cycle shorter than mincycle", static_cast<double>(r.removedCycle), w);
        labelRow(out, "removed: phase shorter than minphase", static_cast<double>(r.removedPhase), w);
        labelRow(out, "window", r.window, w);
        labelRow(out, "minphase", r.minPhase, w);
        labelRow(out, "mincycle", r.minCycle, w);
        labelRow(out, "ends", r.ends, w);
        appendNotes(out, r.diag, w);
    }
    return out;
}

// ---- INDEXSEASONAL ----------------------------------------------------------------------
enum class SeasonalOutput { Factors, Adjusted, Table };
struct SeasonalShow {
    SeasonalOutput output = SeasonalOutput::Factors;  // output: factors (default), adjusted, table
};

OutTable seasonal(const Call& call) {
    const SeasonalOptions o = call.options<SeasonalOptions>();
    const SeasonalOutput what = call.options<SeasonalShow>().output;
    const SeasonalResult r = seasonalFactors(indexColumn(call, "index"), o);
    OutTable out;
    if (what == SeasonalOutput::Table) {
        titleRow(out, call);
    } else {
        titleRow(out, call, {what == SeasonalOutput::Adjusted ? "adjusted" : "factor"});
    }
    for (std::size_t t = 0; t < r.factor.size(); ++t) {
        out.addRow();
        if (what == SeasonalOutput::Table) {
            out.num(r.factor[t]);
            out.num(r.adjusted[t]);
            out.num(r.trend[t]);
        } else {
            out.num(what == SeasonalOutput::Adjusted ? r.adjusted[t] : r.factor[t]);
        }
    }
    if (call.layout().notes) appendNotes(out, r.diag, what == SeasonalOutput::Table ? 3 : 2);
    return out;
}

// ---- INDEXCOMPARE -----------------------------------------------------------------------
OutTable compare(const Call& call) {
    const CompareOptions o = call.options<CompareOptions>();
    const Range& indexes = call.required("indexes");
    const std::size_t first = call.headerRows();
    if (indexes.rows <= first) throw InputError("indexes holds no rows below the header");
    CompareInput in;
    for (std::size_t c = 0; c < indexes.cols; ++c) {
        in.columns.push_back(numberColumn(indexes, first, c));
        in.names.push_back(first ? cellKey(indexes.at(0, c)) : std::string());
    }
    const CompareResult r = indexCompare(in, o);
    OutTable out;
    titleRow(out, call);
    for (const auto& row : r.rows) {
        out.addRow();
        out.text(row.name);
        out.num(row.volatility);
        out.num(row.snr);
        out.num(row.maxAbsChange);
        out.num(row.lag);
        out.num(row.corr);
        out.num(static_cast<double>(row.missing));
    }
    if (call.layout().notes) appendNotes(out, r.diag, call.spec().width());
    return out;
}

std::string positive(double x) { return x > 0 ? std::string() : std::string("must be greater than 0"); }

}  // namespace

std::vector<FunctionSpec> analyticsFunctions() {
    const ArgSpec indexArg{"index", ArgKind::Column,
                           "An index column: one value per period, periods in order; a blank or "
                           "text cell is a period without a value."};
    const OptionSpec header = spec::header(), titles = spec::titles(), notes = spec::notes();
    const std::string freqOptionText =
        "Frequency of the index: \"M\" month, \"Q\" quarter, \"Y\" year.";

    using MO = MixOptions;
    FunctionSpec mixSpec{
        "indexMix",
        "INDEXMIX",
        "Mix-adjusted (stratified) index: each stratum's median (or mean) price relative to the "
        "reference period, averaged with fixed stratum weights, so a change in the mix of homes "
        "sold does not move the index. Base period = 100.",
        {spec::dates(), spec::prices(),
         {"strata", ArgKind::Column,
          "The strata of each sale, one column per stratifying variable (region, type, size band "
          "...); a stratum is each combination of their values. Rows aligned with dates; a blank "
          "cell drops the row."},
         spec::include(), spec::freq<MO>(), spec::base<MO>(), spec::options()},
        {option("stat",
                choice<MO>(&MO::stat, std::vector<std::pair<std::string, MixStatistic>>{
                                          {"median", MixStatistic::Median},
                                          {"mean", MixStatistic::Mean}}),
                "Statistic of each stratum and period: median or mean."),
         option("weights",
                choice<MO>(&MO::weights, std::vector<std::pair<std::string, MixWeights>>{
                                             {"sales", MixWeights::Sales},
                                             {"value", MixWeights::Value},
                                             {"all", MixWeights::All}}),
                "Stratum weights: sales = the reference period's sales counts; value = its sales "
                "values (sum of prices); all = sales counts over the whole sample. With chain=1: "
                "the previous year's counts or values."),
         option("chain", flag<MO>(&MO::chain),
                "1 to re-weight every calendar year with the previous year's weights, "
                "chain-linked at the last period of the previous year (December or Q4)."),
         option("empty",
                choice<MO>(&MO::empty, std::vector<std::pair<std::string, EmptyStratumRule>>{
                                           {"reweight", EmptyStratumRule::Reweight},
                                           {"renormalise", EmptyStratumRule::Reweight},
                                           {"renormalize", EmptyStratumRule::Reweight},
                                           {"carry", EmptyStratumRule::Carry}}),
                "A weighted stratum without a price in a period: reweight = leave it out and "
                "re-normalise the weights over the strata priced; carry = carry its last "
                "relative forward."),
         spec::minsales<MO>(
             "Fewest sales for a stratum to have a price in a period (per stratum and period); "
             "fewer: the stratum counts as without a price there."),
         option("bands",
                choice<MO>(&MO::bootstrap, std::vector<std::pair<std::string, bool>>{
                                               {"none", false}, {"bootstrap", true}}),
                "none: lower and upper stay empty; bootstrap: a stratified percentile bootstrap "
                "band of the change from the base period."),
         option("reps", whole<MO>(&MO::reps, 1),
                "Bootstrap replicates, 20 to 10000 (with bands=bootstrap)."),
         option("seed", whole<MO>(&MO::seed, 0),
                "Bootstrap random seed (a whole number >= 0); the same seed gives the same band."),
         spec::level<MO>("Level of the bootstrap band, between 0 and 1."), spec::dateorder(),
         spec::labels("the strata"), header, titles, notes},
        spec::indexColumns(),
        spec::indexOutput() +
            " Sales used: the sales of the strata priced and weighted in that period. Bands: "
            "empty unless bands=bootstrap (a stratified bootstrap of the change from the base "
            "period; the base row is 100 | 100). With notes=1 the counts of strata, weighted "
            "strata, links, imputed and thin stratum-periods and weights left out come before "
            "the diagnostics.",
        "=INDEXMIX(A2:A5001;B2:B5001;C2:D5001;;\"Q\";;\"chain=1\")",
        mix};

    using VO = VolatilityOptions;
    FunctionSpec volatilitySpec{
        "indexVolatility",
        "INDEXVOLATILITY",
        "Volatility of an index: the standard deviation of its lag-period log changes "
        "100 ln(I(t)/I(t-lag)), in log points. Lower = smoother.",
        {indexArg,
         param("lag", whole<VO>(&VO::lag, 1),
               "Periods spanned by each change, a whole number >= 1; default 1 (12 on a monthly "
               "index = year-over-year changes)."),
         spec::options()},
        {option("annual", flag<VO>(&VO::annual),
                "1 to scale to one year: sd * sqrt(periods per year / lag) (square-root-of-time "
                "rule)."),
         option("freq", frequency<VO>(&VO::freq), freqOptionText), header, notes},
        {{"volatility", "0.00"}},
        "One number: the sample standard deviation (n - 1) of the changes where both ends have "
        "a value, in log points. With notes=1 a two-column table: volatility, changes used, "
        "then the diagnostics.",
        "=INDEXVOLATILITY(G2:G121;1;\"annual=1\")",
        volatility};

    using HO = HpOptions;
    FunctionSpec trendSpec{
        "indexTrend",
        "INDEXTREND",
        "Hodrick-Prescott trend of an index (or any) series: the smooth path that balances "
        "closeness to the values against changes in its slope. Bridges gaps; no extrapolation "
        "beyond the first and last value.",
        {{"index", ArgKind::Column,
          "An index (or any) series, one column, one value per period; a blank or text cell is a "
          "period without a value."},
         spec::freq<HO>(" Sets the default lambda."),
         param("lambda", number<HO>(&HO::lambda, &positive).withDefault("by freq"),
               "Smoothing weight > 0; default 129600 monthly, 1600 quarterly, 6.25 yearly (Ravn "
               "& Uhlig 2002). Larger = smoother.")},
        {},
        {{"trend", "0.0"}},
        "A column aligned with index: the trend of each row, on the values themselves (not "
        "their logs). Rows before the first and after the last value are blank; rows inside "
        "gaps get the bridging trend.",
        "=INDEXTREND(G2:G121;\"M\")",
        trend};

    using SO = SnrOptions;
    FunctionSpec snrSpec{
        "indexSnr",
        "INDEXSNR",
        "Signal-to-noise ratio: power of the HP trend's period changes over power of the "
        "remaining noise's period changes, on the log index. Higher = smoother; above 1, a "
        "reported period change is mostly real movement.",
        {indexArg, spec::freq<SO>(" Sets the default lambda."), spec::options()},
        {option("lambda", number<SO>(&SO::lambda, &positive).withDefault("by freq"),
                "HP smoothing of the signal/noise split; default 215.32 monthly, 2.914 "
                "quarterly, 0.0625 yearly (half gain at a two-year cycle: slower moves are "
                "signal, faster noise)."),
         option("output",
                choice<SnrShow>(&SnrShow::detail, std::vector<std::pair<std::string, bool>>{
                                                      {"ratio", false}, {"detail", true}}),
                "ratio: one number; detail: label | value rows of the ratio, signal and noise "
                "(root mean square period changes, log points), pairs and lambda."),
         header, notes},
        {{"signal-to-noise", "0.000"}},
        "One number, the ratio (blank when the index has no noise at all). output=detail or "
        "notes=1: a two-column table of labels and values.",
        "=INDEXSNR(G2:G121;\"M\")",
        snr};

    using LO = LeadLagOptions;
    FunctionSpec leadLagSpec{
        "indexLeadLag",
        "INDEXLEADLAG",
        "Lead-lag of two indexes: the correlation of their changes (default year-over-year) at "
        "lags -maxlag .. maxlag. A positive lag k means a leads b by k periods: b's changes "
        "follow a's k periods later, corr(a(t), b(t+k)). Negative: b leads a.",
        {{"a", ArgKind::Column, "The first index column (the one tested as leading for a positive lag)."},
         {"b", ArgKind::Column, "The second index column, on the same periods (same rows) as a."},
         param("maxlag", whole<LO>(&LO::maxLag, 0).withDefault("one year"),
               "Largest lead or lag tried, a whole number >= 0; default one year of periods (12 "
               "monthly, 4 quarterly, 2 yearly), at most the rows - 1."),
         spec::options()},
        {option("lag", whole<LO>(&LO::changeLag, 1).withDefault("one year"),
                "Periods spanned by each change: default 12 monthly, 4 quarterly, 1 yearly "
                "(year-over-year)."),
         option("freq", frequency<LO>(&LO::freq), freqOptionText),
         option("minpairs", whole<LO>(&LO::minPairs, 3),
                "Fewest pairs of changes for a lag to get a correlation (>= 3)."),
         header, titles, notes},
        {{"lag", "0"}, {"correlation", "0.000"}, {"pairs", "0"}},
        "Three columns: lag | correlation | pairs, one row per lag from -maxlag to maxlag, then "
        "a row best lag | lag | correlation (the most positive correlation; ties: the smaller "
        "|lag|). Positive lag k means a leads b by k periods: b's changes follow a's k periods "
        "later (corr(a_t, b_{t+k})).",
        "=INDEXLEADLAG(G2:G121;M2:M121;12)",
        leadLag};

    using TO = TurnsOptions;
    ArgSpec turnsFreq = param("freq", frequency<TO>(&TO::freq).withDefault("from the period dates"),
                              "Period length: \"M\", \"Q\" or \"Y\". Empty: inferred from the "
                              "period dates.");
    FunctionSpec turnsSpec{
        "indexTurns",
        "INDEXTURNS",
        "Dated peaks and troughs of an index, by the business-cycle dating rules (Bry & Boschan "
        "1971 monthly, Harding & Pagan 2002 quarterly): local extremes that alternate, with "
        "minimum phase and cycle lengths and none too close to the ends.",
        {{"periods", ArgKind::Column,
          "Period start dates of the index, one column, as the index functions write them."},
         {"index", ArgKind::Column, "The index values, one column aligned with periods."},
         turnsFreq, spec::options()},
        {option("window", whole<TO>(&TO::window, 1).withDefault("5 M, 2 Q, 1 Y"),
                "A turn is the highest (lowest) value within this many periods on each side."),
         option("minphase", whole<TO>(&TO::minPhase, 1).withDefault("5 M, 2 Q, 1 Y"),
                "Shortest peak-to-trough or trough-to-peak phase, in periods."),
         option("mincycle", whole<TO>(&TO::minCycle, 1).withDefault("15 M, 5 Q, 2 Y"),
                "Shortest peak-to-peak or trough-to-trough cycle, in periods."),
         option("ends", whole<TO>(&TO::ends, 0).withDefault("6 M, 2 Q, 1 Y"),
                "No turn closer than this many periods to the first or last value."),
         header, titles, notes},
        {{"period", "YYYY-MM-DD"}, {"turn", ""}, {"index", "0.0"}, {"months since previous", "0"}},
        "Four columns, one row per turn: period start date | peak or trough | index value | "
        "months since the previous turn (blank for the first). No turn: one row \"no turning "
        "point\". With notes=1: candidates, turns removed by each rule, the rules used, then "
        "the diagnostics.",
        "=INDEXTURNS(F2:F121;G2:G121)",
        turns};

    using SeO = SeasonalOptions;
    ArgSpec seasonalFreq = spec::freq<SeO>();
    seasonalFreq.description = "Period length of the index: \"M\" month (default) or \"Q\" quarter.";
    FunctionSpec seasonalSpec{
        "indexSeasonal",
        "INDEXSEASONAL",
        "Seasonal factors of a monthly or quarterly index by the classical multiplicative "
        "decomposition (ratio to a centred moving average), and the seasonally adjusted index.",
        {{"index", ArgKind::Column,
          "A monthly or quarterly index column with at least 2 years of rows; a blank or text "
          "cell is a period without a value."},
         seasonalFreq, spec::options()},
        {option("output",
                choice<SeasonalShow>(&SeasonalShow::output,
                                     std::vector<std::pair<std::string, SeasonalOutput>>{
                                         {"factors", SeasonalOutput::Factors},
                                         {"adjusted", SeasonalOutput::Adjusted},
                                         {"table", SeasonalOutput::Table}}),
                "factors: the seasonal factor of each row; adjusted: index / factor; table: three "
                "columns factor | adjusted | moving average."),
         header, titles, notes},
        {{"factor", "0.0000"}, {"adjusted", "0.0"}, {"moving average", "0.0"}},
        "A column aligned with the index rows (output=table: three columns). Factors are by "
        "position in the year counted from the first row and average 1; rows without a value "
        "have no adjusted value; the moving average is blank for the first and last half year.",
        "=INDEXSEASONAL(G2:G121;\"M\";\"output=adjusted\")",
        seasonal};

    using CO = CompareOptions;
    FunctionSpec compareSpec{
        "indexCompare",
        "INDEXCOMPARE",
        "Compares index columns on the same periods, one row each: volatility, signal-to-noise "
        "ratio, largest period change, lead-lag against the first column (positive lag = this "
        "column leads the first), and periods without a value.",
        {{"indexes", ArgKind::Column,
          "Index columns on the same periods; with header=1 the first row holds their names."},
         spec::freq<CO>(), spec::options()},
        {option("lag", whole<CO>(&CO::lag, 1), "Periods spanned by each change of the volatility."),
         option("annual", flag<CO>(&CO::annual), "1 to annualise the volatility."),
         option("lambda", number<CO>(&CO::lambda, &positive).withDefault("by freq"),
                "HP lambda of the signal-to-noise ratio (default as INDEXSNR)."),
         option("leadlag", whole<CO>(&CO::changeLag, 1).withDefault("one year"),
                "Periods spanned by each change of the lead-lag (default year-over-year)."),
         option("maxlag", whole<CO>(&CO::maxLag, 0).withDefault("one year"),
                "Largest lead or lag tried against the first column, in periods."),
         header, titles, notes},
        {{"name", ""}, {"volatility", "0.00"}, {"signal-to-noise", "0.000"},
         {"largest change %", "0.00"}, {"lag vs first", "0"}, {"correlation", "0.00"},
         {"missing", "0"}},
        "Seven columns, one row per index column: name | volatility (log points) | "
        "signal-to-noise | largest change % | lag vs first | correlation | missing. lag: positive "
        "= this column leads the first column by that many periods (the first column: 0 and 1). "
        "A figure a column cannot give is blank. titles=1 adds the titles row.",
        "=INDEXCOMPARE(F1:H121;\"M\";\"header=1; titles=1\")",
        compare};

    return {mixSpec, volatilitySpec, trendSpec, snrSpec, leadLagSpec, turnsSpec, seasonalSpec,
            compareSpec};
}

}  // namespace lintel::addin
