// The one output shape of every index estimator: one row per period with
// period start | index (base period = 100) | sales used | lower band | upper band.
#pragma once

#include <cmath>
#include <limits>
#include <optional>
#include <vector>

#include "diagnostics.hpp"
#include "periods.hpp"

namespace lintel {

constexpr double kNoValue = std::numeric_limits<double>::quiet_NaN();
inline bool hasValue(double v) { return std::isfinite(v); }

// Options every index estimator shares. Defaults are the documented ones.
struct IndexOptions {
    Frequency freq = Frequency::Month;  // freq argument: "M" (default), "Q", "Y"
    std::optional<double> baseDate;     // base argument: the period containing it is 100;
                                        // default (nullopt): the first period with a value
    std::size_t minSales = 1;           // minsales: fewer sales in a period = no value; >= 1,
                                        // default 1
    double level = 0.95;                // level: confidence of the bands, 0 < level < 1;
                                        // default 0.95

    // Throws InputError naming the option (level, minsales). Every index estimator's
    // validate() calls it first.
    void validate() const;
};

struct IndexTable {
    PeriodAxis axis;
    std::vector<double> index;       // kNoValue where the period has no value
    std::vector<std::size_t> count;  // sales (or pairs) used in the period
    std::vector<double> lower, upper;  // band; kNoValue where not available
    int basePosition = 0;            // position of the base period on the axis
};

// The result of every estimator that writes an index table (raw, mix, hedonic, repeat
// sales, the reference home's value); estimators with more to say derive from it.
struct IndexResult {
    IndexTable table;
    Diagnostics diag;
};

// Position of the base period: the one containing options.baseDate, or the first period
// whose level has a value. Throws InputError when the base lies outside the axis or its
// period has no value.
int resolveBase(const PeriodAxis& axis, const std::vector<double>& level,
                const IndexOptions& options);

// Turns per-period price levels and their bands (same units) into an index with the base
// period's level = 100. The base level is taken as fixed: the bands show each period's own
// sampling uncertainty only (documented in docs/methods.md).
void scaleToBase(IndexTable& t, const std::vector<double>& level,
                 const std::vector<double>& levelLower, const std::vector<double>& levelUpper,
                 const IndexOptions& options);

}  // namespace lintel
