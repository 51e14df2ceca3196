// Periods: serial dates, civil dates, buckets.
// Serial anchors are those of LibreOffice Calc / ODF with the default null date 1899-12-30:
// Calc shows =DATE(1900;1;1) as 2, =DATE(2000;1;1) as 36526, =DATE(2024;2;29) as 45351
// (checkable in any Calc sheet; the values are the documented day counts from 1899-12-30).
#include <boost/test/unit_test.hpp>

#include "periods.hpp"

using namespace lintel;

BOOST_AUTO_TEST_SUITE(periods)

BOOST_AUTO_TEST_CASE(serial_anchors) {
    BOOST_TEST(serialFromCivil({1899, 12, 30}) == 0.0);
    BOOST_TEST(serialFromCivil({1900, 1, 1}) == 2.0);
    BOOST_TEST(serialFromCivil({1900, 3, 1}) == 61.0);  // 1900 is not a leap year
    BOOST_TEST(serialFromCivil({1970, 1, 1}) == 25569.0);
    BOOST_TEST(serialFromCivil({2000, 1, 1}) == 36526.0);
    BOOST_TEST(serialFromCivil({2024, 2, 29}) == 45351.0);
}

BOOST_AUTO_TEST_CASE(century_leap_rules) {
    // Gregorian rule: divisible by 4, except centuries, except multiples of 400.
    BOOST_TEST(serialFromCivil({1900, 3, 1}) - serialFromCivil({1900, 2, 28}) == 1.0);
    BOOST_TEST(serialFromCivil({2000, 3, 1}) - serialFromCivil({2000, 2, 28}) == 2.0);
    BOOST_TEST(serialFromCivil({2100, 3, 1}) - serialFromCivil({2100, 2, 28}) == 1.0);
    BOOST_TEST(serialFromCivil({2400, 3, 1}) - serialFromCivil({2400, 2, 28}) == 2.0);
    BOOST_TEST(serialFromCivil({2024, 1, 1}) - serialFromCivil({2023, 1, 1}) == 365.0);
    BOOST_TEST(serialFromCivil({2025, 1, 1}) - serialFromCivil({2024, 1, 1}) == 366.0);
}

BOOST_AUTO_TEST_CASE(round_trip_every_day) {
    for (double s = -100000; s <= 120000; s += 1) {
        const CivilDate d = civilFromSerial(s);
        BOOST_REQUIRE(serialFromCivil(d) == s);
    }
    const CivilDate d = civilFromSerial(45351.75);  // time of day is ignored
    BOOST_TEST(d.year == 2024);
    BOOST_TEST(d.month == 2);
    BOOST_TEST(d.day == 29);
}

BOOST_AUTO_TEST_CASE(period_boundaries) {
    const double mar31 = serialFromCivil({2024, 3, 31}), apr1 = serialFromCivil({2024, 4, 1});
    BOOST_TEST(periodStartOf(mar31, Frequency::Month) == serialFromCivil({2024, 3, 1}));
    BOOST_TEST(periodStartOf(apr1, Frequency::Month) == apr1);
    BOOST_TEST(periodStartOf(mar31, Frequency::Quarter) == serialFromCivil({2024, 1, 1}));
    BOOST_TEST(periodStartOf(apr1, Frequency::Quarter) == apr1);
    BOOST_TEST(periodStartOf(serialFromCivil({2024, 12, 31}), Frequency::Quarter) ==
               serialFromCivil({2024, 10, 1}));
    BOOST_TEST(periodStartOf(mar31, Frequency::Year) == serialFromCivil({2024, 1, 1}));
    BOOST_TEST(periodKey(serialFromCivil({2024, 12, 31}), Frequency::Month) + 1 ==
               periodKey(serialFromCivil({2025, 1, 1}), Frequency::Month));
    BOOST_TEST(periodLabel(periodKey(apr1, Frequency::Quarter), Frequency::Quarter) == "2024-Q2");
    BOOST_TEST(periodLabel(periodKey(apr1, Frequency::Month), Frequency::Month) == "2024-04");
    // Before 1899: negative serials and keys still work.
    const double old = serialFromCivil({1850, 5, 17});
    BOOST_TEST(periodStartOf(old, Frequency::Quarter) == serialFromCivil({1850, 4, 1}));
}

BOOST_AUTO_TEST_CASE(axis_keeps_empty_periods) {
    const long a = periodKey(serialFromCivil({2023, 11, 5}), Frequency::Month);
    const long b = periodKey(serialFromCivil({2024, 2, 5}), Frequency::Month);
    const PeriodAxis axis = PeriodAxis::spanning(a, b, Frequency::Month);
    BOOST_TEST(axis.count == 4);
    BOOST_TEST(axis.start(2) == serialFromCivil({2024, 1, 1}));
    BOOST_TEST(axis.positionOf(serialFromCivil({2024, 1, 31})) == 2);
    BOOST_TEST(axis.positionOf(serialFromCivil({2024, 3, 1})) == -1);
    BOOST_TEST(axis.rangeText() == "2023-11 .. 2024-02");
}

BOOST_AUTO_TEST_CASE(frequency_text_and_inference) {
    BOOST_TEST((parseFrequency("q") == Frequency::Quarter));
    BOOST_TEST((parseFrequency(" Year ") == Frequency::Year));
    BOOST_TEST(!parseFrequency("weekly").has_value());
    const std::vector<double> months = {serialFromCivil({2024, 1, 1}), serialFromCivil({2024, 2, 1}),
                                        serialFromCivil({2024, 4, 1})};
    BOOST_TEST((inferFrequency(months.data(), months.size()) == Frequency::Month));
    const std::vector<double> quarters = {serialFromCivil({2023, 10, 1}), serialFromCivil({2024, 1, 1}),
                                          serialFromCivil({2024, 4, 1})};
    BOOST_TEST((inferFrequency(quarters.data(), quarters.size()) == Frequency::Quarter));
    const std::vector<double> years = {serialFromCivil({2023, 1, 1}), serialFromCivil({2024, 1, 1})};
    BOOST_TEST((inferFrequency(years.data(), years.size()) == Frequency::Year));
    const std::vector<double> bad = {serialFromCivil({2024, 1, 15})};
    BOOST_TEST(!inferFrequency(bad.data(), bad.size()).has_value());
    const std::vector<double> unordered = {serialFromCivil({2024, 2, 1}), serialFromCivil({2024, 1, 1})};
    BOOST_TEST(!inferFrequency(unordered.data(), unordered.size()).has_value());
}

BOOST_AUTO_TEST_SUITE_END()
