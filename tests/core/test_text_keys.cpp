// Key text of numbers and the one trim (text_keys.hpp): the rule every id, level, stratum and
// cell key goes through. Expected texts are fmt's shortest round-trip form ("{}"), as the
// fmt documentation states for floating-point values without a format spec.
#include <boost/test/unit_test.hpp>

#include <cmath>
#include <limits>

#include "hedonic.hpp"
#include "text_keys.hpp"

using namespace lintel;

BOOST_AUTO_TEST_SUITE(text_keys)

BOOST_AUTO_TEST_CASE(trim_blanks) {
    BOOST_TEST(trimBlanks("  a b \t\n") == "a b");
    BOOST_TEST(trimBlanks("x") == "x");
    BOOST_TEST(trimBlanks(" \t ").empty());
    BOOST_TEST(trimBlanks("").empty());
    BOOST_TEST(isBlankText(" \t"));
    BOOST_TEST(isBlankText(""));
    BOOST_TEST(!isBlankText(" - "));
}

BOOST_AUTO_TEST_CASE(number_key_text) {
    BOOST_TEST(keyText(3.0) == "3");
    BOOST_TEST(keyText(-2.5) == "-2.5");
    BOOST_TEST(keyText(1e20) == "1e+20");
    BOOST_TEST(keyText(std::numeric_limits<double>::infinity()) == "");
    // -0 and 0 are one key.
    BOOST_TEST(keyText(-0.0) == "0");
    BOOST_TEST(keyText(0.0) == "0");
}

BOOST_AUTO_TEST_CASE(minus_zero_is_zero_in_hedonic_levels) {
    // A text column with number cells: the numbers become levels through keyText, so -0 and 0
    // are the same level "0" (before, a level written from -0 read "-0").
    const double nan = std::numeric_limits<double>::quiet_NaN();
    const CharacteristicColumn c =
        classifyColumn("c", {-0.0, 0.0, nan, nan, nan}, {"", "", "a", "b", "a"});
    BOOST_REQUIRE(c.numeric.empty());
    BOOST_TEST(c.text[0] == "0");
    BOOST_TEST(c.text[1] == "0");
}

BOOST_AUTO_TEST_SUITE_END()
