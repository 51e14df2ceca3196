// Hedonic time-dummy estimators: structural checks on data with a known answer.
//
// Test data come from the helper `market` below. Generating model (stated here as the tests
// rely on it): months 2022-01 .. of a given count; in month t (0-based) `perMonth` sales on
// day 1 + (i mod 28); characteristics from a fixed linear congruential sequence u in [0, 1):
//   size = 50 + 150 u1 (m^2), rooms = 1 + floor(4 u2), district = "A".."D" by floor(4 u3)
//   with "A" made most frequent (u3 < 0.4 -> "A"), age = floor(60 u4);
//   ln price = 11 + delta_t + 0.8 ln size + 0.05 rooms + c_district - 0.004 age + noise,
//   delta_t = 0.01 t + 0.02 sin(t), c = {A: 0, B: 0.1, C: -0.2, D: 0.3},
//   noise = 0 (exact fits) or sigma (u5 - 0.5) sqrt(12) (uniform, sd sigma).
// With noise 0 the fit is exact, so the index must equal 100 exp(delta_t - delta_base) and the
// coefficients the generating ones, whatever the parametrisation.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "hedonic.hpp"
#include "text_keys.hpp"

using namespace lintel;

namespace {

struct Lcg {
    unsigned long long s;
    double next() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
};

double delta(int t) { return 0.01 * t + 0.02 * std::sin(static_cast<double>(t)); }

struct Market {
    HedonicInput in;
    std::vector<int> month;  // per row
};

// Columns: size (1), rooms (2), district (3, text), age (4).
Market market(int months, int perMonth, double sigma, const std::vector<int>& emptyMonths = {},
              unsigned long long seed = 7) {
    Market m;
    Lcg g{seed};
    CharacteristicColumn size{"size", {}, {}}, rooms{"rooms", {}, {}}, dist{"district", {}, {}},
        age{"age", {}, {}};
    const double cd[] = {0.0, 0.1, -0.2, 0.3};
    for (int t = 0; t < months; ++t) {
        bool empty = false;
        for (int e : emptyMonths) empty = empty || e == t;
        if (empty) continue;
        for (int i = 0; i < perMonth; ++i) {
            const double s = 50 + 150 * g.next();
            const double r = 1 + std::floor(4 * g.next());
            const double u3 = g.next();
            const int d = u3 < 0.4 ? 0 : 1 + static_cast<int>(std::floor((u3 - 0.4) / 0.6 * 3));
            const double a = std::floor(60 * g.next());
            const double noise = sigma * (g.next() - 0.5) * std::sqrt(12.0);
            const double lnp =
                11 + delta(t) + 0.8 * std::log(s) + 0.05 * r + cd[d] - 0.004 * a + noise;
            m.in.sales.date.push_back(serialFromCivil({2022 + t / 12, t % 12 + 1, 1 + i % 28}));
            m.in.sales.price.push_back(std::exp(lnp));
            size.numeric.push_back(s);
            rooms.numeric.push_back(r);
            dist.text.push_back(std::string(1, static_cast<char>('A' + d)));
            age.numeric.push_back(a);
            m.month.push_back(t);
        }
    }
    m.in.characteristics = {size, rooms, dist, age};
    return m;
}

// Two sales in each of 2023-01 .. 2023-03 with ln prices {10.0, 10.2}, {10.3, 10.5},
// {10.1, 10.1}, and one characteristic column c of 6 rows.
HedonicInput twoSalesAMonth(const CharacteristicColumn& c) {
    HedonicInput in;
    const double lp[3][2] = {{10.0, 10.2}, {10.3, 10.5}, {10.1, 10.1}};
    for (int t = 0; t < 3; ++t)
        for (int i = 0; i < 2; ++i) {
            in.sales.date.push_back(serialFromCivil({2023, t + 1, 5}));
            in.sales.price.push_back(std::exp(lp[t][i]));
        }
    in.characteristics = {c};
    return in;
}

HedonicOptions logSize() {
    HedonicOptions o;
    o.logColumns = {1};
    return o;
}

const HedonicTerm* findTerm(const HedonicFit& f, const std::string& name) {
    for (const auto& t : f.terms)
        if (t.name == name) return &t;
    return nullptr;
}

bool hasDropped(const HedonicFit& f, const std::string& name, const std::string& why) {
    for (const auto& d : f.droppedTerms)
        if (d.name == name && d.why == why) return true;
    return false;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(hedonic)

BOOST_AUTO_TEST_CASE(exact_fit_recovers_the_generating_index) {
    const Market m = market(12, 40, 0.0);
    const IndexResult r = hedonicIndex(m.in, logSize());
    BOOST_REQUIRE_EQUAL(r.table.axis.count, 12);
    BOOST_TEST(r.table.basePosition == 0);
    for (int t = 0; t < 12; ++t) {
        BOOST_TEST(r.table.index[t] == 100 * std::exp(delta(t) - delta(0)),
                   boost::test_tools::tolerance(1e-10));
        BOOST_TEST(r.table.count[t] == 40u);
    }
    BOOST_TEST(r.diag.rowsUsed == 480u);
}

BOOST_AUTO_TEST_CASE(exact_fit_recovers_the_coefficients_and_names_terms) {
    const Market m = market(6, 50, 0.0);
    const HedonicFit f = hedonicFit(m.in, logSize());
    auto coef = [&](const std::string& n) {
        const HedonicTerm* t = findTerm(f, n);
        BOOST_REQUIRE_MESSAGE(t, "term " << n);
        return t->coefficient;
    };
    const auto tol = boost::test_tools::tolerance(1e-9);
    BOOST_TEST(coef("log(size)") == 0.8, tol);
    BOOST_TEST(coef("rooms") == 0.05, tol);
    BOOST_TEST(coef("age") == -0.004, tol);
    // "A" is the most frequent district, so the reference; the others are relative to it.
    BOOST_TEST(!findTerm(f, "district=A"));
    BOOST_TEST(coef("district=B") == 0.1, tol);
    BOOST_TEST(coef("district=C") == -0.2, tol);
    BOOST_TEST(coef("district=D") == 0.3, tol);
    BOOST_TEST(coef("(Intercept)") == 11 + delta(0), tol);
    BOOST_TEST(coef("period 2022-04") == delta(3) - delta(0), tol);
    BOOST_TEST((f.terms.front().kind == TermKind::Intercept));
    BOOST_TEST(f.rSquared == 1.0, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(f.observations == 300u);
    BOOST_TEST(f.dfResidual == 300 - 6 - 6);
}

BOOST_AUTO_TEST_CASE(numeric_column_as_categories) {
    const Market m = market(4, 60, 0.0);
    HedonicOptions o = logSize();
    o.categoricalColumns = {2};
    const HedonicFit f = hedonicFit(m.in, o);
    // rooms 1..4 as levels: one of them is the reference, three terms "rooms=<k>"; the
    // generating effect is linear, so differences are 0.05 per room.
    int levels = 0;
    double ref = -1;
    for (double k = 1; k <= 4; ++k) {
        const HedonicTerm* t = findTerm(f, "rooms=" + keyText(k));
        if (t) ++levels;
        else ref = k;
    }
    BOOST_TEST(levels == 3);
    BOOST_REQUIRE(ref > 0);
    for (double k = 1; k <= 4; ++k)
        if (k != ref)
            BOOST_TEST(findTerm(f, "rooms=" + keyText(k))->coefficient == 0.05 * (k - ref),
                       boost::test_tools::tolerance(1e-8));
    BOOST_TEST(!findTerm(f, "rooms"));
}

BOOST_AUTO_TEST_CASE(header_names_and_default_names) {
    Market m = market(3, 30, 0.01);
    m.in.characteristics[0].name = "";
    m.in.characteristics[3].name = "";
    const HedonicFit f = hedonicFit(m.in, logSize());
    BOOST_TEST(findTerm(f, "log(x1)"));
    BOOST_TEST(findTerm(f, "x4"));
    BOOST_TEST(findTerm(f, "rooms"));
}

BOOST_AUTO_TEST_CASE(aliased_terms_are_dropped_and_named) {
    Market m = market(6, 40, 0.05);
    const IndexResult plain = hedonicIndex(m.in, logSize());
    // 5: rooms + age (collinear), 6: constant, 7: the month number (constant within
    // periods), 8: a text column with one level, 9: a copy of size (collinear).
    CharacteristicColumn sum{"rooms+age", {}, {}}, constant{"const", {}, {}},
        monthNo{"monthno", {}, {}}, single{"kind", {}, {}}, copy{"size2", {}, {}};
    for (std::size_t i = 0; i < m.month.size(); ++i) {
        sum.numeric.push_back(m.in.characteristics[1].numeric[i] +
                              m.in.characteristics[3].numeric[i]);
        constant.numeric.push_back(3.5);
        monthNo.numeric.push_back(m.month[i] * 2.0 + 1);
        single.text.push_back("house");
        copy.numeric.push_back(m.in.characteristics[0].numeric[i]);
    }
    m.in.characteristics.insert(m.in.characteristics.end(),
                                {sum, constant, monthNo, single, copy});
    HedonicOptions o = logSize();
    o.logColumns.push_back(9);
    const HedonicFit f = hedonicFit(m.in, o);
    BOOST_TEST(hasDropped(f, "rooms+age", "collinear with earlier terms"));
    BOOST_TEST(hasDropped(f, "const", "constant"));
    BOOST_TEST(hasDropped(f, "monthno", "constant within periods"));
    BOOST_TEST(hasDropped(f, "kind", "single level"));
    BOOST_TEST(hasDropped(f, "log(size2)", "collinear with earlier terms"));
    BOOST_TEST(f.droppedTerms.size() == 5u);
    for (const auto& t : f.terms) {
        BOOST_TEST(std::isfinite(t.coefficient));
        BOOST_TEST(std::isfinite(t.stdError));
    }
    // The index is that of the model without the aliased columns, and the diagnostics say so.
    const IndexResult r = hedonicIndex(m.in, o);
    for (int t = 0; t < 6; ++t) {
        BOOST_TEST(r.table.index[t] == plain.table.index[t], boost::test_tools::tolerance(1e-9));
        BOOST_TEST(r.table.upper[t] == plain.table.upper[t], boost::test_tools::tolerance(1e-9));
    }
    bool warned = false;
    for (const auto& w : r.diag.warnings) warned = warned || w.find("rooms+age") != std::string::npos;
    BOOST_TEST(warned);
}

BOOST_AUTO_TEST_CASE(every_term_aliased_still_gives_an_index) {
    // Only constant characteristics: the model is ln p = d_t, the index the ratio of
    // geometric means (Handbook 2013, ch. 5 with no characteristics).
    CharacteristicColumn c{"c", {}, {}};
    c.numeric.assign(6, 1.0);
    const HedonicInput in = twoSalesAMonth(c);
    const IndexResult r = hedonicIndex(in, HedonicOptions{});
    BOOST_TEST(r.table.index[1] == 100 * std::exp(0.3), boost::test_tools::tolerance(1e-12));
    BOOST_TEST(r.table.index[2] == 100 * std::exp(0.0), boost::test_tools::tolerance(1e-12));
}

BOOST_AUTO_TEST_CASE(a_single_level_text_column_leaves_no_term_at_all) {
    // A text column of one level gives no term (K = 0, not a term dropped later): the fit is
    // ln p = d_t, every matrix of the characteristics has no column. The index is the ratio of
    // geometric means; classical bands: var(d_1 - d_0) = s^2 (1/2 + 1/2), s^2 = RSS / (6 - 3)
    // = (0.02 + 0.02 + 0) / 3, with the Student t quantile t(0.975; 3) = 3.182446305284263
    // (from memory; scipy.stats.t.ppf(0.975, 3)). Eigen once formed rows of those empty
    // matrices from a null pointer (UBSan pointer-overflow, found by tests/fuzz).
    CharacteristicColumn c{"kind", {}, {}};
    c.text.assign(6, "house");
    const HedonicInput in = twoSalesAMonth(c);
    const IndexResult r = hedonicIndex(in, HedonicOptions{});
    BOOST_TEST(r.table.index[1] == 100 * std::exp(0.3), boost::test_tools::tolerance(1e-12));
    BOOST_TEST(r.table.index[2] == 100 * std::exp(0.0), boost::test_tools::tolerance(1e-12));
    const double half = 3.182446305284263 * std::sqrt(0.04 / 3);
    BOOST_TEST(r.table.lower[1] == 100 * std::exp(0.3 - half), boost::test_tools::tolerance(1e-9));
    BOOST_TEST(r.table.upper[1] == 100 * std::exp(0.3 + half), boost::test_tools::tolerance(1e-9));
    const HedonicFit f = hedonicFit(in, HedonicOptions{});
    BOOST_TEST(hasDropped(f, "kind", "single level"));
    BOOST_TEST(f.droppedTerms.size() == 1u);
    // HC1, rolling windows and the smoothed index run through the same empty matrices.
    HedonicOptions hc;
    hc.se = HedonicStdErr::HC1;
    const IndexResult h = hedonicIndex(in, hc);
    BOOST_TEST(h.table.index[1] == 100 * std::exp(0.3), boost::test_tools::tolerance(1e-12));
    HedonicOptions rolling;
    rolling.window = 2;
    const IndexResult w = hedonicIndex(in, rolling);
    BOOST_TEST(w.table.index[2] == 100 * std::exp(0.0), boost::test_tools::tolerance(1e-12));
    HedonicOptions smooth;
    smooth.smooth = SmoothKind::Level;
    const IndexResult sm = hedonicIndex(in, smooth);
    for (int t = 0; t < 3; ++t) BOOST_TEST(std::isfinite(sm.table.index[t]));
}

BOOST_AUTO_TEST_CASE(empty_periods_have_no_value_and_the_rest_is_estimated) {
    const Market m = market(10, 30, 0.0, {3, 4});
    const IndexResult r = hedonicIndex(m.in, logSize());
    BOOST_REQUIRE_EQUAL(r.table.axis.count, 10);
    for (int t = 0; t < 10; ++t) {
        if (t == 3 || t == 4) {
            BOOST_TEST(!hasValue(r.table.index[t]));
            BOOST_TEST(!hasValue(r.table.lower[t]));
            BOOST_TEST(r.table.count[t] == 0u);
        } else {
            BOOST_TEST(r.table.index[t] == 100 * std::exp(delta(t) - delta(0)),
                       boost::test_tools::tolerance(1e-10));
        }
    }
    bool warned = false;
    for (const auto& w : r.diag.warnings) warned = warned || w == "2 period(s) without sales";
    BOOST_TEST(warned);
}

BOOST_AUTO_TEST_CASE(rolling_window_bridges_a_gap) {
    // A three-month gap (months 5..7) is longer than the adjacent-period window: the window
    // ending at month 8 stretches back to month 4.
    const Market m = market(14, 30, 0.0, {5, 6, 7});
    for (int k : {2, 3, 5}) {
        HedonicOptions o = logSize();
        o.window = k;
        const IndexResult r = hedonicIndex(m.in, o);
        for (int t = 0; t < 14; ++t) {
            if (t >= 5 && t <= 7) {
                BOOST_TEST(!hasValue(r.table.index[t]));
                continue;
            }
            BOOST_TEST(r.table.index[t] == 100 * std::exp(delta(t) - delta(0)),
                       boost::test_tools::tolerance(1e-9));
        }
        bool stretched = false;
        for (const auto& w : r.diag.warnings)
            stretched = stretched || w.find("stretched") != std::string::npos;
        BOOST_TEST(stretched == (k <= 4));
    }
}

BOOST_AUTO_TEST_CASE(rolling_window_does_not_revise) {
    const Market m = market(12, 30, 0.1);
    HedonicOptions o = logSize();
    o.window = 3;
    const IndexResult full = hedonicIndex(m.in, o);
    Market early = m;
    std::size_t keep = 0;
    while (keep < m.month.size() && m.month[keep] < 8) ++keep;
    early.in.sales.date.resize(keep);
    early.in.sales.price.resize(keep);
    for (auto& c : early.in.characteristics) {
        if (!c.numeric.empty()) c.numeric.resize(keep);
        if (!c.text.empty()) c.text.resize(keep);
    }
    const IndexResult part = hedonicIndex(early.in, o);
    BOOST_REQUIRE_EQUAL(part.table.axis.count, 8);
    for (int t = 0; t < 8; ++t) {
        BOOST_TEST(full.table.index[t] == part.table.index[t]);
        BOOST_TEST(full.table.lower[t] == part.table.lower[t]);
    }
}

BOOST_AUTO_TEST_CASE(window_covering_all_periods_is_the_pooled_fit) {
    const Market m = market(5, 30, 0.1);
    HedonicOptions o = logSize();
    const IndexResult pooled = hedonicIndex(m.in, o);
    o.window = 5;
    const IndexResult rolled = hedonicIndex(m.in, o);
    for (int t = 0; t < 5; ++t) {
        BOOST_TEST(pooled.table.index[t] == rolled.table.index[t]);
        BOOST_TEST(pooled.table.upper[t] == rolled.table.upper[t]);
    }
}

BOOST_AUTO_TEST_CASE(kennedy_correction_and_bands) {
    const Market m = market(6, 25, 0.2);
    HedonicOptions o = logSize();
    const IndexResult plain = hedonicIndex(m.in, o);
    o.bias = HedonicBias::Kennedy;
    const IndexResult k = hedonicIndex(m.in, o);
    BOOST_TEST(k.table.index[0] == 100.0);
    for (int t = 1; t < 6; ++t) {
        // Kennedy: exp(d - v/2) with the band's own v: v = (ln(upper/index) / q)^2.
        BOOST_TEST(k.table.index[t] < plain.table.index[t]);
        BOOST_TEST(plain.table.lower[t] < plain.table.index[t]);
        BOOST_TEST(plain.table.upper[t] > plain.table.index[t]);
        // The band is symmetric in logs around the uncorrected index.
        BOOST_TEST(std::log(plain.table.upper[t] / plain.table.index[t]) ==
                       std::log(plain.table.index[t] / plain.table.lower[t]),
                   boost::test_tools::tolerance(1e-10));
        BOOST_TEST(k.table.upper[t] == plain.table.upper[t]);
    }
}

BOOST_AUTO_TEST_CASE(hc1_differs_from_classical_but_not_the_index) {
    const Market m = market(6, 40, 0.2);
    HedonicOptions o = logSize();
    const IndexResult a = hedonicIndex(m.in, o);
    o.se = HedonicStdErr::HC1;
    const IndexResult b = hedonicIndex(m.in, o);
    bool bandsDiffer = false;
    for (int t = 0; t < 6; ++t) {
        BOOST_TEST(a.table.index[t] == b.table.index[t]);
        bandsDiffer = bandsDiffer || std::abs(a.table.upper[t] - b.table.upper[t]) > 1e-9;
    }
    BOOST_TEST(bandsDiffer);
}

BOOST_AUTO_TEST_CASE(single_period_cross_section) {
    Market m = market(1, 80, 0.1);
    const HedonicFit f = hedonicFit(m.in, logSize());
    BOOST_TEST(f.terms.front().name == "(Intercept)");
    for (const auto& t : f.terms) BOOST_TEST((t.kind != TermKind::Period));
    const IndexResult r = hedonicIndex(m.in, logSize());
    BOOST_TEST(r.table.index[0] == 100.0);
}

BOOST_AUTO_TEST_CASE(rows_with_bad_characteristics_are_dropped_with_reasons) {
    Market m = market(4, 30, 0.1);
    m.in.characteristics[0].numeric[3] = 0.0;        // log of 0
    m.in.characteristics[0].numeric[4] = -2.0;       // log of a negative value
    m.in.characteristics[3].numeric[5] = kNoValue;  // blank age
    m.in.characteristics[2].text[6] = "";            // blank district
    m.in.sales.price[7] = kNoValue;                  // blank price: a sales reason
    m.in.characteristics[3].numeric[7] = kNoValue;  // ... counted once, as the price
    const IndexResult r = hedonicIndex(m.in, logSize());
    BOOST_TEST(r.diag.droppedFor(DropReason::LogNonPositive) == 2u);
    BOOST_TEST(r.diag.droppedFor(DropReason::BadCharacteristic) == 2u);
    BOOST_TEST(r.diag.droppedFor(DropReason::BadPrice) == 1u);
    BOOST_TEST(r.diag.rowsUsed == 120u - 5u);
}

BOOST_AUTO_TEST_CASE(input_errors_say_what_is_wrong) {
    const Market m = market(3, 20, 0.1);
    auto fails = [&](HedonicOptions o, const std::string& part) {
        try {
            hedonicIndex(m.in, o);
        } catch (const InputError& e) {
            BOOST_TEST_MESSAGE(e.what());
            return std::string(e.what()).find(part) != std::string::npos;
        }
        return false;
    };
    HedonicOptions o;
    o.window = 1;
    BOOST_TEST(fails(o, "window"));
    o = HedonicOptions{};
    o.logColumns = {3};
    BOOST_TEST(fails(o, "holds text"));
    o.logColumns = {9};
    BOOST_TEST(fails(o, "column 9 lies outside"));
    o.logColumns = {1};
    o.categoricalColumns = {1};
    BOOST_TEST(fails(o, "both log and categorical"));
    Market bad = m;
    bad.in.characteristics[1].numeric.pop_back();
    BOOST_CHECK_THROW(hedonicIndex(bad.in, HedonicOptions{}), InputError);
    HomeInput home;
    home.numbers = {kNoValue, kNoValue, kNoValue, kNoValue};
    home.texts = {"", "", "Z", ""};
    BOOST_CHECK_THROW(referenceHomeValue(m.in, home, logSize()), InputError);
    home.texts = {"", ""};
    BOOST_CHECK_THROW(referenceHomeValue(m.in, home, logSize()), InputError);
    home.numbers = {-5, kNoValue, kNoValue, kNoValue};
    home.texts = {"", "", "", ""};
    BOOST_CHECK_THROW(referenceHomeValue(m.in, home, logSize()), InputError);
}

BOOST_AUTO_TEST_CASE(an_id_column_is_refused_not_fitted) {
    Market m = market(12, 100, 0.1);
    CharacteristicColumn id{"id", {}, {}};
    for (std::size_t i = 0; i < m.month.size(); ++i) id.text.push_back("sale " + std::to_string(i));
    m.in.characteristics.push_back(id);
    try {
        hedonicIndex(m.in, logSize());
        BOOST_FAIL("no error");
    } catch (const InputError& e) {
        BOOST_TEST(std::string(e.what()).find("column 5 (id) has 1200 different values") !=
                   std::string::npos);
    }
}

BOOST_AUTO_TEST_CASE(no_degrees_of_freedom_gives_values_without_bands) {
    // Two periods, two sales each, one characteristic: n = 4, p = 2 + 1, df = 1; with one
    // sale fewer df = 0: values, no bands, no exception.
    HedonicInput in;
    CharacteristicColumn c{"size", {}, {}};
    const double size[] = {60, 80, 70};
    for (int i = 0; i < 3; ++i) {
        in.sales.date.push_back(serialFromCivil({2023, i < 2 ? 1 : 2, 3}));
        in.sales.price.push_back(1000 * size[i] * (i < 2 ? 1.0 : 1.1));
        c.numeric.push_back(size[i]);
    }
    in.characteristics = {c};
    HedonicOptions o;
    o.logColumns = {1};
    const IndexResult r = hedonicIndex(in, o);
    BOOST_TEST(r.table.index[1] == 110.0, boost::test_tools::tolerance(1e-9));
    BOOST_TEST(!hasValue(r.table.lower[1]));
    const HedonicFit f = hedonicFit(in, o);
    BOOST_TEST(f.dfResidual == 0);
    BOOST_TEST(!hasValue(f.residualSE));
}

BOOST_AUTO_TEST_CASE(reference_home_on_an_exact_fit) {
    const Market m = market(5, 40, 0.0);
    HomeInput home;
    home.numbers = {100, 2, kNoValue, 10};
    home.texts = {"", "", "C", ""};
    const RefHomeResult r = referenceHomeValue(m.in, home, logSize());
    BOOST_TEST(r.retransformFactor == 1.0, boost::test_tools::tolerance(1e-12));
    for (int t = 0; t < 5; ++t) {
        const double want =
            std::exp(11 + delta(t) + 0.8 * std::log(100.0) + 0.1 - 0.2 - 0.04);
        BOOST_TEST(r.value()[t] == want, boost::test_tools::tolerance(1e-9));
    }
    BOOST_TEST(!r.home[0].typical);
    BOOST_TEST(r.home[2].level == "C");
    // The typical home: base-period medians and most frequent level ("A").
    const RefHomeResult typ = referenceHomeValue(m.in, HomeInput{}, logSize());
    BOOST_TEST(typ.home[2].level == "A");
    BOOST_TEST(typ.home[2].typical);
    BOOST_TEST(typ.home[0].number > 50);
    BOOST_TEST(typ.home[0].number < 200);
}

BOOST_AUTO_TEST_CASE(classify_column_rule) {
    const double nan = kNoValue;
    // Mostly numbers: numeric, the text cell invalid.
    CharacteristicColumn a = classifyColumn("a", {1, 2, nan, 4}, {"", "", "n/a", ""});
    BOOST_TEST(a.text.empty());
    BOOST_TEST(a.numeric.size() == 4u);
    BOOST_TEST(!hasValue(a.numeric[2]));
    // Mostly text: categorical, numbers as levels.
    CharacteristicColumn b = classifyColumn("b", {nan, 3, nan, nan}, {"x", "", "y", ""});
    BOOST_TEST(b.numeric.empty());
    BOOST_TEST(b.text[1] == "3");
    BOOST_TEST(b.text[3] == "");
    BOOST_TEST(keyText(2.5) == "2.5");
    BOOST_TEST(keyText(4.0) == "4");
}

BOOST_AUTO_TEST_CASE(reference_level_ties_go_to_the_first_sorted_level) {
    Market m = market(2, 40, 0.1);
    // Exactly half "y", half "x": the reference is "x".
    CharacteristicColumn c{"pool", {}, {}};
    for (std::size_t i = 0; i < m.month.size(); ++i) c.text.push_back(i % 2 ? "x" : "y");
    m.in.characteristics.push_back(c);
    const HedonicFit f = hedonicFit(m.in, logSize());
    BOOST_TEST(findTerm(f, "pool=y"));
    BOOST_TEST(!findTerm(f, "pool=x"));
}

BOOST_AUTO_TEST_SUITE_END()
