// INDEXBACKTEST's methods argument: one text row per candidate method, "<kind> key=value ...",
// the options read with the bindings of the kind's own function (median: INDEXMEDIAN, mean:
// INDEXMEAN, mix: INDEXMIX, hedonic: INDEXHEDONIC, repeat: CHAINRS), so a row takes exactly
// the options that function takes and says the same when one is wrong. The reference driver
// (tests/reference/refcli_backtest.cpp) reads its method rows here too.
#pragma once

#include <string>
#include <vector>

#include "backtest.hpp"

namespace lintel::addin {

// One row: "hedonic log=1 categorical=2", "repeat method=bmn; minhold=12", "median".
// Options are key=value items separated by ';', line breaks or blanks (a value may hold
// blanks: "log=1, 3 window=2" gives log "1, 3"). freq and base are INDEXBACKTEST's own and
// refused in a row. Throws InputError "methods row <n> (\"<text>\"): <what is wrong>".
CandidateMethod parseMethodRow(const std::string& text, std::size_t rowNumber);

// Every row (blank rows skipped; a row repeated is refused).
std::vector<CandidateMethod> parseMethodRows(const std::vector<std::string>& rows);

// The rows tried when methods is left empty: median, mean, mix (with strata), hedonic (with
// characteristics), repeat.
std::vector<std::string> defaultMethodRows(bool characteristics, bool strata);

// The kind words a row may start with, for messages and docs ("median, mean, ...").
std::string methodKindList();

}  // namespace lintel::addin
