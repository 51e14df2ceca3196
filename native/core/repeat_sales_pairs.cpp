// Pair building and pair filters of the repeat-sales estimators (see repeat_sales.hpp and
// docs/methods/repeat_sales.md for the rules).
//
// Building is a grouping by id (ids numbered in order of first appearance, rows bucketed by
// that number: a stable counting sort) followed by a sort of each property's rows by
// (day, row): together a sort by (id, date). Consecutive sales of one property form a pair.
#include <algorithm>
#include <cctype>
#include <climits>
#include <cmath>
#include <cstdint>
#include <stdexcept>
#include <string_view>
#include <unordered_map>

#include <fmt/format.h>

#include "repeat_sales_internal.hpp"
#include "statistics.hpp"
#include "text_keys.hpp"

namespace lintel {

namespace {

using rs_detail::BuiltPairs;
using SaleProblem = std::optional<DropReason>;

struct StatusText {
    PairStatus status;
    const char* text;
};

// The one table of pair-status texts, in enum order.
constexpr StatusText kStatusTexts[] = {
    {PairStatus::Used, ""},
    {PairStatus::FirstSaleUnusable, "first sale unusable"},
    {PairStatus::SecondSaleUnusable, "second sale unusable"},
    {PairStatus::Duplicate, "duplicate sale (same id and date)"},
    {PairStatus::Changed, "property changed at the second sale"},
    {PairStatus::SamePeriod, "both sales in one period"},
    {PairStatus::ShortHold, "held less than minhold months"},
    {PairStatus::ExtremeReturn, "annualised log return beyond +/-maxrate"},
    {PairStatus::NotLinked, "not linked to the base period"},
    {PairStatus::ChainUnreached, "first sale in a period without a value"},
    {PairStatus::ThinPeriod, "fewer than minsales pairs end in the period"},
    {PairStatus::NotEstimated, "index not estimated"},
};

constexpr bool statusTableInEnumOrder() {
    std::size_t i = 0;
    for (const StatusText& t : kStatusTexts)
        if (static_cast<std::size_t>(t.status) != i++) return false;
    return i == kPairStatusCount;
}
static_assert(statusTableInEnumOrder(), "one text per PairStatus, in enum order");

// Civil dates of whole-day serials through a table over the span of the data (sales fall
// on a few thousand distinct days; the conversion is the costly part of pair building).
class CivilDays {
public:
    // `days`: the serial days to convert (floored, usable); spans above ~550 years are
    // converted one by one.
    explicit CivilDays(const std::vector<double>& days) {
        double lo = 0, hi = -1;
        for (double d : days) {
            if (hi < lo) lo = hi = d;
            lo = std::min(lo, d);
            hi = std::max(hi, d);
        }
        if (hi >= lo && hi - lo < 200000) {
            first_ = lo;
            table_.resize(static_cast<std::size_t>(hi - lo) + 1);
            for (std::size_t i = 0; i < table_.size(); ++i)
                table_[i] = civilFromSerial(lo + static_cast<double>(i));
        }
    }
    CivilDate operator()(double day) const {
        const double k = day - first_;
        if (!table_.empty() && k >= 0 && k < static_cast<double>(table_.size()))
            return table_[static_cast<std::size_t>(k)];
        return civilFromSerial(day);
    }

private:
    double first_ = 0;
    std::vector<CivilDate> table_;
};

// Completed calendar months: 12 (y2 - y1) + (m2 - m1), one less when the second day of
// month is smaller than the first.
int monthsBetween(const CivilDate& a, const CivilDate& b) {
    int m = 12 * (b.year - a.year) + (b.month - a.month);
    if (b.day < a.day) --m;
    return m;
}

// The filters that do not depend on the estimate, for a pair whose two sales are usable.
// Returns Used when the pair goes on to the estimator.
PairStatus filterPair(long key1, long key2, double months, double rate, bool changedAtSecond,
                      const RepeatSalesOptions& o) {
    if (changedAtSecond) return PairStatus::Changed;
    if (key1 == key2) return PairStatus::SamePeriod;
    if (o.minHoldMonths > 0 && months < o.minHoldMonths) return PairStatus::ShortHold;
    if (o.maxRate > 0 && std::fabs(rate) > o.maxRate) return PairStatus::ExtremeReturn;
    return PairStatus::Used;
}

void reserve(BuiltPairs& b, std::size_t n) {
    b.firstRow.reserve(n);
    b.secondRow.reserve(n);
    b.group.reserve(n);
    b.key1.reserve(n);
    b.key2.reserve(n);
    b.y.reserve(n);
    b.months.reserve(n);
    b.rate.reserve(n);
    b.status.reserve(n);
    b.problem.reserve(n);
    b.realPair.reserve(n);
}

// Appends a pair of two sales given by day, civil date, price and usability; fills the
// filter status. Returns its index.
std::size_t addPair(BuiltPairs& b, std::size_t rowA, std::size_t rowB, std::uint32_t group,
                    double dayA, double dayB, const CivilDate& ca, const CivilDate& cb,
                    double pa, double pb, SaleProblem probA, SaleProblem probB, bool changed,
                    const RepeatSalesOptions& o) {
    b.firstRow.push_back(rowA);
    b.secondRow.push_back(rowB);
    b.group.push_back(group);
    b.realPair.push_back(1);
    b.problem.push_back(std::nullopt);
    const bool datesOk = probA != DropReason::BadDate && probB != DropReason::BadDate;
    b.months.push_back(datesOk ? monthsBetween(ca, cb) : kNoValue);
    double y = kNoValue, rate = kNoValue;
    if (std::isfinite(pa) && std::isfinite(pb) && pa > 0 && pb > 0) {
        y = stats::logRatio(pb, pa);  // ln(pb / pa), also when pb / pa is beyond a double
        if (datesOk && dayB > dayA) rate = y * 365.25 / (dayB - dayA);
    }
    b.y.push_back(y);
    b.rate.push_back(rate);
    long k1 = 0, k2 = 0;
    PairStatus st;
    if (probA) {
        st = PairStatus::FirstSaleUnusable;
        b.problem.back() = probA;
    } else if (probB) {
        st = PairStatus::SecondSaleUnusable;
        b.problem.back() = probB;
    } else {
        k1 = periodKey(ca, o.freq);
        k2 = periodKey(cb, o.freq);
        st = filterPair(k1, k2, b.months.back(), rate, changed, o);
    }
    b.key1.push_back(k1);
    b.key2.push_back(k2);
    b.status.push_back(st);
    return b.status.size() - 1;
}

}  // namespace

const char* pairStatusText(PairStatus status) {
    const auto i = static_cast<std::size_t>(status);
    return i < kPairStatusCount ? kStatusTexts[i].text : "unknown reason";
}

std::string pairReasonText(const PairReason& r) {
    if (r.sale && r.status == PairStatus::FirstSaleUnusable)
        return std::string("first sale: ") + dropReasonText(*r.sale);
    if (r.sale && r.status == PairStatus::SecondSaleUnusable)
        return std::string("second sale: ") + dropReasonText(*r.sale);
    return pairStatusText(r.status);
}

void RepeatSalesOptions::validate() const {
    IndexOptions::validate();
    if (!(minHoldMonths >= 0) || !std::isfinite(minHoldMonths))
        throw InputError(fmt::format("minhold must be 0 or more months, got {}", minHoldMonths));
    if (!(maxRate >= 0) || !std::isfinite(maxRate))
        throw InputError(fmt::format("maxrate must be 0 (off) or positive, got {}", maxRate));
    if (chainInit && *chainInit < 1)
        throw InputError(fmt::format("init must be 1 or more periods, got {}", *chainInit));
    validateSmoothing(*this);
    if (smoothed() && chain)
        throw InputError("smooth needs chain=0: the smoother takes the period effects estimated "
                         "jointly (for values that never revise use realtime=1 instead of "
                         "chain=1)");
}

int RepeatSalesOptions::initialPeriods() const {
    return chainInit ? *chainInit : 2 * periodsPerYear(freq);
}

std::size_t PairCounts::droppedFor(const PairReason& reason) const {
    for (const auto& [r, c] : dropped)
        if (r == reason) return c;
    return 0;
}

std::optional<RepeatSalesMethod> parseRepeatSalesMethod(std::string_view text) {
    std::string t;
    for (char c : trimBlanks(text)) t += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    if (t == "cs") return RepeatSalesMethod::CaseShiller;
    if (t == "bmn") return RepeatSalesMethod::BaileyMuthNourse;
    if (t == "cs2") return RepeatSalesMethod::CaseShillerQuadratic;
    return std::nullopt;
}

const char* repeatSalesMethodCode(RepeatSalesMethod m) {
    switch (m) {
        case RepeatSalesMethod::CaseShiller: return "cs";
        case RepeatSalesMethod::BaileyMuthNourse: return "bmn";
        case RepeatSalesMethod::CaseShillerQuadratic: return "cs2";
    }
    return "cs";
}

namespace rs_detail {

PairReason reasonOf(const BuiltPairs& bp, std::size_t i) {
    return {bp.status[i], bp.problem[i]};
}

std::size_t pairReasonSlot(const PairReason& r) {
    const std::size_t sale = r.sale ? 1 + static_cast<std::size_t>(*r.sale) : 0;
    return static_cast<std::size_t>(r.status) * (kDropReasonCount + 1) + sale;
}

PairCounts countPairs(const BuiltPairs& bp) {
    PairCounts c;
    c.formed = bp.size();
    std::vector<std::size_t> slot(kPairReasonSlots, SIZE_MAX);  // reason -> entry of c.dropped
    for (std::size_t i = 0; i < bp.size(); ++i) {
        if (bp.status[i] == PairStatus::Used) {
            ++c.used;
            continue;
        }
        const PairReason r = reasonOf(bp, i);
        const std::size_t k = pairReasonSlot(r);
        if (k >= slot.size()) throw std::logic_error("pair reason outside the slot table");
        if (slot[k] == SIZE_MAX) {
            slot[k] = c.dropped.size();
            c.dropped.emplace_back(r, 0);
        }
        ++c.dropped[slot[k]].second;
    }
    return c;
}

std::vector<SalePair> auditRows(const BuiltPairs& bp) {
    std::vector<SalePair> out(bp.size());
    // Reason texts are the same for many pairs: build each reason's text once.
    std::vector<std::string> cache(kPairReasonSlots);
    std::vector<char> cached(kPairReasonSlots, 0);
    for (std::size_t i = 0; i < bp.size(); ++i) {
        SalePair& p = out[i];
        p.id = std::string(bp.ids.empty() ? std::string_view() : bp.ids[bp.group[i]]);
        p.firstRow = bp.firstRow[i];
        p.secondRow = bp.secondRow[i];
        if (bp.sales) {
            const SalesInput& s = bp.sales->sales;
            p.firstDate = s.date[p.firstRow];
            p.firstPrice = s.price[p.firstRow];
            p.secondDate = s.date[p.secondRow];
            p.secondPrice = s.price[p.secondRow];
        } else {
            const RepeatSalesPairInput& q = *bp.pairInput;
            p.firstDate = q.firstDate[i];
            p.firstPrice = q.firstPrice[i];
            p.secondDate = q.secondDate[i];
            p.secondPrice = q.secondPrice[i];
            if (bp.swapped[i]) {
                std::swap(p.firstDate, p.secondDate);
                std::swap(p.firstPrice, p.secondPrice);
            }
        }
        p.monthsHeld = bp.months[i];
        p.annualRate = bp.rate[i];
        p.status = bp.status[i];
        p.used = p.status == PairStatus::Used;
        p.weight = p.used ? bp.weight[i] : 0.0;
        const PairReason r = reasonOf(bp, i);
        p.saleProblem = r.sale;
        const std::size_t k = pairReasonSlot(r);
        if (k >= cache.size()) throw std::logic_error("pair reason outside the slot table");
        if (!cached[k]) {
            cache[k] = pairReasonText(r);
            cached[k] = 1;
        }
        p.reason = cache[k];
    }
    return out;
}

namespace {

void checkLengths(const RepeatSalesInput& in) {
    const SalesInput& s = in.sales;
    const std::size_t n = s.date.size();
    if (in.id.size() != n || s.price.size() != n)
        throw InputError(fmt::format("ids, dates and prices must have the same number of rows "
                                     "(got {}, {}, {})", in.id.size(), n, s.price.size()));
    if (!in.changed.empty() && in.changed.size() != n)
        throw InputError(fmt::format("changed must have one entry per sale (got {}, expected {})",
                                     in.changed.size(), n));
    if (!s.include.empty() && s.include.size() != n)
        throw InputError(fmt::format("include must have one entry per sale (got {}, expected {})",
                                     s.include.size(), n));
    if (!s.emptyRow.empty() && s.emptyRow.size() != n)
        throw InputError("internal: emptyRow differs in length from the sales");
}

// The sequenced rows grouped by id: ids numbered in order of first appearance (out.ids),
// rows of group g at order[start[g] .. start[g+1]) in input order (a stable counting sort).
struct IdGroups {
    std::vector<std::size_t> start, order;
    std::vector<std::uint32_t> rowCode;  // per input row: its group, UINT32_MAX if unsequenced
    std::size_t size() const { return start.size() - 1; }
};

IdGroups groupById(const std::vector<std::string_view>& ids, const std::vector<char>& sequenced,
                   BuiltPairs& out) {
    const std::size_t n = ids.size();
    IdGroups G;
    std::unordered_map<std::string_view, std::uint32_t> code;
    code.reserve(n);
    G.rowCode.assign(n, UINT32_MAX);
    std::vector<std::size_t> groupSize;
    for (std::size_t i = 0; i < n; ++i) {
        if (!sequenced[i]) continue;
        auto [it, fresh] = code.try_emplace(ids[i], static_cast<std::uint32_t>(groupSize.size()));
        if (fresh) {
            groupSize.push_back(0);
            out.ids.push_back(ids[i]);
        }
        G.rowCode[i] = it->second;
        ++groupSize[it->second];
    }
    const std::size_t groups = groupSize.size();
    G.start.assign(groups + 1, 0);
    for (std::size_t g = 0; g < groups; ++g) G.start[g + 1] = G.start[g] + groupSize[g];
    G.order.resize(G.start[groups]);
    std::vector<std::size_t> fill(G.start.begin(), G.start.end() - 1);
    for (std::size_t i = 0; i < n; ++i)
        if (G.rowCode[i] != UINT32_MAX) G.order[fill[G.rowCode[i]]++] = i;
    return G;
}

// What the walk over one property's sales reads.
struct Walk {
    const RepeatSalesInput& in;
    const RepeatSalesOptions& o;
    const ScreenedSales& sc;        // problem: the screening reason of each row
    const std::vector<char>& usable;
    const std::vector<double>& day;  // whole-day serial per row
    const std::vector<CivilDate>& civil;
};

// The sales of one property sorted by (day, row), walked day by day: on one day keep the first
// usable row in input order (or the first row when none is usable), pair it with the kept sale
// of the previous day, and list the others as duplicate pseudo pairs.
void pairProperty(BuiltPairs& out, const Walk& w, std::uint32_t gid,
                  std::vector<std::size_t>::iterator first,
                  std::vector<std::size_t>::iterator last) {
    const auto& day = w.day;
    const auto& price = w.in.sales.price;
    if (last - first > 1)
        std::sort(first, last, [&](std::size_t a, std::size_t b) {
            return day[a] != day[b] ? day[a] < day[b] : a < b;
        });
    std::size_t prevKept = 0;
    bool havePrev = false;
    for (auto it = first; it != last;) {
        auto runEnd = it;
        while (runEnd != last && day[*runEnd] == day[*it]) ++runEnd;
        std::size_t keep = *it;
        for (auto j = it; j != runEnd; ++j)
            if (w.usable[*j]) {
                keep = *j;
                break;
            }
        bool changed = false;
        if (!w.in.changed.empty())
            for (auto j = it; j != runEnd; ++j) changed = changed || w.in.changed[*j];
        if (havePrev) {
            // A sequenced row (usable id and date) that is not usable carries its screening
            // reason (price, include).
            const std::size_t a = prevKept, b = keep;
            addPair(out, a, b, gid, day[a], day[b], w.civil[a], w.civil[b], price[a], price[b],
                    w.sc.problem[a], w.sc.problem[b], changed, w.o);
        }
        for (auto j = it; j != runEnd; ++j) {
            if (*j == keep) continue;
            addPair(out, keep, *j, gid, day[keep], day[*j], w.civil[keep], w.civil[*j],
                    price[keep], price[*j], std::nullopt, std::nullopt, false, w.o);
            out.status.back() = PairStatus::Duplicate;
            out.realPair.back() = 0;
            if (w.usable[*j]) {
                out.rowUsable[*j] = 0;
                out.diag.drop(DropReason::DuplicateSale);
            }
        }
        prevKept = keep;
        havePrev = true;
        it = runEnd;
    }
}

}  // namespace

BuiltPairs buildPairsFromSales(const RepeatSalesInput& in, const RepeatSalesOptions& o) {
    checkLengths(in);
    const SalesInput& s = in.sales;
    const std::size_t n = s.date.size();
    BuiltPairs out;
    out.sales = &in;

    // Row validity: the sales screening, a blank id being the extra check. The audit is built
    // even when no row is usable (every pair shows why it was dropped).
    std::vector<std::string_view> ids(n);
    RowProblems idProblem(n);
    for (std::size_t i = 0; i < n; ++i) {
        ids[i] = trimBlanks(in.id[i]);
        if (ids[i].empty()) idProblem[i] = DropReason::BlankId;
    }
    std::vector<char> usable(n, 0);
    const ScreenedSales sc = screenRows(s, o.freq, out.diag, &idProblem);
    for (std::size_t r : sc.rows) usable[r] = 1;
    if (!sc.rows.empty()) out.axis = sc.axis;

    // Rows that take part in the sequence of their property: a usable id and date.
    std::vector<char> sequenced(n);
    for (std::size_t i = 0; i < n; ++i)
        sequenced[i] = (s.emptyRow.empty() || !s.emptyRow[i]) && isUsableSerial(s.date[i]) &&
                       !ids[i].empty();
    IdGroups G = groupById(ids, sequenced, out);

    // Whole days and civil dates of the sequenced rows.
    std::vector<double> day(n, 0.0), sequencedDays;
    sequencedDays.reserve(G.order.size());
    for (std::size_t i = 0; i < n; ++i)
        if (sequenced[i]) {
            day[i] = std::floor(s.date[i]);
            sequencedDays.push_back(day[i]);
        }
    const CivilDays civilOf(sequencedDays);
    std::vector<CivilDate> civil(n);
    for (std::size_t i = 0; i < n; ++i)
        if (sequenced[i]) civil[i] = civilOf(day[i]);

    out.rowUsable = usable;
    reserve(out, G.order.size() > G.size() ? G.order.size() - G.size() : 0);
    const Walk walk{in, o, sc, usable, day, civil};
    for (std::size_t g = 0; g < G.size(); ++g)
        pairProperty(out, walk, static_cast<std::uint32_t>(g),
                     G.order.begin() + static_cast<std::ptrdiff_t>(G.start[g]),
                     G.order.begin() + static_cast<std::ptrdiff_t>(G.start[g + 1]));
    out.weight.assign(out.size(), 0.0);
    return out;
}

BuiltPairs buildPairsFromPairInput(const RepeatSalesPairInput& in, const RepeatSalesOptions& o) {
    const std::size_t n = in.firstDate.size();
    if (in.firstPrice.size() != n || in.secondDate.size() != n || in.secondPrice.size() != n ||
        (!in.id.empty() && in.id.size() != n))
        throw InputError("the pair columns must have the same number of rows");
    BuiltPairs out;
    out.pairInput = &in;
    out.diag.rowsIn = n;
    reserve(out, n);
    out.swapped.assign(n, 0);
    if (!in.id.empty()) {
        out.ids.resize(n);
        for (std::size_t i = 0; i < n; ++i) out.ids[i] = trimBlanks(in.id[i]);
    }
    std::vector<double> days;
    days.reserve(2 * n);
    for (std::size_t i = 0; i < n; ++i) {
        if (isUsableSerial(in.firstDate[i])) days.push_back(std::floor(in.firstDate[i]));
        if (isUsableSerial(in.secondDate[i])) days.push_back(std::floor(in.secondDate[i]));
    }
    const CivilDays civilOf(days);
    long minKey = 0, maxKey = 0;
    bool any = false;
    for (std::size_t i = 0; i < n; ++i) {
        double d1 = in.firstDate[i], p1 = in.firstPrice[i];
        double d2 = in.secondDate[i], p2 = in.secondPrice[i];
        const bool ok1 = isUsableSerial(d1), ok2 = isUsableSerial(d2);
        // The earlier sale is the first one.
        if (ok1 && ok2 && std::floor(d2) < std::floor(d1)) {
            std::swap(d1, d2);
            std::swap(p1, p2);
            out.swapped[i] = 1;
        }
        const double a = ok1 ? std::floor(d1) : 0, b = ok2 ? std::floor(d2) : 0;
        const CivilDate ca = ok1 ? civilOf(a) : CivilDate{};
        const CivilDate cb = ok2 ? civilOf(b) : CivilDate{};
        addPair(out, i, i, static_cast<std::uint32_t>(in.id.empty() ? 0 : i), a, b, ca, cb, p1,
                p2, saleProblem(d1, p1), saleProblem(d2, p2), false, o);
        if (ok1 && ok2 && !out.problem.back()) {
            const long k1 = periodKey(ca, o.freq), k2 = periodKey(cb, o.freq);
            if (!any) {
                minKey = k1;
                maxKey = k2;
                any = true;
            }
            minKey = std::min(minKey, k1);
            maxKey = std::max(maxKey, k2);
        }
    }
    if (any) out.axis = PeriodAxis::spanning(minKey, maxKey, o.freq);
    out.weight.assign(out.size(), 0.0);
    return out;
}

}  // namespace rs_detail

}  // namespace lintel
