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

// The index as the rules see it: values, period keys, rows with a value.
struct Series {
    const double* y = nullptr;
    std::vector<long> key;  // per row
    std::vector<int> obs;   // rows with a value
};

// 1. Candidates: a peak is strictly higher than every value in the window before it and at
// least as high as every value in the window after it; troughs alike; none near the ends.
std::vector<Turn> candidates(const Series& S, const TurnsResult& r) {
    const double* y = S.y;
    const auto& key = S.key;
    const auto& obs = S.obs;
    const long firstKey = key[obs.front()], lastKey = key[obs.back()];
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
    return turns;
}

// a. Alternation: of consecutive peaks keep the highest, of consecutive troughs the lowest.
void alternate(std::vector<Turn>& turns, TurnsResult& r) {
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
}

// b. Ends: the first and last turns must not be exceeded towards their end. Returns true when
// a turn was removed.
bool censorEnds(std::vector<Turn>& turns, const Series& S, TurnsResult& r) {
    const double* y = S.y;
    const Turn& f = turns.front();
    bool drop = false;
    for (int j : S.obs) {
        if (j >= f.row) break;
        if (f.peak ? y[j] > f.value : y[j] < f.value) drop = true;
    }
    if (drop) {
        turns.erase(turns.begin());
        ++r.removedEnds;
        return true;
    }
    const Turn& l = turns.back();
    for (auto it = S.obs.rbegin(); it != S.obs.rend() && *it > l.row; ++it)
        if (l.peak ? y[*it] > l.value : y[*it] < l.value) drop = true;
    if (drop) {
        turns.pop_back();
        ++r.removedEnds;
        return true;
    }
    return false;
}

// c. Cycles: the shortest too-short span between turns of one kind loses the weaker of the
// two (ties: the later). Returns true when a turn was removed.
bool censorCycle(std::vector<Turn>& turns, TurnsResult& r) {
    const std::size_t at = shortestSpan(turns, 2, r.minCycle);
    if (at >= turns.size()) return false;
    const std::size_t victim =
        moreExtreme(turns[at], turns[at + 2]) || turns[at].value == turns[at + 2].value ? at + 2
                                                                                          : at;
    turns.erase(turns.begin() + static_cast<long>(victim));
    ++r.removedCycle;
    return true;
}

// d. Phases: the shortest too-short phase loses both turns. Returns true when it did.
bool censorPhase(std::vector<Turn>& turns, TurnsResult& r) {
    const std::size_t at = shortestSpan(turns, 1, r.minPhase);
    if (at >= turns.size()) return false;
    turns.erase(turns.begin() + static_cast<long>(at), turns.begin() + static_cast<long>(at) + 2);
    r.removedPhase += 2;
    return true;
}

// 2. The censoring rules, repeated until nothing changes (back to a. after each removal).
void censor(std::vector<Turn>& turns, const Series& S, TurnsResult& r) {
    for (bool changed = true; changed;) {
        alternate(turns, r);
        if (turns.empty()) break;
        changed = censorEnds(turns, S, r) || censorCycle(turns, r) || censorPhase(turns, r);
    }
}

// The surviving turns as rows, and the warnings.
void turnRows(const std::vector<Turn>& turns, TurnsResult& r) {
    const int mpp = monthsPerPeriod(r.freq);
    for (std::size_t j = 0; j < turns.size(); ++j) {
        TurnRow row;
        row.row = turns[j].row;
        row.periodStart = periodStartOfKey(turns[j].key, r.freq);
        row.peak = turns[j].peak;
        row.value = turns[j].value;
        if (j > 0)
            row.monthsSincePrevious = static_cast<double>((turns[j].key - turns[j - 1].key) * mpp);
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

    const std::size_t n = in.index.size();
    r.diag.rowsIn = n;
    Series S;
    S.y = in.index.data();
    S.key.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
        S.key[i] = periodKey(in.periods[i], r.freq);
        if (hasValue(in.index[i])) S.obs.push_back(static_cast<int>(i));
    }
    r.diag.rowsUsed = S.obs.size();
    r.diag.drop(DropReason::BlankValue, n - S.obs.size());
    if (S.obs.size() < 3)
        throw InputError(fmt::format("turning points need at least 3 values, the index has {}",
                                     S.obs.size()));
    std::vector<Turn> turns = candidates(S, r);
    r.candidates = turns.size();
    censor(turns, S, r);
    turnRows(turns, r);
    return r;
}

}  // namespace lintel
