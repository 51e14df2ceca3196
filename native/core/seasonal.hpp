// Classical multiplicative seasonal factors ("ratio to moving average"; e.g. Makridakis,
// Wheelwright & Hyndman, Forecasting, 3rd ed., 1998, sec. 3/4; the method of statsmodels'
// seasonal_decompose(model="multiplicative")):
//   1. trend: centred 2 x p moving average, p = 12 monthly or 4 quarterly,
//          T_t = (x_{t-p/2}/2 + x_{t-p/2+1} + ... + x_{t+p/2-1} + x_{t+p/2}/2) / p,
//      defined where all p + 1 values are present (no trend for the first and last p/2 rows);
//   2. ratios x_t / T_t, averaged by position in the year (row t belongs to position t mod p,
//      counting from the first row), skipping positions' missing ratios;
//   3. the p averages divided by their mean, so the factors average exactly 1;
//   4. seasonally adjusted index: x_t / S_t.
// Missing values: a row without a value has no ratio and no adjusted value, and the moving
// averages whose window touches it have no value; its factor is still given. A value of 0 or
// less is refused by name (InputError "row n holds -5"): a multiplicative factor needs
// positive values. Needs at least 2 years of rows, and every position needs at least one
// ratio. Values near the largest double are averaged scaled by a power of two (exact).
#pragma once

#include <vector>

#include "index_analytics.hpp"

namespace lintel {

struct SeasonalOptions {
    Frequency freq = Frequency::Month;  // freq: "M" (default) or "Q"; yearly has no seasons

    void validate() const;  // freq must be M or Q
};

struct SeasonalResult {
    std::vector<double> factor;         // per row: the factor of its position in the year
    std::vector<double> adjusted;       // per row: index / factor (kNoValue without a value)
    std::vector<double> trend;          // per row: the centred moving average (kNoValue at the ends)
    std::vector<double> periodFactors;  // p factors, position 0 = the first row's position
    std::vector<std::size_t> ratios;    // ratios averaged for each position
    Diagnostics diag;
};

SeasonalResult seasonalFactors(const std::vector<double>& index, const SeasonalOptions& options);

}  // namespace lintel
