// Lead-lag of two index series: the cross-correlation of their changes at lags
// -maxlag .. maxlag (common practice; see e.g. Box, Jenkins & Reinsel, Time Series Analysis,
// ch. 11, for the cross-correlation function).
//
// Changes: c_t = 100 ln(I_t / I_{t-k}), k = one year of periods by default (year-over-year:
// 12 monthly, 4 quarterly, 1 yearly), or the option lag.
// Sign convention (ours): at lag L,
//     corr(L) = corr(a_t, b_{t+L})       over every t where both changes exist,
// so a POSITIVE lag L means a LEADS b by L periods (b follows a's moves L periods later);
// a negative lag means b leads a. In statsmodels' notation ccf(x, y)[k] = corr(x_{t+k}, y_t),
// our corr(L) is ccf(b, a)[L] (up to statsmodels' full-sample normalisation). Each correlation
// is the Pearson correlation of its own complete pairs (pairs with a missing end are skipped),
// i.e. pandas' a.corr(b.shift(-L)).
//
// Best lag: the lag with the largest (most positive) correlation among the lags with at least
// minpairs pairs; ties go to the smaller |lag|, then to the negative lag.
#pragma once

#include <cstddef>
#include <optional>
#include <vector>

#include "index_analytics.hpp"

namespace lintel {

struct LeadLagInput {
    std::vector<double> a, b;  // two index columns on the same periods (same length)
};

struct LeadLagOptions {
    Frequency freq = Frequency::Month;  // freq: "M" (default), "Q", "Y"; sets the defaults below
    std::optional<int> changeLag;  // lag: periods spanned by each change, >= 1; default one
                                   // year (12 M, 4 Q, 1 Y)
    std::optional<int> maxLag;     // maxlag: largest lead or lag tried, 0 <= maxlag < rows;
                                   // default one year of periods (12 M, 4 Q, 2 Y), at most
                                   // rows - 1
    std::size_t minPairs = 3;  // minpairs: fewer pairs at a lag = no correlation there;
                               // >= 3, default 3

    void validate() const;     // lag >= 1, maxlag >= 0, minpairs >= 3 (maxlag < rows is
                               // checked against the input)
    int changeLagUsed() const;  // changeLag, or one year of periods
};

struct LeadLagRow {
    int lag = 0;
    double corr = kNoValue;  // kNoValue when fewer than minpairs pairs or no variation
    std::size_t pairs = 0;
};

struct LeadLagResult {
    std::vector<LeadLagRow> rows;  // lags -maxlag .. maxlag in increasing order
    int bestLag = 0;
    double bestCorr = kNoValue;
    int changeLag = 0;             // the change lag used
    Diagnostics diag;              // rowsIn = rows of a; rowsUsed = rows where both have a value
};

// Throws InputError when the columns differ in length or no lag has enough pairs.
LeadLagResult indexLeadLag(const LeadLagInput& input, const LeadLagOptions& options);

// Without the throw: bestCorr stays kNoValue when nothing can be computed (for INDEXCOMPARE).
LeadLagResult leadLagOrEmpty(const LeadLagInput& input, const LeadLagOptions& options);

}  // namespace lintel
