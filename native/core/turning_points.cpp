#include "turning_points.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

namespace lintel {

namespace {

struct Turn {
    int row;
    long key;
    double value;
    bool peak;
};

// a is a more extreme turn of its kind than b (higher peak, lower trough).
bool moreExtreme(const Turn& a, const Turn& b) {
    return a.peak ? a.value > b.value : a.value < b.value;
}

// Start of the shortest span turns[j] .. turns[j + stride] shorter than `limit` periods
// (stride 2: a cycle between turns of one kind; 1: a phase), or turns.size() when none is.
std::size_t shortestSpan(const std::vector<Turn>& turns, std::size_t stride, long limit) {
    long best = limit;
    std::size_t at = turns.size();
    for (std::size_t j = 0; j + stride < turns.size(); ++j) {
        const long span = turns[j + stride].key - turns[j].key;
        if (span < best) {
            best = span;
            at = j;
        }
    }
    return at;
}

Frequency resolveFrequency(const std::vector<double>& periods, const std::optional<Frequency>& f) {
    for (std::size_t i = 0; i < periods.size(); ++i)
        if (!isUsableSerial(periods[i]))
            throw InputError(fmt::format("periods row {} is not a date", i + 1));
    if (f) {
        long prev = 0;
        for (std::size_t i = 0; i < periods.size(); ++i) {
            const long k = periodKey(periods[i], *f);
            if (!isPeriodStart(periods[i], *f) || (i > 0 && k <= prev))
                throw InputError(fmt::format(
                    "periods row {} is not the start of a new {} period (freq {})", i + 1,
                    *f == Frequency::Month ? "month" : *f == Frequency::Quarter ? "quarter" : "year",
                    frequencyCode(*f)));
            prev = k;
        }
        return *f;
    }
    const auto inferred = inferFrequency(periods.data(), periods.size());
    if (!inferred)
        throw InputError(
            "periods must be period start dates (first of a month, quarter or year) in "
            "increasing order, as the index functions write them");
    return *inferred;
}

}  // namespace

void TurnsOptions::validate() const {
    auto atLeast = [](const std::optional<int>& v, int minimum, const char* name) {
        if (v && *v < minimum)
            throw InputError(fmt::format("{} must be {} or more, got {}", name, minimum, *v));
    };
    atLeast(window, 1, "window");
    atLeast(minPhase, 1, "minphase");
    atLeast(minCycle, 1, "mincycle");
    atLeast(ends, 0, "ends");
}

TurnsResult indexTurns(const TurnsInput& in, const TurnsOptions& o) {
    o.validate();
    if (in.periods.size() != in.index.size())
        throw InputError(fmt::format("periods has {} rows, index has {}", in.periods.size(),
                                     in.index.size()));
    if (in.periods.empty()) throw InputError("periods holds no dates");
    TurnsResult r;
    r.freq = resolveFrequency(in.periods, o.freq);
    // Defaults by frequency: Bry & Boschan monthly, Harding & Pagan quarterly, ours yearly.
    auto pick = [&](const std::optional<int>& given, int m, int q, int y) {
        if (given) return *given;
        return r.freq == Frequency::Month ? m : r.freq == Frequency::Quarter ? q : y;
    };
    r.window = pick(o.window, 5, 2, 1);
    r.minPhase = pick(o.minPhase, 5, 2, 1);
    r.minCycle = pick(o.minCycle, 15, 5, 2);
    r.ends = pick(o.ends, 6, 2, 1);

    const int n = static_cast<int>(in.index.size());
    r.diag.rowsIn = in.index.size();
    std::vector<long> key(n);
    std::vector<int> obs;
    for (int i = 0; i < n; ++i) {
        key[i] = periodKey(in.periods[i], r.freq);
        if (hasValue(in.index[i])) obs.push_back(i);
    }
    r.diag.rowsUsed = obs.size();
    r.diag.drop(DropReason::BlankValue, in.index.size() - obs.size());
    if (obs.size() < 3)
        throw InputError(fmt::format("turning points need at least 3 values, the index has {}",
                                     obs.size()));
    const double* y = in.index.data();
    const long firstKey = key[obs.front()], lastKey = key[obs.back()];

    // 1. Candidates.
    std::vector<Turn> turns;
    for (std::size_t m = 0; m < obs.size(); ++m) {
        const int i = obs[m];
        if (key[i] - firstKey < r.ends || lastKey - key[i] < r.ends) continue;
        bool peak = true, trough = true, left = false, right = false;
        for (std::size_t j = m; j-- > 0 && key[i] - key[obs[j]] <= r.window;) {
            left = true;
            const double v = y[obs[j]];
            if (!(v < y[i])) peak = false;
            if (!(v > y[i])) trough = false;
        }
        for (std::size_t j = m + 1; j < obs.size() && key[obs[j]] - key[i] <= r.window; ++j) {
            right = true;
            const double v = y[obs[j]];
            if (!(v <= y[i])) peak = false;
            if (!(v >= y[i])) trough = false;
        }
        if (!left || !right) continue;
        if (peak) turns.push_back({i, key[i], y[i], true});
        else if (trough) turns.push_back({i, key[i], y[i], false});
    }
    r.candidates = turns.size();

    // 2. Censoring rules, repeated until stable.
    for (bool changed = true; changed;) {
        changed = false;
        // a. Alternation.
        std::vector<Turn> alt;
        for (const Turn& t : turns) {
            if (!alt.empty() && alt.back().peak == t.peak) {
                if (moreExtreme(t, alt.back())) alt.back() = t;
                ++r.removedAlternation;
            } else {
                alt.push_back(t);
            }
        }
        turns.swap(alt);
        if (turns.empty()) break;
        // b. Ends: the first and last turns must not be exceeded towards their end.
        {
            const Turn& f = turns.front();
            bool drop = false;
            for (int j : obs) {
                if (j >= f.row) break;
                if (f.peak ? y[j] > f.value : y[j] < f.value) drop = true;
            }
            if (drop) {
                turns.erase(turns.begin());
                ++r.removedEnds;
                changed = true;
                continue;
            }
            const Turn& l = turns.back();
            for (auto it = obs.rbegin(); it != obs.rend() && *it > l.row; ++it)
                if (l.peak ? y[*it] > l.value : y[*it] < l.value) drop = true;
            if (drop) {
                turns.pop_back();
                ++r.removedEnds;
                changed = true;
                continue;
            }
        }
        // c. Cycles: the shortest too-short span between turns of one kind.
        {
            const std::size_t at = shortestSpan(turns, 2, r.minCycle);
            if (at < turns.size()) {
                // Remove the weaker of the two; ties: the later.
                const std::size_t victim = moreExtreme(turns[at], turns[at + 2]) ||
                                                   turns[at].value == turns[at + 2].value
                                               ? at + 2
                                               : at;
                turns.erase(turns.begin() + static_cast<long>(victim));
                ++r.removedCycle;
                changed = true;
                continue;
            }
        }
        // d. Phases: the shortest too-short phase loses both turns.
        {
            const std::size_t at = shortestSpan(turns, 1, r.minPhase);
            if (at < turns.size()) {
                turns.erase(turns.begin() + static_cast<long>(at),
                            turns.begin() + static_cast<long>(at) + 2);
                r.removedPhase += 2;
                changed = true;
                continue;
            }
        }
    }

    const int mpp = monthsPerPeriod(r.freq);
    for (std::size_t j = 0; j < turns.size(); ++j) {
        TurnRow row;
        row.row = turns[j].row;
        row.periodStart = periodStartOfKey(turns[j].key, r.freq);
        row.peak = turns[j].peak;
        row.value = turns[j].value;
        if (j > 0) row.monthsSincePrevious = double((turns[j].key - turns[j - 1].key) * mpp);
        r.rows.push_back(row);
    }
    const std::size_t removed =
        r.removedAlternation + r.removedEnds + r.removedCycle + r.removedPhase;
    if (removed)
        r.diag.warn(fmt::format(
            "{} of {} candidate turns removed: {} alternation, {} ends, {} cycle, {} phase",
            removed, r.candidates, r.removedAlternation, r.removedEnds, r.removedCycle,
            r.removedPhase));
    if (turns.empty()) r.diag.warn("no turning point found");
    return r;
}

}  // namespace lintel
