// Smoothed indexes from sales: INDEXHEDONIC and CHAINRS with smooth=level|trend. The period
// effects of the pooled hedonic fit or of the joint repeat-sales estimate, with their sampling
// covariance, are the measurements of the structural time series model of
// structural_smoother.hpp (Harvey 1989; Durbin & Koopman 2012; for thin housing markets
// Schwann 1998 and Francke 2010). Method and its limits: docs/methods/smoothing.md.
//
// - Smoothed (realtime off): one model on all periods; past values revise as sales arrive.
// - Real time (realtime on): the index is built from vintages, vintage v being everything
//   (the estimator's period effects and the smoother) computed from the sales dated up to
//   period v. The first periods (two years, and at least as many period effects as the
//   model needs) are published together from the first vintage t0 (its smoothed levels);
//   each later period v is published once, from its own vintage, as the movement since t0:
//       P_v = P_t0 + (L_v - L_t0) of vintage v.
//   The disturbance variances are estimated by maximum likelihood at vintage t0 and again
//   every year of periods (12 months, 4 quarters), and kept in between. No published value
//   depends on a sale dated after its period (or after the base period, whichever is later),
//   so adding later sales never changes it. Bands: Var(P_t - P_b) from the vintage that
//   published both when one did (t0), else the sum of the two movements' variances, each from
//   its own vintage (treated as independent).
// - Borrowing (borrow on): the whole range's period effects (the include mask ignored) and
//   the segment's (the include mask applied) in one model: a common trend plus the
//   segment's own deviation (structural_smoother.hpp, borrowStrength). The index is the
//   segment's level on the whole range's periods.
//
// Hedonic period effects (pooled fit, hedonic.hpp): the effects of the mean home,
// d*_t = d_t + zbar'b (zbar the mean characteristic terms over all sales in the fit), whose
// sampling covariance is s^2 (diag(1/n_t) + (Zbar_t - zbar)' A^-1 (Zbar_s - zbar)): an
// independent part and a part shared through the coefficients, both passed to the smoother
// exactly. With se=hc1 the covariance is not of this form: the smoother gets the centred HC1
// marginal variances (checked for the classical case only; docs/methods/smoothing.md).
// Repeat-sales period effects (chain off): b_t relative to the reference period with the
// full covariance V; the reference period enters as an observation 0 with variance v_0 (the
// mean covariance between two periods' effects) and the others with V_tt - v_0 (floored at
// 5 % of V_tt): the errors read as u_t - u_ref with independent u.
#pragma once

#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "hedonic.hpp"
#include "index_smoothing.hpp"
#include "repeat_sales.hpp"
#include "structural_smoother.hpp"

namespace lintel {

// Log period effects of an index estimator with their sampling covariance, on its axis.
struct PeriodEffectSeries {
    PeriodAxis axis;
    std::vector<std::size_t> count;  // sales (repeat sales: pairs ending) per period
    PeriodEffects effects;           // kNoValue where a period has no effect (no sales, or
                                     // fewer than minsales)
    Diagnostics diag;                // rows used and dropped, warnings of the estimator
    PairCounts pairs;                // repeat sales: pairs formed, used, dropped
};

struct SmoothedIndexResult : IndexResult {
    // IndexResult: the index table (the segment's sales per period in count) and the
    // diagnostics (the segment's rows, the estimator's and the smoother's warnings).
    SmootherResult model;           // the model behind the values; realtime: the last vintage
    std::vector<double> logIndex;   // ln(index / 100) per period
    std::vector<double> logSe;      // sd of ln index_t - ln index_base
    PairCounts pairs;               // repeat sales: the segment's pairs
    std::size_t marketRowsUsed = 0; // borrow: rows (sales) used for the whole range's effects
    int periodsWithoutEffect = 0;   // periods the model filled in (no effect of their own)
    // Real time.
    int initialPeriods = 0;         // periods published together from the first vintage
    int vintages = 0;               // vintages computed (t0 .. last period)
    int lastEstimate = -1;          // axis position of the vintage that last estimated the
                                    // variances
};

// The period effects of the segment (whole = false: the include mask applied) or of the whole
// range (whole = true: every row), from the sales dated up to the period with key lastKey
// (nullopt: all sales).
using EffectsOf = std::function<PeriodEffectSeries(bool whole, std::optional<long> lastKey)>;

// The smoothing path shared by both estimators. hasSegment: an include mask was given (borrow
// needs one). Throws InputError.
SmoothedIndexResult smoothedIndexFrom(const EffectsOf& effects, bool hasSegment,
                                      const IndexSmoothing& smoothing,
                                      const IndexOptions& index);

// INDEXHEDONIC with smooth=level|trend (options.smoothed() must hold; hedonicIndex calls this
// itself).
SmoothedIndexResult smoothedHedonicIndex(const HedonicInput& input, const HedonicOptions& options);
// CHAINRS with smooth=level|trend (repeatSalesIndex calls this itself).
SmoothedIndexResult smoothedRepeatSalesIndex(const RepeatSalesInput& input,
                                             const RepeatSalesOptions& options);

}  // namespace lintel
