// INDEXMIX, INDEXVOLATILITY, INDEXTREND, INDEXSNR, INDEXLEADLAG, INDEXTURNS, INDEXSEASONAL,
// INDEXCOMPARE: table entries and implementations (conversion and layout only; the
// statistics are in native/core, see docs/methods/analytics.md and
// docs/notes/addin-analytics.md for the mapping of arguments and options).
#include <climits>
#include <cmath>
#include <optional>

#include <fmt/format.h>

#include "diagnostics.hpp"
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

const FunctionSpec& self(const char* method) { return *findFunctionByMethod(method); }

int clampInt(long v) {
    if (v > INT_MAX) return INT_MAX;
    if (v < INT_MIN) return INT_MIN;
    return static_cast<int>(v);
}

// A whole-number argument (lag, maxlag); nullopt when omitted or empty.
std::optional<long> wholeArg(const Arg& a, const char* name) {
    const double x = numberArg(a, name, NAN);
    if (std::isnan(x)) return std::nullopt;
    if (!std::isfinite(x) || x != std::floor(x))
        throw InputError(fmt::format("{} must be a whole number, got {}", name, x));
    if (x > static_cast<double>(INT_MAX)) return INT_MAX;
    if (x < static_cast<double>(INT_MIN)) return INT_MIN;
    return static_cast<long>(x);
}

// An optional argument that was given with a value (not omitted, not an empty cell).
bool given(const Arg& a) {
    return a && !(a->rows * a->cols == 1 && a->at(0, 0).isEmpty());
}

// An integer option >= minimum; `absent` when the key is not given or left empty.
int optionalInteger(const OptionBag& opts, const char* key, long minimum, int absent) {
    if (std::isnan(opts.number(key, NAN))) return absent;
    return clampInt(opts.integer(key, minimum, minimum));
}

// The `freq` option of the functions without a freq argument.
Frequency frequencyOption(const OptionBag& opts) {
    const std::string t = opts.text("freq", "M");
    const auto f = parseFrequency(t);
    if (!f) throw InputError(fmt::format("option freq must be \"M\", \"Q\" or \"Y\", got \"{}\"", t));
    return *f;
}

// One index column below the header rows.
std::vector<double> indexColumn(const Arg& a, const char* name, std::size_t first) {
    const Range& r = required(a, name);
    checkAligned({{name, &r}});
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
OutTable mix(const std::vector<Arg>& a, const CallContext& ctx) {
    const OptionBag opts = OptionBag::parse(a[6], self("indexMix"));
    const Range& strata = required(a[2], "strata");
    MixInput in;
    in.sales = readSales(a[0], a[1], a[3], opts, ctx, {{"strata", &strata}});
    for (std::size_t c = 0; c < strata.cols; ++c)
        in.strata.push_back(keyColumn(strata, headerRows(opts), c));
    MixOptions o;
    readIndexOptions(o, a[4], a[5], opts, ctx);
    o.stat = opts.choice("stat", "median", {"median", "mean"}) == "mean" ? MixStatistic::Mean
                                                                         : MixStatistic::Median;
    const std::string w = opts.choice("weights", "sales", {"sales", "value", "all"});
    o.weights = w == "value" ? MixWeights::Value : w == "all" ? MixWeights::All : MixWeights::Sales;
    o.chain = opts.flag("chain", false);
    o.empty = opts.choice("empty", "reweight", {"reweight", "renormalise", "renormalize", "carry"}) ==
                      "carry"
                  ? EmptyStratumRule::Carry
                  : EmptyStratumRule::Reweight;
    o.bootstrap = opts.choice("bands", "none", {"none", "bootstrap"}) == "bootstrap";
    o.reps = clampInt(opts.integer("reps", 200, 1));
    o.seed = static_cast<unsigned long long>(opts.integer("seed", 1, 0));
    const MixResult r = indexMix(in, o);
    OutTable out = indexTableCells(r, opts, ctx);
    if (opts.flag("notes", false)) {
        // The mix's own counts go between the table and the shared diagnostics.
        OutTable extra;
        labelRow(extra, "strata", static_cast<double>(r.strata), 5);
        labelRow(extra, "strata weighted", static_cast<double>(r.strataWeighted), 5);
        labelRow(extra, "links", static_cast<double>(r.links), 5);
        labelRow(extra, "stratum-periods imputed", static_cast<double>(r.emptyCells), 5);
        labelRow(extra, "thin stratum-periods", static_cast<double>(r.thinCells), 5);
        labelRow(extra, "weights left out", static_cast<double>(r.unpricedAtReference), 5);
        const std::size_t at =
            static_cast<std::size_t>(r.table.axis.count) + (opts.flag("titles", false) ? 1 : 0);
        out.rows.insert(out.rows.begin() + static_cast<std::ptrdiff_t>(at), extra.rows.begin(),
                        extra.rows.end());
    }
    return out;
}

// ---- INDEXVOLATILITY --------------------------------------------------------------------
OutTable volatility(const std::vector<Arg>& a, const CallContext&) {
    const OptionBag opts = OptionBag::parse(a[2], self("indexVolatility"));
    const std::vector<double> index = indexColumn(a[0], "index", headerRows(opts));
    VolatilityOptions o;
    o.lag = clampInt(wholeArg(a[1], "lag").value_or(1));
    o.annual = opts.flag("annual", false);
    o.freq = frequencyOption(opts);
    const VolatilityResult r = indexVolatility(index, o);
    if (!opts.flag("notes", false)) return scalarResult(r.volatility);
    OutTable out;
    labelRow(out, "volatility", r.volatility, 2);
    labelRow(out, "changes used", static_cast<double>(r.changes), 2);
    appendNotes(out, r.diag, 2);
    return out;
}

// ---- INDEXTREND -------------------------------------------------------------------------
OutTable trend(const std::vector<Arg>& a, const CallContext&) {
    const std::vector<double> series = indexColumn(a[0], "index", 0);
    HpOptions o;
    o.freq = frequencyArg(a[1]);
    const double lambda = numberArg(a[2], "lambda", NAN);
    if (!std::isnan(lambda)) o.lambda = lambda;
    const HpResult r = hodrickPrescott(series, o);
    OutTable out;
    for (double x : r.trend) {
        out.addRow();
        out.num(x);
    }
    return out;
}

// ---- INDEXSNR ---------------------------------------------------------------------------
OutTable snr(const std::vector<Arg>& a, const CallContext&) {
    const OptionBag opts = OptionBag::parse(a[2], self("indexSnr"));
    const std::vector<double> index = indexColumn(a[0], "index", headerRows(opts));
    SnrOptions o;
    o.freq = frequencyArg(a[1]);
    const double lambda = opts.number("lambda", NAN);
    if (!std::isnan(lambda)) o.lambda = lambda;
    const bool detail = opts.choice("output", "ratio", {"ratio", "detail"}) == "detail";
    const bool notes = opts.flag("notes", false);
    const SnrResult r = indexSnr(index, o);
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
OutTable leadLag(const std::vector<Arg>& a, const CallContext&) {
    const OptionBag opts = OptionBag::parse(a[3], self("indexLeadLag"));
    const std::size_t first = headerRows(opts);
    LeadLagInput in{indexColumn(a[0], "a", first), indexColumn(a[1], "b", first)};
    LeadLagOptions o;
    o.freq = frequencyOption(opts);
    o.changeLag = clampInt(opts.integer("lag", periodsPerYear(o.freq), 1));
    if (const auto m = wholeArg(a[2], "maxlag")) {
        if (*m < 0) throw InputError(fmt::format("maxlag must be 0 or more, got {}", *m));
        o.maxLag = clampInt(*m);
    }
    o.minPairs = static_cast<std::size_t>(opts.integer("minpairs", 3, 3));
    const LeadLagResult r = indexLeadLag(in, o);
    OutTable out;
    titleRow(out, opts, {"lag", "correlation", "pairs"});
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
    if (opts.flag("notes", false)) appendNotes(out, r.diag, 3);
    return out;
}

// ---- INDEXTURNS -------------------------------------------------------------------------
OutTable turns(const std::vector<Arg>& a, const CallContext& ctx) {
    const OptionBag opts = OptionBag::parse(a[3], self("indexTurns"));
    const std::size_t first = headerRows(opts);
    const Range& periods = required(a[0], "periods");
    const Range& index = required(a[1], "index");
    checkAligned({{"periods", &periods}, {"index", &index}});
    if (periods.rows <= first) throw InputError("periods holds no rows below the header");
    const TurnsInput in{dateColumn(periods, first, ctx), numberColumn(index, first)};
    TurnsOptions o;
    if (given(a[2])) o.freq = frequencyArg(a[2]);
    o.window = optionalInteger(opts, "window", 1, -1);
    o.minPhase = optionalInteger(opts, "minphase", 1, -1);
    o.minCycle = optionalInteger(opts, "mincycle", 1, -1);
    o.ends = optionalInteger(opts, "ends", 0, -1);
    const TurnsResult r = indexTurns(in, o);
    OutTable out;
    titleRow(out, opts, {"period", "turn", "index", "months since previous"});
    for (const auto& row : r.rows) {
        out.addRow();
        out.num(row.periodStart - ctx.dateOffset);
        out.text(row.peak ? "peak" : "trough");
        out.num(row.value);
        out.num(row.monthsSincePrevious);
    }
    if (r.rows.empty()) {
        out.addRow();
        out.text("no turning point");
        for (int i = 1; i < 4; ++i) out.none();
    }
    if (opts.flag("notes", false)) {
        labelRow(out, "candidates", static_cast<double>(r.candidates), 4);
        labelRow(out, "removed: alternation", static_cast<double>(r.removedAlternation), 4);
        labelRow(out, "removed: ends", static_cast<double>(r.removedEnds), 4);
        labelRow(out, "removed: cycle shorter than mincycle", static_cast<double>(r.removedCycle), 4);
        labelRow(out, "removed: phase shorter than minphase", static_cast<double>(r.removedPhase), 4);
        labelRow(out, "window", r.window, 4);
        labelRow(out, "minphase", r.minPhase, 4);
        labelRow(out, "mincycle", r.minCycle, 4);
        labelRow(out, "ends", r.ends, 4);
        appendNotes(out, r.diag, 4);
    }
    return out;
}

// ---- INDEXSEASONAL ----------------------------------------------------------------------
OutTable seasonal(const std::vector<Arg>& a, const CallContext&) {
    const OptionBag opts = OptionBag::parse(a[2], self("indexSeasonal"));
    const std::vector<double> index = indexColumn(a[0], "index", headerRows(opts));
    const std::string what = opts.choice("output", "factors", {"factors", "adjusted", "table"});
    SeasonalOptions o;
    o.freq = frequencyArg(a[1]);
    const SeasonalResult r = seasonalFactors(index, o);
    OutTable out;
    if (opts.flag("titles", false)) {
        out.addRow();
        if (what == "table") {
            for (const char* s : {"factor", "adjusted", "moving average"}) out.text(s);
        } else {
            out.text(what == "adjusted" ? "adjusted" : "factor");
        }
    }
    for (std::size_t t = 0; t < r.factor.size(); ++t) {
        out.addRow();
        if (what == "table") {
            out.num(r.factor[t]);
            out.num(r.adjusted[t]);
            out.num(r.trend[t]);
        } else {
            out.num(what == "adjusted" ? r.adjusted[t] : r.factor[t]);
        }
    }
    if (opts.flag("notes", false)) appendNotes(out, r.diag, what == "table" ? 3 : 2);
    return out;
}

// ---- INDEXCOMPARE -----------------------------------------------------------------------
OutTable compare(const std::vector<Arg>& a, const CallContext&) {
    const OptionBag opts = OptionBag::parse(a[2], self("indexCompare"));
    const Range& indexes = required(a[0], "indexes");
    const std::size_t first = headerRows(opts);
    if (indexes.rows <= first) throw InputError("indexes holds no rows below the header");
    CompareInput in;
    for (std::size_t c = 0; c < indexes.cols; ++c) {
        in.columns.push_back(numberColumn(indexes, first, c));
        in.names.push_back(first ? cellKey(indexes.at(0, c)) : std::string());
    }
    CompareOptions o;
    o.freq = frequencyArg(a[1]);
    o.lag = clampInt(opts.integer("lag", 1, 1));
    o.annual = opts.flag("annual", false);
    const double lambda = opts.number("lambda", NAN);
    if (!std::isnan(lambda)) o.lambda = lambda;
    o.changeLag = optionalInteger(opts, "leadlag", 1, 0);
    o.maxLag = optionalInteger(opts, "maxlag", 0, -1);
    const CompareResult r = indexCompare(in, o);
    OutTable out;
    titleRow(out, opts, {"name", "volatility", "signal-to-noise", "largest change %",
                              "lag vs first", "correlation", "missing"});
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
    if (opts.flag("notes", false)) appendNotes(out, r.diag, 7);
    return out;
}

}  // namespace

std::vector<FunctionSpec> analyticsFunctions() {
    const ArgSpec indexArg{"index", ArgKind::Column,
                           "An index column: one value per period, periods in order; a blank or "
                           "text cell is a period without a value."};
    ArgSpec freqLambda = spec::freq();
    freqLambda.description += " Sets the default lambda.";
    const OptionSpec header = spec::header(), titles = spec::titles(), notes = spec::notes();
    const OptionSpec freqOption{"freq", "M",
                                "Frequency of the index: \"M\" month, \"Q\" quarter, \"Y\" year."};

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
         spec::include(), spec::freq(), spec::base(), spec::options()},
        {{"stat", "median", "Statistic of each stratum and period: median or mean."},
         {"weights", "sales",
          "Stratum weights: sales = the reference period's sales counts; value = its sales values "
          "(sum of prices); all = sales counts over the whole sample. With chain=1: the previous "
          "year's counts or values."},
         {"chain", "0",
          "1 to re-weight every calendar year with the previous year's weights, chain-linked at "
          "the last period of the previous year (December or Q4)."},
         {"empty", "reweight",
          "A weighted stratum without a price in a period: reweight = leave it out and "
          "re-normalise the weights over the strata priced; carry = carry its last relative "
          "forward."},
         {"minsales", "1",
          "Fewest sales for a stratum to have a price in a period (per stratum and period); "
          "fewer: the stratum counts as without a price there."},
         {"bands", "none",
          "none: lower and upper stay empty; bootstrap: a stratified percentile bootstrap band "
          "of the change from the base period."},
         {"reps", "200", "Bootstrap replicates, 20 to 10000 (with bands=bootstrap)."},
         {"seed", "1", "Bootstrap random seed (a whole number >= 0); the same seed gives the same band."},
         {"level", "0.95", "Level of the bootstrap band, between 0 and 1."},
         header, titles, notes},
        std::string(spec::kIndexOutput) +
            " Sales used: the sales of the strata priced and weighted in that period. Bands: "
            "empty unless bands=bootstrap (a stratified bootstrap of the change from the base "
            "period; the base row is 100 | 100). With notes=1 the counts of strata, weighted "
            "strata, links, imputed and thin stratum-periods and weights left out come before "
            "the diagnostics.",
        "=INDEXMIX(A2:A5001;B2:B5001;C2:D5001;;\"Q\";;\"chain=1\")",
        mix};

    FunctionSpec volatilitySpec{
        "indexVolatility",
        "INDEXVOLATILITY",
        "Volatility of an index: the standard deviation of its lag-period log changes "
        "100 ln(I(t)/I(t-lag)), in log points. Lower = smoother.",
        {indexArg,
         {"lag", ArgKind::Optional,
          "Periods spanned by each change, a whole number >= 1; default 1 (12 on a monthly index "
          "= year-over-year changes)."},
         spec::options()},
        {{"annual", "0",
          "1 to scale to one year: sd * sqrt(periods per year / lag) (square-root-of-time rule)."},
         freqOption, header, notes},
        "One number: the sample standard deviation (n - 1) of the changes where both ends have "
        "a value, in log points. With notes=1 a two-column table: volatility, changes used, "
        "then the diagnostics.",
        "=INDEXVOLATILITY(G2:G121;1;\"annual=1\")",
        volatility};

    FunctionSpec trendSpec{
        "indexTrend",
        "INDEXTREND",
        "Hodrick-Prescott trend of an index (or any) series: the smooth path that balances "
        "closeness to the values against changes in its slope. Bridges gaps; no extrapolation "
        "beyond the first and last value.",
        {{"index", ArgKind::Column,
          "An index (or any) series, one column, one value per period; a blank or text cell is a "
          "period without a value."},
         freqLambda,
         {"lambda", ArgKind::Optional,
          "Smoothing weight > 0; default 129600 monthly, 1600 quarterly, 6.25 yearly (Ravn & "
          "Uhlig 2002). Larger = smoother."}},
        {},
        "A column aligned with index: the trend of each row, on the values themselves (not "
        "their logs). Rows before the first and after the last value are blank; rows inside "
        "gaps get the bridging trend.",
        "=INDEXTREND(G2:G121;\"M\")",
        trend};

    FunctionSpec snrSpec{
        "indexSnr",
        "INDEXSNR",
        "Signal-to-noise ratio: power of the HP trend's period changes over power of the "
        "remaining noise's period changes, on the log index. Higher = smoother; above 1, a "
        "reported period change is mostly real movement.",
        {indexArg, freqLambda, spec::options()},
        {{"lambda", "by freq",
          "HP smoothing of the signal/noise split; default 215.32 monthly, 2.914 quarterly, "
          "0.0625 yearly (half gain at a two-year cycle: slower moves are signal, faster noise)."},
         {"output", "ratio",
          "ratio: one number; detail: label | value rows of the ratio, signal and noise (root "
          "mean square period changes, log points), pairs and lambda."},
         header, notes},
        "One number, the ratio (blank when the index has no noise at all). output=detail or "
        "notes=1: a two-column table of labels and values.",
        "=INDEXSNR(G2:G121;\"M\")",
        snr};

    FunctionSpec leadLagSpec{
        "indexLeadLag",
        "INDEXLEADLAG",
        "Lead-lag of two indexes: the correlation of their changes (default year-over-year) at "
        "lags -maxlag .. maxlag. A positive lag k means a leads b by k periods: b's changes "
        "follow a's k periods later, corr(a(t), b(t+k)). Negative: b leads a.",
        {{"a", ArgKind::Column, "The first index column (the one tested as leading for a positive lag)."},
         {"b", ArgKind::Column, "The second index column, on the same periods (same rows) as a."},
         {"maxlag", ArgKind::Optional,
          "Largest lead or lag tried, a whole number >= 0; default one year of periods (12 "
          "monthly, 4 quarterly, 2 yearly), at most the rows - 1."},
         spec::options()},
        {{"lag", "one year",
          "Periods spanned by each change: default 12 monthly, 4 quarterly, 1 yearly "
          "(year-over-year)."},
         freqOption,
         {"minpairs", "3", "Fewest pairs of changes for a lag to get a correlation (>= 3)."},
         header, titles, notes},
        "Three columns: lag | correlation | pairs, one row per lag from -maxlag to maxlag, then "
        "a row best lag | lag | correlation (the most positive correlation; ties: the smaller "
        "|lag|). Positive lag k means a leads b by k periods: b's changes follow a's k periods "
        "later (corr(a_t, b_{t+k})).",
        "=INDEXLEADLAG(G2:G121;M2:M121;12)",
        leadLag};

    FunctionSpec turnsSpec{
        "indexTurns",
        "INDEXTURNS",
        "Dated peaks and troughs of an index, by the business-cycle dating rules (Bry & Boschan "
        "1971 monthly, Harding & Pagan 2002 quarterly): local extremes that alternate, with "
        "minimum phase and cycle lengths and none too close to the ends.",
        {{"periods", ArgKind::Column,
          "Period start dates of the index, one column, as the index functions write them."},
         {"index", ArgKind::Column, "The index values, one column aligned with periods."},
         {"freq", ArgKind::Optional,
          "Period length: \"M\", \"Q\" or \"Y\". Empty: inferred from the period dates."},
         spec::options()},
        {{"window", "5 M, 2 Q, 1 Y", "A turn is the highest (lowest) value within this many periods on each side."},
         {"minphase", "5 M, 2 Q, 1 Y", "Shortest peak-to-trough or trough-to-peak phase, in periods."},
         {"mincycle", "15 M, 5 Q, 2 Y", "Shortest peak-to-peak or trough-to-trough cycle, in periods."},
         {"ends", "6 M, 2 Q, 1 Y", "No turn closer than this many periods to the first or last value."},
         header, titles, notes},
        "Four columns, one row per turn: period start date | peak or trough | index value | "
        "months since the previous turn (blank for the first). No turn: one row \"no turning "
        "point\". With notes=1: candidates, turns removed by each rule, the rules used, then "
        "the diagnostics.",
        "=INDEXTURNS(F2:F121;G2:G121)",
        turns};

    FunctionSpec seasonalSpec{
        "indexSeasonal",
        "INDEXSEASONAL",
        "Seasonal factors of a monthly or quarterly index by the classical multiplicative "
        "decomposition (ratio to a centred moving average), and the seasonally adjusted index.",
        {{"index", ArgKind::Column,
          "A monthly or quarterly index column with at least 2 years of rows; a blank or text "
          "cell is a period without a value."},
         {"freq", ArgKind::Optional, "Period length of the index: \"M\" month (default) or \"Q\" quarter."},
         spec::options()},
        {{"output", "factors",
          "factors: the seasonal factor of each row; adjusted: index / factor; table: three "
          "columns factor | adjusted | moving average."},
         header, titles, notes},
        "A column aligned with the index rows (output=table: three columns). Factors are by "
        "position in the year counted from the first row and average 1; rows without a value "
        "have no adjusted value; the moving average is blank for the first and last half year.",
        "=INDEXSEASONAL(G2:G121;\"M\";\"output=adjusted\")",
        seasonal};

    FunctionSpec compareSpec{
        "indexCompare",
        "INDEXCOMPARE",
        "Compares index columns on the same periods, one row each: volatility, signal-to-noise "
        "ratio, largest period change, lead-lag against the first column (positive lag = this "
        "column leads the first), and periods without a value.",
        {{"indexes", ArgKind::Column,
          "Index columns on the same periods; with header=1 the first row holds their names."},
         spec::freq(), spec::options()},
        {{"lag", "1", "Periods spanned by each change of the volatility."},
         {"annual", "0", "1 to annualise the volatility."},
         {"lambda", "by freq", "HP lambda of the signal-to-noise ratio (default as INDEXSNR)."},
         {"leadlag", "one year", "Periods spanned by each change of the lead-lag (default year-over-year)."},
         {"maxlag", "one year", "Largest lead or lag tried against the first column, in periods."},
         header, titles, notes},
        "Seven columns, one row per index column: name | volatility (log points) | "
        "signal-to-noise | largest change % | lag vs first | correlation | missing. lag: positive "
        "= this column leads the first column by that many periods (the first column: 0 and 1). "
        "A figure a column cannot give is blank. titles=1 adds the titles row.",
        "=INDEXCOMPARE(F1:H121;\"M\";\"header=1; titles=1\")",
        compare};

    mixSpec.formats = spec::indexFormats();
    trendSpec.formats = {"0.0"};
    leadLagSpec.formats = {"0", "0.000", "0"};
    turnsSpec.formats = {"YYYY-MM-DD", "", "0.0", "0"};
    seasonalSpec.formats = {"0.0000"};
    compareSpec.formats = {"", "0.00", "0.000", "0.00", "0", "0.00", "0"};
    return {mixSpec, volatilitySpec, trendSpec, snrSpec, leadLagSpec, turnsSpec, seasonalSpec,
            compareSpec};
}

}  // namespace lintel::addin
