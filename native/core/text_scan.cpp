#include "text_scan.hpp"

#include <unicode/uchar.h>
#include <unicode/utf8.h>

namespace lintel::text {

char32_t next(std::string_view s, std::size_t& i) {
    const auto* p = reinterpret_cast<const uint8_t*>(s.data());
    const int32_t length = static_cast<int32_t>(s.size());
    int32_t at = static_cast<int32_t>(i);
    UChar32 c = 0;
    U8_NEXT(p, at, length, c);
    i = static_cast<std::size_t>(at);
    return c < 0 ? U'\uFFFD' : static_cast<char32_t>(c);
}

bool isBlank(char32_t c) {
    if (c < 0x80) return c == ' ' || (c >= '\t' && c <= '\r');
    return u_isUWhiteSpace(static_cast<UChar32>(c)) || c == 0x200B || c == 0xFEFF;
}

std::string_view trim(std::string_view s) {
    std::size_t begin = 0;
    while (begin < s.size()) {
        std::size_t j = begin;
        if (!isBlank(next(s, j))) break;
        begin = j;
    }
    // Walk forward and remember the end of the last non-blank code point.
    std::size_t end = begin, i = begin;
    while (i < s.size()) {
        const char32_t c = next(s, i);
        if (!isBlank(c)) end = i;
    }
    return s.substr(begin, end - begin);
}

void append(std::string& out, char32_t c) {
    char buf[4];
    int32_t n = 0;
    UBool error = false;
    U8_APPEND(reinterpret_cast<uint8_t*>(buf), n, 4, static_cast<UChar32>(c), error);
    if (error) {
        out += "\xEF\xBF\xBD";
        return;
    }
    out.append(buf, static_cast<std::size_t>(n));
}

bool isAscii(std::string_view s) {
    for (unsigned char ch : s)
        if (ch >= 0x80) return false;
    return true;
}

}  // namespace lintel::text
