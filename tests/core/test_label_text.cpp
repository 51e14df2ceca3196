// Label keys and groups (label_text.hpp). Expected keys follow Unicode's case folding
// (CaseFolding.txt: "ß" folds to "ss" in full folding, "Σ" and "ς" to "σ") and NFKC
// (full-width letters to ASCII); the wider comparison with Python's str.casefold and
// unicodedata.normalize is tests/reference/test_sales_text_labels.py.
#include <boost/test/unit_test.hpp>

#include "label_text.hpp"

using namespace lintel;

BOOST_AUTO_TEST_SUITE(label_text)

BOOST_AUTO_TEST_CASE(keys) {
    BOOST_TEST(labelKey("Ellenford") == "ellenford");
    BOOST_TEST(labelKey("  Ellenford ") == "ellenford");
    BOOST_TEST(labelKey("ELLENFORD\xC2\xA0") == "ellenford");  // trailing no-break space
    BOOST_TEST(labelKey("North \t  Side") == "north side");
    BOOST_TEST(labelKey("North\xE2\x80\xAFSide") == "north side");      // narrow no-break space
    BOOST_TEST(labelKey("Stra\xC3\x9F" "e") == "strasse");               // Straße
    BOOST_TEST(labelKey("STRASSE") == "strasse");
    BOOST_TEST(labelKey("\xCE\xA3\xCE\xBF\xCF\x86\xCE\xAF\xCE\xB1") == labelKey("\xCF\x83\xCE\xBF\xCF\x86\xCE\xAF\xCE\xB1"));  // Σοφία / σοφία
    BOOST_TEST(labelKey("\xEF\xBC\xAE\xEF\xBD\x8F\xEF\xBD\x92\xEF\xBD\x94\xEF\xBD\x88") == "north");  // full-width
    BOOST_TEST(labelKey("Cafe\xCC\x81") == labelKey("Caf\xC3\xA9"));  // decomposed e + acute
    BOOST_TEST(labelKey("Caf\xC3\xA9") == "caf\xC3\xA9");
    BOOST_TEST(labelKey("   ").empty());
    BOOST_TEST(labelKey("\xE2\x80\x8B").empty());  // zero-width space only
    BOOST_TEST(labelKey("") == "");
    BOOST_TEST(tidyLabel("  North \xC2\xA0 Side ") == "North Side");
    BOOST_TEST(labelKey("\xFF" "abc") == "\xEF\xBF\xBD" "abc");  // malformed byte: U+FFFD
}

BOOST_AUTO_TEST_CASE(groups_and_display) {
    const std::vector<std::string> col = {"ellenford", "Ellenford ", "Ellenford", " ", "North",
                                          "ELLENFORD", "Ellenford", "north", "", "NORTH", "North "};
    const LabelGroups g = groupLabels(col);
    BOOST_REQUIRE(g.groups.size() == 2u);
    BOOST_TEST(g.groups[0].key == "ellenford");
    BOOST_TEST(g.groups[0].display == "Ellenford");  // 3 of "Ellenford" (trimmed) vs 1, 1
    BOOST_TEST(g.groups[0].count == 5u);
    BOOST_TEST(g.groups[0].firstRow == 0u);
    BOOST_TEST(g.groups[0].spellings == 3u);
    BOOST_TEST(g.groups[1].key == "north");
    BOOST_TEST(g.groups[1].display == "North");  // "North" twice (one padded), others once
    BOOST_TEST(g.groups[1].count == 4u);
    BOOST_TEST(g.blanks == 2u);
    BOOST_TEST(g.groupOfRow[3] == -1);
    BOOST_TEST(g.groupOfRow[7] == 1);
    // A tie goes to the spelling seen first.
    const LabelGroups t = groupLabels({"west", "West", "WEST"});
    BOOST_TEST(t.groups[0].display == "west");
    BOOST_TEST(groupLabels({}).groups.empty());
}

BOOST_AUTO_TEST_SUITE_END()
