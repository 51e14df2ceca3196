// Speed of reading a messy export (our own target: the sales check of 200,000 rows well
// under a second, as a recalculation in Calc). Synthetic export: 200,000 sales over 120
// months, dates as day/month/year text, prices as "350,000" text, ids "H000001"..., with
// every 50th row a copy of the row before it (a duplicate), segment labels in 8 spellings of
// 4 invented districts (padding, case, one with a non-ASCII letter); ln price = 12.5 +
// 0.004 t + noise (sum of uniforms).
#include <cmath>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "bench.hpp"
#include "label_text.hpp"
#include "periods.hpp"
#include "sales_check.hpp"

namespace {

// "350,000": thousands separated by commas.
std::string grouped(long long v) {
    std::string digits = std::to_string(v), out;
    for (std::size_t i = 0; i < digits.size(); ++i) {
        if (i > 0 && (digits.size() - i) % 3 == 0) out += ',';
        out += digits[i];
    }
    return out;
}

struct Lcg {
    unsigned long long s = 9001;
    double next() {
        s = s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(s >> 11) * (1.0 / 9007199254740992.0);
    }
};

const lintel::SalesCheckInput& exportTable() {
    static lintel::SalesCheckInput in = [] {
        lintel::SalesCheckInput t;
        Lcg g;
        const std::size_t n = 200000;
        const char* labels[] = {"Ellenford", "ellenford ", "Brookmere", "BROOKMERE", "Ashgrove",
                                " Ashgrove", "Kestrel \xC3\x85s", "kestrel \xC3\xA5s"};
        std::vector<lintel::RawValue> seg;
        for (std::size_t i = 0; i < n; ++i) {
            if (i % 50 == 49) {  // a duplicate of the previous row
                t.dates.push_back(t.dates.back());
                t.prices.push_back(t.prices.back());
                t.ids.push_back(t.ids.back());
                seg.push_back(seg.back());
                continue;
            }
            const int m = static_cast<int>(i * 120 / n);
            const double noise = 0.5 * (g.next() + g.next() + g.next() - 1.5);
            const double price = std::round(std::exp(12.5 + 0.004 * m + noise) / 100) * 100;
            t.dates.push_back(lintel::RawValue::of(
                fmt::format("{:02d}/{:02d}/{}", 1 + static_cast<int>(i % 28), m % 12 + 1, 2014 + m / 12)));
            t.prices.push_back(lintel::RawValue::of(grouped(static_cast<long long>(price))));
            t.ids.push_back(lintel::RawValue::of(fmt::format("H{:06d}", i)));
            seg.push_back(lintel::RawValue::of(labels[static_cast<std::size_t>(8 * g.next())]));
        }
        t.segments.push_back(std::move(seg));
        return t;
    }();
    return in;
}

const bench::Register check("sales_text.check_200k", [] {
    const lintel::SalesCheckInput& in = exportTable();
    lintel::SalesCheckOptions o;
    o.read.dateOrder = lintel::DateOrder::DayMonthYear;
    o.read.currentYear = 2026;
    std::size_t listed = 0;
    const double ms = bench::medianMillis([&] { listed = lintel::checkSales(in, o).problems.size(); }, 3);
    bench::report(fmt::format("sales check, 200k rows of text ({} problems listed)", listed), ms, 1000);
});

const bench::Register labels("sales_text.labels_200k", [] {
    std::vector<std::string> col;
    for (const auto& v : exportTable().segments[0]) col.push_back(v.text);
    const double ms = bench::medianMillis([&] { (void)lintel::groupLabels(col); });
    bench::report("label groups, 200k labels (one non-ASCII district)", ms, 200);
});

}  // namespace
