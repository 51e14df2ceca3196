// One line of the test CSV files: fields split at commas outside double quotes, quotes and
// carriage returns dropped. Shared by the reference driver (refcli) and the fuzz harness.
#pragma once

#include <string>
#include <vector>

namespace lintel::testcsv {

inline std::vector<std::string> splitCsvLine(const std::string& line) {
    std::vector<std::string> out;
    std::string cur;
    bool quoted = false;
    for (char c : line) {
        if (c == '"') quoted = !quoted;
        else if (c == ',' && !quoted) { out.push_back(cur); cur.clear(); }
        else if (c != '\r') cur += c;
    }
    out.push_back(cur);
    return out;
}

}  // namespace lintel::testcsv
