// The smoothing path of INDEXHEDONIC and CHAINRS: period effects -> structural smoother ->
// index table, smoothed or in real time, alone or borrowing from the whole range. The method
// and its sources are in smoothed_index.hpp and docs/methods/smoothing.md.
#include "smoothed_index.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include <boost/math/distributions/normal.hpp>
#include <fmt/format.h>

#include "work_limits.hpp"

namespace lintel {

void IndexSmoothing::validateSmoothing(const IndexOptions& index) const {
    if (!smoothed()) {
        const char* what = seasonal ? "seasonal=1" : realtime ? "realtime=1" : borrow ? "borrow=1" : nullptr;
        if (what)
            throw InputError(fmt::format("{} works on a smoothed index: add smooth=level or "
                                         "smooth=trend", what));
        return;
    }
    if (seasonal && index.freq == Frequency::Year)
        throw InputError("seasonal needs monthly or quarterly periods (freq M or Q)");
}

namespace {

using Eigen::Index;

std::size_t at(int i) { return static_cast<std::size_t>(i); }

// Real time over more rows x periods than this is refused (work_limits.hpp says why).
constexpr double kMaxRowVintages = limits::kMaxRealtimeRowVintages;

SmootherOptions smootherOptions(const IndexSmoothing& s, Frequency freq) {
    SmootherOptions o;
    o.trend = s.smooth == SmoothKind::Level ? TrendKind::Level : TrendKind::Trend;
    o.seasonal = s.seasonal;
    o.freq = freq;
    return o;
}

// The effects of a series on positions 0 .. n-1 of `axis` (matched by period key).
PeriodEffects onAxis(const PeriodEffectSeries& s, const PeriodAxis& axis, int n) {
    const PeriodEffects& in = s.effects;
    PeriodEffects out;
    out.value.assign(at(n), kNoValue);
    out.variance.assign(at(n), 0.0);
    const Index k = in.loadings.cols();
    if (k > 0) {
        out.loadings = Eigen::MatrixXd::Zero(n, k);
        out.sharedCov = in.sharedCov;
    }
    for (int i = 0; i < s.axis.count; ++i) {
        if (!hasValue(in.value[at(i)])) continue;
        const long pos = s.axis.firstKey + i - axis.firstKey;
        if (pos < 0 || pos >= n)
            throw std::logic_error("smoothed index: a period effect outside the index's periods");
        out.value[at(static_cast<int>(pos))] = in.value[at(i)];
        out.variance[at(static_cast<int>(pos))] = in.variance[at(i)];
        if (k > 0) out.loadings.row(pos) = in.loadings.row(i);
    }
    return out;
}

int valuesIn(const PeriodEffects& e) {
    int n = 0;
    for (double v : e.value) n += hasValue(v) ? 1 : 0;
    return n;
}

// Counts of a series on the axis (0 outside its own periods).
std::vector<std::size_t> countsOnAxis(const PeriodEffectSeries& s, const PeriodAxis& axis) {
    std::vector<std::size_t> out(at(axis.count), 0);
    for (int i = 0; i < s.axis.count; ++i) {
        const long pos = s.axis.firstKey + i - axis.firstKey;
        if (pos >= 0 && pos < axis.count) out[at(static_cast<int>(pos))] = s.count[at(i)];
    }
    return out;
}

// One model run on positions 0 .. n-1 of the axis.
SmootherResult fit(const PeriodEffectSeries& segment, const PeriodEffectSeries* market,
                   const PeriodAxis& axis, int n, const SmootherOptions& o) {
    if (!market) return smoothPeriodEffects(onAxis(segment, axis, n), o);
    BorrowInput in;
    in.market = onAxis(*market, axis, n);
    in.segment = onAxis(segment, axis, n);
    return borrowStrength(in, o);
}

// Var(L_t - L_base) of one run for every t (D&K 2012, 4.7 for the covariance).
std::vector<double> varianceFrom(const SmootherResult& r, int base) {
    const std::vector<double> cov = r.levelCovarianceWith(base);
    std::vector<double> v(at(r.periods), kNoValue);
    for (int t = 0; t < r.periods; ++t)
        v[at(t)] = t == base ? 0.0
                             : std::max(0.0, r.levelVariance[at(t)] + r.levelVariance[at(base)] -
                                                 2 * cov[at(t)]);
    return v;
}

// Diffuse initial states plus variances: the fewest period effects that estimate the model.
int effectsNeeded(const IndexSmoothing& s, Frequency freq) {
    const int season = s.seasonal ? periodsPerYear(freq) : 0;
    const int trend = s.smooth == SmoothKind::Trend ? 1 : 0;
    const int states = 1 + trend + (season > 0 ? season - 1 : 0) + (s.borrow ? 1 : 0);
    const int variances = 1 + trend + (season > 0 ? 1 : 0) + (s.borrow ? 1 : 0);
    return states + variances;
}

void fillTable(SmoothedIndexResult& out, const PeriodAxis& axis, std::vector<std::size_t> counts,
               const std::vector<double>& level, const std::vector<double>& var, int base,
               double confidence) {
    const int T = axis.count;
    IndexTable& tb = out.table;
    tb.axis = axis;
    tb.count = std::move(counts);
    tb.basePosition = base;
    tb.index.assign(at(T), kNoValue);
    tb.lower.assign(at(T), kNoValue);
    tb.upper.assign(at(T), kNoValue);
    out.logIndex.assign(at(T), kNoValue);
    out.logSe.assign(at(T), kNoValue);
    const double z = boost::math::quantile(boost::math::normal_distribution<double>(),
                                           0.5 + 0.5 * confidence);
    for (int t = 0; t < T; ++t) {
        if (!hasValue(level[at(t)])) continue;
        const double d = level[at(t)] - level[at(base)];
        out.logIndex[at(t)] = d;
        tb.index[at(t)] = 100.0 * std::exp(d);
        if (!hasValue(var[at(t)])) continue;
        const double sd = std::sqrt(var[at(t)]);
        out.logSe[at(t)] = sd;
        tb.lower[at(t)] = 100.0 * std::exp(d - z * sd);
        tb.upper[at(t)] = 100.0 * std::exp(d + z * sd);
    }
}

// Rows used and dropped of the segment, the estimators' warnings (the whole range's marked),
// the smoother's warnings.
void collectDiagnostics(SmoothedIndexResult& out, const PeriodEffectSeries& segment,
                        const PeriodEffectSeries* market, const std::vector<std::string>& model) {
    out.diag = segment.diag;
    out.pairs = segment.pairs;
    if (market) {
        out.marketRowsUsed = market->diag.rowsUsed;
        for (const std::string& w : market->diag.warnings) out.diag.warn("whole range: " + w);
    }
    for (const std::string& w : model) out.diag.warn(w);
}

void checkSegment(const PeriodEffectSeries& segment, const PeriodEffectSeries& market) {
    if (segment.diag.rowsUsed >= market.diag.rowsUsed)
        throw InputError("borrow=1: the include mask keeps every usable row, so there is no "
                         "segment to borrow for (include must choose a part of the range)");
}

SmoothedIndexResult smoothedAllData(const EffectsOf& effects, const IndexSmoothing& s,
                                    const IndexOptions& io) {
    const PeriodEffectSeries segment = effects(false, std::nullopt);
    std::optional<PeriodEffectSeries> market;
    if (s.borrow) {
        market = effects(true, std::nullopt);
        checkSegment(segment, *market);
    }
    const PeriodAxis& axis = market ? market->axis : segment.axis;
    SmoothedIndexResult out;
    out.model = fit(segment, market ? &*market : nullptr, axis, axis.count,
                    smootherOptions(s, io.freq));
    const int b = resolveBase(axis, out.model.level, io);
    out.periodsWithoutEffect = axis.count - valuesIn(onAxis(segment, axis, axis.count));
    fillTable(out, axis, countsOnAxis(segment, axis), out.model.level, varianceFrom(out.model, b),
              b, io.level);
    collectDiagnostics(out, segment, market ? &*market : nullptr, out.model.diag.warnings);
    return out;
}

// Real time: the vintages t0 .. T-1 (see smoothed_index.hpp).
SmoothedIndexResult smoothedRealTime(const EffectsOf& effects, const IndexSmoothing& s,
                                     const IndexOptions& io) {
    const PeriodEffectSeries segment = effects(false, std::nullopt);
    std::optional<PeriodEffectSeries> market;
    if (s.borrow) {
        market = effects(true, std::nullopt);
        checkSegment(segment, *market);
    }
    const PeriodAxis axis = market ? market->axis : segment.axis;
    const int T = axis.count;
    const int perYear = periodsPerYear(io.freq);
    const int needed = effectsNeeded(s, io.freq);
    const double rows = static_cast<double>(segment.diag.rowsIn) * (market ? 2.0 : 1.0);
    if (rows * T > kMaxRowVintages)
        throw InputError(fmt::format(
            "realtime re-estimates the index from the sales up to each of the {} periods; over "
            "{} rows that takes too long for a spreadsheet (use a narrower range or segment, a "
            "coarser freq, or realtime=0)", T, segment.diag.rowsIn));
    auto vintage = [&](int v, bool whole) {
        return effects(whole, axis.firstKey + v);
    };
    auto inVintage = [&](int v, auto&& f) {
        try {
            return f();
        } catch (const InputError& e) {
            throw InputError(fmt::format("realtime, sales up to {}: {}", axis.label(v), e.what()));
        }
    };
    // The first vintage: two years of periods and enough period effects for the model.
    int t0 = -1;
    PeriodEffectSeries seg0, mkt0;
    std::string why;
    for (int v = std::min(2 * perYear, T) - 1; v < T && t0 < 0; ++v) {
        try {
            seg0 = vintage(v, false);
            if (market) mkt0 = vintage(v, true);
        } catch (const InputError& e) {
            why = e.what();
            continue;
        }
        int have = valuesIn(onAxis(seg0, axis, v + 1));
        if (market) have += valuesIn(onAxis(mkt0, axis, v + 1));
        if (have >= needed && (!market || valuesIn(onAxis(seg0, axis, v + 1)) > 0)) t0 = v;
    }
    if (t0 < 0)
        throw InputError(fmt::format(
            "realtime needs two years of periods with at least {} period effects by the end of "
            "the first vintage; the data ({}) never reach that{}", needed, axis.rangeText(),
            why.empty() ? "" : " (" + why + ")"));

    const SmootherOptions base = smootherOptions(s, io.freq);
    std::vector<double> level(at(T), kNoValue), movementVar(at(T), kNoValue);
    SmootherResult first, last;
    std::optional<SmootherVariances> variances;
    std::vector<std::string> modelWarnings;
    int lastEstimate = t0;
    for (int v = t0; v < T; ++v) {
        PeriodEffectSeries seg, mkt;
        if (v == t0) {
            seg = std::move(seg0);
            mkt = std::move(mkt0);
        } else {
            seg = inVintage(v, [&] { return vintage(v, false); });
            if (market) mkt = inVintage(v, [&] { return vintage(v, true); });
        }
        SmootherOptions o = base;
        const bool estimate = (v - t0) % perYear == 0;
        if (!estimate) o.variances = variances;
        SmootherResult r = inVintage(v, [&] { return fit(seg, market ? &mkt : nullptr, axis, v + 1, o); });
        if (estimate) {
            variances = r.variances;
            lastEstimate = v;
            modelWarnings = r.diag.warnings;
        }
        if (v == t0) {
            for (int t = 0; t <= t0; ++t) level[at(t)] = r.level[at(t)];
            first = r;
        } else {
            const std::vector<double> mv = varianceFrom(r, t0);
            level[at(v)] = level[at(t0)] + (r.level[at(v)] - r.level[at(t0)]);
            movementVar[at(v)] = mv[at(v)];
        }
        if (v == T - 1) last = std::move(r);
    }
    const int b = resolveBase(axis, level, io);
    // Var(P_t - P_b): from the first vintage when it published both, else the two movements
    // since t0, each from its own vintage, as independent.
    const std::vector<double> fromT0 = varianceFrom(first, t0);
    const std::vector<double> fromBase = b <= t0 ? varianceFrom(first, b) : std::vector<double>();
    auto movement = [&](int t) { return t <= t0 ? fromT0[at(t)] : movementVar[at(t)]; };
    std::vector<double> var(at(T), kNoValue);
    for (int t = 0; t < T; ++t)
        var[at(t)] = t == b ? 0.0 : (t <= t0 && b <= t0) ? fromBase[at(t)] : movement(t) + movement(b);

    SmoothedIndexResult out;
    out.model = std::move(last);
    out.initialPeriods = t0 + 1;
    out.vintages = T - t0;
    out.lastEstimate = lastEstimate;
    out.periodsWithoutEffect = T - valuesIn(onAxis(segment, axis, T));
    fillTable(out, axis, countsOnAxis(segment, axis), level, var, b, io.level);
    std::vector<std::string> warnings = modelWarnings;
    warnings.push_back(fmt::format(
        "real time: {} .. {} published together from the sales up to {}, each later period "
        "from the sales up to it; variances estimated every {} period(s), last with the sales "
        "up to {}", axis.label(0), axis.label(t0), axis.label(t0), perYear,
        axis.label(lastEstimate)));
    collectDiagnostics(out, segment, market ? &*market : nullptr, warnings);
    return out;
}

// The rows of a sales table dated up to period key `last` (rows without a usable date go:
// they belong to no period).
std::vector<std::size_t> rowsUpTo(const SalesInput& s, Frequency freq, long last) {
    std::vector<std::size_t> rows;
    rows.reserve(s.date.size());
    for (std::size_t i = 0; i < s.date.size(); ++i)
        if (isUsableSerial(s.date[i]) && periodKey(s.date[i], freq) <= last) rows.push_back(i);
    return rows;
}

template <class T>
std::vector<T> pick(const std::vector<T>& v, const std::vector<std::size_t>& rows) {
    if (v.empty()) return {};
    std::vector<T> out;
    out.reserve(rows.size());
    for (std::size_t r : rows) out.push_back(v[r]);
    return out;
}

SalesInput salesSubset(const SalesInput& s, const std::vector<std::size_t>* rows, bool whole) {
    SalesInput out = rows ? SalesInput{pick(s.date, *rows), pick(s.price, *rows),
                                       pick(s.include, *rows), pick(s.emptyRow, *rows)}
                          : s;
    if (whole) out.include.clear();
    return out;
}

}  // namespace

SmoothedIndexResult smoothedIndexFrom(const EffectsOf& effects, bool hasSegment,
                                      const IndexSmoothing& s, const IndexOptions& io) {
    io.validate();
    s.validateSmoothing(io);
    if (!s.smoothed()) throw std::logic_error("smoothedIndexFrom: smooth is none");
    if (s.borrow && !hasSegment)
        throw InputError("borrow=1 needs an include mask choosing the segment: its index is the "
                         "whole range's price movement plus the segment's own smoothed "
                         "deviation from it");
    return s.realtime ? smoothedRealTime(effects, s, io) : smoothedAllData(effects, s, io);
}

SmoothedIndexResult smoothedHedonicIndex(const HedonicInput& in, const HedonicOptions& o) {
    o.validate();
    const EffectsOf effects = [&](bool whole, std::optional<long> last) {
        if (!last && !whole) return hedonicPeriodEffects(in, o);
        HedonicInput sub;
        std::vector<std::size_t> rows;
        if (last) rows = rowsUpTo(in.sales, o.freq, *last);
        const std::vector<std::size_t>* r = last ? &rows : nullptr;
        sub.sales = salesSubset(in.sales, r, whole);
        sub.characteristics.reserve(in.characteristics.size());
        for (const CharacteristicColumn& c : in.characteristics)
            sub.characteristics.push_back(
                r ? CharacteristicColumn{c.name, pick(c.numeric, *r), pick(c.text, *r)} : c);
        return hedonicPeriodEffects(sub, o);
    };
    return smoothedIndexFrom(effects, !in.sales.include.empty(), o, o);
}

SmoothedIndexResult smoothedRepeatSalesIndex(const RepeatSalesInput& in,
                                             const RepeatSalesOptions& o) {
    o.validate();
    const EffectsOf effects = [&](bool whole, std::optional<long> last) {
        if (!last && !whole) return repeatSalesPeriodEffects(in, o);
        RepeatSalesInput sub;
        std::vector<std::size_t> rows;
        if (last) rows = rowsUpTo(in.sales, o.freq, *last);
        const std::vector<std::size_t>* r = last ? &rows : nullptr;
        sub.sales = salesSubset(in.sales, r, whole);
        sub.id = r ? pick(in.id, *r) : in.id;
        sub.changed = r ? pick(in.changed, *r) : in.changed;
        return repeatSalesPeriodEffects(sub, o);
    };
    return smoothedIndexFrom(effects, !in.sales.include.empty(), o, o);
}

}  // namespace lintel
