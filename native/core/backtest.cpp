// INDEXBACKTEST's core: folds over properties, held-out resale predictions, revisions,
// volatility and missing periods of every candidate method (formulas and rule: backtest.hpp).
#include "backtest.hpp"

#include <algorithm>
#include <climits>
#include <cmath>
#include <cstdint>
#include <map>
#include <set>

#include <fmt/format.h>

#include "backtest_internal.hpp"
#include "index_analytics.hpp"
#include "repeat_sales_internal.hpp"
#include "statistics.hpp"
#include "text_keys.hpp"

namespace lintel {

void BacktestOptions::validate() const {
    if (folds < 2 || folds > kMaxFolds)
        throw InputError(fmt::format("folds must lie between 2 and {}, got {}", kMaxFolds, folds));
    if (revisions && (*revisions < 0 || *revisions > 120))
        throw InputError(fmt::format("revisions must lie between 0 and 120, got {}", *revisions));
    if (minSales < 1) throw InputError("minsales must be 1 or more");
    if (!(minHoldMonths >= 0) || !std::isfinite(minHoldMonths))
        throw InputError("minhold must be 0 or more");
    if (!(maxRate >= 0) || !std::isfinite(maxRate)) throw InputError("maxrate must be 0 or more");
}

int BacktestOptions::revisionPeriods() const {
    if (revisions) return *revisions;
    switch (freq) {
        case Frequency::Month: return 12;
        case Frequency::Quarter: return 4;
        case Frequency::Year: return 2;
    }
    return 12;
}

std::string BacktestResult::summary() const {
    return fmt::format("{}; {} held-out resales of {} properties in {} folds; {} revision periods",
                       diag.summary(), pairs, properties, folds, revisions);
}

namespace {

std::uint64_t splitmix64(std::uint64_t x) {
    std::uint64_t z = x + 0x9E3779B97F4A7C15ULL;
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
}

std::uint64_t fnv1a64(std::string_view s) {
    std::uint64_t h = 14695981039346656037ULL;
    for (unsigned char c : s) {
        h ^= c;
        h *= 1099511628211ULL;
    }
    return h;
}

// The index value of a period key, or kNoValue.
double valueAt(const IndexTable& t, long key) {
    const long i = key - t.axis.firstKey;
    if (i < 0 || i >= t.axis.count) return kNoValue;
    const double v = t.index[static_cast<std::size_t>(i)];
    return hasValue(v) && v > 0 ? v : kNoValue;
}

// The held-out pairs: CHAINRS's pairs under the backtest's pair rules that pass every filter.
struct HeldOut {
    std::vector<std::size_t> firstRow, secondRow;
    std::vector<long> key1, key2;
    std::vector<double> y;             // ln(P2 / P1)
    std::vector<int> fold;
    std::vector<std::size_t> property;  // dense property number (the bootstrap's cluster)
    std::size_t properties = 0;
    std::size_t size() const { return y.size(); }
};

HeldOut heldOutPairs(const BacktestInput& in, const BacktestOptions& o) {
    RepeatSalesInput rin{in.id, in.sales, in.changed};
    RepeatSalesOptions ro;
    ro.freq = o.freq;
    ro.minHoldMonths = o.minHoldMonths;
    ro.maxRate = o.maxRate;
    const rs_detail::BuiltPairs bp = rs_detail::buildPairsFromSales(rin, ro);
    HeldOut h;
    std::map<std::uint32_t, std::size_t> dense;
    for (std::size_t i = 0; i < bp.size(); ++i) {
        if (bp.status[i] != PairStatus::Used || !bp.realPair[i]) continue;
        h.firstRow.push_back(bp.firstRow[i]);
        h.secondRow.push_back(bp.secondRow[i]);
        h.key1.push_back(bp.key1[i]);
        h.key2.push_back(bp.key2[i]);
        h.y.push_back(bp.y[i]);
        h.fold.push_back(propertyFold(bp.ids[bp.group[i]], o.seed, o.folds));
        h.property.push_back(dense.try_emplace(bp.group[i], dense.size()).first->second);
    }
    h.properties = dense.size();
    return h;
}

struct Figures {
    std::vector<double> predicted;  // per pair: ln(I(t2)/I(t1)) or NaN
    std::vector<BacktestDetail::Revision> revisions;
};

// 100 * median |e| and 100 * sqrt(mean e^2) over the predicted pairs.
void errorFigures(const HeldOut& h, const std::vector<double>& predicted, BacktestRow& row,
                  std::vector<double>& absError) {
    absError.assign(h.size(), kNoValue);
    std::vector<double> a;
    double sq = 0;
    for (std::size_t i = 0; i < h.size(); ++i) {
        if (!hasValue(predicted[i])) continue;
        const double e = predicted[i] - h.y[i];
        absError[i] = std::fabs(e);
        a.push_back(std::fabs(e));
        sq += e * e;
    }
    row.pairsPredicted = a.size();
    if (a.empty()) return;
    row.medianAbsError = 100 * stats::median(a);
    row.rmsError = 100 * std::sqrt(sq / static_cast<double>(a.size()));
}

// Revisions of the truncated estimate `cut` (last r periods removed) against `full`.
void compareRevision(const IndexTable& full, const IndexTable& cut, int r, long firstKey,
                     long lastKept, std::vector<BacktestDetail::Revision>& out) {
    long base = 0;
    bool found = false;
    for (long k = firstKey; k <= lastKept && !found; ++k)
        if (hasValue(valueAt(full, k)) && hasValue(valueAt(cut, k))) {
            base = k;
            found = true;
        }
    if (!found) return;
    const double fb = valueAt(full, base), cb = valueAt(cut, base);
    for (long k = base + 1; k <= lastKept; ++k) {
        const double f = valueAt(full, k), c = valueAt(cut, k);
        if (!hasValue(f) || !hasValue(c)) continue;
        out.push_back({r, k, 100 * ((c / cb) / (f / fb) - 1)});
    }
}

}  // namespace

int propertyFold(std::string_view id, unsigned long long seed, int folds) {
    const std::string_view t = trimBlanks(id);
    if (t.empty() || folds < 1) return -1;
    return static_cast<int>(splitmix64(fnv1a64(t) ^ splitmix64(seed)) %
                            static_cast<std::uint64_t>(folds));
}

double backtestWork(const BacktestInput& in, const BacktestOptions& o) {
    Diagnostics d;
    const ScreenedSales s = screenRows(in.sales, o.freq, d);
    const int T = s.axis.count;
    const int R = std::max(0, std::min(o.revisionPeriods(), T - 2));
    const double estimates = static_cast<double>(o.folds + R + 1);
    double work = 0;
    for (const CandidateMethod& m : in.methods)
        work += estimates * bt_detail::estimateWork(in, m, s.rows.size(), T);
    // The bootstrap of the rule: kBootstrapReps medians per method over about n / 2 resales.
    if (in.methods.size() > 1)
        work += 5.0 * kBootstrapReps * static_cast<double>(in.methods.size()) *
                static_cast<double>(s.rows.size());
    return work;
}

BacktestResult backtest(const BacktestInput& in, const BacktestOptions& o, BacktestDetail* detail) {
    o.validate();
    if (in.methods.empty()) throw InputError("no method to test: give at least one methods row");
    const std::size_t n = in.sales.date.size();
    if (in.id.size() != n || in.sales.price.size() != n)
        throw InputError(fmt::format("ids, dates and prices must have the same number of rows "
                                     "(got {}, {}, {})", in.id.size(), n, in.sales.price.size()));

    BacktestResult res;
    const ScreenedSales s = screenSales(in.sales, o.freq, res.diag);
    res.axis = s.axis;
    const long firstKey = s.axis.firstKey, lastKey = s.axis.firstKey + s.axis.count - 1;
    const int R = std::max(0, std::min(o.revisionPeriods(), s.axis.count - 2));
    res.folds = o.folds;
    res.revisions = R;

    // Every method is prepared (its columns checked) before any work.
    std::vector<bt_detail::MaskedEstimate> estimators;
    for (const CandidateMethod& m : in.methods) {
        try {
            estimators.push_back(bt_detail::prepareMethod(in, m, o));
        } catch (const InputError& e) {
            const std::string what = e.what();
            if (what.find(m.label) != std::string::npos) throw;
            throw InputError(fmt::format("method \"{}\": {}", m.label, what));
        }
    }
    const double work = backtestWork(in, o);
    if (work > kMaxBacktestWork)
        throw InputError(fmt::format(
            "the backtest would take too long (about {:.0f} s: {} sales, {} methods, {} estimates "
            "each); use fewer methods, folds or revisions, a coarser freq, or an include mask",
            work / 1e9, s.rows.size(), in.methods.size(), o.folds + R + 1));

    const HeldOut h = heldOutPairs(in, o);
    res.pairs = h.size();
    res.properties = h.properties;

    // Row masks: all usable rows, each fold's complement, each truncation.
    std::vector<char> all(n, 1);
    if (!in.sales.include.empty())
        for (std::size_t i = 0; i < n; ++i) all[i] = in.sales.include[i] ? 1 : 0;
    std::vector<int> rowFold(n, -1);
    for (std::size_t i = 0; i < n; ++i) rowFold[i] = propertyFold(in.id[i], o.seed, o.folds);
    std::vector<char> foldHasPairs(static_cast<std::size_t>(o.folds), 0);
    for (int f : h.fold) foldHasPairs[static_cast<std::size_t>(f)] = 1;
    std::vector<long> rowKey(n, LONG_MIN);
    for (std::size_t i = 0; i < n; ++i)
        if (isUsableSerial(in.sales.date[i])) rowKey[i] = periodKey(in.sales.date[i], o.freq);

    auto foldMask = [&](int f) {
        std::vector<char> m = all;
        for (std::size_t i = 0; i < n; ++i)
            if (rowFold[i] == f) m[i] = 0;
        return m;
    };
    auto cutMask = [&](int r) {
        std::vector<char> m = all;
        for (std::size_t i = 0; i < n; ++i)
            if (rowKey[i] != LONG_MIN && rowKey[i] > lastKey - r) m[i] = 0;
        return m;
    };

    std::vector<MethodScore> scores(in.methods.size());
    if (detail) {
        detail->firstRow = h.firstRow;
        detail->secondRow = h.secondRow;
        detail->fold = h.fold;
        detail->logChange = h.y;
        detail->predicted.assign(in.methods.size(), std::vector<double>(h.size(), kNoValue));
        detail->revisions.assign(in.methods.size(), {});
        detail->fullLog.assign(in.methods.size(),
                               std::vector<double>(static_cast<std::size_t>(s.axis.count), kNoValue));
    }

    // Pairs of each fold, in order.
    std::vector<std::vector<std::size_t>> pairsOf(static_cast<std::size_t>(o.folds));
    for (std::size_t i = 0; i < h.size(); ++i) pairsOf[static_cast<std::size_t>(h.fold[i])].push_back(i);

    res.methods.resize(in.methods.size());
    for (std::size_t mi = 0; mi < in.methods.size(); ++mi) {
        const CandidateMethod& m = in.methods[mi];
        BacktestRow& row = res.methods[mi];
        MethodScore& score = scores[mi];
        row.label = score.label = m.label;

        IndexTable full;
        try {
            full = estimators[mi](all);
            row.estimated = score.estimated = true;
        } catch (const InputError& e) {
            row.failure = score.failure = e.what();
            continue;
        }

        // Accuracy: each fold's pairs predicted by the index estimated without the fold.
        std::vector<double> predicted(h.size(), kNoValue);
        std::string firstFoldFailure;
        for (int f = 0; f < o.folds; ++f) {
            if (!foldHasPairs[static_cast<std::size_t>(f)]) continue;
            IndexTable t;
            try {
                t = estimators[mi](foldMask(f));
            } catch (const InputError& e) {
                if (!row.foldsFailed++) firstFoldFailure = e.what();
                continue;
            }
            for (std::size_t i : pairsOf[static_cast<std::size_t>(f)]) {
                const double v1 = valueAt(t, h.key1[i]), v2 = valueAt(t, h.key2[i]);
                if (hasValue(v1) && hasValue(v2)) predicted[i] = stats::logRatio(v2, v1);
            }
        }
        if (row.foldsFailed)
            res.diag.warn(fmt::format("{}: {} fold estimate(s) failed, their resales count as not "
                                      "predicted (first: {})",
                                      m.label, row.foldsFailed, firstFoldFailure));
        errorFigures(h, predicted, row, score.absError);

        // Revision: the last r periods removed.
        std::vector<BacktestDetail::Revision> revs;
        for (int r = 1; r <= R; ++r) {
            IndexTable t;
            try {
                t = estimators[mi](cutMask(r));
            } catch (const InputError&) {
                ++row.revisionsFailed;
                continue;
            }
            compareRevision(full, t, r, firstKey, lastKey - r, revs);
        }
        if (row.revisionsFailed)
            res.diag.warn(fmt::format("{}: {} of {} estimates with the last periods removed "
                                      "failed", m.label, row.revisionsFailed, R));
        row.revisionsCompared = revs.size();
        if (!revs.empty()) {
            double sum = 0, mx = 0;
            for (const auto& v : revs) {
                sum += std::fabs(v.percent);
                mx = std::max(mx, std::fabs(v.percent));
            }
            row.meanRevision = score.meanRevision = sum / static_cast<double>(revs.size());
            row.maxRevision = mx;
        }

        // Volatility and missing periods over the span of the data.
        std::vector<double> values(static_cast<std::size_t>(s.axis.count));
        std::size_t missing = 0;
        for (int t = 0; t < s.axis.count; ++t) {
            values[static_cast<std::size_t>(t)] = valueAt(full, firstKey + t);
            if (!hasValue(values[static_cast<std::size_t>(t)])) ++missing;
        }
        row.missingShare = score.missingShare =
            static_cast<double>(missing) / static_cast<double>(s.axis.count);
        try {
            row.volatility = indexVolatility(values, VolatilityOptions{1, false, o.freq}).volatility;
        } catch (const InputError&) {
            row.volatility = kNoValue;  // fewer than two changes
        }

        if (detail) {
            detail->predicted[mi] = predicted;
            detail->revisions[mi] = std::move(revs);
            for (int t = 0; t < s.axis.count; ++t)
                if (hasValue(values[static_cast<std::size_t>(t)]))
                    detail->fullLog[mi][static_cast<std::size_t>(t)] =
                        std::log(values[static_cast<std::size_t>(t)]);
        }
    }

    const Ranking rk = rankMethods(scores, h.property, o.seed);
    for (std::size_t mi = 0; mi < res.methods.size(); ++mi) {
        res.methods[mi].rank = rk.rank[mi];
        res.methods[mi].recommended = rk.recommended == static_cast<int>(mi);
        res.methods[mi].reason = rk.reason[mi];
    }
    if (h.size() == 0)
        res.diag.warn("no property has two usable sales far enough apart: accuracy cannot be "
                      "measured, no method is recommended");
    return res;
}

}  // namespace lintel
