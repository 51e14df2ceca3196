// Pair building and pair filters of the repeat-sales estimators (see repeat_sales.hpp and
// docs/methods/repeat_sales.md for the rules).
//
// Building is a grouping by id (ids numbered in order of first appearance, rows bucketed by
// that number: a stable counting sort) followed by a sort of each property's rows by
// (day, row). Consecutive sales of one property form a pair.
#include <algorithm>
#include <cctype>
#include <cmath>
#include <string_view>
#include <unordered_map>

#include <fmt/format.h>

#include "repeat_sales_internal.hpp"

namespace lintel {

namespace {

std::string_view trimmed(std::string_view s) {
    std::size_t a = 0, b = s.size();
    while (a < b && std::isspace(static_cast<unsigned char>(s[a]))) ++a;
    while (b > a && std::isspace(static_cast<unsigned char>(s[b - 1]))) --b;
    return s.substr(a, b - a);
}

// Why a row with a usable id and date was not usable (screenSales' order of checks).
const std::string& unusableRowReason(double price) {
    if (!std::isfinite(price)) return reason::kBadPrice;
    if (price <= 0) return reason::kNonPositivePrice;
    return reason::kExcluded;
}

double annualisedLogReturn(double p1, double p2, double days) {
    if (!(std::isfinite(p1) && std::isfinite(p2) && p1 > 0 && p2 > 0 && days > 0))
        return kNoValue;
    return std::log(p2 / p1) * 365.25 / days;
}

// Applies the filters that do not depend on the estimate to a pair whose two sales are
// usable. Returns Used when the pair goes on to the estimator.
PairStatus filterPair(long key1, long key2, double months, double rate, bool changedAtSecond,
                      const RepeatSalesOptions& o) {
    if (changedAtSecond) return PairStatus::Changed;
    if (key1 == key2) return PairStatus::SamePeriod;
    if (o.minHoldMonths > 0 && months < o.minHoldMonths) return PairStatus::ShortHold;
    if (o.maxRate > 0 && std::fabs(rate) > o.maxRate) return PairStatus::ExtremeReturn;
    return PairStatus::Used;
}

}  // namespace

std::optional<RepeatSalesMethod> parseRepeatSalesMethod(std::string_view text) {
    std::string t;
    for (char c : trimmed(text)) t += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
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

std::string propertyIdFromNumber(double v) {
    if (!std::isfinite(v)) return "";
    if (v == std::floor(v) && std::fabs(v) < 1e15) {
        if (v == 0) return "0";  // also -0
        return fmt::format("{:.0f}", v);
    }
    std::string s = fmt::format("{:.15g}", v);
    return s;
}

namespace rs_detail {

int completedMonths(double fromSerial, double toSerial) {
    const CivilDate a = civilFromSerial(fromSerial), b = civilFromSerial(toSerial);
    int m = 12 * (b.year - a.year) + (b.month - a.month);
    if (b.day < a.day) --m;
    return m;
}

std::string statusText(PairStatus s, const RepeatSalesOptions& o) {
    switch (s) {
        case PairStatus::Used: return "";
        case PairStatus::FirstSaleUnusable: return "first sale unusable";
        case PairStatus::SecondSaleUnusable: return "second sale unusable";
        case PairStatus::Duplicate: return reason::kDuplicateSale;
        case PairStatus::Changed: return "property changed at the second sale";
        case PairStatus::SamePeriod: return "both sales in one period";
        case PairStatus::ShortHold: return fmt::format("held less than {:g} months", o.minHoldMonths);
        case PairStatus::ExtremeReturn:
            return fmt::format("annualised log return beyond +/-{:g}", o.maxRate);
        case PairStatus::NotLinked: return "not linked to the base period";
        case PairStatus::ChainUnreached: return "first sale in a period without a value";
        case PairStatus::ThinPeriod:
            return fmt::format("fewer than {} pairs end in the period", o.minSales);
        case PairStatus::NotEstimated: return "index not estimated";
    }
    return "";
}

void validateOptions(const RepeatSalesOptions& o) {
    validateCommon(o);
    if (!(o.minHoldMonths >= 0) || !std::isfinite(o.minHoldMonths))
        throw InputError(fmt::format("minhold must be 0 or more months, got {}", o.minHoldMonths));
    if (!(o.maxRate >= 0) || !std::isfinite(o.maxRate))
        throw InputError(fmt::format("maxrate must be 0 (off) or positive, got {}", o.maxRate));
    if (o.chain != 0 && o.chain != 1)
        throw InputError(fmt::format("chain must be 0 or 1, got {}", o.chain));
    if (o.chainInit < 0) throw InputError(fmt::format("init must be 0 or more, got {}", o.chainInit));
}

BuiltPairs buildPairsFromSales(const RepeatSalesInput& in, const RepeatSalesOptions& o) {
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

    BuiltPairs out;
    out.fromRows = true;

    // Row validity: screenSales (blank id is the extra check). It throws when no row is
    // usable; the audit is still built then (every pair shows why it was dropped).
    std::vector<std::string_view> ids(n);
    std::vector<char> idValid(n);
    for (std::size_t i = 0; i < n; ++i) {
        ids[i] = trimmed(in.id[i]);
        idValid[i] = !ids[i].empty();
    }
    std::vector<char> usable(n, 0);
    try {
        ScreenedSales sc = screenSales(s, o.freq, out.diag, &idValid, reason::kBlankId.c_str());
        for (std::size_t r : sc.rows) usable[r] = 1;
        out.axis = sc.axis;
    } catch (const InputError&) {
        // diag counts were set before the throw; no usable row, no axis.
    }

    // Rows that take part in the sequence of their property: a usable id and date.
    auto sequenced = [&](std::size_t i) {
        return (s.emptyRow.empty() || !s.emptyRow[i]) && isUsableSerial(s.date[i]) && idValid[i];
    };

    // Number the ids in order of first appearance.
    std::unordered_map<std::string_view, std::uint32_t> code;
    code.reserve(n);
    std::vector<std::uint32_t> rowCode(n, UINT32_MAX);
    std::vector<std::size_t> groupSize;
    for (std::size_t i = 0; i < n; ++i) {
        if (!sequenced(i)) continue;
        auto [it, fresh] = code.try_emplace(ids[i], static_cast<std::uint32_t>(groupSize.size()));
        if (fresh) groupSize.push_back(0);
        rowCode[i] = it->second;
        ++groupSize[it->second];
    }
    // Counting sort of rows by id number (stable: rows of one id stay in input order).
    const std::size_t groups = groupSize.size();
    std::vector<std::size_t> start(groups + 1, 0);
    for (std::size_t g = 0; g < groups; ++g) start[g + 1] = start[g] + groupSize[g];
    std::vector<std::size_t> order(start[groups]);
    {
        std::vector<std::size_t> fill(start.begin(), start.end() - 1);
        for (std::size_t i = 0; i < n; ++i)
            if (rowCode[i] != UINT32_MAX) order[fill[rowCode[i]]++] = i;
    }

    std::vector<double> day(n, 0.0);
    for (std::size_t i = 0; i < n; ++i)
        if (rowCode[i] != UINT32_MAX) day[i] = std::floor(s.date[i]);

    out.rowUsable = usable;
    const std::size_t expected = order.size() > groups ? order.size() - groups : 0;
    out.pairs.reserve(expected);
    out.key1.reserve(expected);
    out.key2.reserve(expected);
    out.candidate.reserve(expected);
    out.realPair.reserve(expected);

    auto rowReason = [&](std::size_t r) -> const std::string& {
        return unusableRowReason(s.price[r]);
    };
    auto addPair = [&](std::size_t a, std::size_t b, std::string_view id) -> SalePair& {
        SalePair p;
        p.id = std::string(id);
        p.firstRow = a;
        p.secondRow = b;
        p.firstDate = s.date[a];
        p.firstPrice = s.price[a];
        p.secondDate = s.date[b];
        p.secondPrice = s.price[b];
        const double days = day[b] - day[a];
        p.monthsHeld = completedMonths(day[a], day[b]);
        p.annualRate = annualisedLogReturn(p.firstPrice, p.secondPrice, days);
        out.pairs.push_back(std::move(p));
        out.key1.push_back(0);
        out.key2.push_back(0);
        out.candidate.push_back(0);
        out.realPair.push_back(1);
        return out.pairs.back();
    };

    std::vector<std::size_t> kept;  // one property's sales after dropping duplicates
    for (std::size_t g = 0; g < groups; ++g) {
        auto first = order.begin() + static_cast<std::ptrdiff_t>(start[g]);
        auto last = order.begin() + static_cast<std::ptrdiff_t>(start[g + 1]);
        if (last - first > 1)
            std::sort(first, last, [&](std::size_t a, std::size_t b) {
                return day[a] != day[b] ? day[a] < day[b] : a < b;
            });
        const std::string_view id = ids[*first];
        kept.clear();
        // Walk the sales day by day; on one day keep the first usable row in input order (or
        // the first row when none is usable), list the others as duplicate pseudo pairs.
        for (auto it = first; it != last;) {
            auto runEnd = it;
            while (runEnd != last && day[*runEnd] == day[*it]) ++runEnd;
            std::size_t keep = *it;
            for (auto j = it; j != runEnd; ++j)
                if (usable[*j]) { keep = *j; break; }
            bool changed = false;
            for (auto j = it; j != runEnd; ++j)
                if (!in.changed.empty() && in.changed[*j]) changed = true;
            // Pair from the previous kept sale to this one.
            if (!kept.empty()) {
                const std::size_t a = kept.back(), b = keep;
                SalePair& p = addPair(a, b, id);
                const std::size_t k = out.pairs.size() - 1;
                if (!usable[a]) {
                    p.status = PairStatus::FirstSaleUnusable;
                    p.reason = "first sale: " + rowReason(a);
                } else if (!usable[b]) {
                    p.status = PairStatus::SecondSaleUnusable;
                    p.reason = "second sale: " + rowReason(b);
                } else {
                    out.key1[k] = periodKey(s.date[a], o.freq);
                    out.key2[k] = periodKey(s.date[b], o.freq);
                    p.status = filterPair(out.key1[k], out.key2[k], p.monthsHeld, p.annualRate,
                                          changed, o);
                    if (p.status == PairStatus::Used) out.candidate[k] = 1;
                    else p.reason = statusText(p.status, o);
                }
            }
            for (auto j = it; j != runEnd; ++j) {
                if (*j == keep) continue;
                SalePair& p = addPair(keep, *j, id);
                p.status = PairStatus::Duplicate;
                p.reason = reason::kDuplicateSale;
                out.realPair.back() = 0;
                if (usable[*j]) {
                    out.rowUsable[*j] = 0;
                    out.diag.drop(reason::kDuplicateSale);
                }
            }
            kept.push_back(keep);
            it = runEnd;
        }
    }
    return out;
}

BuiltPairs buildPairsFromPairInput(const RepeatSalesPairInput& in, const RepeatSalesOptions& o) {
    const std::size_t n = in.firstDate.size();
    if (in.firstPrice.size() != n || in.secondDate.size() != n || in.secondPrice.size() != n ||
        (!in.id.empty() && in.id.size() != n))
        throw InputError("the pair columns must have the same number of rows");
    BuiltPairs out;
    out.fromRows = false;
    out.diag.rowsIn = n;
    out.pairs.resize(n);
    out.key1.assign(n, 0);
    out.key2.assign(n, 0);
    out.candidate.assign(n, 0);
    out.realPair.assign(n, 1);
    long minKey = 0, maxKey = 0;
    bool any = false;
    auto saleReason = [](double d, double p) -> const std::string* {
        if (!isUsableSerial(d)) return &reason::kBadDate;
        if (!std::isfinite(p)) return &reason::kBadPrice;
        if (p <= 0) return &reason::kNonPositivePrice;
        return nullptr;
    };
    for (std::size_t i = 0; i < n; ++i) {
        SalePair& p = out.pairs[i];
        if (!in.id.empty()) p.id = std::string(trimmed(in.id[i]));
        p.firstRow = p.secondRow = i;
        double d1 = in.firstDate[i], p1 = in.firstPrice[i];
        double d2 = in.secondDate[i], p2 = in.secondPrice[i];
        // The earlier sale is the first one.
        if (isUsableSerial(d1) && isUsableSerial(d2) && std::floor(d2) < std::floor(d1)) {
            std::swap(d1, d2);
            std::swap(p1, p2);
        }
        p.firstDate = d1;
        p.firstPrice = p1;
        p.secondDate = d2;
        p.secondPrice = p2;
        if (const std::string* r = saleReason(d1, p1)) {
            p.status = PairStatus::FirstSaleUnusable;
            p.reason = "first sale: " + *r;
            continue;
        }
        if (const std::string* r = saleReason(d2, p2)) {
            p.status = PairStatus::SecondSaleUnusable;
            p.reason = "second sale: " + *r;
            continue;
        }
        const double days = std::floor(d2) - std::floor(d1);
        p.monthsHeld = completedMonths(d1, d2);
        p.annualRate = annualisedLogReturn(p1, p2, days);
        out.key1[i] = periodKey(d1, o.freq);
        out.key2[i] = periodKey(d2, o.freq);
        if (!any) { minKey = out.key1[i]; maxKey = out.key2[i]; any = true; }
        minKey = std::min(minKey, out.key1[i]);
        maxKey = std::max(maxKey, out.key2[i]);
        p.status = filterPair(out.key1[i], out.key2[i], p.monthsHeld, p.annualRate, false, o);
        if (p.status == PairStatus::Used) out.candidate[i] = 1;
        else p.reason = statusText(p.status, o);
    }
    if (any) out.axis = PeriodAxis::spanning(minKey, maxKey, o.freq);
    return out;
}

}  // namespace rs_detail

}  // namespace lintel
