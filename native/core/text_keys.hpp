// Ids, category levels and strata as text: the one trim and the one rule that turns a
// number into key text, so that a number cell and the same number typed as text are one key
// everywhere (property ids, hedonic levels, strata, option values, column names).
#pragma once

#include <string>
#include <string_view>

namespace lintel {

// The text without leading and trailing blanks (spaces, tabs, line breaks, and the no-break
// spaces U+00A0 and U+202F).
std::string_view trimBlanks(std::string_view text);
// True when the text is empty or only blanks.
bool isBlankText(std::string_view text);

// Key text of a number: the shortest text that reads back as the same number ("123", "-7",
// "12.5", "0.30000000000000004", "1e+16"; fmt's "{}" form); -0 and 0 both give "0"; NaN and
// infinities give "" (a blank key).
std::string keyText(double value);

}  // namespace lintel
