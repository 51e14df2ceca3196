// refcli commands for the repeat-sales estimators (CHAINRS / RSPAIRS core).
//
//   repeat_sales_index <csv: id, date, price[, changed][, include]> [options]
//       -> period, index, pairs, lower, upper, log, se, df
//   repeat_sales_pairs <same csv> [options]
//       -> the audit: id, first_row, first_date, first_price, second_row, second_date,
//          second_price, months, rate, used, status, reason, weight
//   repeat_sales_diag <same csv> [options]
//       -> kind, name, value rows: rows_in, rows_used, dropped <reason>, pairs_formed,
//          pairs_used, pairs_dropped <reason>, warning <text>, variance <coef>
//   repeat_sales_from_pairs <csv: first_date, first_price, second_date, second_price>
//       -> as repeat_sales_index
// Options: freq=M base=<serial> method=cs|bmn|cs2 minhold=6 maxrate=1 chain=0 init=0
//          minsales=1 level=0.95 numericid=0 (1: read ids as numbers and convert them with
//          keyText, as the add-in does for numeric cells), and the smoothing options of
//          refcli_smoothed.hpp (repeat_sales_index then gives the smoothed table)
//   repeat_sales_smooth <same csv> [options]   -> the smoothed index with the model
//   repeat_sales_effects <same csv> [options]  -> the period effects for the smoother
#include <cmath>
#include <cstdio>
#include <stdexcept>
#include <string>

#include "repeat_sales.hpp"
#include "text_keys.hpp"
#include "refcli.hpp"
#include "refcli_smoothed.hpp"

namespace {

// The options as CHAINRS (or RSPAIRS, whose freq and base are options) reads them.
lintel::RepeatSalesOptions options(const refcli::Args& a, const char* function = "CHAINRS") {
    return refcli::specOptions<lintel::RepeatSalesOptions>(function, a, {"numericid"});
}

lintel::RepeatSalesInput input(const refcli::Table& t, const refcli::Args& a) {
    lintel::RepeatSalesInput in;
    if (refcli::number(a, "numericid", 0) != 0)
        for (double x : t.numbers("id")) in.id.push_back(lintel::keyText(x));
    else
        in.id = t.text("id");
    in.sales.date = t.numbers("date");
    in.sales.price = t.numbers("price");
    if (t.find("include") >= 0)
        for (double x : t.numbers("include")) in.sales.include.push_back(x != 0 ? 1 : 0);
    if (t.find("changed") >= 0)
        for (double x : t.numbers("changed"))
            in.changed.push_back(std::isfinite(x) && x != 0 ? 1 : 0);
    return in;
}

std::string quoted(const std::string& s) {
    std::string q = "\"";
    for (char c : s) {
        if (c == '"') q += '"';
        q += c;
    }
    return q + "\"";
}

void num(double x, bool first = false) {
    if (!first) std::printf(",");
    if (std::isfinite(x)) std::printf("%.17g", x);
}

int printIndex(const lintel::RepeatSalesResult& r) {
    const auto& tb = r.table;
    refcli::printColumns({"period", "index", "pairs", "lower", "upper", "log", "se", "df"},
                         {refcli::periodStarts(tb.axis), tb.index, refcli::asNumbers(tb.count), tb.lower,
                          tb.upper, r.logIndex, r.logSe, r.df});
    std::fprintf(stderr, "%s\n", r.summary().c_str());
    for (const auto& w : r.diag.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());
    return 0;
}

const refcli::Register regIndex("repeat_sales_index", [](const auto& t, const auto& a) {
    return printIndex(lintel::repeatSalesIndex(input(t, a), options(a)));
});

const refcli::Register regSmooth("repeat_sales_smooth", [](const auto& t, const auto& a) {
    return refcli::printSmoothed(lintel::smoothedRepeatSalesIndex(input(t, a), options(a)));
});

const refcli::Register regEffects("repeat_sales_effects", [](const auto& t, const auto& a) {
    return refcli::printEffects(lintel::repeatSalesPeriodEffects(input(t, a), options(a)));
});

const refcli::Register regFromPairs("repeat_sales_from_pairs", [](const auto& t, const auto& a) {
    lintel::RepeatSalesPairInput in;
    in.firstDate = t.numbers("first_date");
    in.firstPrice = t.numbers("first_price");
    in.secondDate = t.numbers("second_date");
    in.secondPrice = t.numbers("second_price");
    return printIndex(lintel::repeatSalesFromPairs(in, options(a)));
});

const refcli::Register regPairs("repeat_sales_pairs", [](const auto& t, const auto& a) {
    const lintel::PairAudit audit = lintel::repeatSalesPairs(input(t, a), options(a, "RSPAIRS"));
    std::printf("id,first_row,first_date,first_price,second_row,second_date,second_price,"
                "months,rate,used,status,reason,weight\n");
    for (const auto& p : audit.pairs) {
        std::printf("%s", quoted(p.id).c_str());
        num(static_cast<double>(p.firstRow));
        num(p.firstDate);
        num(p.firstPrice);
        num(static_cast<double>(p.secondRow));
        num(p.secondDate);
        num(p.secondPrice);
        num(p.monthsHeld);
        num(p.annualRate);
        num(p.used ? 1 : 0);
        num(static_cast<int>(p.status));
        std::printf(",%s", quoted(p.reason).c_str());
        num(p.weight);
        std::printf("\n");
    }
    return 0;
});

const refcli::Register regDiag("repeat_sales_diag", [](const auto& t, const auto& a) {
    const lintel::RepeatSalesOptions o = options(a, "RSPAIRS");
    const lintel::PairAudit audit = lintel::repeatSalesPairs(input(t, a), o);
    std::printf("kind,name,value\n");
    std::printf("rows_in,,%zu\nrows_used,,%zu\n", audit.diag.rowsIn, audit.diag.rowsUsed);
    for (const auto& [r, c] : audit.diag.dropped)
        std::printf("dropped,%s,%zu\n", quoted(lintel::dropReasonText(r)).c_str(), c);
    std::printf("pairs_formed,,%zu\npairs_used,,%zu\n", audit.counts.formed, audit.counts.used);
    for (const auto& [r, c] : audit.counts.dropped)
        std::printf("pairs_dropped,%s,%zu\n", quoted(lintel::pairReasonText(r)).c_str(), c);
    for (const auto& w : audit.diag.warnings) std::printf("warning,%s,\n", quoted(w).c_str());
    return 0;
});

}  // namespace
