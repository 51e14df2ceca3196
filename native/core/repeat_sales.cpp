// Repeat-sales estimators: the joint estimate (chain off) of one connected part of the pair
// graph, the index table with its bands, and CHAINRS / RSPAIRS themselves. The stages of a fit
// are in repeat_sales_stages.cpp, the chain in repeat_sales_chain.cpp, the pairs in
// repeat_sales_pairs.cpp. Formulas and sources in repeat_sales.hpp; rules and edge cases in
// docs/methods/repeat_sales.md.
#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>
#include <stdexcept>

#include <fmt/format.h>

#include "repeat_sales_internal.hpp"
#include "smoothed_index.hpp"
#include "statistics.hpp"

namespace lintel {

namespace rs_detail {

std::string periodList(const PeriodAxis& axis, const std::vector<int>& pos) {
    std::string s;
    std::size_t runs = 0, i = 0;
    while (i < pos.size()) {
        std::size_t j = i;
        while (j + 1 < pos.size() && pos[j + 1] == pos[j] + 1) ++j;
        if (runs == 8) {
            s += fmt::format(" and {} more", pos.size() - i);
            break;
        }
        if (runs) s += ", ";
        s += j > i ? axis.label(pos[i]) + " .. " + axis.label(pos[j]) : axis.label(pos[i]);
        ++runs;
        i = j + 1;
    }
    return s;
}

std::string noValueText(NoValue why, const RepeatSalesOptions& o) {
    switch (why) {
        case NoValue::NoPair: return "no usable pair has a sale in it";
        case NoValue::NotLinked: return "its pairs are not linked to the base period";
        case NoValue::Thin: return fmt::format("fewer than {} pairs inform it (minsales)", o.minSales);
        case NoValue::NoPairEnds: return "no usable pair ends in it";
        case NoValue::Unreached: return "its pairs start in periods without a value";
        case NoValue::None: return "";
    }
    return "";
}

void Estimator::run() {
    std::size_t candidates = 0;
    for (PairStatus st : bp_.status) candidates += st == PairStatus::Used;
    if (candidates == 0 || !bp_.axis)
        throw InputError("no usable pair of sales: " + pairSummaryNow());
    axis_ = *bp_.axis;
    T_ = axis_.count;
    if (T_ > kMaxPeriods)
        throw InputError(fmt::format(
            "the sales span {} periods ({}); a repeat-sales index takes at most {} "
            "(use a coarser freq)", T_, axis_.rangeText(), kMaxPeriods));
    ppy_ = periodsPerYear(o_.freq);
    obs_.reserve(candidates);
    for (std::size_t i = 0; i < bp_.size(); ++i) {
        if (bp_.status[i] != PairStatus::Used) continue;
        Obs ob;
        ob.s = static_cast<int>(bp_.key1[i] - axis_.firstKey);
        ob.t = static_cast<int>(bp_.key2[i] - axis_.firstKey);
        ob.y = bp_.y[i];
        ob.years = static_cast<double>(ob.t - ob.s) / ppy_;
        ob.pair = i;
        obs_.push_back(ob);
    }
    weight_.assign(bp_.size(), 0.0);
    levels_ = o_.chain ? chained() : joint();
    assemble(levels_);
}

std::string Estimator::pairSummaryNow() const {
    if (bp_.size() == 0) return "no property has two sales with a usable date and id";
    return rs_detail::countPairs(bp_).summary();
}

int Estimator::explicitBase() const {
    if (!o_.baseDate) return -1;
    return axis_.positionOf(*o_.baseDate);
}

// The connected part to estimate among `obs`: the base period's part when a base is
// given and a pair reaches it, else the part with the most pairs (ties: the earliest).
// Returns its root; obs outside it are marked NotLinked and removed.
int Estimator::choosePart(std::vector<Obs>& obs, Components& cc, int basePos) {
    for (const Obs& ob : obs) cc.join(ob.s, ob.t);
    std::vector<std::size_t> count(T_, 0);
    for (const Obs& ob : obs) ++count[cc.find(ob.s)];
    int root = -1;
    if (basePos >= 0 && basePos < T_ && count[cc.find(basePos)] > 0) root = cc.find(basePos);
    if (root < 0)
        for (int p = 0; p < T_; ++p)
            if (count[p] > 0 && (root < 0 || count[p] > count[root])) root = p;
    std::size_t j = 0;  // compact in place, keeping the order
    for (std::size_t i = 0; i < obs.size(); ++i) {
        if (cc.find(obs[i].s) == root) obs[j++] = obs[i];
        else drop(obs[i], PairStatus::NotLinked);
    }
    obs.resize(j);
    return root;
}

Levels Estimator::emptyLevels() const {
    Levels lv;
    lv.level.assign(T_, kNoValue);
    lv.cov = decltype(lv.cov)::Zero(T_, T_);
    lv.df.assign(T_, kNoValue);
    lv.why.assign(T_, NoValue::None);
    return lv;
}

// Jointly estimated periods: touching counts, the reference, the fit. Fills lv for the
// periods of the part. Returns the fit.
JointFit Estimator::fitPart(std::vector<Obs>& obs, int basePos, Levels& lv, VarianceAccumulator* acc,
                 std::vector<char>& inPart) {
    Components cc(T_);
    const int root = choosePart(obs, cc, basePos);
    std::vector<std::size_t> touching(T_, 0);
    for (const Obs& ob : obs) {
        ++touching[ob.s];
        ++touching[ob.t];
    }
    inPart.assign(T_, 0);
    for (int p = 0; p < T_; ++p) inPart[p] = touching[p] > 0 && cc.find(p) == root;
    // Reference: the base when it is in the part, else the first period that will show a
    // value (so the coefficients are b_t - b_base directly in the common case).
    int ref = -1;
    if (basePos >= 0 && basePos < T_ && inPart[basePos]) ref = basePos;
    for (int p = 0; p < T_ && ref < 0; ++p)
        if (inPart[p] && touching[p] >= o_.minSales) ref = p;
    if (ref < 0) ref = root;
    std::vector<int> col(T_, -1);
    int k = 0;
    for (int p = 0; p < T_; ++p)
        if (inPart[p] && p != ref) col[p] = k++;
    JointFit f = fitJoint(obs, col, k, o_.method, T_, acc, notes_, r_.diag);
    lv.reference = ref;
    for (int p = 0; p < T_; ++p) {
        if (!inPart[p]) continue;
        if (touching[p] < o_.minSales) {
            lv.why[p] = NoValue::Thin;
            continue;
        }
        lv.level[p] = f.level(p);
    }
    for (int p = 0; p < T_; ++p) {
        if (!inPart[p] || f.col[p] < 0) continue;
        for (int q = 0; q < T_; ++q)
            if (inPart[q] && f.col[q] >= 0)
                lv.cov(p, q) = f.s2 * f.fin.inv(f.col[p], f.col[q]);
    }
    const double dof = static_cast<double>(f.n) - static_cast<double>(f.k);
    for (int p = 0; p < T_; ++p)
        if (inPart[p]) lv.df[p] = dof;
    for (std::size_t i = 0; i < obs.size(); ++i) weight_[obs[i].pair] = f.w[i];
    return f;
}

std::vector<char> Estimator::touchedPeriods(const std::vector<Obs>& obs) const {
    std::vector<char> touched(T_, 0);
    for (const Obs& ob : obs) touched[ob.s] = touched[ob.t] = 1;
    return touched;
}

void Estimator::markNoValueJoint(Levels& lv, const std::vector<char>& touched, int upTo) {
    for (int p = 0; p < upTo; ++p)
        if (!hasValue(lv.level[p]) && lv.why[p] == NoValue::None)
            lv.why[p] = touched[p] ? NoValue::NotLinked : NoValue::NoPair;
}

Levels Estimator::joint() {
    Levels lv = emptyLevels();
    std::vector<char> touched = touchedPeriods(obs_);
    std::vector<char> inPart;
    // obs_ keeps only the pairs of the estimated part from here on.
    JointFit f = fitPart(obs_, explicitBase(), lv, nullptr, inPart);
    markNoValueJoint(lv, touched, T_);
    lv.scale = f.s2;
    lv.model = f.model;
    return lv;
}

void Estimator::assemble(const Levels& lv) {
    const int eb = explicitBase();
    if (eb >= 0 && !hasValue(lv.level[eb]))
        throw InputError(fmt::format("the base period {} has no value: {}", axis_.label(eb),
                                     noValueText(lv.why[eb], o_)));
    const int b = resolveBase(axis_, lv.level, o_);
    IndexTable& tb = r_.table;
    tb.axis = axis_;
    tb.basePosition = b;
    tb.index.assign(T_, kNoValue);
    tb.lower.assign(T_, kNoValue);
    tb.upper.assign(T_, kNoValue);
    tb.count.assign(T_, 0);
    r_.logIndex.assign(T_, kNoValue);
    r_.logSe.assign(T_, kNoValue);
    r_.df.assign(T_, kNoValue);
    for (int t = 0; t < T_; ++t) {
        if (!hasValue(lv.level[t])) continue;
        const double d = lv.level[t] - lv.level[b];
        const double var = t == b ? 0.0 : lv.cov(t, t) + lv.cov(b, b) - 2 * lv.cov(t, b);
        const double se = std::sqrt(std::max(var, 0.0));
        const double dof = lv.df[std::max(t, b)];
        r_.logIndex[t] = d;
        r_.logSe[t] = hasValue(var) ? se : kNoValue;
        r_.df[t] = dof;
        tb.index[t] = 100.0 * std::exp(d);
        if (t == b) {  // the change from the base to itself is known exactly
            tb.lower[t] = tb.upper[t] = 100.0;
        } else if (hasValue(var) && dof > 0) {
            const double q = stats::tCritical(o_.level, dof);
            tb.lower[t] = 100.0 * std::exp(d - q * se);
            tb.upper[t] = 100.0 * std::exp(d + q * se);
        }
    }
    // Used pairs: counts per period, weights normalised to mean 1.
    double sumW = 0;
    std::size_t used = 0;
    for (const Obs& ob : obs_)
        if (bp_.status[ob.pair] == PairStatus::Used) {
            ++tb.count[ob.t];
            sumW += weight_[ob.pair];
            ++used;
        }
    const double norm = static_cast<double>(used) / sumW;
    for (const Obs& ob : obs_)
        if (bp_.status[ob.pair] == PairStatus::Used) bp_.weight[ob.pair] = weight_[ob.pair] * norm;
    r_.scale = lv.scale;
    r_.variance = lv.model;
    // Warnings naming the periods without a value, one per cause (the smoother gives them
    // a value).
    for (NoValue why : {NoValue::NoPair, NoValue::NotLinked, NoValue::NoPairEnds,
                        NoValue::Unreached, NoValue::Thin}) {
        if (forSmoothing_) break;
        std::vector<int> pos;
        for (int t = 0; t < T_; ++t)
            if (!hasValue(lv.level[t]) && lv.why[t] == why) pos.push_back(t);
        if (pos.empty()) continue;
        r_.diag.warn(fmt::format("no value for {} period(s) ({}): {}", pos.size(),
                                 periodList(axis_, pos), noValueText(why, o_)));
    }
    if (r_.variance.floored)
        r_.diag.warn(fmt::format("{} pair(s) with a fitted variance below the floor {:.3g} "
                                 "(5 % of the mean squared first-stage residual)",
                                 r_.variance.floored, r_.variance.floor));
}

}  // namespace rs_detail

namespace {

using rs_detail::BuiltPairs;

// Pair counts and the rows used (r.diag already holds the screening's row drops).
void finish(const BuiltPairs& bp, RepeatSalesResult& r) {
    r.pairCounts = rs_detail::countPairs(bp);
    if (bp.sales) {
        const std::size_t n = bp.rowUsable.size();
        std::vector<char> inReal(n, 0), inUsed(n, 0);
        for (std::size_t i = 0; i < bp.size(); ++i) {
            if (!bp.realPair[i]) continue;
            const std::size_t a = bp.firstRow[i], b = bp.secondRow[i];
            inReal[a] = inReal[b] = 1;
            if (bp.status[i] == PairStatus::Used) inUsed[a] = inUsed[b] = 1;
        }
        std::size_t used = 0, single = 0, none = 0;
        for (std::size_t i = 0; i < n; ++i) {
            if (!bp.rowUsable[i]) continue;
            if (inUsed[i]) ++used;
            else if (inReal[i]) ++none;
            else ++single;
        }
        r.diag.rowsUsed = used;
        r.diag.drop(DropReason::SingleSale, single);
        r.diag.drop(DropReason::NoUsedPair, none);
    } else {
        // Pairs given directly: each pair is a row (its reasons are in the pair counts).
        r.diag.rowsIn = bp.size();
        r.diag.rowsUsed = r.pairCounts.used;
        r.diag.drop(DropReason::PairNotUsed, bp.size() - r.pairCounts.used);
    }
}

RepeatSalesResult runEstimate(BuiltPairs bp, const RepeatSalesOptions& o, bool forAudit,
                              PairAudit* audit) {
    RepeatSalesResult r;
    r.diag = bp.diag;  // the row drops of the screening and of duplicate sales
    std::optional<std::string> notEstimated;
    try {
        rs_detail::Estimator(bp, o, r).run();
    } catch (const InputError& e) {
        if (!forAudit) throw;
        r = RepeatSalesResult{};
        r.diag = bp.diag;
        notEstimated = e.what();
        // Pairs that passed the filters (or were judged by the failed estimate).
        for (std::size_t i = 0; i < bp.size(); ++i) {
            bp.weight[i] = 0;
            switch (bp.status[i]) {
                case PairStatus::Used:
                case PairStatus::NotLinked:
                case PairStatus::ChainUnreached:
                case PairStatus::ThinPeriod: bp.status[i] = PairStatus::NotEstimated; break;
                default: break;
            }
        }
        r.diag.warn(std::string("index not estimated: ") + e.what());
    }
    finish(bp, r);
    if (audit) {
        audit->pairs = rs_detail::auditRows(bp);
        audit->counts = r.pairCounts;
        audit->diag = r.diag;
        audit->notEstimated = std::move(notEstimated);
    }
    return r;
}

}  // namespace

std::string PairCounts::summary() const {
    std::vector<std::pair<std::string, std::size_t>> texts;
    texts.reserve(dropped.size());
    for (const auto& [r, c] : dropped) texts.emplace_back(pairReasonText(r), c);
    return fmt::format("{} of {} pairs used", used, formed) + droppedText(texts);
}

std::string RepeatSalesResult::summary() const {
    return diag.summary() + "; " + pairCounts.summary();
}

RepeatSalesResult repeatSalesIndex(const RepeatSalesInput& input,
                                   const RepeatSalesOptions& options, PairAudit* audit) {
    options.validate();
    if (options.smoothed()) {
        if (audit) throw std::logic_error("repeatSalesIndex: no pair audit for a smoothed index");
        SmoothedIndexResult s = smoothedRepeatSalesIndex(input, options);
        RepeatSalesResult r;
        r.table = std::move(s.table);
        r.diag = std::move(s.diag);
        r.pairCounts = std::move(s.pairs);
        r.logIndex = std::move(s.logIndex);
        r.logSe = std::move(s.logSe);
        r.df.assign(r.logIndex.size(), std::numeric_limits<double>::infinity());
        return r;
    }
    return runEstimate(rs_detail::buildPairsFromSales(input, options), options, false, audit);
}

PeriodEffectSeries repeatSalesPeriodEffects(const RepeatSalesInput& input,
                                            const RepeatSalesOptions& options) {
    if (options.chain)
        throw InputError("period effects for smoothing come from the joint estimate (chain=0)");
    RepeatSalesOptions o = options;
    o.baseDate.reset();  // the reference is the first period with a value; the smoother rebases
    static_cast<IndexSmoothing&>(o) = IndexSmoothing{};
    o.validate();
    BuiltPairs bp = rs_detail::buildPairsFromSales(input, o);
    RepeatSalesResult r;
    r.diag = bp.diag;
    rs_detail::Estimator est(bp, o, r);
    est.forSmoothing();
    est.run();
    finish(bp, r);
    const rs_detail::Levels& lv = est.levels();
    PeriodEffectSeries out;
    out.axis = r.table.axis;
    out.count = r.table.count;
    out.diag = std::move(r.diag);
    out.pairs = r.pairCounts;
    const int T = out.axis.count;
    const int ref = lv.reference;
    std::vector<int> other;  // periods with a value besides the reference
    for (int t = 0; t < T; ++t)
        if (t != ref && hasValue(lv.level[t])) other.push_back(t);
    if (other.empty())
        throw InputError("the repeat-sales estimate has a value for one period only: nothing to "
                         "smooth");
    // v_ref: the mean covariance between two periods' effects (the part of their errors
    // they share through the reference period).
    double sum = 0, diag = 0;
    std::size_t pairs = 0;
    for (std::size_t i = 0; i < other.size(); ++i) {
        diag += lv.cov(other[i], other[i]);
        for (std::size_t j = i + 1; j < other.size(); ++j) {
            sum += lv.cov(other[i], other[j]);
            ++pairs;
        }
    }
    double vref = pairs ? sum / static_cast<double>(pairs) : 0.0;
    if (!(vref > 0)) vref = 0.5 * diag / static_cast<double>(other.size());
    PeriodEffects& e = out.effects;
    e.value.assign(T, kNoValue);
    e.variance.assign(T, kNoValue);
    if (ref >= 0 && hasValue(lv.level[ref])) {
        e.value[ref] = 0.0;
        e.variance[ref] = vref;
    }
    for (int t : other) {
        const double v = lv.cov(t, t);
        e.value[t] = lv.level[t];
        e.variance[t] = std::max(v - vref, 0.05 * v);
    }
    return out;
}

PairAudit repeatSalesPairs(const RepeatSalesInput& input, const RepeatSalesOptions& options) {
    options.validate();
    PairAudit a;
    runEstimate(rs_detail::buildPairsFromSales(input, options), options, true, &a);
    return a;
}

RepeatSalesResult repeatSalesFromPairs(const RepeatSalesPairInput& input,
                                       const RepeatSalesOptions& options, PairAudit* audit) {
    options.validate();
    return runEstimate(rs_detail::buildPairsFromPairInput(input, options), options, false,
                       audit);
}

}  // namespace lintel
