// refcli commands for the hedonic time-dummy estimators.
//
//   hedonic_index <csv> [options]   -> period,index,sales,lower,upper
//   hedonic_coefs <csv> [options]   -> kind,term,coefficient,std_error,t,note
//        kind: intercept | characteristic | period | stat | dropped | reason
//   hedonic_home  <csv> [options] [home=v1|v2|...] [homeout=<path>]
//                                   -> period,value,lower,upper,sales
//        home: one cell per characteristic column, '|'-separated, empty = typical;
//        homeout: CSV column,categorical,number,level,typical of the home used, plus a row
//        "#factor" with the retransformation factor.
//
// CSV: columns date, price, optional include (0/1); every other column is a characteristic,
// in file order, classified by lintel::classifyColumn (numbers vs text) as the add-in does.
// Options: freq=M base=<serial> minsales=1 level=0.95 window=0 bias=none|kennedy
// se=classical|hc1 log=1,3 categorical=2 retransform=smearing|lognormal, and the smoothing
// options of refcli_smoothed.hpp; with them hedonic_index gives the smoothed table.
//   hedonic_smooth <csv> [options]    -> the smoothed index with the model (refcli_smoothed.hpp)
//   hedonic_effects <csv> [options]   -> the period effects for the smoother
#include <cmath>
#include <cstdio>
#include <fstream>
#include <sstream>

#include "hedonic.hpp"
#include "refcli.hpp"
#include "refcli_smoothed.hpp"

namespace {

lintel::HedonicInput readInput(const refcli::Table& t) {
    lintel::HedonicInput in;
    in.sales.date = t.numbers("date");
    in.sales.price = t.numbers("price");
    if (t.find("include") >= 0)
        for (double x : t.numbers("include")) in.sales.include.push_back(x != 0 ? 1 : 0);
    for (const auto& name : t.names) {
        if (name == "date" || name == "price" || name == "include") continue;
        const std::vector<double> nums = t.numbers(name);
        std::vector<std::string> texts = t.text(name);
        for (std::size_t i = 0; i < texts.size(); ++i)
            if (std::isfinite(nums[i])) texts[i].clear();
        in.characteristics.push_back(lintel::classifyColumn(name, nums, texts));
    }
    return in;
}

// The options as the function behind the command reads them (INDEXHEDONIC,
// HEDONICCOEFS or REFHOMEVALUE).
lintel::HedonicOptions readOptions(const refcli::Args& a, const char* function) {
    return refcli::specOptions<lintel::HedonicOptions>(function, a, {"home", "homeout"});
}

void printDiag(const lintel::Diagnostics& d) {
    std::fprintf(stderr, "%s\n", d.summary().c_str());
    for (const auto& w : d.warnings) std::fprintf(stderr, "warning: %s\n", w.c_str());
}

std::string quoted(const std::string& s) {
    std::string q = "\"";
    for (char c : s) q += c == '"' ? std::string("\"\"") : std::string(1, c);
    return q + "\"";
}

std::string num(double x) {
    if (!std::isfinite(x)) return "";
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", x);
    return buf;
}

const refcli::Register regIndex("hedonic_index", [](const refcli::Table& t,
                                                    const refcli::Args& a) {
    const lintel::IndexResult r = lintel::hedonicIndex(readInput(t), readOptions(a, "INDEXHEDONIC"));
    printDiag(r.diag);
    return refcli::printIndexTable(r.table);
});

const refcli::Register regSmooth("hedonic_smooth", [](const refcli::Table& t,
                                                      const refcli::Args& a) {
    return refcli::printSmoothed(
        lintel::smoothedHedonicIndex(readInput(t), readOptions(a, "INDEXHEDONIC")));
});

const refcli::Register regEffects("hedonic_effects", [](const refcli::Table& t,
                                                        const refcli::Args& a) {
    return refcli::printEffects(
        lintel::hedonicPeriodEffects(readInput(t), readOptions(a, "INDEXHEDONIC")));
});

const refcli::Register regCoefs("hedonic_coefs", [](const refcli::Table& t,
                                                    const refcli::Args& a) {
    const lintel::HedonicFit f = lintel::hedonicFit(readInput(t), readOptions(a, "HEDONICCOEFS"));
    printDiag(f.diag);
    std::printf("kind,term,coefficient,std_error,t,note\n");
    for (const auto& term : f.terms) {
        const char* kind = term.kind == lintel::TermKind::Intercept ? "intercept"
                           : term.kind == lintel::TermKind::Period  ? "period"
                                                                    : "characteristic";
        std::printf("%s,%s,%s,%s,%s,\n", kind, quoted(term.name).c_str(),
                    num(term.coefficient).c_str(), num(term.stdError).c_str(),
                    num(term.tValue).c_str());
    }
    auto stat = [](const char* name, double v) {
        std::printf("stat,%s,%s,,,\n", name, num(v).c_str());
    };
    stat("observations", static_cast<double>(f.observations));
    stat("dropped", static_cast<double>(f.rowsDropped));
    stat("r_squared", f.rSquared);
    stat("adj_r_squared", f.adjRSquared);
    stat("residual_se", f.residualSE);
    stat("df_residual", f.dfResidual);
    stat("reference_period", f.axis.start(f.referencePosition));
    for (const auto& d : f.droppedTerms)
        std::printf("dropped,%s,,,,%s\n", quoted(d.name).c_str(), quoted(d.why).c_str());
    for (const auto& [why, n] : f.diag.dropped)
        std::printf("reason,%s,%zu,,,\n", quoted(lintel::dropReasonText(why)).c_str(), n);
    return 0;
});

const refcli::Register regHome("hedonic_home", [](const refcli::Table& t,
                                                  const refcli::Args& a) {
    const lintel::HedonicInput in = readInput(t);
    lintel::HomeInput home;
    if (a.count("home")) {
        std::string cell;
        std::istringstream is(a.at("home") + "|");
        while (std::getline(is, cell, '|')) {
            char* end = nullptr;
            const double x = std::strtod(cell.c_str(), &end);
            const bool isNum = !cell.empty() && *end == 0;
            home.numbers.push_back(isNum ? x : NAN);
            home.texts.push_back(isNum ? std::string() : cell);
        }
        home.numbers.resize(in.characteristics.size(), NAN);
        home.texts.resize(in.characteristics.size());
    }
    const lintel::RefHomeResult r = lintel::referenceHomeValue(in, home, readOptions(a, "REFHOMEVALUE"));
    printDiag(r.diag);
    refcli::printColumns({"period", "value", "lower", "upper", "sales"},
                         {refcli::periodStarts(r.table.axis), r.value(), r.table.lower, r.table.upper,
                          refcli::asNumbers(r.table.count)});
    const std::string out = refcli::text(a, "homeout", "");
    if (!out.empty()) {
        std::ofstream f(out);
        f << "column,categorical,number,level,typical\n";
        for (const auto& c : r.home)
            f << quoted(c.column) << ',' << (c.categorical ? 1 : 0) << ',' << num(c.number)
              << ',' << quoted(c.level) << ',' << (c.typical ? 1 : 0) << '\n';
        f << "#factor,0," << num(r.retransformFactor) << ",,0\n";
    }
    return 0;
});

}  // namespace
