// Repeat-sales price indexes from raw sales: pairs of consecutive sales of one property,
// regressed on period dummies.
//
//   y_i = ln(P_second / P_first) = b_t(i) - b_s(i) + e_i,  b_base = 0,  I_t = 100 exp(b_t)
//
// where s(i), t(i) are the periods of the first and second sale of pair i.
// - "bmn": Bailey, Muth & Nourse (1963), "A regression method for real estate price index
//   construction", JASA 58:933-942: ordinary least squares on the +1/-1 dummies.
// - "cs" (default): Case & Shiller (1987), "Prices of single-family homes since 1970", New
//   England Economic Review, Sep/Oct, 45-56; (1989) "The efficiency of the market for
//   single-family homes", AER 79:125-137: (1) BMN OLS; (2) OLS of the squared stage-1
//   residuals on a constant and the interval between the sales; (3) weighted least squares
//   with weights 1 / fitted variance.
// - "cs2": as "cs" with the squared interval added in stage (2) (Calhoun 1996, "OFHEO house
//   price indexes: HPI technical description", Office of Federal Housing Enterprise
//   Oversight).
// With chain on, published values are frozen: after an initial window estimated jointly,
// each later period is estimated from the pairs that end in it given the frozen values of
// the periods where they start (our own construction, documented in
// docs/methods/repeat_sales.md).
//
// The T x T normal equations are accumulated pair by pair (each pair touches two periods)
// and solved with Eigen's LDLT; no pairs x periods design matrix is ever formed.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "index_smoothing.hpp"
#include "index_table.hpp"
#include "sales.hpp"

namespace lintel {

enum class RepeatSalesMethod { CaseShiller, BaileyMuthNourse, CaseShillerQuadratic };

// "cs", "bmn", "cs2" (any case, surrounding blanks ignored); nullopt for anything else.
std::optional<RepeatSalesMethod> parseRepeatSalesMethod(std::string_view text);
const char* repeatSalesMethodCode(RepeatSalesMethod m);  // "cs", "bmn", "cs2"

// Raw sales, one entry per spreadsheet row.
struct RepeatSalesInput {
    // Property id as text; "" (or only blanks) = blank id: the row is dropped. Ids are compared
    // after trimming leading and trailing blanks (trimBlanks), case-sensitively. Numeric cells
    // become text with keyText (text_keys.hpp; in the add-in's cell conversion), so 123 and
    // "123" are one id.
    std::vector<std::string> id;
    SalesInput sales;            // date, price, include, emptyRow as for every index
    std::vector<char> changed;   // empty = no flags; else 1 = the property changed at this sale
                                 // (renovated, extended, rebuilt): the pair ending here is
                                 // dropped, the next pair starts from this sale
};

struct RepeatSalesOptions : IndexOptions, IndexSmoothing {
    // IndexOptions: freq (default "M"), base (default: first period with a value), level
    // (0.95), minsales (1): a period informed by fewer used pairs gets no value; the pairs
    // that inform a period are those with a sale in it for jointly estimated periods
    // (chain off, and the initial window of a chain) and those ending in it for chained
    // periods.
    // IndexSmoothing: smooth (none), seasonal, realtime, borrow (smoothed_index.hpp); smooth
    // needs chain off.
    RepeatSalesMethod method = RepeatSalesMethod::CaseShiller;  // method: "cs" (default),
                                                                // "bmn", "cs2"
    double minHoldMonths = 6;  // minhold: pairs held fewer completed calendar months are
                               // dropped ("flips"); default 6; 0 turns the filter off
    double maxRate = 1.0;      // maxrate: pairs whose |annualised log return| exceeds it are
                               // dropped; default 1; 0 turns the filter off
    bool chain = false;        // chain: false (default, option 0) re-estimates the whole
                               // history; true (option 1) freezes published values
    std::optional<int> chainInit;  // init (with chain): periods estimated jointly before
                                   // chaining starts, counted from the first period of the
                                   // data, >= 1; default: two years (24 M, 8 Q, 2 Y)

    // IndexOptions::validate, then minhold, maxrate, init and the smoothing choices. Throws
    // InputError.
    void validate() const;
    // The initial window used: chainInit, or two years of periods.
    int initialPeriods() const;
};

// Why a pair was not used. Codes are stable (RSPAIRS and the reference checks show them); the
// texts are in one table (pairStatusText, pairReasonText).
enum class PairStatus : std::uint8_t {
    Used = 0,
    FirstSaleUnusable,   // "first sale: <row reason>" (date, price, include)
    SecondSaleUnusable,  // "second sale: <row reason>"
    Duplicate,           // "duplicate sale (same id and date)": second row is the dropped one
    Changed,             // "property changed at the second sale"
    SamePeriod,          // "both sales in one period"
    ShortHold,           // "held less than minhold months"
    ExtremeReturn,       // "annualised log return beyond +/-maxrate"
    NotLinked,           // "not linked to the base period": its periods lie in another
                         // connected part of the pair graph
    ChainUnreached,      // "first sale in a period without a value" (chain 1)
    ThinPeriod,          // "fewer than minsales pairs end in the period" (chain 1)
    NotEstimated,        // "index not estimated" (RSPAIRS when the index cannot be built)
};
inline constexpr std::size_t kPairStatusCount =
    static_cast<std::size_t>(PairStatus::NotEstimated) + 1;

// The full reason of a dropped pair: its status and, for an unusable first or second sale,
// that sale's row reason (BadDate, BadPrice, NonPositivePrice, Excluded).
struct PairReason {
    PairStatus status = PairStatus::Used;
    std::optional<DropReason> sale;
    bool operator==(const PairReason& o) const { return status == o.status && sale == o.sale; }
};

const char* pairStatusText(PairStatus status);  // "" for Used; "first sale unusable" ...
// pairStatusText, with the sale's row reason for an unusable sale ("second sale: blank or
// non-numeric price").
std::string pairReasonText(const PairReason& reason);

// One row of the pair audit (RSPAIRS).
struct SalePair {
    std::string id;                  // trimmed id
    std::size_t firstRow = 0;        // input rows (0-based) of the two sales
    std::size_t secondRow = 0;
    double firstDate = kNoValue, firstPrice = kNoValue;
    double secondDate = kNoValue, secondPrice = kNoValue;
    double monthsHeld = kNoValue;    // completed calendar months between the sale days
    double annualRate = kNoValue;    // ln(P2/P1) * 365.25 / days held; kNoValue when a price
                                     // is unusable or the days are equal
    bool used = false;
    PairStatus status = PairStatus::Used;
    std::optional<DropReason> saleProblem;  // First/SecondSaleUnusable: the sale's row reason
    std::string reason;              // pairReasonText; "" when used
    double weight = 0;               // weight in the final stage, normalised to mean 1 over
                                     // the used pairs; 0 when not used
};

// Pairs formed and dropped, by reason (in the order reasons first occur).
struct PairCounts {
    std::size_t formed = 0;
    std::size_t used = 0;
    std::vector<std::pair<PairReason, std::size_t>> dropped;
    std::size_t droppedFor(const PairReason& reason) const;
    std::string summary() const;  // "9120 of 10000 pairs used; dropped: 500 ..."
};

// Stage-2 variance model: fitted variance of a pair = c0 + c1 * years + c2 * years^2
// (years between the two sales' periods). Empty for bmn, or when equal weights were used.
struct RepeatSalesVarianceModel {
    std::vector<double> coef;
    double floor = kNoValue;       // smallest variance allowed (5 % of the mean squared
                                   // stage-1 residual)
    std::size_t floored = 0;       // pairs whose fitted variance was raised to the floor
};

// table.count = used pairs whose second sale is in the period; diag rows: used = in at least
// one used pair, pair reasons in pairCounts (pairs given directly: each pair is a row,
// dropped as PairNotUsed).
struct RepeatSalesResult : IndexResult {
    PairCounts pairCounts;
    RepeatSalesVarianceModel variance;
    std::vector<double> logIndex;   // b_t - b_base per period; kNoValue where no value
    std::vector<double> logSe;      // standard error of b_t - b_base
    std::vector<double> df;         // residual degrees of freedom behind each band
    double scale = kNoValue;        // residual variance of the final stage
    std::string summary() const;    // diag.summary() + "; " + pairCounts.summary()
};

// The audit table (RSPAIRS): one row per pair, grouped by id (in order of first appearance)
// then by date; a duplicate sale follows the pair that ends at the sale it duplicates.
struct PairAudit {
    std::vector<SalePair> pairs;
    PairCounts counts;
    Diagnostics diag;
    // Set when the index could not be built (RSPAIRS still lists the pairs): the reason, in
    // the user's words, as CHAINRS would have said it.
    std::optional<std::string> notEstimated;
};

// CHAINRS: the index. Throws InputError when no index can be built (no usable pair, base
// outside the data or without a value, invalid options). When `audit` is given it also
// receives the pair audit of this very estimate (building it costs time: CHAINRS does not).
// With options.smoothed(): the table of smoothedRepeatSalesIndex (smoothed_index.hpp), logSe
// its band's standard deviation, df infinite (normal bands); audit must then be null.
RepeatSalesResult repeatSalesIndex(const RepeatSalesInput& input,
                                   const RepeatSalesOptions& options,
                                   PairAudit* audit = nullptr);

// The period effects of the joint estimate (chain must be off) with their sampling
// variances read as independent errors around the reference period (smoothed_index.hpp),
// for the smoother. The base option is not used.
struct PeriodEffectSeries;
PeriodEffectSeries repeatSalesPeriodEffects(const RepeatSalesInput& input,
                                            const RepeatSalesOptions& options);

// RSPAIRS: the audit table under the same filters and options. Does not throw when the index
// itself cannot be built: the pairs that passed the filters are then marked NotEstimated, the
// reason is in notEstimated (and, for the notes, in diag.warnings as "index not estimated:
// <reason>"). Throws InputError only for invalid options or columns.
PairAudit repeatSalesPairs(const RepeatSalesInput& input, const RepeatSalesOptions& options);

// Pairs given directly (one entry per pair; first and second sale of one property; a pair
// whose second date is the earlier is turned round). The same filters (except changed),
// estimators and output as repeatSalesIndex; ids are optional (shown in the audit only).
// Each pair counts as one row in diag.
struct RepeatSalesPairInput {
    std::vector<std::string> id;  // empty, or one per pair
    std::vector<double> firstDate, firstPrice, secondDate, secondPrice;
};
RepeatSalesResult repeatSalesFromPairs(const RepeatSalesPairInput& input,
                                       const RepeatSalesOptions& options,
                                       PairAudit* audit = nullptr);

}  // namespace lintel
