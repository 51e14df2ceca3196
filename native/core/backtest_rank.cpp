// The rule that ranks the candidate methods and says why, in one line each (backtest.hpp, a-c).
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <map>
#include <random>
#include <utility>

#include <fmt/format.h>

#include "backtest.hpp"
#include "statistics.hpp"

namespace lintel {

namespace {

// Unbiased draw from 0 .. n-1 (rejection of the top remainder), the same on every platform.
std::size_t draw(std::mt19937_64& g, std::size_t n) {
    const std::uint64_t range = static_cast<std::uint64_t>(n);
    const std::uint64_t limit = std::numeric_limits<std::uint64_t>::max() -
                                std::numeric_limits<std::uint64_t>::max() % range;
    std::uint64_t x;
    do x = g(); while (x >= limit);
    return static_cast<std::size_t>(x % range);
}

std::string pct(double x) { return hasValue(x) ? fmt::format("{:.1f} %", x) : std::string("n/a"); }
// Revisions are small: two decimals.
std::string rev(double x) { return hasValue(x) ? fmt::format("{:.2f} %", x) : std::string("n/a"); }

struct Comparison {
    const std::vector<MethodScore>& ms;
    std::vector<std::size_t> common;                  // pairs every ranked method predicted
    std::vector<std::vector<std::size_t>> byCluster;  // common pairs grouped by property
    std::vector<double> med;                          // 100 * median |e| over common, per method
    unsigned long long seed;
    std::vector<std::vector<double>> boot;            // per method: its median in each replicate

    // The bootstrap that redraws properties (all pairs of a drawn property come along): the
    // same kBootstrapReps draws for every method, so med[a] - med[b] is compared replicate by
    // replicate.
    void bootstrap(const std::vector<std::size_t>& ranked) {
        boot.assign(ms.size(), {});
        for (std::size_t m : ranked) boot[m].reserve(kBootstrapReps);
        std::mt19937_64 gen(seed ^ 0x5DEECE66DULL);
        const std::size_t K = byCluster.size();
        std::vector<std::size_t> pairs;
        std::vector<double> e;
        for (int rep = 0; rep < kBootstrapReps; ++rep) {
            pairs.clear();
            for (std::size_t k = 0; k < K; ++k) {
                const auto& c = byCluster[draw(gen, K)];
                pairs.insert(pairs.end(), c.begin(), c.end());
            }
            for (std::size_t m : ranked) {
                e.resize(pairs.size());
                for (std::size_t j = 0; j < pairs.size(); ++j) e[j] = ms[m].absError[pairs[j]];
                boot[m].push_back(100 * stats::median(e));
            }
        }
    }

    // Standard error of med[a] - med[b] over the replicates.
    double se(std::size_t a, std::size_t b) const {
        std::vector<double> diffs(boot[a].size());
        for (std::size_t r = 0; r < diffs.size(); ++r) diffs[r] = boot[a][r] - boot[b][r];
        std::size_t used = 0;
        const double s = stats::sampleSd(diffs, &used);
        return hasValue(s) ? s : 0.0;
    }
};

double revisionOf(const MethodScore& m) { return m.meanRevision; }

}  // namespace

Ranking rankMethods(const std::vector<MethodScore>& ms, const std::vector<std::size_t>& cluster,
                    unsigned long long seed) {
    const std::size_t M = ms.size(), P = cluster.size();
    Ranking out;
    out.rank.assign(M, 0);
    out.reason.assign(M, std::string());

    // a. Who can be ranked.
    std::vector<std::size_t> predicted(M, 0);
    std::size_t most = 0;
    for (std::size_t m = 0; m < M; ++m) {
        if (!ms[m].estimated) continue;
        if (ms[m].absError.size() != P)
            throw std::logic_error("rankMethods: one error per held-out pair expected");
        for (double e : ms[m].absError) predicted[m] += hasValue(e) ? 1 : 0;
        most = std::max(most, predicted[m]);
    }
    std::vector<std::size_t> ranked;
    for (std::size_t m = 0; m < M; ++m) {
        if (!ms[m].estimated)
            out.reason[m] = "failed: " + ms[m].failure;
        else if (P == 0)
            out.reason[m] = "no held-out resales: accuracy cannot be measured";
        else if (predicted[m] < kMinPredictedPairs)
            out.reason[m] = fmt::format("only {} held-out resales predicted ({} needed)",
                                        predicted[m], kMinPredictedPairs);
        else if (static_cast<double>(predicted[m]) < kMinCoverage * static_cast<double>(most))
            out.reason[m] = fmt::format(
                "predicted only {:.0f} % of the held-out resales another method predicted "
                "(periods without a value)",
                100.0 * static_cast<double>(predicted[m]) / static_cast<double>(most));
        else
            ranked.push_back(m);
    }
    if (ranked.empty()) return out;

    // b. Accuracy over the pairs every ranked method predicted.
    Comparison c{ms, {}, {}, std::vector<double>(M, kNoValue), seed, {}};
    for (std::size_t i = 0; i < P; ++i) {
        bool all = true;
        for (std::size_t m : ranked) all = all && hasValue(ms[m].absError[i]);
        if (all) c.common.push_back(i);
    }
    if (c.common.size() < kMinPredictedPairs) {
        for (std::size_t m : ranked)
            out.reason[m] = fmt::format(
                "only {} held-out resales predicted by every method: too few to compare",
                c.common.size());
        return out;
    }
    {
        std::map<std::size_t, std::size_t> dense;
        for (std::size_t i : c.common) {
            const std::size_t k = dense.try_emplace(cluster[i], dense.size()).first->second;
            if (k == c.byCluster.size()) c.byCluster.emplace_back();
            c.byCluster[k].push_back(i);
        }
    }
    for (std::size_t m : ranked) {
        std::vector<double> e;
        e.reserve(c.common.size());
        for (std::size_t i : c.common) e.push_back(ms[m].absError[i]);
        c.med[m] = 100 * stats::median(e);
    }
    if (ranked.size() > 1) c.bootstrap(ranked);

    // c. Round by round: the tie set on accuracy, then revision, then missing periods.
    struct Round {
        std::size_t best = 0, winner = 0;
        std::vector<std::size_t> accurate, stable, covered;  // sets A, B, C
    };
    auto contains = [](const std::vector<std::size_t>& v, std::size_t x) {
        return std::find(v.begin(), v.end(), x) != v.end();
    };
    std::vector<std::size_t> left = ranked;
    Round first;
    for (int round = 1; !left.empty(); ++round) {
        Round r;
        r.best = left.front();
        for (std::size_t m : left)
            if (c.med[m] < c.med[r.best]) r.best = m;
        for (std::size_t m : left)
            if (m == r.best || c.med[m] - c.med[r.best] <= c.se(m, r.best)) r.accurate.push_back(m);
        double minRev = std::numeric_limits<double>::infinity();
        for (std::size_t m : r.accurate)
            if (hasValue(revisionOf(ms[m]))) minRev = std::min(minRev, revisionOf(ms[m]));
        for (std::size_t m : r.accurate)
            if (!hasValue(revisionOf(ms[m])) || revisionOf(ms[m]) <= minRev + kRevisionBand)
                r.stable.push_back(m);
        double minMiss = std::numeric_limits<double>::infinity();
        for (std::size_t m : r.stable) minMiss = std::min(minMiss, ms[m].missingShare);
        for (std::size_t m : r.stable)
            if (ms[m].missingShare <= minMiss + 1e-12) r.covered.push_back(m);
        r.winner = r.covered.front();
        for (std::size_t m : r.covered)
            if (c.med[m] < c.med[r.winner]) r.winner = m;
        out.rank[r.winner] = round;
        left.erase(std::find(left.begin(), left.end(), r.winner));
        if (round == 1) first = r;
    }

    // Reasons, against the recommended method.
    const std::size_t w = first.winner;
    out.recommended = static_cast<int>(w);
    const MethodScore& W = ms[w];
    const std::string revText =
        hasValue(W.meanRevision) ? fmt::format(", revises {}", rev(W.meanRevision)) : std::string();
    if (ranked.size() == 1)
        out.reason[w] = fmt::format("the only method that could be judged: median error {}{}",
                                    pct(c.med[w]), revText);
    else if (w == first.best)
        out.reason[w] = fmt::format("predicts held-out resales best (median error {}){}",
                                    pct(c.med[w]), revText);
    else if (first.stable.size() < first.accurate.size())
        out.reason[w] = fmt::format(
            "as accurate as {} within noise (median error {} vs {}) and revises less ({} vs {})",
            ms[first.best].label, pct(c.med[w]), pct(c.med[first.best]), rev(W.meanRevision),
            rev(ms[first.best].meanRevision));
    else
        out.reason[w] = fmt::format(
            "as accurate as {} within noise (median error {} vs {}), fewer periods without a "
            "value ({:.0f} % vs {:.0f} %)",
            ms[first.best].label, pct(c.med[w]), pct(c.med[first.best]), 100 * W.missingShare,
            100 * ms[first.best].missingShare);

    for (std::size_t m : ranked) {
        if (m == w) continue;
        const MethodScore& S = ms[m];
        if (!contains(first.accurate, m))
            out.reason[m] = fmt::format("less accurate than {}: median error {} vs {}", W.label,
                                        pct(c.med[m]), pct(c.med[w]));
        else if (!contains(first.stable, m))
            out.reason[m] = fmt::format("as accurate within noise, but revises more than {} ({} vs {})",
                                        W.label, rev(S.meanRevision), rev(W.meanRevision));
        else if (!contains(first.covered, m))
            out.reason[m] = fmt::format(
                "as accurate and stable, but more periods without a value than {} ({:.0f} % vs "
                "{:.0f} %)",
                W.label, 100 * S.missingShare, 100 * W.missingShare);
        else
            out.reason[m] = fmt::format("as good as {} within noise; median error {} vs {}",
                                        W.label, pct(c.med[m]), pct(c.med[w]));
    }
    return out;
}

}  // namespace lintel
