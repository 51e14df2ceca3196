// Raw price indexes: the mean or the median sale price of each period, relative to the base
// period (Eurostat et al., Handbook on Residential Property Prices Indices, 2013, ch. 4:
// "central tendency" methods). No adjustment for the mix of homes sold.
//
// Bands (documented in docs/methods.md; formulas and sources in statistics.hpp): the
// Student-t (trimmed: Tukey-McLaughlin) interval of the mean, and the distribution-free
// order-statistic interval of the median. Too few sales for the level: no band.
#pragma once

#include <vector>

#include "index_table.hpp"
#include "sales.hpp"

namespace lintel {

struct RawIndexOptions : IndexOptions {
    // IndexOptions: freq ("M"), base (first period with a value), minsales (1), level (0.95).
    double trim = 0.0;  // trim (mean only): fraction cut from each tail, 0 <= trim < 0.5;
                        // default 0 (the plain mean)

    void validate() const;  // IndexOptions::validate, then trim
};

IndexResult indexMean(const SalesInput& sales, const RawIndexOptions& options);
IndexResult indexMedian(const SalesInput& sales, const RawIndexOptions& options);

}  // namespace lintel
