// Small text helpers of the add-in (option keys, settings, column names).
#pragma once

#include <cctype>
#include <string>

#include "text_keys.hpp"

namespace lintel::addin {

// The core's trim (trimBlanks), as a string.
inline std::string trim(const std::string& s) { return std::string(trimBlanks(s)); }

inline std::string lower(std::string s) {
    for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return s;
}

}  // namespace lintel::addin
