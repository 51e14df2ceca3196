// Every estimator's Options: the defaults validate, and validate() on its own rejects a bad
// value with the message the estimator gives (the add-in and refcli call it before any data
// is read). The rules are the documented ones in each header.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <string>

#include "hedonic.hpp"
#include "hodrick_prescott.hpp"
#include "index_analytics.hpp"
#include "index_arithmetic.hpp"
#include "index_compare.hpp"
#include "lead_lag.hpp"
#include "mix_adjusted.hpp"
#include "raw_index.hpp"
#include "repeat_sales.hpp"
#include "seasonal.hpp"
#include "turning_points.hpp"

using namespace lintel;

namespace {
template <class Options>
std::string messageOf(const Options& o) {
    try {
        o.validate();
    } catch (const InputError& e) {
        return e.what();
    }
    return "valid";
}
}  // namespace

BOOST_AUTO_TEST_SUITE(options)

BOOST_AUTO_TEST_CASE(defaults_are_valid) {
    BOOST_TEST(messageOf(IndexOptions{}) == "valid");
    BOOST_TEST(messageOf(RawIndexOptions{}) == "valid");
    BOOST_TEST(messageOf(RepeatSalesOptions{}) == "valid");
    BOOST_TEST(messageOf(HedonicOptions{}) == "valid");
    BOOST_TEST(messageOf(MixOptions{}) == "valid");
    BOOST_TEST(messageOf(VolatilityOptions{}) == "valid");
    BOOST_TEST(messageOf(SnrOptions{}) == "valid");
    BOOST_TEST(messageOf(HpOptions{}) == "valid");
    BOOST_TEST(messageOf(LeadLagOptions{}) == "valid");
    BOOST_TEST(messageOf(TurnsOptions{}) == "valid");
    BOOST_TEST(messageOf(CompareOptions{}) == "valid");
    BOOST_TEST(messageOf(SeasonalOptions{}) == "valid");
    BOOST_TEST(messageOf(ChangeOptions{}) == "valid");
    // The one option without a default: the rebase needs its base.
    BOOST_TEST(messageOf(RebaseOptions{}) == "base is required: a date in the new base period");
}

BOOST_AUTO_TEST_CASE(each_rejects_a_bad_value_in_the_users_words) {
    RawIndexOptions raw;
    raw.level = 1.0;
    BOOST_TEST(messageOf(raw) == "level must lie between 0 and 1, got 1");
    raw = {};
    raw.trim = 0.5;
    BOOST_TEST(messageOf(raw) == "trim must lie in [0, 0.5), got 0.5");
    RepeatSalesOptions rs;
    rs.minSales = 0;
    BOOST_TEST(messageOf(rs) == "minsales must be at least 1");
    HedonicOptions h;
    h.window = 1;
    BOOST_TEST(messageOf(h) == "window must be 0 (pooled) or at least 2 periods, got 1");
    h = {};
    h.logColumns = {2};
    h.categoricalColumns = {2};
    BOOST_TEST(messageOf(h) == "column 2 cannot be both log and categorical");
    MixOptions m;
    m.bootstrap = true;
    m.reps = 10;
    BOOST_TEST(messageOf(m) == "reps must lie between 20 and 10000, got 10");
    m.bootstrap = false;  // reps only matter with the bootstrap
    BOOST_TEST(messageOf(m) == "valid");
    VolatilityOptions v;
    v.lag = 0;
    BOOST_TEST(messageOf(v) == "lag must be 1 or more, got 0");
    SnrOptions snr;
    snr.lambda = -1.0;
    BOOST_TEST(messageOf(snr) == "lambda must be a positive number, got -1");
    HpOptions hp;
    hp.lambda = 0.0;
    BOOST_TEST(messageOf(hp) == "lambda must be a positive number, got 0");
    LeadLagOptions ll;
    ll.maxLag = -1;
    BOOST_TEST(messageOf(ll) == "maxlag must be 0 or more, got -1");
    ll = {};
    ll.changeLag = 0;
    BOOST_TEST(messageOf(ll) == "lag must be 1 or more, got 0");
    TurnsOptions turns;
    turns.ends = 0;  // no margin at the ends is allowed
    BOOST_TEST(messageOf(turns) == "valid");
    turns.minCycle = 0;
    BOOST_TEST(messageOf(turns) == "mincycle must be 1 or more, got 0");
    CompareOptions c;
    c.changeLag = 0;
    BOOST_TEST(messageOf(c) == "leadlag must be 1 or more, got 0");
    SeasonalOptions s;
    s.freq = Frequency::Year;
    BOOST_TEST(messageOf(s) == "seasonal factors need a monthly or quarterly index (freq M or Q)");
}

BOOST_AUTO_TEST_CASE(defaults_derived_from_the_frequency) {
    // Default lags and windows are "one year" or the published rules for the frequency: an
    // unset optional, resolved by the estimator (documented in the headers).
    LeadLagOptions ll;
    ll.freq = Frequency::Quarter;
    BOOST_TEST(ll.changeLagUsed() == 4);
    ll.changeLag = 2;
    BOOST_TEST(ll.changeLagUsed() == 2);
    RepeatSalesOptions rs;
    rs.freq = Frequency::Quarter;
    BOOST_TEST(rs.initialPeriods() == 8);  // two years
    rs.chainInit = 3;
    BOOST_TEST(rs.initialPeriods() == 3);
}

BOOST_AUTO_TEST_SUITE_END()
