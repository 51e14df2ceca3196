// Dated peaks and troughs of an index (business-cycle dating rules).
//   Quarterly: Harding & Pagan (2002, J. Monetary Economics 49:365), the BBQ rules: a peak
//     (trough) is a value higher (lower) than every value within +/- 2 quarters; peaks and
//     troughs alternate; each phase (peak to trough, trough to peak) lasts at least 2
//     quarters and each cycle (peak to peak, trough to trough) at least 5 quarters.
//   Monthly: after Bry & Boschan (1971, NBER Technical Paper 20), the rules of their final
//     stage (V) applied to the index itself: extremum within +/- 5 months, no turn within 6
//     months of either end, first and last peak (trough) not exceeded (undercut) by the values
//     between it and the end, cycles >= 15 months, phases >= 5 months. Their smoothing stages
//     (Spencer curve, 12-month moving average) are not run: an index is already an average.
//   Yearly (our own choice, no published rule): +/- 1 year, phase >= 1, cycle >= 2, ends 1.
//
// Procedure (deterministic; documented in docs/methods/analytics.md):
//   1. candidates: a peak is strictly higher than every value in the `window` periods before
//      it and at least as high as every value in the `window` periods after it (so a flat top
//      dates at its first period); troughs alike; at least one value on each side within
//      the window, and at least `ends` periods from the first and the last value;
//   2. repeat until nothing changes:
//      a. alternation: of consecutive peaks keep the highest, of consecutive troughs the lowest
//         (ties: the earlier);
//      b. ends: drop the first turn if it is a peak and a value before it is higher, or a
//         trough and a value before it is lower; the last turn likewise with the values after;
//      c. cycle: the shortest peak-to-peak or trough-to-trough span below `mincycle` loses its
//         lower peak (higher trough; ties: the later), then back to a.;
//      d. phase: the shortest phase below `minphase` loses both of its turns, then back to a.
// Distances count calendar periods (period keys), so periods without a value count too. A
// period without a value is never a turn.
#pragma once

#include <optional>
#include <vector>

#include "index_analytics.hpp"

namespace lintel {

struct TurnsInput {
    std::vector<double> periods;  // period start dates (as the index functions write them)
    std::vector<double> index;    // kNoValue where the period has no value
};

struct TurnsOptions {
    std::optional<Frequency> freq;  // freq: default inferred from the period dates
    std::optional<int> window;    // window: +/- periods a turn must dominate, >= 1;
                                  // default 5 M, 2 Q, 1 Y
    std::optional<int> minPhase;  // minphase: shortest phase, periods, >= 1; default 5 M, 2 Q, 1 Y
    std::optional<int> minCycle;  // mincycle: shortest cycle, periods, >= 1; default 15 M, 5 Q, 2 Y
    std::optional<int> ends;      // ends: no turn closer than this many periods to the first or
                                  // last value, >= 0; default 6 M, 2 Q, 1 Y

    void validate() const;  // the bounds above; throws InputError naming the option
};

struct TurnRow {
    int row = 0;               // row in the input
    double periodStart = 0;    // period start date serial
    bool peak = true;          // true = "peak", false = "trough"
    double value = kNoValue;   // index value at the turn
    double monthsSincePrevious = kNoValue;  // kNoValue for the first turn
};

struct TurnsResult {
    std::vector<TurnRow> rows;
    Frequency freq = Frequency::Month;
    int window = 0, minPhase = 0, minCycle = 0, ends = 0;  // the rules used
    // Turns removed by each rule (candidates that did not survive).
    std::size_t candidates = 0, removedAlternation = 0, removedEnds = 0, removedCycle = 0,
                removedPhase = 0;
    Diagnostics diag;
};

TurnsResult indexTurns(const TurnsInput& input, const TurnsOptions& options);

}  // namespace lintel
