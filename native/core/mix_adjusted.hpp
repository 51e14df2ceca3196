// Stratified (mix-adjusted) median or mean index (Eurostat et al., Handbook on Residential
// Property Prices Indices, 2013, ch. 4 "Stratification or mix adjustment methods"; Prasad &
// Richards, RBA Research Discussion Paper 2006-04):
//
//     P_t = sum_h w_h * (m_h^t / m_h^0),      sum_h w_h = 1,
//
// m_h^t the median (or mean) sale price of stratum h in period t, 0 the reference period.
// A stratum is one combination of the values of the strata columns.
//
// Fixed base (default): the reference period is the base period; w_h is proportional to the
// stratum's base-period sales count ("sales"), base-period sales value ("value"), or
// whole-sample sales count ("all"). Strata without a price in the base period cannot form a
// relative and get no weight (reported).
//
// Chain (option chain): one link per calendar year Y, re-weighted with the previous year's
// sales counts (or values) over all of year Y-1 and priced relative to the link period: the
// last period before year Y with an index value (December, or Q4, when it has one). The
// index of year Y is the link period's index times the link's P_t, so the links join at
// December: I_t = I_Dec(Y-1) * sum_h w_h^(Y-1) m_h^t / m_h^Dec(Y-1). The first year of data
// is its own link: weights from that year, priced relative to its first period with a value.
// Then the whole series is scaled to base = 100.
//
// A weighted stratum with no price in a period (no sales, or fewer than minsales):
//   empty=reweight (default): it is left out and the weights re-normalised over the strata
//     priced in that period, which imputes the weighted average relative of the others;
//   empty=carry: its last relative (since the reference period, where it is 1) is carried
//     forward (for periods before a base set later in the series: the nearest later one).
// A period in which no weighted stratum has a price has no value. Both are counted.
//
// Bands: by default none (kNoValue): a weighted sum of ratios of stratum medians has no
// closed-form sampling distribution we would trust at small cell sizes. Option
// bands=bootstrap gives a stratified percentile bootstrap (Efron & Tibshirani, An
// Introduction to the Bootstrap, 1993, ch. 13; resampling within strata for a stratified
// sample, from memory): each replicate redraws, with replacement, the sales
// of every stratum-period cell (cell sizes kept), recomputes the whole index (weights, links,
// base = 100), and the band is the (1 - level)/2 and (1 + level)/2 linear-interpolation
// quantiles of the replicates (numpy's default quantile rule). The base period itself gets
// the band [100, 100]; a cell with one sale contributes no variation, so thin cells make the
// band too narrow. Deterministic: mt19937_64 with a fixed seed, unbiased bounded draws.
#pragma once

#include <string>
#include <vector>

#include "index_table.hpp"
#include "sales.hpp"

namespace lintel {

struct MixInput {
    SalesInput sales;
    // One or more strata columns, each one entry per sales row; "" (or blanks) = no value,
    // the row is dropped as "blank stratum". Numbers arrive as their canonical text.
    std::vector<std::vector<std::string>> strata;
};

enum class MixStatistic { Median, Mean };
enum class MixWeights { Sales, Value, All };
enum class EmptyStratumRule { Reweight, Carry };

struct MixOptions : IndexOptions {
    // IndexOptions: freq (M), base (first period with a value), minsales (1) = fewest sales
    // for a stratum to have a price in a period; level (0.95) = the bootstrap band's level.
    MixStatistic stat = MixStatistic::Median;   // stat: "median" (default) or "mean"
    MixWeights weights = MixWeights::Sales;     // weights: "sales" (default), "value", "all"
    bool chain = false;                         // chain: yearly re-weighting, chain-linked;
                                                // default off (a fixed base)
    EmptyStratumRule empty = EmptyStratumRule::Reweight;  // empty: "reweight" (default), "carry"
    bool bootstrap = false;       // bands: "none" (default) or "bootstrap"
    int reps = 200;               // reps: bootstrap replicates, 20 .. 10000; default 200
    unsigned long long seed = 1;  // seed: bootstrap random seed; default 1

    void validate() const;  // IndexOptions::validate, then reps (with the bootstrap)
};

struct MixResult : IndexResult {
    std::size_t strata = 0;           // strata found in the usable rows
    std::size_t strataWeighted = 0;   // strata with a weight in at least one link
    std::size_t links = 0;            // 1 for a fixed base, else the yearly links
    std::size_t emptyCells = 0;       // weighted stratum-periods without a price, in periods
                                      // with a value (re-weighted or carried)
    std::size_t thinCells = 0;        // stratum-periods with sales but fewer than minsales
    std::size_t unpricedAtReference = 0;  // strata with sales in the weight period but no price
                                          // in the reference (base or link) period, summed over links
    std::size_t fallbackWeights = 0;  // links whose previous year gave no weight (link period used)
};

MixResult indexMix(const MixInput& input, const MixOptions& options);

}  // namespace lintel
