// Internals of the repeat-sales estimators, shared by repeat_sales_pairs.cpp (pair building
// and filters), repeat_sales_stages.cpp (the BMN and Case-Shiller stages of one fit),
// repeat_sales.cpp (the joint estimate, the index table, the public functions) and
// repeat_sales_chain.cpp (chain: frozen history). Not part of the public API.
#pragma once

#include <algorithm>
#include <cstdint>
#include <numeric>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <Eigen/Dense>

#include "repeat_sales.hpp"
#include "work_limits.hpp"

namespace lintel::rs_detail {

// Pairs in audit order as plain columns (the audit rows with their texts are only built
// when asked for: CHAINRS does not need them).
struct BuiltPairs {
    std::vector<std::size_t> firstRow, secondRow;  // input rows (pair input: the pair)
    std::vector<std::uint32_t> group;              // index into ids
    std::vector<long> key1, key2;                  // period keys (set when both usable)
    std::vector<double> y;                         // ln(P2 / P1) (set when both usable)
    std::vector<double> months, rate;              // months held, annualised log return
    std::vector<PairStatus> status;                // Used = candidate until estimated
    std::vector<std::optional<DropReason>> problem;  // First/SecondSaleUnusable: the
                                                     // sale's row reason
    std::vector<char> realPair;                    // 0: a duplicate listed as a pseudo pair
    std::vector<char> swapped;                     // pair input: the dates were reversed
    std::vector<double> weight;                    // final-stage weight, mean 1 over used
    std::vector<std::string_view> ids;             // trimmed id per group (views of input)

    Diagnostics diag;                // row-level drops so far
    const RepeatSalesInput* sales = nullptr;        // the source (one of the two)
    const RepeatSalesPairInput* pairInput = nullptr;
    std::vector<char> rowUsable;     // per input row: usable and not a dropped duplicate
    std::optional<PeriodAxis> axis;  // periods spanned by the usable sales, if any

    std::size_t size() const { return status.size(); }
};

BuiltPairs buildPairsFromSales(const RepeatSalesInput& in, const RepeatSalesOptions& o);
BuiltPairs buildPairsFromPairInput(const RepeatSalesPairInput& in, const RepeatSalesOptions& o);

// The reason of pair i (status Used when it is used).
PairReason reasonOf(const BuiltPairs& bp, std::size_t i);

// Pair reasons numbered 0 .. kPairReasonSlots - 1 (a table index for counting and caching the
// texts): status * (kDropReasonCount + 1) + (sale ? 1 + sale : 0).
inline constexpr std::size_t kPairReasonSlots = kPairStatusCount * (kDropReasonCount + 1);
std::size_t pairReasonSlot(const PairReason& r);

// Pairs formed, used and dropped by reason.
PairCounts countPairs(const BuiltPairs& bp);
// The audit rows.
std::vector<SalePair> auditRows(const BuiltPairs& bp);


// ---------------------------------------------------------------------------------------
// The estimators (repeat_sales_stages.cpp, repeat_sales.cpp, repeat_sales_chain.cpp).

// Largest number of periods on the axis (250 years of months): the normal equations and the
// covariance are dense T x T.
inline constexpr int kMaxPeriods = limits::kMaxRepeatSalesPeriods;

// One pair as the estimator sees it: periods as axis positions s < t.
struct Obs {
    int s = 0, t = 0;
    double y = 0;      // ln(P2 / P1)
    double years = 0;  // (t - s) / periods per year
    std::size_t pair = 0;  // index into the BuiltPairs columns
};

// Union-find over periods; the root of a part is its earliest period.
struct Components {
    std::vector<int> parent;
    explicit Components(int n) : parent(static_cast<std::size_t>(n)) {
        std::iota(parent.begin(), parent.end(), 0);
    }
    int find(int x) {
        while (parent[x] != x) {
            parent[x] = parent[parent[x]];
            x = parent[x];
        }
        return x;
    }
    void join(int a, int b) {
        a = find(a);
        b = find(b);
        if (a != b) parent[std::max(a, b)] = std::min(a, b);
    }
};

// Stage 2 of Case & Shiller: OLS of squared stage-1 residuals on 1, years (and years^2 for
// cs2). Sums are accumulated so the chained index can extend them period by period.
struct VarianceAccumulator {
    int terms = 2;  // 2: cs, 3: cs2
    Eigen::Matrix3d zz = Eigen::Matrix3d::Zero();
    Eigen::Vector3d ze = Eigen::Vector3d::Zero();
    double sumE2 = 0, sumY2 = 0;
    std::size_t n = 0;
    std::vector<char> gapSeen;
    int distinctGaps = 0;

    VarianceAccumulator(int terms_, int periods) : terms(terms_), gapSeen(periods + 1, 0) {}

    void add(int gap, double years, double e, double y);
    // Fits the model. Returns the number of terms actually fitted: 0 when the stage-1
    // residuals are all zero (equal weights), 1 when every pair spans the same number of
    // periods (constant variance: equal weights in variance units).
    int fit(RepeatSalesVarianceModel& m) const;
};

double fittedVariance(const RepeatSalesVarianceModel& m, double years, std::size_t* floored);

// Weighted least squares on the +1/-1 dummies, the normal equations accumulated pair by pair.
// col maps an axis position to its coefficient (-1: the reference period, b = 0).
struct Wls {
    Eigen::VectorXd b;
    Eigen::MatrixXd inv;      // (X'WX)^-1
    std::vector<double> res;  // residual per observation
    double sumWr2 = 0;
};

Wls solveWls(const std::vector<Obs>& obs, const std::vector<double>* w,
             const std::vector<int>& col, int k);
int varianceTerms(RepeatSalesMethod m);

// Warnings of the stage-2 fallbacks, each given once.
struct StageTwoNotes {
    bool zeroResiduals = false, sameGap = false, noSquare = false;
    void note(int fitted, int wanted, Diagnostics& diag);
};

// The joint estimate (all periods together) of one connected part of the pair graph.
struct JointFit {
    std::vector<int> col;
    Wls fin;
    double s2 = kNoValue;
    std::size_t n = 0, k = 0;
    std::vector<double> w;   // final-stage weight per observation
    std::vector<double> e1;  // stage-1 residual per observation
    RepeatSalesVarianceModel model;
    double level(int pos) const { return col[pos] < 0 ? 0.0 : fin.b[col[pos]]; }
};

JointFit fitJoint(const std::vector<Obs>& obs, std::vector<int> col, int k,
                  RepeatSalesMethod method, int periods, VarianceAccumulator* acc,
                  StageTwoNotes& notes, Diagnostics& diag);

// Why a period has no value (for the warnings and the base error).
enum class NoValue { None, NoPair, NotLinked, Thin, NoPairEnds, Unreached };

// "2020-01 .. 2020-06, 2021-03" (at most 8 runs, then "and N more").
std::string periodList(const PeriodAxis& axis, const std::vector<int>& pos);
std::string noValueText(NoValue why, const RepeatSalesOptions& o);

// What both estimators hand to the table assembly.
struct Levels {
    std::vector<double> level;   // log level per period (any reference); kNoValue = none
    Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor> cov;  // T x T
    std::vector<double> df;      // residual df behind each period's value
    std::vector<NoValue> why;
    double scale = kNoValue;
    RepeatSalesVarianceModel model;
    int reference = -1;          // joint estimate: the period whose level is fixed at 0
};

// The estimate behind CHAINRS from the pairs that passed the filters: the joint fit (chain
// off; repeat_sales.cpp) or the chain (repeat_sales_chain.cpp), then the index table.
// Pairs it cannot use get their status (NotLinked, ChainUnreached, ThinPeriod) in bp.
class Estimator {
public:
    Estimator(BuiltPairs& bp, const RepeatSalesOptions& o, RepeatSalesResult& r)
        : bp_(bp), o_(o), r_(r) {}
    // Throws InputError when no index can be built.
    void run();
    // For the smoother: no warnings about periods without a value (the model gives them one).
    void forSmoothing() { forSmoothing_ = true; }
    // The levels and their covariance behind the table (after run()).
    const Levels& levels() const { return levels_; }

private:
    // The running sums of the chain (repeat_sales_chain.cpp).
    struct ChainState {
        VarianceAccumulator acc;
        double sumWr2 = 0, nObs = 0, nPar = 0;  // weighted residual sum, observations, values
        std::vector<double> aS;   // per period: weight of its frozen value in the new one
        std::vector<int> starts;  // periods with aS != 0
        std::size_t unreached = 0;
    };

    BuiltPairs& bp_;
    const RepeatSalesOptions& o_;
    RepeatSalesResult& r_;
    PeriodAxis axis_;
    int T_ = 0;
    int ppy_ = 12;
    std::vector<Obs> obs_;
    std::vector<double> weight_;  // raw final-stage weight per pair (0 = not used)
    StageTwoNotes notes_;
    Levels levels_;
    bool forSmoothing_ = false;

    std::string pairSummaryNow() const;
    int explicitBase() const;
    void drop(const Obs& ob, PairStatus s) { bp_.status[ob.pair] = s; }
    int choosePart(std::vector<Obs>& obs, Components& cc, int basePos);
    Levels emptyLevels() const;
    JointFit fitPart(std::vector<Obs>& obs, int basePos, Levels& lv, VarianceAccumulator* acc,
                     std::vector<char>& inPart);
    std::vector<char> touchedPeriods(const std::vector<Obs>& obs) const;
    void markNoValueJoint(Levels& lv, const std::vector<char>& touched, int upTo);
    Levels joint();
    Levels chained();
    void chainInitialWindow(std::vector<Obs>& window, int init, Levels& lv, ChainState& st);
    void chainPeriod(int t, const std::vector<Obs>& candidates, Levels& lv, ChainState& st);
    std::vector<double> chainWeights(const std::vector<Obs>& use, const Levels& lv,
                                     ChainState& st);
    void chainCovariance(int t, const std::vector<Obs>& use, const std::vector<double>& w,
                         double W, double s2, Levels& lv, ChainState& st);
    void assemble(const Levels& lv);
};

}  // namespace lintel::rs_detail
