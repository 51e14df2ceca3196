// Hodrick-Prescott trend (Hodrick & Prescott 1997, J. Money, Credit and Banking 29:1; first
// circulated 1980). The trend tau minimises
//
//     sum_{t observed} (y_t - tau_t)^2  +  lambda * sum_{t=2}^{T-1} (tau_{t+1} - 2 tau_t + tau_{t-1})^2
//
// over the span from the first to the last observed value. The fit term runs over observed
// periods only, so a period without a value inside the span still gets a trend (the smoothest
// bridge between its neighbours); periods before the first or after the last value get no
// trend (we do not extrapolate). The normal equations (W + lambda K'K) tau = W y, with W the
// 0/1 diagonal of observed periods and K the (T-2) x T second-difference matrix, form a
// symmetric positive definite pentadiagonal system, solved with Eigen's sparse LDLT in the
// natural (banded) ordering. Without gaps this is exactly statsmodels' hpfilter.
//
// Default lambda by frequency (Ravn & Uhlig 2002, REStat 84:371): 129600 monthly, 1600
// quarterly, 6.25 yearly.
#pragma once

#include <optional>
#include <vector>

#include "diagnostics.hpp"
#include "periods.hpp"

namespace lintel {

double defaultHpLambda(Frequency f);  // 129600 M, 1600 Q, 6.25 Y
// Throws InputError unless lambda, when given, is a positive number (the words INDEXTREND,
// INDEXSNR and INDEXCOMPARE share).
void validateLambda(const std::optional<double>& lambda);

struct HpOptions {
    Frequency freq = Frequency::Month;  // freq: "M" (default), "Q", "Y"; sets the default lambda
    std::optional<double> lambda;       // lambda: smoothing weight > 0; default
                                        // defaultHpLambda(freq)

    void validate() const;  // lambda positive when given
};

struct HpResult {
    std::vector<double> trend;  // one per input row; kNoValue before the first / after the last value
    std::vector<double> cycle;  // y - trend where y has a value, else kNoValue
    double lambda = 0;          // the lambda used
    int first = -1, last = -1;  // rows of the first and last value (the span of the trend)
    Diagnostics diag;           // rowsIn = rows, rowsUsed = rows with a value
};

// Throws InputError when fewer than 3 values are present or lambda is not positive.
HpResult hodrickPrescott(const std::vector<double>& series, const HpOptions& options);

}  // namespace lintel
