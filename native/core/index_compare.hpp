// Side-by-side comparison of several index columns on the same periods: for each column its
// volatility, signal-to-noise ratio, largest absolute period change, the best lead-lag against
// the first column, and the periods without a value. Each figure is the one defined in
// index_analytics.hpp / lead_lag.hpp, with the options below; a figure that cannot be computed
// for a column (too few values) is kNoValue for that column only, with a warning.
//
//   volatility     sd of 100 ln(I_t / I_{t-lag}), lag = option lag (default 1)
//   snr            as INDEXSNR (default lambda snrLambda(freq))
//   maxchange      max over t of |100 (I_t / I_{t-1} - 1)|, the largest period change in percent
//   lag, corr      best lag and its correlation of INDEXLEADLAG(column, first column): a
//                  positive lag means THIS column leads the first column by lag periods. The
//                  first column itself gets lag 0, corr 1.
//   missing        rows without a positive value
#pragma once

#include <string>
#include <vector>

#include "index_analytics.hpp"
#include "lead_lag.hpp"

namespace lintel {

struct CompareInput {
    std::vector<std::vector<double>> columns;  // index columns, all the same length
    std::vector<std::string> names;            // empty, or one name per column ("" = unnamed)
};

struct CompareOptions {
    Frequency freq = Frequency::Month;  // freq: "M" (default), "Q", "Y"
    int lag = 1;                        // lag: change lag of the volatility, >= 1; default 1
    bool annual = false;                // annual: annualise the volatility; default off
    std::optional<double> lambda;       // lambda: HP lambda of the SNR, > 0; default
                                        // snrLambda(freq)
    std::optional<int> changeLag;       // leadlag: change lag of the lead-lag, >= 1; default
                                        // one year of periods
    std::optional<int> maxLag;          // maxlag: as INDEXLEADLAG, >= 0; default one year of
                                        // periods (at most rows - 1)

    void validate() const;  // lag, lambda, leadlag, maxlag; throws InputError
};

struct CompareRow {
    std::string name;               // the header's name, or "column N"
    double volatility = kNoValue;
    double snr = kNoValue;
    double maxAbsChange = kNoValue;
    double lag = kNoValue;          // best lag vs the first column (kNoValue if none)
    double corr = kNoValue;
    std::size_t missing = 0;
    std::size_t values = 0;
};

struct CompareResult {
    std::vector<CompareRow> rows;   // one per column, in input order
    Diagnostics diag;               // rowsIn = periods (rows); warnings per column
};

CompareResult indexCompare(const CompareInput& input, const CompareOptions& options);

}  // namespace lintel
