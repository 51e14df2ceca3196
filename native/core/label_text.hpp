// Labels in segment, stratum, category and id columns, compared the way a reader compares
// them: "Ellenford", "Ellenford " and "ellenford" are one district.
//
// The key of a label (what is compared): blanks trimmed (also no-break spaces and the
// other Unicode blanks), every inner run of blanks one space, then Unicode's NFKC_Casefold
// mapping through ICU (full case folding, so "STRASSE" and "Straße" match; compatibility
// forms, so a full-width "Ｎｏｒｔｈ" matches "north"; invisible format characters dropped).
// NFKC_Casefold is Unicode's mapping for caseless matching of identifiers (Unicode Standard,
// section 3.13, and the DerivedNormalizationProps data file). The folding is the default,
// not the Turkish one: "ÇAMLIK" folds to "çamlik", which differs from "çamlık" (dotless ı).
//
// The display form of a group of labels is its most frequent spelling after trimming and
// collapsing blanks (case and accents kept); a tie goes to the spelling seen first. A report
// title then reads "Ellenford", not "ellenford".
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

namespace lintel {

// The comparison key (UTF-8). Empty for a blank label.
std::string labelKey(std::string_view label);
// The spelling with blanks trimmed and inner runs made one space; case kept.
std::string tidyLabel(std::string_view label);

struct LabelGroup {
    std::string key;          // labelKey of every member
    std::string display;      // most frequent tidy spelling (ties: first seen)
    std::size_t count = 0;    // rows in the group
    std::size_t firstRow = 0;   // index of its first row
    std::size_t spellings = 0;  // distinct tidy spellings seen
};

struct LabelGroups {
    std::vector<LabelGroup> groups;  // in order of first appearance
    std::vector<int> groupOfRow;     // index into groups; -1 for a blank label
    std::size_t blanks = 0;          // rows with a blank label
};

// Groups a column by key.
LabelGroups groupLabels(const std::vector<std::string>& column);

}  // namespace lintel
