// Measures that describe one index series: volatility and signal-to-noise; plus the helpers
// every index-series measure shares (lead-lag, turning points, seasonal factors, compare).
//
// Input of every measure here is an index column: one value per period, consecutive periods,
// kNoValue (NaN) where the period has no value. Measures that use logs also treat a value
// <= 0 as "no value" (counted in the diagnostics).
//
// Volatility (common practice; Eurostat RPPI Handbook 2013 uses the term informally): the
// sample standard deviation (n - 1 denominator) of the lag-period log changes
//     r_t = 100 ln(I_t / I_{t-lag}),
// taken over every t where both ends have a value (overlapping changes when lag > 1).
// Annualised (option annual): sd * sqrt(p / lag), p periods per year (the square-root-of-time
// rule, exact when changes are uncorrelated). Unit: percentage points of log change.
//
// Signal-to-noise ratio (our own definition, documented in docs/methods/analytics.md):
//     x_t = 100 ln I_t,  x = tau + n  (Hodrick-Prescott trend tau, n = x - tau the noise)
//     SNR = mean over P of (tau_t - tau_{t-1})^2  /  mean over P of (n_t - n_{t-1})^2
// where P is the set of periods t whose value and previous period's value both exist.
// It compares the power of the trend's period moves with the power of the noise's period
// moves: above 1, a reported period change is mostly movement of the trend.
// The HP lambda is NOT the business-cycle one (that would count the market's own cycles as
// noise): it puts the filter's half-gain point at a cycle of two years. The HP trend's gain at
// frequency w is 1 / (1 + 4 lambda (1 - cos w)^2) (King & Rebelo 1993, J. Economic Dynamics
// and Control 17:207, from memory), so half gain at a cycle of P periods needs
//     lambda = 1 / (4 (1 - cos(2 pi / P))^2),   P = 2 years of periods:
// 215.3 monthly (P = 24), 2.914 quarterly (P = 8), 0.0625 yearly (P = 2).
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "diagnostics.hpp"
#include "index_table.hpp"
#include "periods.hpp"

namespace lintel {

namespace analytics {
// rowsIn = rows; rowsUsed = rows with a value (> 0 when positiveOnly); drops counted by reason.
void countValues(const std::vector<double>& index, bool positiveOnly, Diagnostics& diag);
// 100 ln(I_t / I_{t-lag}); kNoValue where an end is missing or not positive. Computed from
// the logs of each end where the ratio itself is beyond the range of a double (1e308 after
// 1e-308: 141839 log points).
std::vector<double> logChanges(const std::vector<double>& index, int lag);
// " (a value of 0 or less has no log change: row n holds v)" for the first such row, or ""
// when every value is positive: the reason a message about too few changes gives.
std::string nonPositiveNote(const std::vector<double>& index);
}  // namespace analytics

// ---- INDEXVOLATILITY --------------------------------------------------------------------
struct VolatilityOptions {
    int lag = 1;                        // lag: periods spanned by each change, >= 1; default 1
    bool annual = false;                // annual: scale to one year, sd * sqrt(p / lag);
                                        // default off
    Frequency freq = Frequency::Month;  // freq: "M" (default), "Q", "Y"; p for annual

    void validate() const;  // lag >= 1
};

struct VolatilityResult {
    double volatility = kNoValue;  // percentage points of log change
    std::size_t changes = 0;       // changes used
    Diagnostics diag;
};

// Throws InputError when fewer than 2 changes can be formed.
VolatilityResult indexVolatility(const std::vector<double>& index, const VolatilityOptions& options);

// ---- INDEXSNR ---------------------------------------------------------------------------
// HP lambda whose trend gain is 1/2 at a cycle of two years (see above).
double snrLambda(Frequency f);

struct SnrOptions {
    Frequency freq = Frequency::Month;  // freq: "M" (default), "Q", "Y"; sets lambda
    std::optional<double> lambda;       // lambda: HP smoothing > 0; default snrLambda(freq)
                                        // (215.3 M, 2.914 Q, 0.0625 Y)

    void validate() const;  // lambda positive when given
};

struct SnrResult {
    double snr = kNoValue;      // signal^2 / noise^2; kNoValue when the noise is exactly 0
    double signal = kNoValue;   // root mean square of the trend's period changes (pct points)
    double noise = kNoValue;    // root mean square of the noise's period changes (pct points)
    std::size_t pairs = 0;      // period pairs used (both ends with a value)
    double lambda = 0;          // HP lambda used
    Diagnostics diag;
};

// Throws InputError when fewer than 3 positive values or fewer than 2 pairs are present.
SnrResult indexSnr(const std::vector<double>& index, const SnrOptions& options);

}  // namespace lintel
