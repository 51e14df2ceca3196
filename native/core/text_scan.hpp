// Small UTF-8 helpers shared by the text readers (dates, numbers, labels). Decoding uses
// ICU's U8_NEXT, so malformed bytes come back as one U+FFFD each instead of being skipped.
#pragma once

#include <string>
#include <string_view>

namespace lintel::text {

// The code point at byte i (advancing i past it); U+FFFD for a malformed sequence.
char32_t next(std::string_view s, std::size_t& i);

// Blank for trimming and for separating words: Unicode White_Space (space, tab, line
// breaks, no-break space U+00A0, narrow no-break space U+202F, thin space, ideographic space,
// ...) plus the invisible zero-width space U+200B and byte-order mark U+FEFF that exported
// files leave at the start of a cell.
bool isBlank(char32_t c);

// The text without leading and trailing blanks (a view into s).
std::string_view trim(std::string_view s);

// Appends the UTF-8 form of c.
void append(std::string& out, char32_t c);

// True when every byte is ASCII.
bool isAscii(std::string_view s);

}  // namespace lintel::text
