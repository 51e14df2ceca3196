// The smoothing options of INDEXHEDONIC and CHAINRS in the add-in, without UNO: options ->
// IndexSmoothing, the smoothed table and its notes rows, and the messages for options that do
// not go together. Expected values: the core called directly on the same data built by hand
// (the core is checked against statsmodels and a dense GLS in
// tests/reference/test_smoothed_index_statsmodels.py) and the documented layout.
//
// Test data: 30 months from 2021-01, 12 sales a month of 60 properties (id p<k>, k = sale
// mod 60, so each property sells six times, five months apart: CHAINRS runs with
// minhold=0), size = 50 + (7 i mod 90) m^2, ln price = 12 + 0.005 t + 0.7 ln size + 0.08 sin(1.7 i) (a fixed wiggle as noise).
#include <boost/test/unit_test.hpp>

#include "addin_test_cells.hpp"

#include <cmath>
#include <string>
#include <vector>

#include "hedonic.hpp"
#include "repeat_sales.hpp"
#include "smoothed_index.hpp"

using namespace lintel;
using namespace lintel::addin;
using namespace addin_test;

namespace {

struct Data {
    std::vector<double> date, price, size;
    std::vector<std::string> id;
};

Data data() {
    Data d;
    for (int i = 0; i < 360; ++i) {
        const int t = i / 12;
        const double size = 50 + (7 * i) % 90;
        d.date.push_back(serialFromCivil({2021 + t / 12, 1 + t % 12, 1 + 2 * (i % 12)}));
        d.size.push_back(size);
        d.price.push_back(std::exp(12 + 0.005 * t + 0.7 * std::log(size) + 0.08 * std::sin(1.7 * i)));
        d.id.push_back("p" + std::to_string(i % 60));
    }
    return d;
}

Arg numbers(const std::vector<double>& v) {
    std::vector<Cell> c;
    for (double x : v) c.push_back(Cell::num(x));
    return column(c);
}

std::vector<Arg> hedonicArgs(const Data& d, const std::string& options) {
    std::vector<Arg> a(7);
    a[0] = numbers(d.date);
    a[1] = numbers(d.price);
    a[2] = numbers(d.size);
    a[6] = text(options);
    return a;
}

std::vector<Arg> chainArgs(const Data& d, const std::string& options, const char* freq = nullptr) {
    std::vector<Cell> ids;
    for (const auto& s : d.id) ids.push_back(Cell::str(s));
    std::vector<Arg> a(8);
    a[0] = column(ids);
    a[1] = numbers(d.date);
    a[2] = numbers(d.price);
    a[7] = text(options);
    if (freq) a[5] = text(freq);
    return a;
}

const std::vector<OutCell>* rowOf(const OutTable& t, const std::string& label) {
    for (const auto& r : t.rows)
        if (!r.empty() && r[0].kind == OutCell::Kind::Text && r[0].text == label) return &r;
    return nullptr;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(addin_smoothing)

BOOST_AUTO_TEST_CASE(hedonic_smooth_cells_and_notes) {
    const Data d = data();
    const OutTable t = call("INDEXHEDONIC", hedonicArgs(d, "log=1; smooth=trend; notes=1"));
    HedonicInput in;
    in.sales.date = d.date;
    in.sales.price = d.price;
    in.characteristics = {{"", d.size, {}}};
    HedonicOptions o;
    o.logColumns = {1};
    o.smooth = SmoothKind::Trend;
    const SmoothedIndexResult r = smoothedHedonicIndex(in, o);
    BOOST_REQUIRE(t.rows.size() > 30u);
    for (int i = 0; i < 30; ++i) {
        BOOST_TEST(num(t.rows[i][1]) == r.table.index[i]);
        BOOST_TEST(num(t.rows[i][2]) == 12.0);
        BOOST_TEST(num(t.rows[i][3]) == r.table.lower[i]);
        BOOST_TEST(num(t.rows[i][4]) == r.table.upper[i]);
    }
    const auto* model = rowOf(t, "smoothing model");
    BOOST_REQUIRE(model);
    BOOST_TEST(txt((*model)[1]) == "local linear trend");
    BOOST_TEST(num((*rowOf(t, "level variance"))[1]) == r.model.variances.level);
    BOOST_TEST(num((*rowOf(t, "slope variance"))[1]) == r.model.variances.slope);
    BOOST_TEST(rowOf(t, "seasonal variance") == nullptr);
    BOOST_TEST(num((*rowOf(t, "signal-to-noise ratio"))[1]) == r.model.signalToNoise);
    BOOST_TEST(num((*rowOf(t, "log-likelihood"))[1]) == r.model.logLikelihood);
    BOOST_TEST(txt((*rowOf(t, "variances"))[1]).rfind("maximum likelihood (", 0) == 0);
    BOOST_TEST(num((*rowOf(t, "periods filled in by the model"))[1]) == 0.0);
    BOOST_TEST(num((*rowOf(t, "rows used"))[1]) == 360.0);
    for (const auto& row : t.rows) BOOST_TEST(row.size() == 5u);
}

BOOST_AUTO_TEST_CASE(chainrs_smooth_cells_and_pairs_row) {
    const Data d = data();
    const OutTable t = call("CHAINRS", chainArgs(d, "smooth=level; minhold=0; notes=1"));
    RepeatSalesInput in;
    in.id = d.id;
    in.sales.date = d.date;
    in.sales.price = d.price;
    RepeatSalesOptions o;
    o.smooth = SmoothKind::Level;
    o.minHoldMonths = 0;
    const SmoothedIndexResult r = smoothedRepeatSalesIndex(in, o);
    for (int i = 0; i < 30; ++i) BOOST_TEST(num(t.rows[i][1]) == r.table.index[i]);
    BOOST_TEST(txt((*rowOf(t, "pairs"))[1]) == r.pairs.summary());
    BOOST_TEST(txt((*rowOf(t, "smoothing model"))[1]) == "local level");
    BOOST_TEST(rowOf(t, "slope variance") == nullptr);
}

BOOST_AUTO_TEST_CASE(messages_for_options_that_do_not_go_together) {
    const Data d = data();
    const std::vector<std::pair<std::string, std::string>> hedonic = {
        {"log=1; smooth=trend; window=3",
         "Lintel: smooth works on the pooled fit, not on rolling windows: use window=0 with "
         "smooth=trend (for values that never revise add realtime=1)"},
        {"log=1; smooth=level; bias=kennedy",
         "Lintel: bias=kennedy corrects the free period effects of the plain index; it does not "
         "apply with smooth (use bias=none)"},
        {"log=1; realtime=1",
         "Lintel: realtime=1 works on a smoothed index: add smooth=level or smooth=trend"},
        {"log=1; smooth=trend; borrow=1",
         "Lintel: borrow=1 needs an include mask choosing the segment: its index is the whole "
         "range's price movement plus the segment's own smoothed deviation from it"},
        {"log=1; smooth=wobbly",
         "Lintel: option smooth must be \"none\", \"level\" or \"trend\", got \"wobbly\""},
    };
    for (const auto& [options, want] : hedonic)
        BOOST_TEST(messageOf(call("INDEXHEDONIC", hedonicArgs(d, options))) == want, options);
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(d, "smooth=trend; chain=1"))) ==
               "Lintel: smooth needs chain=0: the smoother takes the period effects estimated "
               "jointly (for values that never revise use realtime=1 instead of chain=1)");
    BOOST_TEST(messageOf(call("CHAINRS", chainArgs(d, "smooth=trend; seasonal=1", "Y"))) ==
               "Lintel: seasonal needs monthly or quarterly periods (freq M or Q)");
}

BOOST_AUTO_TEST_SUITE_END()
