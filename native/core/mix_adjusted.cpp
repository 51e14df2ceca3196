#include "mix_adjusted.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <map>
#include <numeric>
#include <random>

#include <fmt/format.h>

#include "statistics.hpp"
#include "text_keys.hpp"
#include "work_limits.hpp"

namespace lintel {

namespace {

// Stratum-period cells held at most (memory guard against e.g. an id column as strata).
constexpr auto kMaxCells = static_cast<std::size_t>(limits::kMaxMixCells);

// Per stratum-period cells, flattened h * T + t.
struct Cells {
    int H = 0, T = 0;
    std::vector<std::size_t> count;
    std::vector<double> value;  // sum of prices
    std::vector<double> price;  // median or mean; kNoValue below minsales
    std::size_t at(int h, int t) const { return static_cast<std::size_t>(h) * T + t; }
    bool priced(int h, int t) const { return hasValue(price[at(h, t)]); }
};

class MixBuilder {
public:
    MixBuilder(const Cells& c, const MixOptions& o, MixResult& r)
        : c_(c), o_(o), r_(r), level_(c.T, kNoValue), used_(c.T, 0), weighted_(c.H, 0) {}

    // Weights over strata priced at ref, from the sales of periods [a, b] (clipped).
    std::vector<double> weights(int ref, int a, int b) {
        a = std::max(a, 0);
        b = std::min(b, c_.T - 1);
        std::vector<double> w(c_.H, 0.0);
        for (int h = 0; h < c_.H; ++h) {
            double x = 0;
            if (o_.weights == MixWeights::All) {
                x = allSales(h);
            } else {
                for (int t = a; t <= b; ++t)
                    x += o_.weights == MixWeights::Value ? c_.value[c_.at(h, t)]
                                                         : double(c_.count[c_.at(h, t)]);
            }
            if (x > 0 && !c_.priced(h, ref)) {
                ++r_.unpricedAtReference;
                continue;
            }
            if (c_.priced(h, ref)) w[h] = x;
        }
        return w;
    }

    // Evaluates one link: relative levels L(t) for t in [from, to] against ref, written as
    // startLevel * L(t). Returns false when the weights are all zero.
    bool link(int ref, int from, int to, std::vector<double> w, double startLevel) {
        const double total = std::accumulate(w.begin(), w.end(), 0.0);
        if (!(total > 0)) return false;
        for (int h = 0; h < c_.H; ++h) {
            w[h] /= total;
            if (w[h] > 0) weighted_[h] = 1;
        }
        ++r_.links;
        std::vector<double> last(c_.H, 1.0);
        auto evaluate = [&](int t) {
            double sum = 0, wPresent = 0, wCarried = 0;
            std::size_t used = 0, empty = 0;
            for (int h = 0; h < c_.H; ++h) {
                if (w[h] <= 0) continue;
                if (c_.priced(h, t)) {
                    const double rel = c_.price[c_.at(h, t)] / c_.price[c_.at(h, ref)];
                    last[h] = rel;
                    sum += w[h] * rel;
                    wPresent += w[h];
                    used += c_.count[c_.at(h, t)];
                } else {
                    ++empty;
                    if (o_.empty == EmptyStratumRule::Carry) {
                        sum += w[h] * last[h];
                        wCarried += w[h];
                    }
                }
            }
            if (t < from || t > to) return;  // only keeps `last` up to date
            if (!(wPresent > 0)) return;     // no weighted stratum priced: no value
            const double rel = o_.empty == EmptyStratumRule::Carry ? sum / (wPresent + wCarried)
                                                                   : sum / wPresent;
            level_[t] = startLevel * rel;
            used_[t] = used;
            r_.emptyCells += empty;
        };
        for (int t = ref; t <= to; ++t) evaluate(t);  // at ref every weighted stratum is priced
        std::fill(last.begin(), last.end(), 1.0);
        for (int t = std::min(ref - 1, to); t >= from; --t) evaluate(t);
        return true;
    }

    std::vector<double>& level() { return level_; }
    // The last position before `before` with a value, -1 when none (levels are written year
    // by year, so the search starts from the last valued position found so far).
    int lastValuedBefore(int before) {
        for (int t = std::min(before, c_.T) - 1; t > scanned_; --t)
            if (hasValue(level_[t])) {
                lastValued_ = t;
                break;
            }
        scanned_ = std::max(scanned_, std::min(before, c_.T) - 1);
        return lastValued_ < before ? lastValued_ : -1;
    }
    std::vector<std::size_t>& used() { return used_; }
    std::size_t weightedStrata() const {
        return static_cast<std::size_t>(std::count(weighted_.begin(), weighted_.end(), 1));
    }

private:
    // Sales of stratum h over the whole sample (weights=all), summed once.
    double allSales(int h) {
        if (all_.empty()) {
            all_.assign(static_cast<std::size_t>(c_.H), 0.0);
            for (int k = 0; k < c_.H; ++k)
                for (int t = 0; t < c_.T; ++t)
                    all_[k] += static_cast<double>(c_.count[c_.at(k, t)]);
        }
        return all_[h];
    }

    const Cells& c_;
    const MixOptions& o_;
    MixResult& r_;
    std::vector<double> all_;
    int scanned_ = -1, lastValued_ = -1;
    std::vector<double> level_;
    std::vector<std::size_t> used_;
    std::vector<char> weighted_;
};

// The level series (relative to the first reference period) for a fixed base or the yearly
// chain; counters go to r.
void buildLevels(MixBuilder& b, const Cells& c, const PeriodAxis& axis,
                 const std::vector<double>& anyPrice, const MixOptions& o, MixResult& r) {
    if (!o.chain) {
        const int base = resolveBase(axis, anyPrice, o);
        b.link(base, 0, c.T - 1, b.weights(base, base, base), 1.0);
    } else {
        const int p = periodsPerYear(o.freq);
        auto yearOf = [&](int t) { return yearOfKey(axis.firstKey + t, o.freq); };
        int first = -1;
        for (int t = 0; t < c.T && first < 0; ++t)
            if (hasValue(anyPrice[t])) first = t;
        if (first < 0)
            throw InputError(fmt::format("no stratum has {} or more sales in any period", o.minSales));
        // Positions of each calendar year on the axis.
        auto yearStart = [&](long y) { return static_cast<int>(y * p - axis.firstKey); };
        const long y0 = yearOf(first), yLast = yearOf(c.T - 1);
        b.link(first, std::max(yearStart(y0), 0), std::min(yearStart(y0 + 1) - 1, c.T - 1),
               b.weights(first, yearStart(y0), yearStart(y0 + 1) - 1), 1.0);
        for (long y = y0 + 1; y <= yLast; ++y) {
            const int from = yearStart(y), to = std::min(yearStart(y + 1) - 1, c.T - 1);
            // A year in which no stratum has a price gets no value whatever its link: skipped
            // (a long gap, such as one mistyped date, would otherwise cost gap^2 steps).
            bool priced = false;
            for (int t = from; t <= to && !priced; ++t) priced = hasValue(anyPrice[t]);
            if (!priced) continue;
            const int linkAt = b.lastValuedBefore(from);
            if (linkAt < 0) continue;
            std::vector<double> w = b.weights(linkAt, yearStart(y - 1), from - 1);
            if (std::accumulate(w.begin(), w.end(), 0.0) <= 0) {
                w = b.weights(linkAt, linkAt, linkAt);
                ++r.fallbackWeights;
            }
            b.link(linkAt, from, to, w, b.level()[linkAt]);
        }
    }
}

// Unbiased draw from 0 .. n-1 (rejection of the top remainder), same on every platform.
std::size_t draw(std::mt19937_64& g, std::size_t n) {
    const std::uint64_t range = static_cast<std::uint64_t>(n);
    const std::uint64_t limit = std::numeric_limits<std::uint64_t>::max() -
                                std::numeric_limits<std::uint64_t>::max() % range;
    std::uint64_t x;
    do x = g(); while (x >= limit);
    return static_cast<std::size_t>(x % range);
}

// The strata columns against the dates; rows with a blank stratum cell.
RowProblems blankStrata(const MixInput& in) {
    if (in.strata.empty()) throw InputError("strata needs at least one column");
    const std::size_t n = in.sales.date.size();
    for (std::size_t k = 0; k < in.strata.size(); ++k)
        if (in.strata[k].size() != n)
            throw InputError(fmt::format("strata column {} has {} rows, dates has {}", k + 1,
                                         in.strata[k].size(), n));
    RowProblems blank(n);
    for (const auto& col : in.strata)
        for (std::size_t i = 0; i < n; ++i)
            if (isBlankText(col[i])) blank[i] = DropReason::BlankStratum;
    return blank;
}

// Stratum number of each used row (strata numbered in order of first appearance); `count`
// receives the number of strata.
std::vector<int> stratumIds(const MixInput& in, const ScreenedSales& s, std::size_t& count) {
    std::map<std::string, int> ids;
    std::vector<int> sid(s.rows.size());
    for (std::size_t j = 0; j < s.rows.size(); ++j) {
        std::string key;
        for (std::size_t k = 0; k < in.strata.size(); ++k) {
            if (k) key += '\x1f';
            key += in.strata[k][s.rows[j]];
        }
        const auto it = ids.emplace(key, static_cast<int>(ids.size())).first;
        sid[j] = it->second;
    }
    count = ids.size();
    return sid;
}

// The prices of each cell, contiguous: cell k holds pool[offset[k] .. offset[k+1]).
struct CellPool {
    std::vector<std::size_t> offset;
    std::vector<double> pool;
    std::size_t size(std::size_t k) const { return offset[k + 1] - offset[k]; }
};

CellPool poolCells(const Cells& c, const MixInput& in, const ScreenedSales& s,
                   const std::vector<int>& sid) {
    const std::size_t HT = c.count.size();
    CellPool p;
    p.offset.assign(HT + 1, 0);
    for (std::size_t j = 0; j < s.rows.size(); ++j) ++p.offset[c.at(sid[j], s.period[j]) + 1];
    for (std::size_t k = 0; k < HT; ++k) p.offset[k + 1] += p.offset[k];
    p.pool.resize(s.rows.size());
    std::vector<std::size_t> next(p.offset.begin(), p.offset.end() - 1);
    // Prices near the largest double scaled by a power of two (sales.hpp): the value sums and
    // the means stay finite; relatives and value weights do not change.
    const std::vector<double> price = scaledPrices(in.sales, s);
    for (std::size_t j = 0; j < s.rows.size(); ++j)
        p.pool[next[c.at(sid[j], s.period[j])]++] = price[j];
    return p;
}

// Counts, sums and prices of the cells (no price below minsales sales; counted in r); marks
// the periods where some stratum has a price. Returns the rows in thin cells.
std::size_t priceCells(Cells& c, const CellPool& p, const MixOptions& o, MixResult& r,
                       std::vector<double>& anyPrice) {
    std::size_t thinRows = 0;
    for (std::size_t k = 0; k < c.count.size(); ++k) {
        const auto from = p.pool.begin() + static_cast<std::ptrdiff_t>(p.offset[k]);
        const std::vector<double> v(from, from + static_cast<std::ptrdiff_t>(p.size(k)));
        c.count[k] = v.size();
        c.value[k] = std::accumulate(v.begin(), v.end(), 0.0);
        if (v.empty()) continue;
        if (v.size() < o.minSales) {
            ++r.thinCells;
            thinRows += v.size();
            continue;
        }
        c.price[k] = o.stat == MixStatistic::Median ? stats::median(v)
                                                     : c.value[k] / double(v.size());
        anyPrice[k % static_cast<std::size_t>(c.T)] = 1.0;
    }
    return thinRows;
}

// Stratified bootstrap: redraw every cell's sales, rebuild the index, keep base = 100; the
// band is the quantiles of the replicates.
void bootstrapBands(const Cells& c, const CellPool& p, const PeriodAxis& axis,
                    const std::vector<double>& anyPrice, const MixOptions& o, MixResult& r) {
    const int base = r.table.basePosition;
    std::mt19937_64 gen(o.seed);
    std::vector<std::vector<double>> reps(static_cast<std::size_t>(c.T));
    Cells rc = c;
    std::vector<double> sample;
    for (int k = 0; k < o.reps; ++k) {
        for (std::size_t cell = 0; cell < c.count.size(); ++cell) {
            const std::size_t m = p.size(cell);
            if (m == 0) continue;
            const double* v = p.pool.data() + p.offset[cell];
            sample.resize(m);
            for (double& x : sample) x = v[draw(gen, m)];
            rc.value[cell] = std::accumulate(sample.begin(), sample.end(), 0.0);
            if (hasValue(c.price[cell]))
                rc.price[cell] = o.stat == MixStatistic::Median
                                     ? stats::median(sample)
                                     : rc.value[cell] / double(sample.size());
        }
        MixResult scratch;
        MixBuilder rb(rc, o, scratch);
        buildLevels(rb, rc, axis, anyPrice, o, scratch);
        const double ref = rb.level()[base];
        if (!hasValue(ref) || !(ref > 0)) continue;
        for (int t = 0; t < c.T; ++t)
            if (hasValue(rb.level()[t])) reps[t].push_back(100.0 * rb.level()[t] / ref);
    }
    for (int t = 0; t < c.T; ++t) {
        if (!hasValue(r.table.index[t]) || reps[t].size() < 2) continue;
        std::sort(reps[t].begin(), reps[t].end());
        r.table.lower[t] = stats::quantile(reps[t], (1 - o.level) / 2);
        r.table.upper[t] = stats::quantile(reps[t], (1 + o.level) / 2);
    }
}

// Rows used and dropped after the cells, and the warnings of the mix.
void mixDiagnostics(std::size_t used, std::size_t thinRows, const MixOptions& o, MixResult& r) {
    r.diag.drop(DropReason::ThinStratumPeriod, thinRows);
    r.diag.drop(DropReason::UnpricedStratum, r.diag.rowsUsed - used - thinRows);
    r.diag.rowsUsed = used;
    std::size_t noValue = 0;
    for (double v : r.table.index)
        if (!hasValue(v)) ++noValue;
    if (r.emptyCells)
        r.diag.warn(fmt::format("{} stratum-period(s) without a price: {}", r.emptyCells,
                                o.empty == EmptyStratumRule::Carry ? "last relative carried forward"
                                                                   : "weights re-normalised"));
    if (r.unpricedAtReference)
        r.diag.warn(fmt::format("{} stratum weight(s) left out: no price in the reference period",
                                r.unpricedAtReference));
    if (r.fallbackWeights)
        r.diag.warn(fmt::format("{} link(s) weighted by the link period (no sales the year before)",
                                r.fallbackWeights));
    if (noValue) r.diag.warn(fmt::format("{} period(s) without a value", noValue));
}

}  // namespace

void MixOptions::validate() const {
    IndexOptions::validate();
    if (bootstrap && (reps < 20 || reps > 10000))
        throw InputError(fmt::format("reps must lie between 20 and 10000, got {}", reps));
}

MixResult indexMix(const MixInput& in, const MixOptions& o) {
    o.validate();
    const RowProblems blank = blankStrata(in);
    MixResult r;
    const ScreenedSales s = screenSales(in.sales, o.freq, r.diag, &blank);
    const std::vector<int> sid = stratumIds(in, s, r.strata);
    Cells c;
    c.H = static_cast<int>(r.strata);
    c.T = s.axis.count;
    const std::size_t HT = r.strata * static_cast<std::size_t>(c.T);
    if (HT > kMaxCells)
        throw InputError(fmt::format(
            "strata: {} strata over {} periods are too many cells (more than {}); a stratum "
            "should hold many sales, so use coarser strata columns",
            c.H, c.T, kMaxCells));
    if (o.bootstrap)
        limits::checkWork(
            double(o.reps) * (double(s.rows.size()) + double(HT)), limits::kMaxMixBootstrapWork,
            fmt::format("bands=bootstrap: {} replicates x ({} sales + {} strata x {} periods; {})",
                        limits::grouped(o.reps), limits::grouped(double(s.rows.size())),
                        limits::grouped(c.H), limits::grouped(c.T), limits::spanText(s.axis)),
            "sales and stratum-periods redrawn",
            limits::longSpan(s.axis)
                ? std::string(limits::kMistypedDateAdvice) +
                      ", or use fewer replicates (reps), fewer strata or an include mask"
                : std::string("use fewer replicates (reps), fewer strata or an include mask"));
    c.count.assign(HT, 0);
    c.value.assign(HT, 0.0);
    c.price.assign(HT, kNoValue);
    const CellPool pool = poolCells(c, in, s, sid);
    std::vector<double> anyPrice(static_cast<std::size_t>(c.T), kNoValue);
    const std::size_t thinRows = priceCells(c, pool, o, r, anyPrice);

    MixBuilder b(c, o, r);
    buildLevels(b, c, s.axis, anyPrice, o, r);
    r.strataWeighted = b.weightedStrata();
    r.table.axis = s.axis;
    r.table.count = b.used();
    const std::vector<double> none(static_cast<std::size_t>(c.T), kNoValue);
    scaleToBase(r.table, b.level(), none, none, o);
    if (o.bootstrap) bootstrapBands(c, pool, s.axis, anyPrice, o, r);
    mixDiagnostics(std::accumulate(b.used().begin(), b.used().end(), std::size_t{0}), thinRows, o,
                   r);
    return r;
}

}  // namespace lintel
