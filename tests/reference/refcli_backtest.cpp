// refcli commands for the backtest (INDEXBACKTEST's core). Options and method rows are read
// with INDEXBACKTEST's spec and the add-in's method-row reader, as in Calc.
//
//   backtest_pairs <csv> [options] -> one row per held-out pair: first_row, second_row, fold,
//                                     log_change, then pred_<k> per method (k = 1, 2 ...):
//                                     ln(I(t2)/I(t1)) of the fold's estimate, empty when not
//                                     predicted
//   backtest_summary <csv> [options] -> one row per method: method (k), pairs, mdae, rmse,
//                                     mean_rev, max_rev, volatility, missing, rank,
//                                     recommended; the reasons go to stderr
//   backtest_revisions <csv> [options] -> method (k), removed, period (start serial), percent
//   backtest_indexes <csv> [options] -> period (start serial), log_<k> per method: ln I of the
//                                     estimate on all sales (any base), empty without a value
//   backtest_report <csv> [options] -> backtest_summary's table, an empty line, then
//                                     backtest_indexes' table, from one run
// csv: id, date, price[, changed][, include]; characteristics in columns named c_<name>
//      (numeric unless text), strata in columns named s_<name>.
// Options: freq folds seed revisions minsales minhold maxrate as INDEXBACKTEST, and
//          methods=<row>|<row>|... (default: INDEXBACKTEST's default rows).
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <stdexcept>
#include <string>

#include "backtest.hpp"
#include "backtest_methods.hpp"
#include "call.hpp"
#include "function_table.hpp"
#include "refcli.hpp"

namespace {

struct Run {
    lintel::BacktestInput in;
    lintel::BacktestOptions o;
};

Run prepare(const refcli::Table& t, const refcli::Args& a) {
    Run run;
    const auto& spec = lintel::addin::functionSpec("INDEXBACKTEST");
    std::map<std::string, std::string> named;
    for (const auto& [k, v] : a)
        if (k != "methods") named[k] = v;
    run.o = lintel::addin::optionsFromText<lintel::BacktestOptions>(spec, named);
    auto& in = run.in;
    in.id = t.text("id");
    in.sales.date = t.numbers("date");
    in.sales.price = t.numbers("price");
    if (t.find("include") >= 0)
        for (double x : t.numbers("include")) in.sales.include.push_back(x != 0 ? 1 : 0);
    if (t.find("changed") >= 0)
        for (double x : t.numbers("changed")) in.changed.push_back(std::isfinite(x) && x != 0 ? 1 : 0);
    for (const auto& name : t.names) {
        if (name.rfind("c_", 0) == 0) {
            const auto numbers = t.numbers(name);
            std::vector<std::string> texts;
            for (const auto& s : t.text(name)) {
                char* end = nullptr;
                std::strtod(s.c_str(), &end);
                texts.push_back(!s.empty() && *end ? s : std::string());
            }
            in.characteristics.push_back(lintel::classifyColumn(name.substr(2), numbers, texts));
        } else if (name.rfind("s_", 0) == 0) {
            in.strata.push_back(t.text(name));
        }
    }
    std::vector<std::string> rows;
    const std::string methods = refcli::text(a, "methods", "");
    if (methods.empty()) {
        rows = lintel::addin::defaultMethodRows(!in.characteristics.empty(), !in.strata.empty());
    } else {
        std::size_t pos = 0;
        while (pos <= methods.size()) {
            std::size_t end = methods.find('|', pos);
            if (end == std::string::npos) end = methods.size();
            rows.push_back(methods.substr(pos, end - pos));
            pos = end + 1;
        }
    }
    in.methods = lintel::addin::parseMethodRows(rows);
    return run;
}

void num(double x) {
    std::printf(",");
    if (std::isfinite(x)) std::printf("%.17g", x);
}

const refcli::Register regPairs("backtest_pairs", [](const auto& t, const auto& a) {
    const Run run = prepare(t, a);
    lintel::BacktestDetail d;
    lintel::backtest(run.in, run.o, &d);
    std::printf("first_row,second_row,fold,log_change");
    for (std::size_t m = 0; m < d.predicted.size(); ++m) std::printf(",pred_%zu", m + 1);
    std::printf("\n");
    for (std::size_t i = 0; i < d.logChange.size(); ++i) {
        std::printf("%zu,%zu,%d", d.firstRow[i], d.secondRow[i], d.fold[i]);
        num(d.logChange[i]);
        for (const auto& p : d.predicted) num(p[i]);
        std::printf("\n");
    }
    return 0;
});

void printSummary(const lintel::BacktestResult& r) {
    std::printf("method,pairs,mdae,rmse,mean_rev,max_rev,volatility,missing,rank,recommended\n");
    for (std::size_t m = 0; m < r.methods.size(); ++m) {
        const auto& row = r.methods[m];
        std::printf("%zu", m + 1);
        num(static_cast<double>(row.pairsPredicted));
        num(row.medianAbsError);
        num(row.rmsError);
        num(row.meanRevision);
        num(row.maxRevision);
        num(row.volatility);
        num(row.missingShare);
        num(row.rank);
        num(row.recommended ? 1 : 0);
        std::printf("\n");
        std::fprintf(stderr, "%s: %s\n", row.label.c_str(), row.reason.c_str());
    }
    std::fprintf(stderr, "%s\n", r.summary().c_str());
    for (const auto& w : r.diag.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());
}

void printIndexes(const lintel::BacktestResult& r, const lintel::BacktestDetail& d) {
    std::vector<std::string> names = {"period"};
    std::vector<std::vector<double>> cols = {refcli::periodStarts(r.axis)};
    for (std::size_t m = 0; m < d.fullLog.size(); ++m) {
        names.push_back("log_" + std::to_string(m + 1));
        cols.push_back(d.fullLog[m]);
    }
    refcli::printColumns(names, cols);
}

const refcli::Register regSummary("backtest_summary", [](const auto& t, const auto& a) {
    const Run run = prepare(t, a);
    printSummary(lintel::backtest(run.in, run.o));
    return 0;
});

const refcli::Register regRevisions("backtest_revisions", [](const auto& t, const auto& a) {
    const Run run = prepare(t, a);
    lintel::BacktestDetail d;
    lintel::backtest(run.in, run.o, &d);
    std::printf("method,removed,period,percent\n");
    for (std::size_t m = 0; m < d.revisions.size(); ++m)
        for (const auto& v : d.revisions[m]) {
            std::printf("%zu,%d", m + 1, v.removed);
            num(lintel::periodStartOfKey(v.periodKey, run.o.freq));
            num(v.percent);
            std::printf("\n");
        }
    return 0;
});

const refcli::Register regIndexes("backtest_indexes", [](const auto& t, const auto& a) {
    const Run run = prepare(t, a);
    lintel::BacktestDetail d;
    printIndexes(lintel::backtest(run.in, run.o, &d), d);
    return 0;
});

const refcli::Register regReport("backtest_report", [](const auto& t, const auto& a) {
    const Run run = prepare(t, a);
    lintel::BacktestDetail d;
    const lintel::BacktestResult r = lintel::backtest(run.in, run.o, &d);
    printSummary(r);
    std::printf("\n");
    printIndexes(r, d);
    return 0;
});

}  // namespace
