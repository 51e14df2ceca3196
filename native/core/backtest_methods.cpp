// The candidate method kinds of the backtest: what each needs, how it is estimated from a row
// mask, and what one estimate costs. One entry per kind (see backtest.hpp).
#include <algorithm>
#include <cmath>
#include <memory>
#include <stdexcept>
#include <string_view>
#include <unordered_set>

#include <fmt/format.h>

#include "backtest_internal.hpp"

namespace lintel {

MethodNeeds methodNeeds(IndexMethodKind kind) {
    switch (kind) {
        case IndexMethodKind::Hedonic: return MethodNeeds::Characteristics;
        case IndexMethodKind::Mix: return MethodNeeds::Strata;
        default: return MethodNeeds::Nothing;
    }
}

const char* methodKindWord(IndexMethodKind kind) {
    switch (kind) {
        case IndexMethodKind::Median: return "median";
        case IndexMethodKind::Mean: return "mean";
        case IndexMethodKind::Mix: return "mix";
        case IndexMethodKind::Hedonic: return "hedonic";
        case IndexMethodKind::RepeatSales: return "repeat";
    }
    return "?";
}

namespace bt_detail {

namespace {

// The backtest's settings over the method's own: one frequency, the default base (the
// comparisons rebase anyway), its minsales unless the row set one, no bands that cost
// replicates.
template <class O>
O settled(O o, const CandidateMethod& m, const BacktestOptions& bo) {
    o.freq = bo.freq;
    o.baseDate.reset();
    if (!m.ownMinSales) o.minSales = bo.minSales;
    if constexpr (std::is_same_v<O, MixOptions>) o.bootstrap = false;
    o.validate();
    return o;
}

template <class O>
const O& optionsOf(const CandidateMethod& m) {
    if (const O* o = std::get_if<O>(&m.options)) return *o;
    throw std::logic_error(fmt::format("backtest method {}: options do not fit its kind {}",
                                       m.label, methodKindWord(m.kind)));
}

void needs(const BacktestInput& in, const CandidateMethod& m) {
    switch (methodNeeds(m.kind)) {
        case MethodNeeds::Characteristics:
            if (in.characteristics.empty())
                throw InputError(fmt::format("method \"{}\" needs the characteristics argument",
                                             m.label));
            break;
        case MethodNeeds::Strata:
            if (in.strata.empty())
                throw InputError(fmt::format("method \"{}\" needs the strata argument", m.label));
            break;
        case MethodNeeds::Nothing: break;
    }
}

// Terms of a hedonic fit: a number column is one term, a category column one per level but
// the first (numeric columns listed in categorical, and text columns).
double hedonicTerms(const BacktestInput& in, const HedonicOptions& o) {
    double terms = 0;
    for (std::size_t c = 0; c < in.characteristics.size(); ++c) {
        const CharacteristicColumn& col = in.characteristics[c];
        const bool categorical =
            !col.text.empty() || std::count(o.categoricalColumns.begin(), o.categoricalColumns.end(),
                                            static_cast<int>(c) + 1) > 0;
        if (!categorical) {
            terms += 1;
            continue;
        }
        std::size_t levels = 0;
        if (!col.text.empty()) {
            std::unordered_set<std::string_view> seen;
            for (const auto& t : col.text) seen.insert(t);
            levels = seen.size();
        } else {
            std::unordered_set<double> seen;
            for (double x : col.numeric)
                if (std::isfinite(x)) seen.insert(x);
            levels = seen.size();
        }
        terms += levels > 1 ? static_cast<double>(levels - 1) : 0.0;
    }
    return terms;
}

}  // namespace

MaskedEstimate prepareMethod(const BacktestInput& in, const CandidateMethod& m,
                             const BacktestOptions& bo) {
    needs(in, m);
    switch (m.kind) {
        case IndexMethodKind::Median:
        case IndexMethodKind::Mean: {
            const RawIndexOptions o = settled(optionsOf<RawIndexOptions>(m), m, bo);
            auto sales = std::make_shared<SalesInput>(in.sales);
            const bool median = m.kind == IndexMethodKind::Median;
            return [sales, o, median](const std::vector<char>& include) {
                sales->include = include;
                return (median ? indexMedian(*sales, o) : indexMean(*sales, o)).table;
            };
        }
        case IndexMethodKind::Mix: {
            const MixOptions o = settled(optionsOf<MixOptions>(m), m, bo);
            auto mix = std::make_shared<MixInput>(MixInput{in.sales, in.strata});
            return [mix, o](const std::vector<char>& include) {
                mix->sales.include = include;
                return indexMix(*mix, o).table;
            };
        }
        case IndexMethodKind::Hedonic: {
            const HedonicOptions o = settled(optionsOf<HedonicOptions>(m), m, bo);
            auto hed = std::make_shared<HedonicInput>(HedonicInput{in.sales, in.characteristics});
            return [hed, o](const std::vector<char>& include) {
                hed->sales.include = include;
                return hedonicIndex(*hed, o).table;
            };
        }
        case IndexMethodKind::RepeatSales: {
            const RepeatSalesOptions o = settled(optionsOf<RepeatSalesOptions>(m), m, bo);
            auto rs = std::make_shared<RepeatSalesInput>(
                RepeatSalesInput{in.id, in.sales, in.changed});
            return [rs, o](const std::vector<char>& include) {
                rs->sales.include = include;
                return repeatSalesIndex(*rs, o).table;
            };
        }
    }
    throw std::logic_error("backtest: unknown method kind");
}

// Rough costs per row of one estimate, in nanoseconds, measured by tests/bench/bench_backtest.cpp
// (35,000 sales, 132 months) on a shared two-core machine: the screening and the per-period
// statistic for the raw indexes, text keys for the strata, the design and the within-period
// cross-products for the hedonic fit (terms^2 per row; a rolling window fits each sale once
// per window it lies in, and solves once per period), the id grouping and the T x T solves
// for repeat sales.
double estimateWork(const BacktestInput& in, const CandidateMethod& m, std::size_t rows,
                    int periods) {
    const double n = static_cast<double>(rows), T = static_cast<double>(periods);
    switch (m.kind) {
        case IndexMethodKind::Median:
        case IndexMethodKind::Mean: return 300 * n;
        case IndexMethodKind::Mix: return (200 + 100 * static_cast<double>(in.strata.size())) * n;
        case IndexMethodKind::Hedonic: {
            const HedonicOptions& o = optionsOf<HedonicOptions>(m);
            const double p = hedonicTerms(in, o);
            const double windows = o.window > 0 ? std::min<double>(o.window, T) : 1.0;
            return (300 + 50 * static_cast<double>(in.characteristics.size()) + 4 * p * p) * n *
                       windows +
                   (o.window > 0 ? T : 1.0) * p * p * p;
        }
        case IndexMethodKind::RepeatSales: return 400 * n + 3 * T * T * T;
    }
    return 0;
}

}  // namespace bt_detail
}  // namespace lintel
