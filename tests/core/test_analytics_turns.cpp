// Turning points (native/core/turning_points.hpp): constructed series with known turns, and
// one constructed series breaking each censoring rule. Piecewise-linear series are given by
// their knots (month, value) and interpolated linearly in between; the expected turns follow
// from the rules by hand (the reasoning is beside each case).
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include "turning_points.hpp"

using namespace lintel;

namespace {

std::vector<double> monthStarts(int n, int year = 2010) {
    std::vector<double> p(n);
    for (int t = 0; t < n; ++t) p[t] = serialFromCivil({year + t / 12, t % 12 + 1, 1});
    return p;
}

std::vector<double> quarterStarts(int n, int year = 2000) {
    std::vector<double> p(n);
    for (int t = 0; t < n; ++t) p[t] = serialFromCivil({year + t / 4, (t % 4) * 3 + 1, 1});
    return p;
}

std::vector<double> piecewise(const std::vector<std::pair<int, double>>& knots) {
    std::vector<double> v(knots.back().first + 1);
    for (std::size_t k = 0; k + 1 < knots.size(); ++k) {
        const auto [t0, y0] = knots[k];
        const auto [t1, y1] = knots[k + 1];
        for (int t = t0; t <= t1; ++t) v[t] = y0 + (y1 - y0) * (t - t0) / double(t1 - t0);
    }
    return v;
}

// "P12 T36 ..." summary of the turns: kind and input row.
std::string turns(const TurnsResult& r) {
    std::string out;
    for (const auto& row : r.rows)
        out += (out.empty() ? "" : " ") + std::string(row.peak ? "P" : "T") + std::to_string(row.row);
    return out;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(analytics)

BOOST_AUTO_TEST_CASE(turns_monthly_sine_known_dates) {
    // y_t = 100 + 10 sin(2 pi t / 48), 144 months from 2010-01: peaks at t = 12, 60, 108,
    // troughs at t = 36, 84, 132 (all at least 6 months from the ends), 24 months apart.
    std::vector<double> y(144);
    for (int t = 0; t < 144; ++t) y[t] = 100 + 10 * std::sin(6.283185307179586 * t / 48);
    const TurnsResult r = indexTurns({monthStarts(144), y}, TurnsOptions{});
    BOOST_TEST(frequencyCode(r.freq) == std::string("M"));
    BOOST_TEST(r.window == 5);
    BOOST_TEST(r.minPhase == 5);
    BOOST_TEST(r.minCycle == 15);
    BOOST_TEST(r.ends == 6);
    const std::string want = "P12 T36 P60 T84 P108 T132";
    BOOST_TEST(turns(r) == want);
    BOOST_TEST(!hasValue(r.rows[0].monthsSincePrevious));
    for (std::size_t j = 1; j < r.rows.size(); ++j) BOOST_TEST(r.rows[j].monthsSincePrevious == 24.0);
    BOOST_TEST(r.rows[0].periodStart == serialFromCivil({2011, 1, 1}));
    BOOST_TEST(std::fabs(r.rows[1].value - 90) < 1e-12);
}

BOOST_AUTO_TEST_CASE(turns_quarterly_harding_pagan) {
    // y_q = 100 + 10 sin(2 pi q / 16), 36 quarters: peaks q = 4, 20; troughs q = 12, 28.
    // Harding-Pagan defaults: window 2, phase 2, cycle 5; months since = 3 * 8 quarters.
    std::vector<double> y(36);
    for (int q = 0; q < 36; ++q) y[q] = 100 + 10 * std::sin(6.283185307179586 * q / 16);
    const TurnsResult r = indexTurns({quarterStarts(36), y}, TurnsOptions{});
    BOOST_TEST(frequencyCode(r.freq) == std::string("Q"));
    BOOST_TEST(r.window == 2);
    BOOST_TEST(r.minPhase == 2);
    BOOST_TEST(r.minCycle == 5);
    const std::string want = "P4 T12 P20 T28";
    BOOST_TEST(turns(r) == want);
    BOOST_TEST(r.rows[1].monthsSincePrevious == 24.0);
    // A quarterly series with a 2-quarter blip: q 0..23, peak 120 at q6, trough 100 at q14,
    // blip: q9 = 108 (dip) and q10 = 112 (bump) inside the fall. With window 2, q10 is not a
    // peak (q8 = 115 is higher within 2 quarters); q9 is a trough candidate, but with no peak
    // between it and q14, alternation keeps the lower trough q14.
    std::vector<double> z = {100, 103, 106, 110, 114, 117, 120, 118, 115, 108, 112, 109,
                             105, 102, 100, 103, 106, 110, 113, 116, 118, 117, 115, 113};
    const TurnsResult s = indexTurns({quarterStarts(24), z}, TurnsOptions{});
    const std::string want2 = "P6 T14 P20";
    BOOST_TEST(turns(s) == want2);
    BOOST_TEST(s.removedAlternation == 1u);
}

BOOST_AUTO_TEST_CASE(turns_window_and_phase_rules) {
    // Knots: trough 90 at t10, a bump on the rise (115 at t25, 113 at t27), peak 130 at t40,
    // trough 90 at t70, peak 130 at t100, 110 at t119.
    // Window 5 (default): t25 is no peak (t29 = 115.6 > 115), so no bump turns.
    // Window 2: t25 is a peak and t27 a trough candidate; their phase lasts 2 < 5 months, so
    // the phase rule removes both.
    const auto y = piecewise({{0, 100}, {10, 90}, {25, 115}, {27, 113}, {40, 130}, {70, 90},
                              {100, 130}, {119, 110}});
    const auto p = monthStarts(120);
    const std::string want = "T10 P40 T70 P100";
    const TurnsResult r = indexTurns({p, y}, TurnsOptions{});
    BOOST_TEST(turns(r) == want);
    BOOST_TEST(r.removedPhase == 0u);
    TurnsOptions o;
    o.window = 2;
    const TurnsResult w = indexTurns({p, y}, o);
    BOOST_TEST(turns(w) == want);
    BOOST_TEST(w.candidates == 6u);
    BOOST_TEST(w.removedPhase == 2u);
    // With minphase 2 the bump survives as a short cycle? T10..T27 = 17 >= 15 and
    // P25..P40 = 15 >= 15: yes, all six turns stay.
    o.minPhase = 2;
    const TurnsResult keep = indexTurns({p, y}, o);
    const std::string all = "T10 P25 T27 P40 T70 P100";
    BOOST_TEST(turns(keep) == all);
}

BOOST_AUTO_TEST_CASE(turns_phase_rule_short_reversal) {
    // Knots: peak 120 at t10, trough 90 at t30, peak 95 at t33, trough 80 at t50, peak 115 at
    // t80, 100 at t119. T30 -> P33 lasts 3 < 5 months: both go; P10 T50 P80 remain.
    const auto y = piecewise({{0, 100}, {10, 120}, {30, 90}, {33, 95}, {50, 80}, {80, 115},
                              {119, 100}});
    const TurnsResult r = indexTurns({monthStarts(120), y}, TurnsOptions{});
    const std::string want = "P10 T50 P80";
    BOOST_TEST(turns(r) == want);
    BOOST_TEST(r.candidates == 5u);
    BOOST_TEST(r.removedPhase == 2u);
    BOOST_TEST(r.rows[1].monthsSincePrevious == 40.0);
}

BOOST_AUTO_TEST_CASE(turns_alternation_rule) {
    // Knots: trough 80 at t10, peak A 121 at t30, shallow dip 118 at t33 (not a trough: t28 is
    // lower within 5 months), peak B 125 at t40, trough 80 at t70, peak 120 at t100, 110 at
    // t119. A and B are both peaks with no trough between: alternation keeps the higher, B.
    const auto y = piecewise({{0, 100}, {10, 80}, {30, 121}, {33, 118}, {40, 125}, {70, 80},
                              {100, 120}, {119, 110}});
    const TurnsResult r = indexTurns({monthStarts(120), y}, TurnsOptions{});
    const std::string want = "T10 P40 T70 P100";
    BOOST_TEST(turns(r) == want);
    BOOST_TEST(r.candidates == 5u);
    BOOST_TEST(r.removedAlternation == 1u);
}

BOOST_AUTO_TEST_CASE(turns_cycle_rule) {
    // Knots: trough 80 at t8, peak 120 at t20, trough 105 at t26, peak 118 at t32, trough 70
    // at t60, peak 115 at t90, 95 at t119. Phases are all >= 6 months but P20 -> P32 is a
    // 12-month cycle (< 15): the lower peak (t32) goes, then alternation drops the higher of
    // the two troughs now adjacent (t26).
    const auto y = piecewise({{0, 100}, {8, 80}, {20, 120}, {26, 105}, {32, 118}, {60, 70},
                              {90, 115}, {119, 95}});
    const TurnsResult r = indexTurns({monthStarts(120), y}, TurnsOptions{});
    const std::string want = "T8 P20 T60 P90";
    BOOST_TEST(turns(r) == want);
    BOOST_TEST(r.removedCycle == 1u);
    BOOST_TEST(r.removedAlternation == 1u);
    // A looser cycle rule keeps everything.
    TurnsOptions o;
    o.minCycle = 12;
    BOOST_TEST(indexTurns({monthStarts(120), y}, o).rows.size() == 6u);
}

BOOST_AUTO_TEST_CASE(turns_end_rules) {
    // Knots: 130 at t0, 100 at t4, peak 110 at t14, trough 70 at t40, peak 120 at t70, trough
    // 90 at t100, 95 at t119. The first turn, P14, is lower than the series' start (130): the
    // peak lies before the data, so P14 goes (Bry-Boschan V.C); T4 is within 6 months of the
    // start (V.B) and never a candidate.
    const auto y = piecewise({{0, 130}, {4, 100}, {14, 110}, {40, 70}, {70, 120}, {100, 90},
                              {119, 95}});
    const TurnsResult r = indexTurns({monthStarts(120), y}, TurnsOptions{});
    const std::string want = "T40 P70 T100";
    BOOST_TEST(turns(r) == want);
    BOOST_TEST(r.removedEnds == 1u);
    // Last turn: after the trough at t100 the series creeps up to 91 at t103 (no peak: t98 =
    // 92 is higher within 5 months) and then falls to 85 at t119, below the trough: the trough
    // lies after the data, so T100 goes too.
    const auto z = piecewise({{0, 130}, {4, 100}, {14, 110}, {40, 70}, {70, 120}, {100, 90},
                              {103, 91}, {119, 85}});
    const TurnsResult s = indexTurns({monthStarts(120), z}, TurnsOptions{});
    const std::string want2 = "T40 P70";
    BOOST_TEST(s.removedEnds == 2u);
    BOOST_TEST(turns(s) == want2);
}

BOOST_AUTO_TEST_CASE(turns_missing_values_and_errors) {
    // The sine of the first case with its first peak month blank: that month cannot be a turn;
    // its neighbours (t11 and t13, equal values) are compared with the values present, and the
    // first of the flat pair, t11, dates the peak.
    std::vector<double> y(144);
    for (int t = 0; t < 144; ++t) y[t] = 100 + 10 * std::sin(6.283185307179586 * t / 48);
    y[12] = kNoValue;
    y[13] = y[11];
    const TurnsResult r = indexTurns({monthStarts(144), y}, TurnsOptions{});
    BOOST_REQUIRE(!r.rows.empty());
    BOOST_TEST(r.rows[0].row == 11);
    BOOST_TEST(r.rows[1].monthsSincePrevious == 25.0);
    BOOST_TEST(r.diag.droppedFor(DropReason::BlankValue) == 1u);
    // Errors, never a crash.
    BOOST_CHECK_THROW(indexTurns({monthStarts(3), {1, 2}}, TurnsOptions{}), InputError);
    BOOST_CHECK_THROW(indexTurns({monthStarts(4), {1, kNoValue, kNoValue, 2}}, TurnsOptions{}),
                      InputError);
    std::vector<double> bad = monthStarts(10);
    bad[4] += 3;  // not a month start
    BOOST_CHECK_THROW(indexTurns({bad, std::vector<double>(10, 100.0)}, TurnsOptions{}), InputError);
    TurnsOptions q;
    q.freq = Frequency::Quarter;  // monthly dates are not quarter starts
    BOOST_CHECK_THROW(indexTurns({monthStarts(10), std::vector<double>(10, 100.0)}, q), InputError);
    // A flat series: no turn, a warning.
    const TurnsResult flat = indexTurns({monthStarts(40), std::vector<double>(40, 100.0)}, TurnsOptions{});
    BOOST_TEST(flat.rows.empty());
    BOOST_TEST(!flat.diag.warnings.empty());
}

BOOST_AUTO_TEST_SUITE_END()
