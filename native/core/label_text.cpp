#include "label_text.hpp"

#include <unordered_map>

#include <unicode/normalizer2.h>
#include <unicode/unistr.h>

#include "text_scan.hpp"

namespace lintel {

namespace {

// Trims and collapses blanks; when lowerAscii, also lower-cases ASCII letters.
std::string collapse(std::string_view s, bool lowerAscii) {
    std::string out;
    out.reserve(s.size());
    std::size_t i = 0;
    bool blank = false;
    while (i < s.size()) {
        const std::size_t start = i;
        const char32_t c = text::next(s, i);
        if (text::isBlank(c)) {
            blank = true;
            continue;
        }
        if (blank && !out.empty()) out += ' ';
        blank = false;
        if (c < 0x80) {
            char ch = static_cast<char>(c);
            if (lowerAscii && ch >= 'A' && ch <= 'Z') ch = static_cast<char>(ch - 'A' + 'a');
            out += ch;
        } else if (c == 0xFFFD) {
            out += "\xEF\xBF\xBD";
        } else {
            out.append(s.substr(start, i - start));
        }
    }
    return out;
}

}  // namespace

std::string tidyLabel(std::string_view label) { return collapse(label, false); }

std::string labelKey(std::string_view label) {
    // ASCII text (the usual case, and most of a million rows): NFKC_Casefold of ASCII is
    // lower-casing, so skip ICU.
    if (text::isAscii(label)) return collapse(label, true);
    UErrorCode err = U_ZERO_ERROR;
    const icu::Normalizer2* nfkcCf = icu::Normalizer2::getNFKCCasefoldInstance(err);
    const std::string tidy = collapse(label, false);
    if (U_FAILURE(err) || nfkcCf == nullptr) return tidy;
    const icu::UnicodeString in = icu::UnicodeString::fromUTF8(tidy);
    icu::UnicodeString folded = nfkcCf->normalize(in, err);
    if (U_FAILURE(err)) return tidy;
    std::string out;
    folded.toUTF8String(out);
    // Folding can create or remove blanks (a no-break space becomes a space, a lone format
    // character vanishes): collapse again.
    return collapse(out, false);
}

LabelGroups groupLabels(const std::vector<std::string>& column) {
    LabelGroups r;
    r.groupOfRow.assign(column.size(), -1);
    std::unordered_map<std::string, int> byKey;
    // Per group: spelling -> (count, first seen order).
    std::vector<std::unordered_map<std::string, std::size_t>> spellingCounts;
    std::vector<std::vector<std::string>> spellingOrder;
    for (std::size_t i = 0; i < column.size(); ++i) {
        std::string key = labelKey(column[i]);
        if (key.empty()) {
            ++r.blanks;
            continue;
        }
        auto [it, added] = byKey.emplace(std::move(key), static_cast<int>(r.groups.size()));
        if (added) {
            LabelGroup g;
            g.key = it->first;
            g.firstRow = i;
            r.groups.push_back(std::move(g));
            spellingCounts.emplace_back();
            spellingOrder.emplace_back();
        }
        const int gi = it->second;
        r.groupOfRow[i] = gi;
        LabelGroup& g = r.groups[static_cast<std::size_t>(gi)];
        ++g.count;
        std::string tidy = tidyLabel(column[i]);
        auto& counts = spellingCounts[static_cast<std::size_t>(gi)];
        auto [sit, newSpelling] = counts.emplace(tidy, 0);
        ++sit->second;
        if (newSpelling) spellingOrder[static_cast<std::size_t>(gi)].push_back(std::move(tidy));
    }
    for (std::size_t gi = 0; gi < r.groups.size(); ++gi) {
        const auto& counts = spellingCounts[gi];
        std::size_t best = 0;
        for (const std::string& s : spellingOrder[gi]) {  // first seen wins a tie
            const std::size_t n = counts.at(s);
            if (n > best) {
                best = n;
                r.groups[gi].display = s;
            }
        }
        r.groups[gi].spellings = spellingOrder[gi].size();
    }
    return r;
}

}  // namespace lintel
