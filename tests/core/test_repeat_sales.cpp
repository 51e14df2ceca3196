// Repeat-sales core (CHAINRS / RSPAIRS): a hand-solved example, every filter and reason code,
// ids as text and numbers, duplicates, a property sold many times, unlinked periods, chain=1
// without revisions, and the error paths. The large comparisons with statsmodels are in
// tests/reference/test_repeat_sales_statsmodels.py and test_repeat_sales_chain.py.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <random>
#include <set>
#include <string>

#include "repeat_sales.hpp"
#include "repeat_sales_internal.hpp"
#include "text_keys.hpp"

using namespace lintel;

namespace {

double day(int y, int m, int d) { return serialFromCivil({y, m, d}); }

struct Sales {
    RepeatSalesInput in;
    bool anyChanged = false, anyExcluded = false;
    Sales& add(const std::string& id, double date, double price, bool changed = false,
               bool include = true) {
        in.id.push_back(id);
        in.sales.date.push_back(date);
        in.sales.price.push_back(price);
        in.changed.push_back(changed ? 1 : 0);
        in.sales.include.push_back(include ? 1 : 0);
        return *this;
    }
};

RepeatSalesOptions yearly(RepeatSalesMethod m = RepeatSalesMethod::BaileyMuthNourse) {
    RepeatSalesOptions o;
    o.freq = Frequency::Year;
    o.method = m;
    return o;
}

const SalePair* findPair(const std::vector<SalePair>& pairs, const std::string& id,
                         std::size_t secondRow) {
    for (const SalePair& p : pairs)
        if (p.id == id && p.secondRow == secondRow) return &p;
    return nullptr;
}

bool hasWarning(const Diagnostics& d, const std::string& part) {
    for (const auto& w : d.warnings)
        if (w.find(part) != std::string::npos) return true;
    return false;
}

// The hand-solved example: yearly periods 2020 (0), 2021 (1), 2022 (2), three pairs
//   A: 2020 -> 2021, y = 0.10     B: 2021 -> 2022, y = 0.05     C: 2020 -> 2022, y = 0.18
Sales handExample() {
    Sales s;
    s.add("A", day(2020, 3, 1), 100).add("A", day(2021, 3, 1), 100 * std::exp(0.10));
    s.add("B", day(2021, 4, 1), 100).add("B", day(2022, 4, 1), 100 * std::exp(0.05));
    s.add("C", day(2020, 3, 1), 100).add("C", day(2022, 3, 1), 100 * std::exp(0.18));
    return s;
}

}  // namespace

BOOST_AUTO_TEST_SUITE(repeat_sales)

BOOST_AUTO_TEST_CASE(hand_solved_three_periods_bmn) {
    // Solved by hand (BMN 1963: OLS of y on +1/-1 dummies, base 2020 dropped).
    //   X = [ 1 0 ; -1 1 ; 0 1 ]  (columns b1, b2),  X'X = [ 2 -1 ; -1 2 ],
    //   (X'X)^-1 = 1/3 [ 2 1 ; 1 2 ],  X'y = [ y1 - y2 ; y2 + y3 ] = [ 0.05 ; 0.23 ]
    //   b1 = (2 * 0.05 + 0.23) / 3 = 0.11,   b2 = (0.05 + 2 * 0.23) / 3 = 0.17
    //   residuals: A 0.10 - 0.11 = -0.01, B 0.05 - 0.06 = -0.01, C 0.18 - 0.17 = 0.01
    //   s^2 = 3e-4 / (3 - 2) = 3e-4, var b1 = var b2 = s^2 * 2/3 = 2e-4, se = 0.0141421356
    //   index: 100, 100 e^0.11 = 111.627807, 100 e^0.17 = 118.530485
    //   95 % band of 2021: t(1) quantile 0.975 = 12.7062047 (any t table), so
    //   100 exp(0.11 -/+ 12.7062047 * 0.0141421356) = 93.26802, 133.60171
    Sales s = handExample();
    PairAudit r_audit;
    const RepeatSalesResult r = repeatSalesIndex(s.in, yearly(), &r_audit);
    BOOST_REQUIRE_EQUAL(r.table.axis.count, 3);
    BOOST_TEST(r.table.index[0] == 100.0);
    BOOST_TEST(r.logIndex[1] == 0.11, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(r.logIndex[2] == 0.17, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(r.table.index[1] == 111.627807, boost::test_tools::tolerance(1e-8));
    BOOST_TEST(r.table.index[2] == 118.530485, boost::test_tools::tolerance(1e-8));
    BOOST_TEST(r.logSe[1] == std::sqrt(2e-4), boost::test_tools::tolerance(1e-9));
    BOOST_TEST(r.logSe[2] == std::sqrt(2e-4), boost::test_tools::tolerance(1e-9));
    BOOST_TEST(r.scale == 3e-4, boost::test_tools::tolerance(1e-9));
    BOOST_TEST(r.table.lower[1] == 93.26802, boost::test_tools::tolerance(1e-6));
    BOOST_TEST(r.table.upper[1] == 133.60171, boost::test_tools::tolerance(1e-6));
    BOOST_TEST(r.table.lower[0] == 100.0);  // the base: no sampling error relative to itself
    // Pairs ending in each period: none in 2020, A in 2021, B and C in 2022.
    BOOST_TEST(r.table.count[0] == 0u);
    BOOST_TEST(r.table.count[1] == 1u);
    BOOST_TEST(r.table.count[2] == 2u);
    BOOST_TEST(r.pairCounts.used == 3u);
    BOOST_TEST(r.diag.rowsUsed == 6u);
    for (const SalePair& p : r_audit.pairs) BOOST_TEST(p.weight == 1.0);
}

BOOST_AUTO_TEST_CASE(hand_solved_case_shiller_equal_residuals) {
    // Same data, method cs: the squared stage-1 residuals are all 1e-4, so the stage-2 OLS
    // on (1, years) has slope 0 and intercept 1e-4: equal weights, the same values as BMN.
    Sales s = handExample();
    PairAudit r_audit;
    const RepeatSalesResult r = repeatSalesIndex(s.in, yearly(RepeatSalesMethod::CaseShiller), &r_audit);
    BOOST_TEST(r.logIndex[1] == 0.11, boost::test_tools::tolerance(1e-10));
    BOOST_TEST(r.logIndex[2] == 0.17, boost::test_tools::tolerance(1e-10));
    BOOST_REQUIRE_EQUAL(r.variance.coef.size(), 2u);
    BOOST_TEST(r.variance.coef[0] == 1e-4, boost::test_tools::tolerance(1e-8));
    BOOST_TEST(std::fabs(r.variance.coef[1]) < 1e-15);
    for (const SalePair& p : r_audit.pairs) BOOST_TEST(p.weight == 1.0, boost::test_tools::tolerance(1e-12));
}

BOOST_AUTO_TEST_CASE(hand_solved_chain) {
    // chain = 1, init = 1 (only 2020 is the initial window, log level 0):
    //   2021: the one pair ending there, A: b1 = 0 + 0.10 = 0.10
    //   2022: B gives b1 + 0.05 = 0.15, C gives 0 + 0.18 = 0.18; BMN mean: b2 = 0.165
    // (the joint estimate gave 0.11 and 0.17: chaining does not revise 2021 with B and C).
    // 2021 rests on one pair for one parameter: no residual degree of freedom, no band.
    Sales s = handExample();
    RepeatSalesOptions o = yearly();
    o.chain = true;
    o.chainInit = 1;
    const RepeatSalesResult r = repeatSalesIndex(s.in, o);
    BOOST_TEST(r.logIndex[1] == 0.10, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(r.logIndex[2] == 0.165, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(r.table.index[2] == 100 * std::exp(0.165), boost::test_tools::tolerance(1e-12));
    BOOST_TEST(!hasValue(r.table.lower[1]));
    BOOST_TEST(r.table.lower[0] == 100.0);  // the base row is 100 | 100
    BOOST_TEST(r.table.upper[0] == 100.0);
}

BOOST_AUTO_TEST_CASE(every_filter_and_reason) {
    // Yearly periods 2010..2019. A backbone of eight pairs links 2010..2014; every other
    // property shows one reason.
    Sales s;
    auto backbone = [&](const std::string& id, int y1, int m1, int y2) {
        const double wiggle = 0.01 * static_cast<double>(id.back() - '0');
        s.add(id, day(y1, m1, 1), 100 * std::exp(0.05 * (y1 - 2010)));
        s.add(id, day(y2, m1, 1), 100 * std::exp(0.05 * (y2 - 2010) + wiggle));
    };
    backbone("K1", 2010, 3, 2011);
    backbone("K2", 2011, 4, 2012);
    backbone("K3", 2012, 5, 2013);
    backbone("K4", 2013, 6, 2014);
    backbone("K5", 2010, 7, 2012);
    backbone("K6", 2011, 8, 2013);
    backbone("K7", 2012, 9, 2014);
    backbone("K8", 2010, 2, 2014);                                    // rows 0..15
    s.add("A", day(2010, 5, 1), NAN).add("A", day(2011, 5, 1), 105);  // 16, 17
    s.add("B", day(2011, 5, 1), 100).add("B", day(2012, 6, 1), -5);   // 18, 19
    s.add("C", day(2012, 1, 10), 100).add("C", day(2013, 1, 10), 105, false, false);  // 20, 21
    s.add("D", day(2010, 1, 15), 100).add("D", day(2011, 1, 15), 150, true);          // 22, 23
    s.add("D", day(2013, 1, 15), 160);                                                // 24
    s.add("E", day(2012, 2, 1), 100).add("E", day(2012, 11, 1), 103);  // 25, 26 same year
    s.add("F", day(2011, 11, 1), 100).add("F", day(2012, 2, 1), 101);  // 27, 28 3 months
    s.add("G", day(2013, 9, 1), 100).add("G", day(2014, 4, 1), 200);   // 29, 30 doubles in 7 m
    s.add("H", day(2012, 7, 1), 280).add("H", day(2014, 7, 1), 300);   // 31, 32
    s.add("H", day(2014, 7, 1) + 0.5, 310);                            // 33 duplicate
    s.add("", day(2012, 3, 3), 100);                                   // 34 blank id
    s.add("J", NAN, 100).add("J", day(2013, 3, 3), 120);               // 35, 36
    s.add("S", day(2011, 3, 3), 100);                                  // 37 single sale
    s.add("Z1", day(2018, 3, 1), 100).add("Z1", day(2019, 3, 1), 104);  // 38, 39 isolated
    s.add("Z2", day(2018, 5, 1), 100).add("Z2", day(2019, 6, 1), 103);  // 40, 41
    const RepeatSalesOptions o = yearly();
    PairAudit r_audit;
    const RepeatSalesResult r = repeatSalesIndex(s.in, o, &r_audit);

    auto expect = [&](const std::string& id, std::size_t second, PairStatus st,
                      const std::string& why) {
        const SalePair* p = findPair(r_audit.pairs, id, second);
        BOOST_REQUIRE_MESSAGE(p, "pair " << id << " ending at row " << second);
        BOOST_TEST(static_cast<int>(p->status) == static_cast<int>(st), id);
        BOOST_TEST(p->reason == why, id);
        BOOST_TEST(p->used == (st == PairStatus::Used), id);
        if (st != PairStatus::Used) BOOST_TEST(p->weight == 0.0);
    };
    expect("A", 17, PairStatus::FirstSaleUnusable, "first sale: blank or non-numeric price");
    expect("B", 19, PairStatus::SecondSaleUnusable, "second sale: non-positive price");
    expect("C", 21, PairStatus::SecondSaleUnusable, "second sale: excluded by include");
    expect("D", 23, PairStatus::Changed, "property changed at the second sale");
    expect("D", 24, PairStatus::Used, "");  // the next pair starts from the changed sale
    expect("E", 26, PairStatus::SamePeriod, "both sales in one period");
    expect("F", 28, PairStatus::ShortHold, "held less than minhold months");
    expect("G", 30, PairStatus::ExtremeReturn, "annualised log return beyond +/-maxrate");
    expect("H", 32, PairStatus::Used, "");
    expect("H", 33, PairStatus::Duplicate, "duplicate sale (same id and date)");
    expect("Z1", 39, PairStatus::NotLinked, "not linked to the base period");
    expect("Z2", 41, PairStatus::NotLinked, "not linked to the base period");
    for (const char* k : {"K1", "K2", "K3", "K4", "K5", "K6", "K7", "K8"})
        BOOST_TEST(findPair(r_audit.pairs, k, 0) == nullptr);
    BOOST_TEST(findPair(r_audit.pairs, "J", 36) == nullptr);  // its other sale has no date

    // Audit columns of two pairs.
    const SalePair* f = findPair(r_audit.pairs, "F", 28);
    BOOST_TEST(f->monthsHeld == 3.0);
    BOOST_TEST(f->annualRate == std::log(1.01) * 365.25 / 92, boost::test_tools::tolerance(1e-12));
    const SalePair* g = findPair(r_audit.pairs, "G", 30);
    BOOST_TEST(g->monthsHeld == 7.0);
    BOOST_TEST(g->annualRate == std::log(2.0) * 365.25 / 212, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(std::fabs(findPair(r_audit.pairs, "A", 17)->monthsHeld - 12.0) < 1e-12);
    BOOST_TEST(!hasValue(findPair(r_audit.pairs, "A", 17)->annualRate));

    // Counts. Rows: 42 in; screened out: bad price 1 (A), non-positive 1 (B), blank id 1,
    // excluded 1 (C), bad date 1 (J); duplicate 1 (H, row 33); used: 16 backbone + D 2 + H 2
    // = 20; only sale: J (row 36), S = 2; in no used pair: A2 B1 C1 D1 E E F F G G Z Z Z Z = 14.
    BOOST_TEST(r.diag.rowsIn == 42u);
    BOOST_TEST(r.diag.rowsUsed == 20u);
    BOOST_TEST(r.diag.droppedFor(DropReason::BadPrice) == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::NonPositivePrice) == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::BlankId) == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::Excluded) == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::BadDate) == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::DuplicateSale) == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::SingleSale) == 2u);
    BOOST_TEST(r.diag.droppedFor(DropReason::NoUsedPair) == 14u);
    BOOST_TEST(r.diag.rowsIn == r.diag.rowsUsed + r.diag.rowsDropped());
    BOOST_TEST(r.pairCounts.formed == 20u);
    BOOST_TEST(r.pairCounts.used == 10u);
    // Pair counts by reason agree with the audit rows, one entry per distinct reason.
    std::size_t listed = 0;
    for (const auto& [why, n] : r.pairCounts.dropped) {
        std::size_t rows = 0;
        for (const SalePair& p : r_audit.pairs)
            rows += p.status == why.status && p.saleProblem == why.sale;
        BOOST_TEST(n == rows, pairReasonText(why));
        listed += n;
    }
    BOOST_TEST(listed + r.pairCounts.used == r.pairCounts.formed);
    BOOST_TEST(r.pairCounts.droppedFor({PairStatus::ShortHold, std::nullopt}) == 1u);
    BOOST_TEST(r.pairCounts.droppedFor({PairStatus::SecondSaleUnusable, DropReason::Excluded}) == 1u);

    // Periods without a value are named, and there is no failure.
    BOOST_TEST(r.table.axis.count == 10);
    for (int t = 0; t < 5; ++t) BOOST_TEST(hasValue(r.table.index[t]));
    for (int t = 5; t < 10; ++t) BOOST_TEST(!hasValue(r.table.index[t]));
    BOOST_TEST(hasWarning(r.diag, "(2015 .. 2017): no usable pair has a sale in it"));
    BOOST_TEST(hasWarning(r.diag, "(2018 .. 2019): its pairs are not linked to the base period"));

    // RSPAIRS explains the same thing.
    const PairAudit a = repeatSalesPairs(s.in, o);
    BOOST_REQUIRE_EQUAL(a.pairs.size(), r_audit.pairs.size());
    for (std::size_t i = 0; i < a.pairs.size(); ++i) {
        BOOST_TEST(a.pairs[i].reason == r_audit.pairs[i].reason);
        BOOST_TEST(a.pairs[i].weight == r_audit.pairs[i].weight);
    }
    BOOST_TEST(a.counts.used == 10u);

    // Filters off: F (3 months) and G (rate 1.19) come back; E (same year) stays out.
    RepeatSalesOptions off = o;
    off.minHoldMonths = 0;
    off.maxRate = 0;
    PairAudit r2_audit;
    const RepeatSalesResult r2 = repeatSalesIndex(s.in, off, &r2_audit);
    BOOST_TEST(findPair(r2_audit.pairs, "F", 28)->used);
    BOOST_TEST(findPair(r2_audit.pairs, "G", 30)->used);
    BOOST_TEST(!findPair(r2_audit.pairs, "E", 26)->used);
    RepeatSalesOptions tight = o;
    tight.minHoldMonths = 13;  // 12-month holds are now flips
    PairAudit r3_audit;
    const RepeatSalesResult r3 = repeatSalesIndex(s.in, tight, &r3_audit);
    BOOST_TEST(static_cast<int>(findPair(r3_audit.pairs, "K1", 1)->status) ==
               static_cast<int>(PairStatus::ShortHold));
    BOOST_TEST(findPair(r3_audit.pairs, "K5", 9)->used);
}

BOOST_AUTO_TEST_CASE(ids_as_text_and_numbers) {
    BOOST_TEST(keyText(123.0) == "123");
    BOOST_TEST(keyText(-7.0) == "-7");
    BOOST_TEST(keyText(0.0) == "0");
    BOOST_TEST(keyText(-0.0) == "0");
    BOOST_TEST(keyText(12.5) == "12.5");
    BOOST_TEST(keyText(123456789012345.0) == "123456789012345");
    BOOST_TEST(keyText(1e6) == "1000000");
    BOOST_TEST(keyText(0.1 + 0.2) == "0.30000000000000004");  // round-trip form
    BOOST_TEST(keyText(NAN) == "");
    // The hand example with ids given as numbers (converted as the add-in does), as text with
    // blanks around, and as text: one index.
    Sales text = handExample();
    Sales num = handExample();
    Sales padded = handExample();
    const double code[] = {101, 101, 102, 102, 103, 103};
    for (std::size_t i = 0; i < 6; ++i) {
        num.in.id[i] = keyText(code[i]);
        text.in.id[i] = std::to_string(static_cast<int>(code[i]));
        padded.in.id[i] = "  " + text.in.id[i] + " ";
    }
    const RepeatSalesResult a = repeatSalesIndex(num.in, yearly());
    const RepeatSalesResult b = repeatSalesIndex(text.in, yearly());
    PairAudit c_audit;
    const RepeatSalesResult c = repeatSalesIndex(padded.in, yearly(), &c_audit);
    for (int t = 0; t < 3; ++t) {
        BOOST_TEST(a.table.index[t] == b.table.index[t]);
        BOOST_TEST(c.table.index[t] == b.table.index[t]);
    }
    BOOST_TEST(c_audit.pairs[0].id == "101");
    BOOST_TEST(a.logIndex[1] == 0.11, boost::test_tools::tolerance(1e-12));
    // Ids are case-sensitive: "a" and "A" are two properties, each sold once.
    Sales cs;
    cs.add("a", day(2020, 1, 1), 100).add("A", day(2021, 6, 1), 110);
    cs.add("B", day(2020, 1, 1), 100).add("B", day(2021, 6, 1), 110);
    const RepeatSalesResult d = repeatSalesIndex(cs.in, yearly());
    BOOST_TEST(d.pairCounts.formed == 1u);
    BOOST_TEST(d.diag.droppedFor(DropReason::SingleSale) == 2u);
}

BOOST_AUTO_TEST_CASE(duplicate_sales_of_one_id_on_one_date) {
    // Three rows for P on 2021-05-05: blank price, 200 (flagged changed), 205. The kept sale is
    // the first usable row in input order (200); the others are listed as duplicate pseudo
    // pairs from it. The changed flag on any row of the day marks the kept sale.
    Sales s;
    s.add("P", day(2019, 1, 10), 150);                          // 0
    s.add("P", day(2021, 5, 5), NAN);                           // 1
    s.add("P", day(2021, 5, 5) + 0.3, 200);                     // 2 kept
    s.add("P", day(2021, 5, 5), 205, true);                     // 3
    s.add("P", day(2023, 2, 1), 230);                           // 4
    s.add("Q", day(2019, 2, 1), 100).add("Q", day(2021, 2, 1), 120).add("Q", day(2023, 2, 2), 140);
    PairAudit r_audit;
    const RepeatSalesResult r = repeatSalesIndex(s.in, yearly(), &r_audit);
    const SalePair* in = findPair(r_audit.pairs, "P", 2);
    BOOST_REQUIRE(in);
    BOOST_TEST(in->firstRow == 0u);
    BOOST_TEST(in->reason == "property changed at the second sale");
    const SalePair* d1 = findPair(r_audit.pairs, "P", 1);
    const SalePair* d3 = findPair(r_audit.pairs, "P", 3);
    BOOST_REQUIRE(d1);
    BOOST_REQUIRE(d3);
    BOOST_TEST(d1->firstRow == 2u);
    BOOST_TEST(d3->firstRow == 2u);
    BOOST_TEST(static_cast<int>(d1->status) == static_cast<int>(PairStatus::Duplicate));
    BOOST_TEST(d1->reason == "duplicate sale (same id and date)");
    BOOST_TEST(static_cast<int>(d3->status) == static_cast<int>(PairStatus::Duplicate));
    const SalePair* out = findPair(r_audit.pairs, "P", 4);
    BOOST_REQUIRE(out);
    BOOST_TEST(out->firstRow == 2u);  // the chain continues from the kept sale
    BOOST_TEST(out->used);
    // Row 1 stays counted as a bad price, row 3 (usable) as a duplicate.
    BOOST_TEST(r.diag.droppedFor(DropReason::BadPrice) == 1u);
    BOOST_TEST(r.diag.droppedFor(DropReason::DuplicateSale) == 1u);
    BOOST_TEST(r.diag.rowsIn == r.diag.rowsUsed + r.diag.rowsDropped());
}

BOOST_AUTO_TEST_CASE(property_sold_many_times) {
    // One house sold six times (rows given out of date order), changed (extended) at the
    // fourth sale; a second house links the same years.
    Sales s;
    const int years[] = {2016, 2012, 2014, 2018, 2013, 2020};
    const double price[] = {130, 100, 115, 170, 108, 190};
    const bool changed[] = {false, false, false, true, false, false};
    for (int i = 0; i < 6; ++i) s.add("M", day(years[i], 6, 1), price[i], changed[i]);
    for (int y = 2012; y < 2020; ++y)
        s.add("N" + std::to_string(y), day(y, 2, 1), 100).add("N" + std::to_string(y), day(y + 1, 3, 1), 104);
    PairAudit r_audit;
    const RepeatSalesResult r = repeatSalesIndex(s.in, yearly(), &r_audit);
    std::vector<const SalePair*> m;
    for (const SalePair& p : r_audit.pairs)
        if (p.id == "M") m.push_back(&p);
    BOOST_REQUIRE_EQUAL(m.size(), 5u);
    // In date order: 2012 (row 1), 2013 (4), 2014 (2), 2016 (0), 2018 (3, changed), 2020 (5).
    const std::size_t first[] = {1, 4, 2, 0, 3}, second[] = {4, 2, 0, 3, 5};
    for (int i = 0; i < 5; ++i) {
        BOOST_TEST(m[i]->firstRow == first[i]);
        BOOST_TEST(m[i]->secondRow == second[i]);
        BOOST_TEST(m[i]->used == (i != 3));
    }
    BOOST_TEST(m[3]->reason == "property changed at the second sale");
    BOOST_TEST(m[4]->monthsHeld == 24.0);
    BOOST_TEST(m[4]->annualRate == std::log(190.0 / 170.0) * 365.25 / 731,
               boost::test_tools::tolerance(1e-12));
}

BOOST_AUTO_TEST_CASE(chain_never_revises_published_values) {
    // Generating model: 600 houses, 2..5 sales each on days uniform over 2015-01-01 ..
    // 2019-12-31, ln p = N(12, 0.3^2) + 0.006 m + N(0, 0.05^2) (m: month number). Fixed seed.
    std::mt19937 gen(42);
    std::uniform_int_distribution<int> nSales(2, 5), dayOf(0, 1825);
    std::normal_distribution<double> level(12, 0.3), noise(0, 0.05);
    struct Row { std::string id; double date, price; };
    std::vector<Row> rows;
    const double d0 = day(2015, 1, 1);
    for (int h = 0; h < 600; ++h) {
        const double a = level(gen);
        const int k = nSales(gen);
        for (int j = 0; j < k; ++j) {
            const double d = d0 + dayOf(gen);
            const CivilDate c = civilFromSerial(d);
            const int m = (c.year - 2015) * 12 + c.month - 1;
            rows.push_back({"h" + std::to_string(h), d, std::exp(a + 0.006 * m + noise(gen))});
        }
    }
    for (RepeatSalesMethod method : {RepeatSalesMethod::CaseShiller, RepeatSalesMethod::BaileyMuthNourse,
                                     RepeatSalesMethod::CaseShillerQuadratic}) {
        RepeatSalesOptions o;
        o.method = method;
        o.chain = true;
        RepeatSalesResult prev;
        bool havePrev = false;
        for (int cut = 30; cut <= 60; cut += 6) {  // data up to month `cut` (exclusive)
            RepeatSalesInput in;
            const double limit = day(2015 + cut / 12, cut % 12 + 1, 1);
            for (const Row& r : rows)
                if (r.date < limit) {
                    in.id.push_back(r.id);
                    in.sales.date.push_back(r.date);
                    in.sales.price.push_back(r.price);
                }
            RepeatSalesResult cur = repeatSalesIndex(in, o);
            BOOST_TEST(cur.table.axis.count == cut);
            if (havePrev) {
                int published = 0;
                for (int t = 0; t < prev.table.axis.count; ++t) {
                    const bool a = hasValue(prev.table.index[t]), b = hasValue(cur.table.index[t]);
                    BOOST_TEST(a == b);
                    if (!a) continue;
                    ++published;
                    BOOST_TEST(cur.table.index[t] == prev.table.index[t]);  // exactly
                    BOOST_TEST((cur.table.lower[t] == prev.table.lower[t] ||
                                (!hasValue(cur.table.lower[t]) && !hasValue(prev.table.lower[t]))));
                }
                BOOST_TEST(published > 20);
            }
            prev = std::move(cur);
            havePrev = true;
        }
        // The joint estimate on the same cuts does revise (so the check above can fail).
        RepeatSalesOptions joint = o;
        joint.chain = false;
        RepeatSalesInput a, b;
        for (const Row& r : rows) {
            for (RepeatSalesInput* in : {&a, &b}) {
                if (in == &a && r.date >= day(2018, 1, 1)) continue;
                in->id.push_back(r.id);
                in->sales.date.push_back(r.date);
                in->sales.price.push_back(r.price);
            }
        }
        const RepeatSalesResult ja = repeatSalesIndex(a, joint), jb = repeatSalesIndex(b, joint);
        double most = 0;
        for (int t = 0; t < ja.table.axis.count; ++t)
            if (hasValue(ja.table.index[t]))
                most = std::max(most, std::fabs(ja.table.index[t] / jb.table.index[t] - 1));
        BOOST_TEST(most > 1e-4);
    }
}

BOOST_AUTO_TEST_CASE(chain_unreached_and_thin_periods) {
    // Yearly, init = 1: 2010 is the start (level 0). 2011 and 2012 are reached one pair at a
    // time; no pair ends in 2013, so the pair 2013 -> 2015 cannot be used and 2015 has no
    // value; 2014 is reached directly from 2010.
    Sales s;
    s.add("A", day(2010, 1, 5), 100).add("A", day(2011, 3, 5), 105);  // 2010 -> 2011
    s.add("B", day(2011, 4, 5), 100).add("B", day(2012, 6, 5), 103);  // 2011 -> 2012
    s.add("C", day(2013, 4, 5), 100).add("C", day(2015, 6, 5), 103);  // 2013 (no value) -> 2015
    s.add("D", day(2010, 4, 5), 100).add("D", day(2014, 6, 5), 120);  // 2010 -> 2014
    RepeatSalesOptions o = yearly();
    o.chain = true;
    o.chainInit = 1;
    PairAudit r_audit;
    const RepeatSalesResult r = repeatSalesIndex(s.in, o, &r_audit);
    BOOST_TEST(findPair(r_audit.pairs, "C", 5)->reason == "first sale in a period without a value");
    BOOST_TEST(!hasValue(r.table.index[3]));  // 2013: no pair ends there
    BOOST_TEST(hasValue(r.table.index[4]));
    BOOST_TEST(!hasValue(r.table.index[5]));  // 2015: its only pair starts in 2013
    BOOST_TEST(hasWarning(r.diag, "(2013): no usable pair ends in it"));
    BOOST_TEST(hasWarning(r.diag, "(2015): its pairs start in periods without a value"));
    BOOST_TEST(hasWarning(r.diag, "chain: 1 pair(s) not used"));
    // minsales 2: every chained period has one pair: none gets a value; pairs say why.
    o.minSales = 2;
    o.chainInit = 2;  // 2010-2011 window: A touches both (1 pair each) -> thin as well
    BOOST_CHECK_THROW(repeatSalesIndex(s.in, o), InputError);  // no period has a value
    const PairAudit a = repeatSalesPairs(s.in, o);
    BOOST_TEST(hasWarning(a.diag, "index not estimated"));
    // The reason is a field of its own (RSPAIRS reads it there), the same words as CHAINRS's.
    BOOST_REQUIRE(a.notEstimated.has_value());
    try {
        repeatSalesIndex(s.in, o);
    } catch (const InputError& e) {
        BOOST_TEST(*a.notEstimated == e.what());
    }
    o.minSales = 1;
    o.chainInit = 1;
    Sales t = s;
    t.add("E", day(2010, 6, 5), 100).add("E", day(2011, 8, 5), 107);  // 2011 now has two pairs
    o.minSales = 2;
    PairAudit r2_audit;
    const RepeatSalesResult r2 = repeatSalesIndex(t.in, o, &r2_audit);
    BOOST_TEST(hasValue(r2.table.index[1]));
    BOOST_TEST(!hasValue(r2.table.index[2]));
    BOOST_TEST(findPair(r2_audit.pairs, "B", 3)->reason == "fewer than minsales pairs end in the period");
}

BOOST_AUTO_TEST_CASE(minsales_hides_thin_periods_in_joint_estimate) {
    // chain 0: minsales counts used pairs with a sale in the period; thin periods stay in the
    // regression (the other values do not change) but show no value.
    Sales s = handExample();
    s.add("D", day(2020, 5, 1), 100).add("D", day(2021, 5, 1), 111);
    RepeatSalesOptions o = yearly();
    const RepeatSalesResult all = repeatSalesIndex(s.in, o);
    o.minSales = 4;  // 2020: A C D = 3 thin; 2021: A B D = 3 thin; 2022: B C = 2 thin
    BOOST_CHECK_THROW(repeatSalesIndex(s.in, o), InputError);
    o.minSales = 3;  // 2022 thin only
    const RepeatSalesResult r = repeatSalesIndex(s.in, o);
    BOOST_TEST(r.table.index[1] == all.table.index[1]);
    BOOST_TEST(!hasValue(r.table.index[2]));
    BOOST_TEST(r.table.count[2] == 2u);
    BOOST_TEST(hasWarning(r.diag, "(2022): fewer than 3 pairs inform it (minsales)"));
}

BOOST_AUTO_TEST_CASE(variance_floor_and_fallbacks) {
    // Stage 2 with a steeply falling variance: the short pairs are noisy, the long ones exact
    // up to rounding, so the fitted line goes below zero at long intervals and is floored at
    // 5 % of the mean squared stage-1 residual; no weight is then above 1 / floor.
    Sales s;
    const double noise[] = {0.2, -0.25, 0.22, -0.18, 0.24, -0.21, 0.19, -0.23};
    int k = 0;
    for (int y = 2010; y < 2017; ++y)
        for (int j = 0; j < 8; ++j, ++k)
            s.add("S" + std::to_string(k), day(y, 1 + j, 1), 100)
                .add("S" + std::to_string(k), day(y + 1, 1 + j, 1), 100 * std::exp(0.03 + noise[j]));
    for (int j = 0; j < 6; ++j, ++k)
        s.add("L" + std::to_string(k), day(2010, 2 + j, 1), 100)
            .add("L" + std::to_string(k), day(2017, 2 + j, 1), 100 * std::exp(7 * 0.03 + 0.001 * j));
    PairAudit r_audit;
    const RepeatSalesResult r = repeatSalesIndex(s.in, yearly(RepeatSalesMethod::CaseShiller), &r_audit);
    BOOST_TEST(r.variance.coef.size() == 2u);
    BOOST_TEST(r.variance.coef[1] < 0);
    BOOST_TEST(r.variance.floored == 6u);
    BOOST_TEST(hasWarning(r.diag, "below the floor"));
    // Floored (7-year) pairs weigh v_short / floor times a 1-year pair, v_short = c0 + c1.
    const double vShort = r.variance.coef[0] + r.variance.coef[1];
    BOOST_TEST(vShort > r.variance.floor);
    const double wLong = findPair(r_audit.pairs, "L56", 113)->weight;
    const double wShort = findPair(r_audit.pairs, "S0", 1)->weight;
    BOOST_TEST(wLong / wShort == vShort / r.variance.floor, boost::test_tools::tolerance(1e-10));
    for (const SalePair& p : r_audit.pairs)
        BOOST_TEST(p.weight <= wLong * (1 + 1e-12));
    // cs2 with only two distinct intervals (1 and 7 years): no squared term, = cs.
    const RepeatSalesResult r2 = repeatSalesIndex(s.in, yearly(RepeatSalesMethod::CaseShillerQuadratic));
    BOOST_TEST(hasWarning(r2.diag, "no squared term"));
    for (int t = 0; t < r.table.axis.count; ++t)
        BOOST_TEST(r2.table.index[t] == r.table.index[t], boost::test_tools::tolerance(1e-12));
    // Every pair spans one year: constant variance, equal weights.
    Sales one;
    for (int y = 2010; y < 2014; ++y)
        for (int j = 0; j < 3; ++j)
            one.add("O" + std::to_string(y * 10 + j), day(y, 3 + j, 1), 100)
                .add("O" + std::to_string(y * 10 + j), day(y + 1, 3 + j, 1), 100 + y - 2005 + 3 * j);
    const RepeatSalesResult r3 = repeatSalesIndex(one.in, yearly(RepeatSalesMethod::CaseShiller));
    const RepeatSalesResult r4 = repeatSalesIndex(one.in, yearly());
    BOOST_TEST(hasWarning(r3.diag, "same number of periods"));
    for (int t = 0; t < r3.table.axis.count; ++t)
        BOOST_TEST(r3.table.index[t] == r4.table.index[t], boost::test_tools::tolerance(1e-12));
}

BOOST_AUTO_TEST_CASE(errors_in_the_users_words) {
    Sales s = handExample();
    RepeatSalesOptions o = yearly();
    auto message = [&](const RepeatSalesInput& in, const RepeatSalesOptions& opt) {
        try {
            repeatSalesIndex(in, opt);
        } catch (const InputError& e) {
            return std::string(e.what());
        }
        return std::string("no error");
    };
    o.baseDate = day(2030, 1, 1);
    BOOST_TEST(message(s.in, o) == "base 2030-01-01 lies outside the data (2020 .. 2022)");
    // Pairs of RSPAIRS survive an index that cannot be built.
    const PairAudit a = repeatSalesPairs(s.in, o);
    BOOST_TEST(a.pairs.size() == 3u);
    BOOST_TEST(a.pairs[0].reason == "index not estimated");
    BOOST_TEST(hasWarning(a.diag, "lies outside the data"));
    o.baseDate.reset();

    Sales iso = handExample();
    iso.add("Z", day(2025, 1, 1), 100).add("Z", day(2026, 2, 1), 100);
    RepeatSalesOptions ob = yearly();
    ob.baseDate = day(2024, 6, 1);
    BOOST_TEST(message(iso.in, ob) == "the base period 2024 has no value: no usable pair has a sale in it");
    ob.baseDate = day(2025, 6, 1);  // the base picks its own part: 2025-2026 has a value now
    PairAudit rz_audit;
    const RepeatSalesResult rz = repeatSalesIndex(iso.in, ob, &rz_audit);
    BOOST_TEST(rz.table.index[5] == 100.0);
    BOOST_TEST(!hasValue(rz.table.index[0]));
    BOOST_TEST(findPair(rz_audit.pairs, "A", 1)->reason == "not linked to the base period");

    Sales none;
    none.add("A", day(2020, 1, 1), 100).add("A", day(2020, 2, 1), 100);
    BOOST_TEST(message(none.in, o) ==
               "no usable pair of sales: 0 of 1 pairs used; dropped: 1 both sales in one period");
    Sales blank;
    blank.add("", day(2020, 1, 1), 100).add("", day(2021, 1, 1), 100);
    BOOST_TEST(message(blank.in, o).find("no usable pair of sales") == 0);
    const PairAudit ab = repeatSalesPairs(blank.in, o);
    BOOST_TEST(ab.pairs.empty());
    BOOST_TEST(ab.diag.droppedFor(DropReason::BlankId) == 2u);
    BOOST_TEST(message(RepeatSalesInput{}, o).find("no usable pair of sales") == 0);

    RepeatSalesOptions bad = o;
    bad.minHoldMonths = -1;
    BOOST_TEST(message(s.in, bad) == "minhold must be 0 or more months, got -1");
    bad = o;
    bad.maxRate = NAN;
    BOOST_TEST(message(s.in, bad).find("maxrate") == 0);
    bad = o;
    bad.chainInit = 0;
    BOOST_TEST(message(s.in, bad) == "init must be 1 or more periods, got 0");
    BOOST_CHECK_THROW(bad.validate(), InputError);  // the same check on its own
    bad.chainInit = 1;
    BOOST_CHECK_NO_THROW(bad.validate());
    bad = o;
    bad.level = 1.5;
    BOOST_TEST(message(s.in, bad).find("level") == 0);
    Sales ragged = handExample();
    ragged.in.id.pop_back();
    BOOST_TEST(message(ragged.in, o).find("same number of rows") != std::string::npos);
    ragged = handExample();
    ragged.in.changed.pop_back();
    BOOST_TEST(message(ragged.in, o).find("changed must have one entry per sale") == 0);
    // Dates spanning more than 3000 periods.
    Sales wide = handExample();
    wide.add("W", day(1700, 1, 1), 100).add("W", day(1701, 6, 1), 100);
    RepeatSalesOptions monthly;
    BOOST_TEST(message(wide.in, monthly).find("a repeat-sales index takes at most 3000") != std::string::npos);
    BOOST_TEST(message(wide.in, o) == "no error");  // yearly: fine, W is an unlinked part
}

BOOST_AUTO_TEST_CASE(pairs_given_directly) {
    // The hand example as a pair table; one pair with its dates reversed (swapped), one with a
    // blank second price.
    RepeatSalesPairInput p;
    auto add = [&](double d1, double p1, double d2, double p2) {
        p.firstDate.push_back(d1);
        p.firstPrice.push_back(p1);
        p.secondDate.push_back(d2);
        p.secondPrice.push_back(p2);
    };
    add(day(2020, 3, 1), 100, day(2021, 3, 1), 100 * std::exp(0.10));
    add(day(2022, 4, 1), 100 * std::exp(0.05), day(2021, 4, 1), 100);
    add(day(2020, 3, 1), 100, day(2022, 3, 1), 100 * std::exp(0.18));
    add(day(2020, 3, 1), 100, day(2022, 3, 1), NAN);
    PairAudit r_audit;
    const RepeatSalesResult r = repeatSalesFromPairs(p, yearly(), &r_audit);
    BOOST_TEST(r.logIndex[1] == 0.11, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(r.logIndex[2] == 0.17, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(r_audit.pairs[1].firstPrice == 100.0);
    BOOST_TEST(r_audit.pairs[3].reason == "second sale: blank or non-numeric price");
    BOOST_TEST(r.diag.rowsIn == 4u);
    BOOST_TEST(r.diag.rowsUsed == 3u);
}

BOOST_AUTO_TEST_CASE(pair_reason_slots_cover_every_reason) {
    // Pair reasons are counted (countPairs) and their texts cached (the audit) in tables indexed
    // by pairReasonSlot. Every status with every sale reason, or none, lands inside the table on
    // a slot of its own. (Before, a fixed table of 64 slots was indexed by status * 5 + sale
    // problem without a bounds check: any new status or reason would have written past it.)
    std::set<std::size_t> seen;
    for (std::size_t st = 0; st < kPairStatusCount; ++st) {
        const auto status = static_cast<PairStatus>(st);
        seen.insert(rs_detail::pairReasonSlot({status, std::nullopt}));
        for (std::size_t d = 0; d < kDropReasonCount; ++d)
            seen.insert(rs_detail::pairReasonSlot({status, static_cast<DropReason>(d)}));
    }
    BOOST_TEST(seen.size() == rs_detail::kPairReasonSlots);
    BOOST_TEST(*seen.rbegin() == rs_detail::kPairReasonSlots - 1);
    // Texts: one per status, the sale's row reason after "first sale: " / "second sale: ".
    BOOST_TEST(pairReasonText({PairStatus::Used, std::nullopt}).empty());
    BOOST_TEST(pairReasonText({PairStatus::FirstSaleUnusable, DropReason::BadDate}) ==
               "first sale: blank or non-date date");
    BOOST_TEST(pairReasonText({PairStatus::ThinPeriod, std::nullopt}) ==
               "fewer than minsales pairs end in the period");
    for (std::size_t st = 1; st < kPairStatusCount; ++st)
        BOOST_TEST(!std::string(pairStatusText(static_cast<PairStatus>(st))).empty());
}

BOOST_AUTO_TEST_CASE(method_names) {
    BOOST_TEST((parseRepeatSalesMethod(" CS ") == RepeatSalesMethod::CaseShiller));
    BOOST_TEST((parseRepeatSalesMethod("bmn") == RepeatSalesMethod::BaileyMuthNourse));
    BOOST_TEST((parseRepeatSalesMethod("cs2") == RepeatSalesMethod::CaseShillerQuadratic));
    BOOST_TEST(!parseRepeatSalesMethod("ols").has_value());
    BOOST_TEST(std::string(repeatSalesMethodCode(RepeatSalesMethod::CaseShillerQuadratic)) == "cs2");
    const RepeatSalesOptions o;
    BOOST_TEST(o.minHoldMonths == 6.0);
    BOOST_TEST(o.maxRate == 1.0);
    BOOST_TEST(!o.chain);
    BOOST_TEST(!o.chainInit.has_value());
    BOOST_TEST(o.initialPeriods() == 24);  // two years of months
    BOOST_TEST((o.method == RepeatSalesMethod::CaseShiller));
}

BOOST_AUTO_TEST_SUITE_END()
