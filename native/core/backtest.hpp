// Which index to quote, measured on the user's own sales (INDEXBACKTEST): every candidate
// index method is estimated again and again on parts of the same sales and judged by
//
// 1. Accuracy out of sample. The properties are split into k folds (a property's fold is a
//    hash of its trimmed id text and the seed, so the same sales always give the same folds).
//    For each fold every sale of the fold's properties is removed, the index is estimated on
//    the rest, and the second price of each of the fold's resale pairs is predicted from the
//    first: P2_hat = P1 * I(t2) / I(t1). The pairs are CHAINRS's (consecutive sales of one
//    property; minhold, maxrate, changed and include as there; rs_detail::buildPairsFromSales).
//    Error e = ln P2_hat - ln P2; reported as 100 * median |e| and 100 * sqrt(mean e^2) (log
//    points, close to % for small errors). A pair whose periods have no index value is not
//    predicted (counted). After Crone & Voith (1992, J. Housing Econ. 2: 324-338: mean squared
//    and mean absolute prediction errors of held-out sales) and Nagaraja, Brown & Wachter
//    (2014, J. Real Estate Literature 22: 23-46: predictive ability as the comparison).
// 2. Revision. The index is estimated again with the last r = 1..R periods removed; each
//    period still present is compared with the estimate on all sales, both rebased to the
//    first period where both have a value: 100 |(I_r(t)/I_r(b)) / (I(t)/I(b)) - 1|; mean and
//    largest over all r and t (t != b). After Clapp & Giaccotto (1999, Real Estate Econ. 27:
//    79-104) and Clapham, Englund, Quigley & Redfearn (2006, Real Estate Econ. 34: 275-302).
// 3. Volatility (sd of the period log changes, INDEXVOLATILITY's lag 1) and the share of
//    periods of the data's span without a value, on the estimate from all sales.
//
// The rule behind the rank (also in docs/methods/backtest.md):
//  a. A method is ranked when its estimate on all sales succeeded, it predicted at least
//     kMinPredictedPairs held-out pairs, and at least kMinCoverage of the pairs predicted by
//     the method that predicted most (fewer: its gaps would make the comparison unfair).
//  b. Accuracy first: the median absolute error over the pairs every ranked method predicted.
//     A method is as accurate as the best when its median error exceeds the best's by at most
//     one standard error of the difference (a bootstrap over properties, kBootstrapReps
//     replicates from the seed): the one-standard-error rule of cross-validation (Breiman,
//     Friedman, Olshen & Stone 1984, Classification and Regression Trees; Hastie, Tibshirani
//     & Friedman 2009, The Elements of Statistical Learning, 2nd ed., sec. 7.10; from
//     memory).
//  c. Among those, the least mean revision wins; differences below kRevisionBand (0.5
//     percentage points) count as equal, being small next to prediction errors of 5-15 % (our
//     choice, no source; tests/reference/test_backtest_simulated.py shows how a narrower band
//     lets revision overrule accuracy in thin segments). Then the fewest periods without a
//     value; then the smaller median error. Rank 1 is recommended; rank 2 is chosen the same
//     way among the rest, and so on.
//  Volatility never decides: a flat line is perfectly smooth and revises nothing, but it wins
//  only when no method predicts resales better by more than the noise. Held-out resales favour
//  repeat-sales methods (they are what those methods fit); the docs say so.
//
// Cost: each method is estimated up to k + R + 1 times (a fold without resales is skipped).
// The work is estimated first (backtestWork) and refused past kMaxBacktestWork.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <variant>
#include <vector>

#include "hedonic.hpp"
#include "index_table.hpp"
#include "mix_adjusted.hpp"
#include "raw_index.hpp"
#include "repeat_sales.hpp"
#include "sales.hpp"

namespace lintel {

// ---- Candidate methods --------------------------------------------------------------------
// Adding a kind: an enum value, its Options type in the variant (if new), its entry in
// backtest_methods.cpp (estimator and work), and its row word in the add-in
// (native/addin/functions_backtest.cpp).
enum class IndexMethodKind { Median, Mean, Mix, Hedonic, RepeatSales };

using IndexMethodOptions =
    std::variant<RawIndexOptions, MixOptions, HedonicOptions, RepeatSalesOptions>;

struct CandidateMethod {
    std::string label;             // as the user wrote it ("hedonic log=1"); names the row
    IndexMethodKind kind = IndexMethodKind::Median;
    IndexMethodOptions options;    // the method's own Options; the alternative must fit the
                                   // kind. The backtest sets freq to its own, clears base and
                                   // turns off bootstrap bands (mix).
    bool ownMinSales = false;      // false: the backtest's minsales replaces the method's
};

// What a kind needs besides ids, dates and prices.
enum class MethodNeeds { Nothing, Characteristics, Strata };
MethodNeeds methodNeeds(IndexMethodKind kind);
const char* methodKindWord(IndexMethodKind kind);  // "median", "mean", "mix", "hedonic", "repeat"

// ---- Input, options, result ---------------------------------------------------------------
struct BacktestInput {
    std::vector<std::string> id;   // property id per row (as CHAINRS: trimmed, case matters,
                                   // numbers as keyText); a blank id: the sale is never held
                                   // out, it stays in every estimate
    SalesInput sales;              // dates, prices, include, emptyRow
    std::vector<CharacteristicColumn> characteristics;  // optional (hedonic)
    std::vector<std::vector<std::string>> strata;       // optional (mix), columns of rows
    std::vector<char> changed;     // optional, as CHAINRS
    std::vector<CandidateMethod> methods;  // at least one
};

inline constexpr std::size_t kMinPredictedPairs = 30;
inline constexpr double kMinCoverage = 0.8;
inline constexpr int kBootstrapReps = 200;
inline constexpr double kRevisionBand = 0.5;  // percentage points
inline constexpr int kMaxFolds = 100;
// Largest work allowed, in backtestWork units (nanoseconds as measured on a shared two-core
// machine: 6 s there). Six methods with 10 folds and 12 revisions pass up to about 80,000
// sales.
inline constexpr double kMaxBacktestWork = 6.0e9;

struct BacktestOptions {
    Frequency freq = Frequency::Month;  // freq: "M" (default), "Q", "Y"; every method's
    int folds = 10;                     // folds: 2 .. kMaxFolds; default 10
    unsigned long long seed = 1;        // seed: folds and bootstrap; default 1
    std::optional<int> revisions;       // revisions: periods removed, 0 .. 120 (0 = off);
                                        // default one year (12 M, 4 Q, 2 Y)
    std::size_t minSales = 1;           // minsales: every method's, unless its row sets its
                                        // own; default 1
    double minHoldMonths = 6;           // minhold, maxrate: CHAINRS's pair rules for the
    double maxRate = 1.0;               // held-out pairs; defaults 6 and 1 (0 = off)

    void validate() const;              // throws InputError naming the option
    int revisionPeriods() const;        // revisions or its default
};

struct BacktestRow {
    std::string label;
    bool estimated = false;           // the estimate on all sales succeeded
    std::string failure;              // why not (the estimator's message)
    std::size_t pairsPredicted = 0;   // held-out pairs with both periods valued
    double medianAbsError = kNoValue; // 100 * median |e| over its predicted pairs
    double rmsError = kNoValue;       // 100 * sqrt(mean e^2)
    double meanRevision = kNoValue;   // %; kNoValue when nothing could be compared
    double maxRevision = kNoValue;    // %
    std::size_t revisionsCompared = 0;  // (r, period) values compared
    double volatility = kNoValue;     // sd of 100 ln(I_t / I_{t-1}), log points
    double missingShare = kNoValue;   // 0..1: periods of the span without a value
    std::size_t foldsFailed = 0;      // fold estimates that failed (their pairs unpredicted)
    std::size_t revisionsFailed = 0;  // truncated estimates that failed
    int rank = 0;                     // 1 = best; 0 = not ranked
    bool recommended = false;
    std::string reason;               // one line in plain words
};

struct BacktestResult {
    std::vector<BacktestRow> methods;  // in the input's order
    std::size_t pairs = 0;             // held-out resale pairs (all folds)
    std::size_t properties = 0;        // properties with at least one such pair
    int folds = 0;
    int revisions = 0;                 // periods removed at most (after the span's limit)
    PeriodAxis axis;                   // span of the usable sales
    Diagnostics diag;                  // screening of the sales; warnings
    std::string summary() const;
};

// Per-pair and per-method detail of a run (the reference checks).
struct BacktestDetail {
    std::vector<std::size_t> firstRow, secondRow;  // input rows of each held-out pair
    std::vector<int> fold;
    std::vector<double> logChange;                 // ln(P2 / P1)
    std::vector<std::vector<double>> predicted;    // [method][pair] ln(I(t2)/I(t1)); NaN
    struct Revision {
        int removed = 0;            // r
        long periodKey = 0;
        double percent = kNoValue;  // signed 100 ((I_r(t)/I_r(b)) / (I(t)/I(b)) - 1)
    };
    std::vector<std::vector<Revision>> revisions;  // [method]
    std::vector<std::vector<double>> fullLog;      // [method][period of the result's axis]:
                                                   // ln I of the estimate on all sales; NaN
};

// Estimated work of a backtest (units of roughly one nanosecond), from the rows, the terms
// of the hedonic methods, the periods and the number of estimates.
double backtestWork(const BacktestInput& input, const BacktestOptions& options);

// Runs the backtest. Throws InputError for bad input or options, no usable sale, a method
// lacking its columns (characteristics, strata), or work past kMaxBacktestWork. A method
// whose estimate fails is reported in its row, not thrown.
BacktestResult backtest(const BacktestInput& input, const BacktestOptions& options,
                        BacktestDetail* detail = nullptr);

// The fold of a property: splitmix64(fnv1a64(trimmed id) xor splitmix64(seed)) mod folds
// (FNV-1a: Fowler, Noll & Vo; splitmix64: Steele, Lea & Flood 2014). -1 for a blank id.
int propertyFold(std::string_view id, unsigned long long seed, int folds);

// ---- The rule, on its own (unit-tested with made-up errors) --------------------------------
struct MethodScore {
    std::string label;
    bool estimated = false;
    std::string failure;
    std::vector<double> absError;    // per held-out pair: |e|; NaN when not predicted
    double meanRevision = kNoValue;  // %
    double missingShare = kNoValue;  // 0..1
};
struct Ranking {
    std::vector<int> rank;            // per method; 0 = not ranked
    int recommended = -1;             // index of the method, -1 when none
    std::vector<std::string> reason;  // per method
};
// cluster: per held-out pair, its property (for the bootstrap). Deterministic in seed.
Ranking rankMethods(const std::vector<MethodScore>& methods, const std::vector<std::size_t>& cluster,
                    unsigned long long seed);

}  // namespace lintel
