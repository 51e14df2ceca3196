// The sales check (sales_check.hpp), duplicates (sale_duplicates.hpp) and the modified
// z-score (price_outliers.hpp).
// Worked values: the modified z-score example of the "modern" R package documentation style,
// computed by hand here: x = 10, 11, 12, 12, 13, 14, 35: median 12, absolute deviations
// 2, 1, 0, 0, 1, 2, 23, MAD 1, so z(35) = 0.6745 * 23 = 15.5135 and z(14) = 1.349
// (Iglewicz & Hoaglin 1993; the arithmetic is ours). The pandas/numpy comparison on a
// generated table is tests/reference/test_sales_text_check.py.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <random>

#include "diagnostics.hpp"
#include "label_text.hpp"
#include "periods.hpp"
#include "price_outliers.hpp"
#include "sale_duplicates.hpp"
#include "sales_check.hpp"

using namespace lintel;

namespace {
bool has(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }
RawValue num(double x) { return RawValue::of(x); }
RawValue txt(const char* t) { return RawValue::of(std::string(t)); }
RawValue none() { return RawValue::empty(); }
}  // namespace

BOOST_AUTO_TEST_SUITE(sales_check)

BOOST_AUTO_TEST_CASE(modified_z_worked_example) {
    const std::vector<double> z = modifiedZScores({10, 11, 12, 12, 13, 14, 35});
    BOOST_TEST(z[6] == 0.6745 * 23, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(z[5] == 0.6745 * 2, boost::test_tools::tolerance(1e-12));
    BOOST_TEST(z[2] == 0.0);
    // MAD 0 (five of eight equal): MeanAD fallback. Median 10, deviations 0,0,0,0,0,1,2,90:
    // MeanAD 93/8 = 11.625; z(100) = 90 / (1.253314 * 11.625).
    const std::vector<double> w = modifiedZScores({10, 10, 10, 10, 10, 11, 12, 100});
    BOOST_TEST(w[7] == 90 / (1.253314 * 11.625), boost::test_tools::tolerance(1e-12));
    // All equal: no outlier.
    for (double v : modifiedZScores({5, 5, 5, 5})) BOOST_TEST(v == 0.0);
    BOOST_TEST(modifiedZScores({}).empty());
}

BOOST_AUTO_TEST_CASE(outlier_groups) {
    // Group 0: ten prices around 300000 and one extra zero; group 1: five sales (too small).
    std::vector<double> price = {300000, 310000, 290000, 305000, 295000, 315000, 285000,
                                 300000, 302000, 298000, 3000000, 100, 200, 300, 400, 500};
    std::vector<long> group(price.size(), 0);
    for (std::size_t i = 11; i < price.size(); ++i) group[i] = 1;
    OutlierOptions o;
    const OutlierCheck r = findPriceOutliers(price, group, o);
    BOOST_TEST(r.outliers == 1u);
    BOOST_TEST(r.outlier[10] == 1);
    BOOST_TEST(r.groupsTested == 1u);
    BOOST_TEST(r.groupsTooSmall == 1u);
    BOOST_TEST(r.rowsNotTested == 5u);
    BOOST_TEST(std::isnan(r.z[12]));
    // Against the formula on the logs of group 0.
    std::vector<double> logs;
    for (std::size_t i = 0; i < 11; ++i) logs.push_back(std::log(price[i]));
    BOOST_TEST(r.z[10] == modifiedZScores(logs)[10], boost::test_tools::tolerance(1e-12));
    const auto message = [&](const OutlierOptions& bad) {
        try {
            findPriceOutliers(price, group, bad);
        } catch (const InputError& e) {
            return std::string(e.what());
        }
        return std::string("no error");
    };
    o.minGroup = 2;
    BOOST_TEST(message(o) == "the smallest group tested for outliers must have at least 3 sales, got 2");
    o.minGroup = 10;
    o.threshold = 0;
    BOOST_TEST(message(o) == "the outlier threshold must be a positive number, got 0");
    o.threshold = 3.5;
    try {
        findPriceOutliers(price, std::vector<long>(3, 0), o);
        BOOST_FAIL("no error");
    } catch (const InputError& e) {
        BOOST_TEST(std::string(e.what()) == "prices has 16 rows, groups has 3");
    }
}

BOOST_AUTO_TEST_CASE(duplicates) {
    const std::vector<std::string> ids = {"a", "a", "b", "b", "c", "", "", "a", "d", "d"};
    const std::vector<double> dates = {100, 100.5, 100, 100, 100, 100, 100, 101, 100, 100};
    const std::vector<double> prices = {5, 5, 6, 7, 8, 9, 9, 5, 4, -4};
    const DuplicateCheck d = findDuplicateSales(ids, dates, prices);
    BOOST_TEST((d.mark[0] == DuplicateMark::None));
    BOOST_TEST((d.mark[1] == DuplicateMark::Duplicate));  // same day (time ignored), same price
    BOOST_TEST(d.firstOf[1] == 0u);
    BOOST_TEST((d.mark[2] == DuplicateMark::Conflict));
    BOOST_TEST((d.mark[3] == DuplicateMark::Conflict));
    BOOST_TEST((d.mark[5] == DuplicateMark::None));  // no id: not compared
    BOOST_TEST((d.mark[6] == DuplicateMark::None));
    BOOST_TEST((d.mark[7] == DuplicateMark::None));  // another day
    BOOST_TEST((d.mark[9] == DuplicateMark::None));  // unusable price: not compared
    BOOST_TEST(d.duplicates == 1u);
    BOOST_TEST(d.conflictRows == 2u);
    BOOST_TEST(d.conflictGroups == 1u);
    try {
        findDuplicateSales(ids, {1.0}, prices);
        BOOST_FAIL("no error");
    } catch (const InputError& e) {
        BOOST_TEST(std::string(e.what()) == "ids has 10 rows, dates 1, prices 10");
    }
}

BOOST_AUTO_TEST_CASE(problem_texts) {
    // One table: every problem has its own text.
    BOOST_TEST(std::string(saleProblemText(SaleProblem::BlankDate)) == "blank date");
    BOOST_TEST(std::string(saleProblemText(SaleProblem::TwoDigitYear)) == "two-digit year");
    BOOST_TEST(std::string(saleProblemText(SaleProblem::ImplausibleDate)) == "date implausible for a sale");
    BOOST_TEST(std::string(saleProblemText(SaleProblem::AmbiguousNumber)) == "ambiguous number");
    BOOST_TEST(std::string(saleProblemText(SaleProblem::DuplicateSale)) == "duplicate");
    BOOST_TEST(std::string(saleProblemText(SaleProblem::ConflictingPrices)) == "conflicting prices");
    BOOST_TEST(std::string(saleProblemText(SaleProblem::PriceOutlier)) == "price outlier");
    std::vector<std::string> seen;
    for (std::size_t k = 0; k < kSaleProblemCount; ++k) {
        const std::string t = saleProblemText(static_cast<SaleProblem>(k));
        BOOST_TEST(!t.empty());
        for (const auto& s : seen) BOOST_TEST(s != t);
        seen.push_back(t);
    }
    BOOST_TEST(saleProblemKeepsRow(SaleProblem::PriceOutlier));
    BOOST_TEST(saleProblemKeepsRow(SaleProblem::BlankId));
    BOOST_TEST(!saleProblemKeepsRow(SaleProblem::DuplicateSale));
    BOOST_TEST(!saleProblemKeepsRow(SaleProblem::ConflictingPrices));
}

BOOST_AUTO_TEST_CASE(messy_table) {
    SalesCheckInput in;
    const double mar15 = serialFromCivil({2024, 3, 15});
    // Rows 0-11: March 2024 in segment Ellenford (spellings vary), all readable.
    for (int i = 0; i < 12; ++i) {
        in.dates.push_back(i % 2 ? num(mar15) : txt("15/03/2024"));
        in.prices.push_back(i % 3 ? num(300000 + 1000 * i) : txt("300,000"));
        in.ids.push_back(RawValue::of("P" + std::to_string(i)));
        in.segments.push_back({});
    }
    std::vector<RawValue> seg;
    for (int i = 0; i < 12; ++i) seg.push_back(txt(i % 4 == 0 ? "ellenford " : "Ellenford"));
    auto add = [&](RawValue d, RawValue p, RawValue id, RawValue s) {
        in.dates.push_back(std::move(d));
        in.prices.push_back(std::move(p));
        in.ids.push_back(std::move(id));
        seg.push_back(std::move(s));
    };
    add(txt("15/03/24"), num(300000), txt("Q1"), txt("Ellenford"));          // 12 two-digit year
    add(txt("31/02/2024"), num(300000), txt("Q2"), txt("Ellenford"));        // 13 no such date
    add(txt("15/03/2024"), txt("350.000"), txt("Q3"), txt("Ellenford"));     // 14 ambiguous number
    add(txt("15/03/2024"), txt("1,5"), txt("Q4"), txt("Ellenford"));         // 15 unreadable price
    add(txt("15/03/2024"), num(0), txt("Q5"), txt("Ellenford"));             // 16 non-positive
    add(txt("15/03/2024"), num(301000), txt(" p1 "), txt("Ellenford"));      // 17 duplicate of row 1
    add(txt("15/03/2024"), num(390000), txt("Q6"), txt("Ellenford"));        // 18 conflict with 19
    add(num(mar15 + 0.25), num(391000), txt("q6"), txt("Ellenford"));        // 19 conflict
    add(txt("15/03/2024"), txt("$3,000,000"), txt("Q7"), txt("ELLENFORD"));  // 20 outlier (extra zero)
    add(none(), none(), none(), none());                                     // 21 empty row
    add(txt("1850-01-01"), num(300000), txt("Q8"), txt("Ellenford"));        // 22 implausible
    add(txt("2031-01-01"), num(300000), txt("Q9"), txt("Ellenford"));        // 23 implausible (current year 2029)
    add(txt("15/03/2024"), num(300000), none(), txt(" "));                   // 24 blank id, blank segment
    add(none(), num(300000), txt("Q10"), txt("Ellenford"));                  // 25 blank date
    add(txt("15/03/2024"), txt("-"), txt("Q11"), txt("Ellenford"));         // 26 blank price (dash)
    add(txt("next week"), num(300000), txt("Q12"), txt("Ellenford"));        // 27 unreadable date
    add(txt("15/03/2024"), num(305000), txt("Q13"), txt("Ellenford"));       // 28 excluded
    in.segments = {seg};
    in.segmentNames = {"district"};
    in.include.assign(in.dates.size(), 1);
    in.include[28] = 0;

    SalesCheckOptions o;
    o.read.dateOrder = DateOrder::DayMonthYear;
    o.read.currentYear = 2029;
    o.firstRowNumber = 2;  // a header row above
    const SalesCheck r = checkSales(in, o);

    const auto find = [&](std::size_t row, SaleProblem p) -> const SalesProblemRow* {
        for (const auto& pr : r.problems)
            if (pr.row == row + 2 && pr.problem == p) return &pr;
        return nullptr;
    };
    BOOST_REQUIRE(find(12, SaleProblem::TwoDigitYear));
    BOOST_TEST(find(12, SaleProblem::TwoDigitYear)->column == "dates");
    BOOST_TEST(find(12, SaleProblem::TwoDigitYear)->value == "15/03/24");
    BOOST_TEST(has(find(12, SaleProblem::TwoDigitYear)->detail, "two-digit year"));
    BOOST_REQUIRE(find(13, SaleProblem::NoSuchDate));
    BOOST_REQUIRE(find(14, SaleProblem::AmbiguousNumber));
    BOOST_TEST(find(14, SaleProblem::AmbiguousNumber)->column == "prices");
    BOOST_REQUIRE(find(15, SaleProblem::UnreadablePrice));
    BOOST_REQUIRE(find(16, SaleProblem::NonPositivePrice));
    BOOST_TEST(find(16, SaleProblem::NonPositivePrice)->value == "0");
    const SalesProblemRow* dup = find(17, SaleProblem::DuplicateSale);
    BOOST_REQUIRE(dup);
    BOOST_TEST(dup->column == "ids");
    BOOST_TEST(dup->value == " p1 ");
    BOOST_TEST(has(dup->detail, "same id, date and price as row 3: used once"));
    BOOST_REQUIRE(find(18, SaleProblem::ConflictingPrices));
    BOOST_REQUIRE(find(19, SaleProblem::ConflictingPrices));
    BOOST_TEST(has(find(18, SaleProblem::ConflictingPrices)->detail,
                   "id Q6 sold on 2024-03-15 at different prices (390000, 391000) in rows 20, 21: none is used"));
    const SalesProblemRow* out = find(20, SaleProblem::PriceOutlier);
    BOOST_REQUIRE(out);
    BOOST_TEST(out->value == "$3,000,000");
    BOOST_TEST(out->z > 3.5);
    BOOST_TEST(has(out->detail, "times the median price"));
    BOOST_TEST(has(out->detail, "of 2024-03 in its segment"));
    BOOST_REQUIRE(find(22, SaleProblem::ImplausibleDate));
    BOOST_TEST(find(22, SaleProblem::ImplausibleDate)->detail == "1850-01-01 lies before 1900 or after 2030");
    BOOST_REQUIRE(find(23, SaleProblem::ImplausibleDate));
    BOOST_REQUIRE(find(24, SaleProblem::BlankId));
    BOOST_REQUIRE(find(24, SaleProblem::BlankSegment));
    BOOST_TEST(find(24, SaleProblem::BlankSegment)->column == "district");
    BOOST_REQUIRE(find(25, SaleProblem::BlankDate));
    BOOST_TEST(find(25, SaleProblem::BlankDate)->detail == "no date: the sale cannot be placed in a period");
    BOOST_REQUIRE(find(26, SaleProblem::BlankPrice));
    BOOST_TEST(find(26, SaleProblem::BlankPrice)->detail == "no price (a dash or an empty cell)");
    BOOST_TEST(find(26, SaleProblem::BlankPrice)->value == "-");
    BOOST_REQUIRE(find(27, SaleProblem::UnreadableDate));
    // Nothing else is listed: the twelve clean rows, the empty row and the excluded row.
    BOOST_TEST(r.problems.size() == 16u);
    for (const auto& pr : r.problems) {
        BOOST_TEST(pr.row >= 14u);
        BOOST_TEST(pr.row != 23u);  // empty row
        BOOST_TEST(pr.row != 30u);  // excluded
        BOOST_TEST((std::isnan(pr.z) == (pr.problem != SaleProblem::PriceOutlier)));
    }
    // Used rows: 0-11, 17's original (row 1), 20 (outlier kept), 24 (blank id kept).
    BOOST_TEST(r.diagnostics.rowsUsed == 14u);
    BOOST_TEST(r.used[20] == 1);
    BOOST_TEST(r.used[24] == 1);
    BOOST_TEST(r.used[17] == 0);
    BOOST_TEST(r.used[18] == 0);
    BOOST_TEST(r.diagnostics.droppedFor(DropReason::DuplicateRow) == 1u);
    BOOST_TEST(r.diagnostics.droppedFor(DropReason::ConflictingPrices) == 2u);
    BOOST_TEST(r.diagnostics.droppedFor(DropReason::EmptyRow) == 1u);
    BOOST_TEST(r.diagnostics.droppedFor(DropReason::Excluded) == 1u);
    BOOST_TEST(r.count(SaleProblem::PriceOutlier) == 1u);
    BOOST_TEST(r.count(SaleProblem::BlankSegment) == 1u);
    BOOST_TEST(r.counts.size() == kSaleProblemCount);
    // Cleaned columns: the text price read, the segment keys folded.
    BOOST_TEST(r.price[0] == 300000.0);
    BOOST_TEST(r.price[20] == 3000000.0);
    BOOST_TEST(r.segmentKeys[0] == "ellenford");
    BOOST_TEST(r.segmentKeys[20] == "ellenford");
    BOOST_TEST(r.idKeys[17] == "p1");
}

BOOST_AUTO_TEST_CASE(date_order_from_column_and_warnings) {
    SalesCheckInput in;
    for (const char* d : {"03/04/2024", "13/04/2024", "05/04/2024"}) {
        in.dates.push_back(txt(d));
        in.prices.push_back(num(100));
    }
    SalesCheckOptions o;  // order unknown: inferred day/month/year from row 2
    SalesCheck r = checkSales(in, o);
    BOOST_TEST((r.dateOrder == DateOrder::DayMonthYear));
    BOOST_TEST(r.problems.empty());
    BOOST_TEST(r.date[0] == serialFromCivil({2024, 4, 3}));
    BOOST_REQUIRE(!r.diagnostics.warnings.empty());
    BOOST_TEST(r.diagnostics.warnings[0] == "dates read as day/month/year: 1 of them can only be read that way (first: row 2)");
    o.read.inferOrder = false;  // then the texts that read both ways are ambiguous
    r = checkSales(in, o);
    BOOST_TEST(r.count(SaleProblem::AmbiguousDate) == 2u);
    // A stated order the column contradicts: listed and warned.
    o.read.dateOrder = DateOrder::MonthDayYear;
    r = checkSales(in, o);
    BOOST_TEST(r.count(SaleProblem::NoSuchDate) == 1u);
    BOOST_TEST(has(r.diagnostics.warnings.at(0), "1 dates can only be read as day/month/year (first: row 2) but the date order is month/day/year"));
    // The reverse: day/month/year stated, the column reads only as month/day/year.
    SalesCheckInput us;
    us.dates = {txt("12/25/2024")};
    us.prices = {num(100)};
    SalesCheckOptions dmy;
    dmy.read.dateOrder = DateOrder::DayMonthYear;
    r = checkSales(us, dmy);
    BOOST_TEST(r.diagnostics.warnings.at(0) == "1 dates can only be read as month/day/year (first: row 1) but the "
                                               "date order is day/month/year: check the date order");
    // Groups too small for the outlier test are reported.
    BOOST_TEST(r.diagnostics.warnings.size() == 1u);  // no used row: no group
    us.dates = {txt("2024-12-25"), txt("2024-12-26")};
    us.prices = {num(100), num(200)};
    r = checkSales(us, dmy);
    BOOST_TEST(r.diagnostics.warnings.at(0) == "2 sales in 1 period-and-segment groups of fewer than 10 sales "
                                               "were not tested for outliers");
    // Mixed column.
    in.dates.push_back(txt("12/25/2024"));
    in.prices.push_back(num(100));
    const SalesCheckOptions fresh;
    r = checkSales(in, fresh);
    BOOST_TEST(has(r.diagnostics.warnings.at(0), "the dates mix day/month/year (first: row 2) and month/day/year (first: row 4)"));
    BOOST_TEST(r.count(SaleProblem::AmbiguousDate) == 2u);
}

BOOST_AUTO_TEST_CASE(input_errors) {
    SalesCheckInput in;
    in.dates = {num(45000), num(45001)};
    in.prices = {num(1)};
    const SalesCheckOptions defaults;
    try {
        checkSales(in, defaults);
        BOOST_FAIL("no error");
    } catch (const InputError& e) {
        BOOST_TEST(std::string(e.what()) == "dates has 2 rows, prices has 1");
    }
    in.prices = {num(1), num(2)};
    in.ids = {txt("a")};
    BOOST_CHECK_THROW(checkSales(in, defaults), InputError);
    in.ids.clear();
    const auto message = [&](const SalesCheckOptions& bad) {
        try {
            checkSales(in, bad);
        } catch (const InputError& e) {
            return std::string(e.what());
        }
        return std::string("no error");
    };
    SalesCheckOptions year;
    year.read.currentYear = 50;
    BOOST_TEST(message(year) == "the current year must lie within 1900..9998, got 50");
    SalesCheckOptions first;
    first.firstRowNumber = 0;
    BOOST_TEST(message(first) == "the first row number must be at least 1");
    SalesCheckOptions separators;
    separators.read.numbers.decimal = ",";
    separators.read.numbers.group = ",";
    BOOST_TEST(message(separators) == "the decimal and thousands separators are both \",\"");
    // An empty table is no error: nothing to list.
    const SalesCheck r = checkSales(SalesCheckInput{}, defaults);
    BOOST_TEST(r.problems.empty());
}

BOOST_AUTO_TEST_CASE(random_texts) {
    // Random texts from fragments exports contain (and broken UTF-8): the readers never throw,
    // a reading is a finite value, a refusal always says what is accepted, and label keys
    // are stable (NFKC_Casefold is idempotent by its definition).
    const std::vector<std::string> parts = {
        "0", "1", "2", "3", "12", "31", "2024", "1999", "/", ".", "-", ",", " ", "\xC2\xA0",
        "\xE2\x80\xAF", "'", "$", "\xE2\x82\xAC", "EUR", "Mar", "march", "T", ":", "PM", "(", ")",
        "\xFF", "\xC3", "\xC3\xA9", "\xC4\xB1", "\xC3\x9F", "Z", "+01:00", "\xE2\x80\x8B"};
    std::mt19937 rng(20241215);
    NumberFormat comma;
    comma.decimal = ",";
    comma.group = ".";
    NumberFormat space;
    space.decimal = ",";
    space.group = "\xE2\x80\xAF";
    SalesCheckInput in;
    for (int round = 0; round < 20000; ++round) {
        std::string t;
        const int n = static_cast<int>(rng() % 12);
        for (int k = 0; k < n; ++k) t += parts[rng() % parts.size()];
        for (DateOrder o : {DateOrder::Unknown, DateOrder::DayMonthYear, DateOrder::MonthDayYear,
                            DateOrder::YearMonthDay}) {
            const DateText d = readDateText(t, o);
            if (d.ok()) BOOST_REQUIRE(isUsableSerial(d.serial));
            else if (d.status != DateTextStatus::Blank) BOOST_REQUIRE(has(d.message, "accepted: "));
        }
        for (const NumberFormat& f : {NumberFormat{}, comma, space}) {
            const NumberText x = readNumberText(t, f);
            if (x.ok()) BOOST_REQUIRE(std::isfinite(x.value));
            else if (x.status != NumberTextStatus::Blank) BOOST_REQUIRE(has(x.message, "accepted: "));
        }
        const std::string key = labelKey(t);
        BOOST_REQUIRE(labelKey(key) == key);
        if (round < 2000) {
            in.dates.push_back(RawValue::of(t));
            in.prices.push_back(RawValue::of(t));
            in.ids.push_back(RawValue::of(t));
        }
    }
    SalesCheckOptions o;
    o.outliers.minGroup = 3;
    const SalesCheck r = checkSales(in, o);
    BOOST_TEST(r.diagnostics.rowsIn == 2000u);
    for (std::size_t i = 0; i < r.used.size(); ++i)
        if (r.used[i]) BOOST_REQUIRE((std::isfinite(r.date[i]) && r.price[i] > 0));
}

BOOST_AUTO_TEST_SUITE_END()
