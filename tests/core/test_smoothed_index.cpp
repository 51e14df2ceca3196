// Smoothed INDEXHEDONIC and CHAINRS (native/core/smoothed_index.hpp): the wiring from sales
// to the smoother. Checks here are properties the method promises (real-time values never
// change when later sales are added; the first vintage is the smoothed index on its own data;
// a period without sales gets a value with a wider band; the smoothed index is invariant to
// the centring of the hedonic effects) and the messages for options that do not go together.
// The comparisons with statsmodels and a dense GLS are in
// tests/reference/test_smoothed_index_statsmodels.py.
//
// Generated data (deterministic LCG): monthly sales from 2018-01, a true log level
// 0.004 t + 0.02 sin(2 pi t / 12); hedonic: 10..25 sales a month, ln price = 12 + level
// + 0.8 ln size + 0.1 [flat] + N(0, 0.15^2), size uniform 40..160 m^2; repeat sales: 250
// properties with a lasting effect N(0, 0.2^2), each sold in 2..4 distinct random months,
// ln price = 12 + level + effect + N(0, 0.05^2).
#include <boost/test/unit_test.hpp>

#include <algorithm>
#include <cmath>
#include <functional>
#include <string>
#include <vector>

#include "hedonic.hpp"
#include "repeat_sales.hpp"
#include "smoothed_index.hpp"

using namespace lintel;

namespace {

struct Lcg {
    unsigned long long s;
    double uniform() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
    double normal() {
        const double u = uniform() + 1e-300, v = uniform();
        return std::sqrt(-2 * std::log(u)) * std::cos(6.283185307179586 * v);
    }
};

double level(int t) { return 0.004 * t + 0.02 * std::sin(6.283185307179586 * t / 12); }

double dateOf(int month, int day) {
    return serialFromCivil({2018 + month / 12, 1 + month % 12, day});
}

// Hedonic sales of `months` months; `skip` months have no sales; district "A" or "B".
HedonicInput hedonicSales(int months, std::vector<int> skip = {}, unsigned long long seed = 7) {
    Lcg g{seed};
    HedonicInput in;
    CharacteristicColumn size{"size", {}, {}}, type{"type", {}, {}}, district{"district", {}, {}};
    for (int t = 0; t < months; ++t) {
        const int n = 10 + static_cast<int>(16 * g.uniform());
        for (int i = 0; i < n; ++i) {
            const double s = 40 + 120 * g.uniform();
            const bool flat = g.uniform() < 0.4;
            const bool a = g.uniform() < 0.3;
            if (std::find(skip.begin(), skip.end(), t) != skip.end()) continue;
            in.sales.date.push_back(dateOf(t, 1 + static_cast<int>(27 * g.uniform())));
            in.sales.price.push_back(std::exp(12 + level(t) + 0.8 * std::log(s) +
                                              (flat ? 0.1 : 0.0) + (a ? 0.05 : 0.0) +
                                              0.15 * g.normal()));
            size.numeric.push_back(s);
            type.text.push_back(flat ? "flat" : "house");
            district.text.push_back(a ? "A" : "B");
        }
    }
    in.characteristics = {size, type, district};
    return in;
}

// The first rows of a hedonic input (the sales are in date order).
HedonicInput firstRows(const HedonicInput& in, std::size_t n) {
    HedonicInput out = in;
    out.sales.date.resize(n);
    out.sales.price.resize(n);
    if (!out.sales.include.empty()) out.sales.include.resize(n);
    for (auto& c : out.characteristics) {
        if (!c.numeric.empty()) c.numeric.resize(n);
        if (!c.text.empty()) c.text.resize(n);
    }
    return out;
}

std::size_t rowsBefore(const std::vector<double>& dates, int month) {
    const double limit = dateOf(month, 1);
    return static_cast<std::size_t>(
        std::count_if(dates.begin(), dates.end(), [&](double d) { return d < limit; }));
}

RepeatSalesInput repeatSales(int months, unsigned long long seed = 11) {
    Lcg g{seed};
    struct Sale {
        double date, price;
        std::string id;
    };
    std::vector<Sale> sales;
    for (int p = 0; p < 250; ++p) {
        const double effect = 0.2 * g.normal();
        const int k = 2 + static_cast<int>(3 * g.uniform());
        std::vector<int> when;
        while (static_cast<int>(when.size()) < k) {
            const int t = static_cast<int>(months * g.uniform());
            if (std::find(when.begin(), when.end(), t) == when.end()) when.push_back(t);
        }
        for (int t : when)
            sales.push_back({dateOf(t, 1 + static_cast<int>(27 * g.uniform())),
                             std::exp(12 + level(t) + effect + 0.05 * g.normal()),
                             "p" + std::to_string(p)});
    }
    std::stable_sort(sales.begin(), sales.end(),
                     [](const Sale& a, const Sale& b) { return a.date < b.date; });
    RepeatSalesInput in;
    for (const Sale& s : sales) {
        in.sales.date.push_back(s.date);
        in.sales.price.push_back(s.price);
        in.id.push_back(s.id);
    }
    return in;
}

RepeatSalesInput firstRows(const RepeatSalesInput& in, std::size_t n) {
    RepeatSalesInput out = in;
    out.sales.date.resize(n);
    out.sales.price.resize(n);
    out.id.resize(n);
    if (!out.sales.include.empty()) out.sales.include.resize(n);
    return out;
}

HedonicOptions hedonicOptions(SmoothKind k, bool seasonal = false, bool realtime = false) {
    HedonicOptions o;
    o.logColumns = {1};
    o.smooth = k;
    o.seasonal = seasonal;
    o.realtime = realtime;
    return o;
}

bool sameRow(const IndexTable& a, const IndexTable& b, int t) {
    // Exactly equal, blanks included (NaN compares unequal to itself).
    auto same = [](double x, double y) { return (std::isnan(x) && std::isnan(y)) || x == y; };
    return same(a.index[t], b.index[t]) && same(a.lower[t], b.lower[t]) &&
           same(a.upper[t], b.upper[t]) && a.axis.start(t) == b.axis.start(t);
}

std::string messageOf(const std::function<void()>& f) {
    try {
        f();
    } catch (const InputError& e) {
        return e.what();
    }
    return "no error";
}

bool contains(const std::string& text, const std::string& part) {
    return text.find(part) != std::string::npos;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(smoothed_index)

BOOST_AUTO_TEST_CASE(hedonic_smoothed_index_is_what_hedonicIndex_gives) {
    const HedonicInput in = hedonicSales(36);
    const HedonicOptions o = hedonicOptions(SmoothKind::Trend);
    const SmoothedIndexResult s = smoothedHedonicIndex(in, o);
    const IndexResult r = hedonicIndex(in, o);
    BOOST_TEST(r.table.axis.count == 36);
    for (int t = 0; t < 36; ++t) BOOST_TEST(sameRow(r.table, s.table, t));
    BOOST_TEST(s.table.index[0] == 100.0);
    BOOST_TEST(s.table.lower[0] == 100.0);
    BOOST_TEST(s.model.model == "local linear trend");
    BOOST_TEST(s.model.estimated);
    // Every period has a value and a band around it.
    for (int t = 1; t < 36; ++t) {
        BOOST_TEST(hasValue(s.table.index[t]));
        BOOST_TEST(s.table.lower[t] < s.table.index[t]);
        BOOST_TEST(s.table.upper[t] > s.table.index[t]);
    }
    // The plain index of the same data is unchanged by the new options' defaults.
    HedonicOptions plain;
    plain.logColumns = {1};
    const IndexResult p = hedonicIndex(in, plain);
    BOOST_TEST(p.table.index[1] != s.table.index[1]);
}

BOOST_AUTO_TEST_CASE(hedonic_effects_differ_from_the_plain_index_by_a_constant) {
    // d*_t = d_t + zbar'b: the differences between periods are those of the plain index, so the
    // plain index is exp of the effects' differences (the plain index itself is checked against
    // statsmodels in tests/reference and tests/calc).
    const HedonicInput in = hedonicSales(24);
    HedonicOptions plain;
    plain.logColumns = {1};
    const IndexResult p = hedonicIndex(in, plain);
    const PeriodEffectSeries e = hedonicPeriodEffects(in, plain);
    BOOST_TEST(e.axis.count == 24);
    BOOST_TEST(e.effects.loadings.rows() == 24);
    BOOST_TEST(e.effects.sharedCov.rows() == e.effects.loadings.cols());
    for (int t = 0; t < 24; ++t) {
        const double d = e.effects.value[t] - e.effects.value[0];
        BOOST_TEST(std::fabs(100 * std::exp(d) - p.table.index[t]) <= 1e-9 * p.table.index[t]);
        BOOST_TEST(e.effects.variance[t] > 0);
        BOOST_TEST(e.count[t] == p.table.count[t]);
    }
    // HC1: no shared part, the marginal variances.
    plain.se = HedonicStdErr::HC1;
    const PeriodEffectSeries h = hedonicPeriodEffects(in, plain);
    BOOST_TEST(h.effects.loadings.size() == 0);
    for (int t = 0; t < 24; ++t) BOOST_TEST(h.effects.value[t] == e.effects.value[t]);
}

BOOST_AUTO_TEST_CASE(period_without_sales_gets_a_value_with_a_wider_band) {
    const HedonicInput in = hedonicSales(36, {17});
    const SmoothedIndexResult s = smoothedHedonicIndex(in, hedonicOptions(SmoothKind::Level));
    BOOST_TEST(s.table.count[17] == 0u);
    BOOST_TEST(s.periodsWithoutEffect == 1);
    BOOST_TEST(hasValue(s.table.index[17]));
    auto width = [&](int t) { return s.logSe[t]; };
    BOOST_TEST(width(17) > width(16));
    BOOST_TEST(width(17) > width(18));
}

BOOST_AUTO_TEST_CASE(hedonic_real_time_values_never_change_when_later_sales_arrive) {
    const HedonicInput all = hedonicSales(48);
    for (bool seasonal : {false, true}) {
        const HedonicOptions o = hedonicOptions(SmoothKind::Trend, seasonal, true);
        const SmoothedIndexResult full = smoothedHedonicIndex(all, o);
        for (int upTo : {30, 41}) {
            const SmoothedIndexResult early = smoothedHedonicIndex(firstRows(all, rowsBefore(all.sales.date, upTo)), o);
            BOOST_TEST(early.table.axis.count == upTo);
            for (int t = 0; t < upTo; ++t) BOOST_TEST(sameRow(early.table, full.table, t), "month " << t);
        }
        // The smoothed (revising) index does change its past.
        HedonicOptions revising = o;
        revising.realtime = false;
        const SmoothedIndexResult a = smoothedHedonicIndex(all, revising);
        const SmoothedIndexResult b = smoothedHedonicIndex(firstRows(all, rowsBefore(all.sales.date, 30)), revising);
        BOOST_TEST(a.table.index[20] != b.table.index[20]);
    }
}

BOOST_AUTO_TEST_CASE(real_time_first_vintage_is_the_smoothed_index_of_its_data) {
    // The first two years are published together from the sales up to 2019-12: the smoothed
    // index of those sales. Later values: P_v = P_t0 + (L_v - L_t0) of vintage v, so at a
    // vintage that re-estimates the variances (t0 + 12) the movement since t0 is that of the
    // smoothed index of the sales up to v.
    const HedonicInput all = hedonicSales(40);
    const SmoothedIndexResult rt = smoothedHedonicIndex(all, hedonicOptions(SmoothKind::Trend, false, true));
    BOOST_TEST(rt.initialPeriods == 24);
    BOOST_TEST(rt.vintages == 17);
    BOOST_TEST(rt.lastEstimate == 35);
    const HedonicOptions smooth = hedonicOptions(SmoothKind::Trend);
    const SmoothedIndexResult first = smoothedHedonicIndex(firstRows(all, rowsBefore(all.sales.date, 24)), smooth);
    for (int t = 0; t < 24; ++t)
        BOOST_TEST(std::fabs(rt.table.index[t] - first.table.index[t]) <= 1e-12 * first.table.index[t]);
    const SmoothedIndexResult v36 = smoothedHedonicIndex(firstRows(all, rowsBefore(all.sales.date, 36)), smooth);
    const double want = rt.table.index[23] * v36.table.index[35] / v36.table.index[23];
    BOOST_TEST(std::fabs(rt.table.index[35] - want) <= 1e-11 * want);
}

BOOST_AUTO_TEST_CASE(repeat_sales_smoothed_and_real_time) {
    const RepeatSalesInput all = repeatSales(48);
    RepeatSalesOptions o;
    o.smooth = SmoothKind::Trend;
    const SmoothedIndexResult s = smoothedRepeatSalesIndex(all, o);
    const RepeatSalesResult r = repeatSalesIndex(all, o);
    BOOST_TEST(r.table.axis.count == 48);
    for (int t = 0; t < 48; ++t) {
        BOOST_TEST(sameRow(r.table, s.table, t));
        BOOST_TEST(r.logIndex[t] == s.logIndex[t]);
    }
    BOOST_TEST(r.pairCounts.used == s.pairs.used);
    BOOST_TEST(s.pairs.used > 300u);
    // Effects: the reference period is an observation 0; the other variances positive.
    const PeriodEffectSeries e = repeatSalesPeriodEffects(all, o);
    BOOST_TEST(e.effects.value[0] == 0.0);
    for (int t = 0; t < e.axis.count; ++t)
        if (hasValue(e.effects.value[t])) BOOST_TEST(e.effects.variance[t] > 0);
    o.realtime = true;
    const SmoothedIndexResult full = smoothedRepeatSalesIndex(all, o);
    const SmoothedIndexResult early = smoothedRepeatSalesIndex(firstRows(all, rowsBefore(all.sales.date, 33)), o);
    for (int t = 0; t < 33; ++t) BOOST_TEST(sameRow(early.table, full.table, t), "month " << t);
}

BOOST_AUTO_TEST_CASE(borrowing_uses_the_whole_range_and_the_segment) {
    HedonicInput in = hedonicSales(36);
    in.sales.include.assign(in.sales.date.size(), 0);
    for (std::size_t i = 0; i < in.sales.include.size(); ++i)
        in.sales.include[i] = in.characteristics[2].text[i] == "A" ? 1 : 0;
    HedonicOptions o = hedonicOptions(SmoothKind::Trend);
    o.borrow = true;
    const SmoothedIndexResult b = smoothedHedonicIndex(in, o);
    BOOST_TEST(b.model.model == "local linear trend + segment deviation");
    BOOST_TEST(b.marketRowsUsed == in.sales.date.size());
    std::size_t segment = 0;
    for (char c : in.sales.include) segment += c ? 1u : 0u;
    BOOST_TEST(b.diag.rowsUsed == segment);
    std::size_t counted = 0;
    for (std::size_t c : b.table.count) counted += c;
    BOOST_TEST(counted == segment);
    BOOST_TEST(hasValue(b.model.variances.deviation));
    // Real time with borrowing never revises either.
    o.realtime = true;
    const SmoothedIndexResult full = smoothedHedonicIndex(in, o);
    const SmoothedIndexResult early = smoothedHedonicIndex(firstRows(in, rowsBefore(in.sales.date, 30)), o);
    for (int t = 0; t < 30; ++t) BOOST_TEST(sameRow(early.table, full.table, t), "month " << t);
}

BOOST_AUTO_TEST_CASE(options_that_do_not_go_together_say_why) {
    HedonicInput in = hedonicSales(30);
    HedonicOptions o = hedonicOptions(SmoothKind::Trend);
    o.borrow = true;
    BOOST_TEST(contains(messageOf([&] { hedonicIndex(in, o); }), "borrow=1 needs an include mask"));
    in.sales.include.assign(in.sales.date.size(), 1);
    BOOST_TEST(contains(messageOf([&] { hedonicIndex(in, o); }), "no segment to borrow for"));
    o = hedonicOptions(SmoothKind::Trend);
    o.window = 3;
    BOOST_TEST(contains(messageOf([&] { o.validate(); }), "use window=0 with smooth=trend"));
    o = hedonicOptions(SmoothKind::Level);
    o.bias = HedonicBias::Kennedy;
    BOOST_TEST(contains(messageOf([&] { o.validate(); }), "bias=kennedy"));
    o = hedonicOptions(SmoothKind::None);
    o.seasonal = true;
    BOOST_TEST(messageOf([&] { o.validate(); }) ==
               "seasonal=1 works on a smoothed index: add smooth=level or smooth=trend");
    o.seasonal = false;
    o.realtime = true;
    BOOST_TEST(contains(messageOf([&] { o.validate(); }), "realtime=1 works on a smoothed index"));
    o = hedonicOptions(SmoothKind::Trend, true);
    o.freq = Frequency::Year;
    BOOST_TEST(contains(messageOf([&] { o.validate(); }), "seasonal needs monthly or quarterly"));
    RepeatSalesOptions r;
    r.smooth = SmoothKind::Trend;
    r.chain = true;
    BOOST_TEST(contains(messageOf([&] { r.validate(); }), "smooth needs chain=0"));
    // Too short for a real-time index: says what it needs.
    o = hedonicOptions(SmoothKind::Trend, true, true);
    const std::string m = messageOf([&] { hedonicIndex(firstRows(in, rowsBefore(in.sales.date, 12)), o); });
    BOOST_TEST(contains(m, "realtime needs two years of periods with at least 16 period effects"), m);
}

BOOST_AUTO_TEST_SUITE_END()
