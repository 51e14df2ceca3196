// Hedonic time-dummy price indexes (Eurostat et al., Handbook on Residential Property Prices
// Indices, 2013, ch. 5):
//
//     ln p_i = sum_t d_t D_it + sum_j b_j z_ij + e_i,
//
// one dummy D_t per period with sales (no separate intercept: the dummies span it) and the
// characteristic terms z (numeric columns as they are or logged, text or categorical columns
// as one dummy per level except the most frequent). Index I_t = 100 exp(d_t - d_base).
//
// Forms:
// - pooled (window = 0): one fit over all periods; past values revise as sales arrive;
// - rolling window (window = k >= 2): a fit on the k periods ending at t moves the index from
//   the latest earlier period s with a value: I_t = I_s exp(d_t - d_s) (Hill, Scholz,
//   Shimizu & Steurer 2022, J. Official Statistics 38); k = 2 is the adjacent-period method.
//   Published values never revise. Bands of the chain: the variance of ln I_t - ln I_base
//   as one linear combination of the log prices, sales shared by windows counted once.
// Options: Kennedy's (1981, AER 71:801) correction exp(d - var(d)/2); classical or HC1
// (White 1980 with the n / (n - p) factor, MacKinnon & White 1985) standard errors.
//
// Computation (Frisch-Waugh-Lovell): the period block is eliminated by demeaning every
// term and ln p within its period, so only the k x k matrix A = Z~'Z~ is formed and solved
// (Eigen's LDLT on the Jacobi-scaled A); d_t = mean_t(ln p) - mean_t(z)'b. The full
// covariance of the d's follows from the block structure:
//     cov(d_t, d_s) = s^2 ([t = s] / n_t + zbar_t' A^-1 zbar_s),   cov(d_t, b) = -s^2 A^-1 zbar_t
// (the HC1 analogue uses per-period sums of e^2 and e^2 z~). Cost O(n k^2 + T k^2 + k^3);
// memory O(n + T k + k^2) besides the input (the n x T dummy matrix is never formed).
//
// Aliased terms (dropped automatically, named in the result, as R's lm reports them):
// a term whose within-period sum of squares is below (1e-7)^2 of its raw sum of squares is
// constant within periods (R's lm tolerance 1e-7 on the column norm, the period dummies coming
// first); a term whose within-period variation is explained by earlier terms up to a share
// 1 - 1e-9 (pivot of the scaled A below options.collinearTolerance) is collinear with them.
// The earlier term in column order is kept, as in R.
//
// Reference home (REFHOMEVALUE): exp(d_t + z_h'b) times a retransformation factor, Duan's
// (1983, JASA 78:605) smearing mean(exp(e)) by default, or the lognormal exp(s^2/2).
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "index_smoothing.hpp"
#include "index_table.hpp"
#include "sales.hpp"

namespace lintel {

// One characteristic column, aligned with the sales rows. Exactly one of `numeric` (NaN =
// blank or invalid) or `text` ("" = blank) holds the values; a text column is categorical.
struct CharacteristicColumn {
    std::string name;                // term names; empty: "x<column number>"
    std::vector<double> numeric;
    std::vector<std::string> text;
};

struct HedonicInput {
    SalesInput sales;
    std::vector<CharacteristicColumn> characteristics;  // in the user's column order
};

// The add-in's cell conversion for one column, kept here so the rule lives in one tested
// place. numbers[i]: the cell's number, NaN if it holds no number; texts[i]: the cell's text,
// "" if it holds a number or is blank. The column is numeric when more than half of its
// non-blank cells are numbers (its text cells are then invalid: NaN); otherwise it is a text
// column and its numbers become levels written as keyText(number) (text_keys.hpp).
CharacteristicColumn classifyColumn(std::string name, const std::vector<double>& numbers,
                                    const std::vector<std::string>& texts);

enum class HedonicBias { None, Kennedy };
enum class HedonicStdErr { Classical, HC1 };
enum class Retransform { Smearing, Lognormal };

struct HedonicOptions : IndexOptions, IndexSmoothing {
    // IndexOptions: freq ("M"), base (first period with a value), minsales (1): a period with
    // fewer sales shows no value but its sales stay in the fit, level (0.95).
    // IndexSmoothing: smooth (none), seasonal, realtime, borrow (smoothed_index.hpp); smooth
    // needs window 0 and bias none.
    int window = 0;                         // window: 0 (default) one pooled fit over all
                                            // periods; k >= 2 rolling windows of k periods
    HedonicBias bias = HedonicBias::None;   // bias: "none" (default) or "kennedy"
    HedonicStdErr se = HedonicStdErr::Classical;  // se: "classical" (default) or "hc1"
    std::vector<int> logColumns;            // log: 1-based columns whose logs enter;
                                            // default none
    std::vector<int> categoricalColumns;    // categorical: 1-based numeric columns treated as
                                            // categories; default none (text columns
                                            // always are)
    Retransform retransform = Retransform::Smearing;  // retransform (REFHOMEVALUE only):
                                            // "smearing" (Duan 1983, default) or "lognormal"
    double collinearTolerance = 1e-9;       // (no option key) pivot of the scaled A below
                                            // which a term counts as collinear with earlier
                                            // terms; default 1e-9, 0 < tolerance < 1

    // IndexOptions::validate, then window, log and categorical (columns >= 1, not both log
    // and categorical), the tolerance and the smoothing choices. Whether the columns exist is checked against the
    // input by the estimators. Throws InputError.
    void validate() const;
};

enum class TermKind { Intercept, Characteristic, Period };

struct HedonicTerm {
    std::string name;   // "(Intercept)", "log(lotsize)", "aircon=yes", "period 2024-03"
    TermKind kind = TermKind::Characteristic;
    double coefficient = kNoValue;
    double stdError = kNoValue;  // classical or HC1, as options.se says
    double tValue = kNoValue;
};

struct DroppedTerm {
    std::string name;
    std::string why;  // "constant", "constant within periods", "collinear with earlier terms",
                      // "single level"
};

// HEDONICCOEFS: the fitted model in the parametrisation of R's
// lm(log(price) ~ terms + relevel(factor(period), base)): the intercept is the reference
// period's level d_ref; period terms are d_t - d_ref for the other periods with sales.
// Pooled: the reference period is the index base. Rolling: the fit of the latest window
// (its last k periods); the reference is the base if it has sales in that window, else the
// window's first period with sales.
struct HedonicFit {
    std::vector<HedonicTerm> terms;  // intercept, characteristic terms kept, period terms
    std::vector<DroppedTerm> droppedTerms;
    std::size_t observations = 0;   // sales in the fit
    std::size_t rowsDropped = 0;    // rows dropped in screening (see diag for reasons)
    double rSquared = kNoValue;
    double adjRSquared = kNoValue;
    double residualSE = kNoValue;   // s = sqrt(RSS / df)
    double dfResidual = 0;          // n - periods with sales - terms kept
    PeriodAxis axis;
    int referencePosition = 0;      // axis position of the intercept's period
    int firstPosition = 0, lastPosition = 0;  // periods the fit covers
    Diagnostics diag;
};

// One characteristic of the reference home as used.
struct HomeCell {
    std::string column;
    bool categorical = false;
    double number = kNoValue;  // numeric columns: the value (before any log)
    std::string level;         // categorical columns: the level
    bool typical = false;      // filled in from the typical home (the cell was blank)
};

// The reference home, one entry per characteristic column, same conventions as
// classifyColumn's arguments; a blank cell (number NaN and text "") takes the typical home's
// value: the base period's median for a numeric column, its most frequent level for a
// categorical one. Both vectors empty: the typical home throughout.
struct HomeInput {
    std::vector<double> numbers;
    std::vector<std::string> texts;
};

// REFHOMEVALUE: the index table's layout with the home's value in price units (not an
// index) in table.index and its band in lower / upper (kNoValue where the period has no
// value); count = sales per period; basePosition = the period whose typical home fills blank
// cells of the home.
struct RefHomeResult : IndexResult {
    std::vector<HomeCell> home;  // the home valued
    double retransformFactor = kNoValue;  // pooled: the factor; rolling: the latest window's
    const std::vector<double>& value() const { return table.index; }
};

// INDEXHEDONIC. With options.smoothed(): smoothedHedonicIndex (smoothed_index.hpp).
IndexResult hedonicIndex(const HedonicInput& input, const HedonicOptions& options);
// The period effects of the pooled fit (window must be 0) at the mean home with their
// sampling covariance, for the smoother (smoothed_index.hpp says how).
struct PeriodEffectSeries;
PeriodEffectSeries hedonicPeriodEffects(const HedonicInput& input, const HedonicOptions& options);
// HEDONICCOEFS.
HedonicFit hedonicFit(const HedonicInput& input, const HedonicOptions& options);
// REFHOMEVALUE.
RefHomeResult referenceHomeValue(const HedonicInput& input, const HomeInput& home,
                                 const HedonicOptions& options);

}  // namespace lintel
