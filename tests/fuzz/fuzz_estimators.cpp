// libFuzzer harness: a small CSV sales table into every core estimator.
//
// Input (text):
//   line 1:   options, "key=value; key=value ..." (the keys of the spreadsheet functions, read
//             through each function's own bindings as Calc reads them; a key a function does
//             not take is left out for it). The harness's own keys: chars=0..2 (characteristic
//             columns given to the hedonic estimators, default 2), home=v1|v2 (REFHOMEVALUE's
//             home, empty = typical), methods=row|row (INDEXBACKTEST's method rows).
//   lines 2+: rows id,date,price,size,kind,stratum,include,changed (numbers in C locale; a
//             field that is not wholly a number is text, NaN where a number is wanted).
// Every estimator runs on the same table: raw mean and median, mix-adjusted, hedonic (pooled,
// rolling window, smoothed, coefficients, reference home), repeat sales (chained, pairs audit,
// smoothed, from pairs), the index-series analytics, the sales check, the backtest with tiny
// folds. lintel::InputError is the expected answer to bad input; any other exception, a crash,
// a sanitizer report or a hang is a finding (tests/fuzz/README.md).
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <limits>
#include <map>
#include <string>
#include <vector>

#include "backtest.hpp"
#include "backtest_methods.hpp"
#include "call.hpp"
#include "csv_line.hpp"
#include "diagnostics.hpp"
#include "function_table.hpp"
#include "hedonic.hpp"
#include "hodrick_prescott.hpp"
#include "index_analytics.hpp"
#include "index_arithmetic.hpp"
#include "index_compare.hpp"
#include "lead_lag.hpp"
#include "mix_adjusted.hpp"
#include "periods.hpp"
#include "raw_index.hpp"
#include "repeat_sales.hpp"
#include "sales_check.hpp"
#include "seasonal.hpp"
#include "smoothed_index.hpp"
#include "turning_points.hpp"

namespace {

using Named = std::map<std::string, std::string>;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Bounds that keep one input to milliseconds: rows, and the span of the sale dates (periods).
constexpr std::size_t kMaxRows = 64;
constexpr std::size_t kColumns = 8;
constexpr double kMaxSpanDays = 4 * 366.0;  // 49 months

enum Col { Id, Date, Price, Size, Kind, Stratum, Include, Changed };

struct Sheet {
    Named options;
    std::vector<std::vector<std::string>> rows;

    std::vector<std::string> text(Col c) const {
        std::vector<std::string> v;
        for (const auto& r : rows) v.push_back(r[c]);
        return v;
    }
    std::vector<double> numbers(Col c) const {
        std::vector<double> v;
        for (const auto& r : rows) v.push_back(number(r[c]));
        return v;
    }
    static double number(const std::string& s) {
        if (s.empty()) return kNaN;
        char* end = nullptr;
        const double x = std::strtod(s.c_str(), &end);
        return *end ? kNaN : x;
    }
};

std::string trim(const std::string& s) {
    const auto a = s.find_first_not_of(" \t\r");
    if (a == std::string::npos) return {};
    return s.substr(a, s.find_last_not_of(" \t\r") - a + 1);
}

using lintel::testcsv::splitCsvLine;

Sheet parse(const std::uint8_t* data, std::size_t size) {
    Sheet s;
    const std::string text(reinterpret_cast<const char*>(data), size);
    std::size_t pos = 0;
    bool first = true;
    while (pos <= text.size() && s.rows.size() < kMaxRows) {
        std::size_t end = text.find('\n', pos);
        if (end == std::string::npos) end = text.size();
        const std::string line = text.substr(pos, end - pos);
        pos = end + 1;
        if (first) {
            first = false;
            std::size_t p = 0;
            while (p <= line.size()) {
                std::size_t q = line.find(';', p);
                if (q == std::string::npos) q = line.size();
                const std::string item = line.substr(p, q - p);
                const auto eq = item.find('=');
                if (eq != std::string::npos) s.options[trim(item.substr(0, eq))] = trim(item.substr(eq + 1));
                p = q + 1;
            }
            continue;
        }
        if (line.empty()) continue;
        s.rows.push_back(splitCsvLine(line));
        s.rows.back().resize(kColumns);
    }
    return s;
}

// The named values function `fn` takes (its bound arguments and its options), as Calc would
// pass them, read into the struct O by the function's bindings.
template <class O>
O optionsFor(const char* fn, const Named& all) {
    const lintel::addin::FunctionSpec& f = lintel::addin::functionSpec(fn);
    Named mine;
    for (const auto& [key, value] : all) {
        const int i = f.argIndex(key);
        if (f.option(key) || (i >= 0 && key != "options" && f.args[static_cast<std::size_t>(i)].binding))
            mine[key] = value;
    }
    return lintel::addin::optionsFromText<O>(f, mine);
}

// Runs one estimator; an InputError is a correct answer. Anything else escapes to libFuzzer,
// which reports it (uncaught exception -> abort -> crash artifact).
template <class F>
void attempt(F&& f) {
    try {
        f();
    } catch (const lintel::InputError&) {
    }
}

lintel::SalesInput salesOf(const Sheet& s) {
    lintel::SalesInput in;
    in.date = s.numbers(Date);
    in.price = s.numbers(Price);
    bool anyInclude = false;
    for (const auto& r : s.rows) anyInclude = anyInclude || !r[Include].empty();
    if (anyInclude)
        for (const auto& r : s.rows) {
            const double x = Sheet::number(r[Include]);
            in.include.push_back(r[Include].empty() || (std::isfinite(x) && x != 0) ? 1 : 0);
        }
    return in;
}

std::vector<char> changedOf(const Sheet& s) {
    std::vector<char> v;
    bool any = false;
    for (const auto& r : s.rows) {
        const double x = Sheet::number(r[Changed]);
        v.push_back(std::isfinite(x) && x != 0 ? 1 : 0);
        any = any || !r[Changed].empty();
    }
    return any ? v : std::vector<char>{};
}

std::vector<lintel::CharacteristicColumn> characteristicsOf(const Sheet& s) {
    std::vector<lintel::CharacteristicColumn> out;
    const double given = Sheet::number(s.options.count("chars") ? s.options.at("chars") : "2");
    const int n = std::isfinite(given) ? std::clamp(static_cast<int>(std::clamp(given, 0.0, 2.0)), 0, 2) : 2;
    for (int k = 0; k < n; ++k) {
        const Col c = k == 0 ? Size : Kind;
        const std::vector<double> nums = s.numbers(c);
        std::vector<std::string> texts = s.text(c);
        for (std::size_t i = 0; i < texts.size(); ++i)
            if (std::isfinite(nums[i])) texts[i].clear();
        out.push_back(lintel::classifyColumn(k == 0 ? "size" : "kind", nums, texts));
    }
    return out;
}

std::vector<std::string> splitBar(const std::string& s) {
    std::vector<std::string> out;
    std::size_t p = 0;
    while (p <= s.size()) {
        std::size_t q = s.find('|', p);
        if (q == std::string::npos) q = s.size();
        out.push_back(s.substr(p, q - p));
        p = q + 1;
    }
    return out;
}

lintel::RawValue rawOf(const std::string& s) {
    if (s.empty()) return lintel::RawValue::empty();
    const double x = Sheet::number(s);
    return std::isnan(x) ? lintel::RawValue::of(s) : lintel::RawValue::of(x);
}

// The index-series functions on one column of values (an estimator's index, or a column of
// the input as it is) with period starts `starts`.
void seriesAnalytics(const std::vector<double>& series, const std::vector<double>& starts,
               const std::vector<double>& other, const Named& opt) {
    using namespace lintel;
    attempt([&] { indexVolatility(series, optionsFor<VolatilityOptions>("INDEXVOLATILITY", opt)); });
    attempt([&] { hodrickPrescott(series, optionsFor<HpOptions>("INDEXTREND", opt)); });
    attempt([&] { indexSnr(series, optionsFor<SnrOptions>("INDEXSNR", opt)); });
    attempt([&] { seasonalFactors(series, optionsFor<SeasonalOptions>("INDEXSEASONAL", opt)); });
    attempt([&] { indexTurns({starts, series}, optionsFor<TurnsOptions>("INDEXTURNS", opt)); });
    attempt([&] { indexChange(series, optionsFor<ChangeOptions>("INDEXCHANGE", opt)); });
    attempt([&] {
        const IndexSeries s = IndexSeries::fromColumns(starts, series);
        attempt([&] { rebaseIndex(s, optionsFor<RebaseOptions>("INDEXREBASE", opt)); });
        if (!starts.empty())
            attempt([&] { adjustPrice(s, series.front(), starts.back(), starts.front()); });
    });
    if (other.size() == series.size()) {
        attempt([&] { indexLeadLag({series, other}, optionsFor<LeadLagOptions>("INDEXLEADLAG", opt)); });
        attempt([&] {
            CompareInput in;
            in.columns = {series, other};
            in.names = {"a", ""};
            indexCompare(in, optionsFor<CompareOptions>("INDEXCOMPARE", opt));
        });
    }
}

std::vector<double> startsOf(const lintel::PeriodAxis& axis) {
    std::vector<double> v;
    for (int i = 0; i < axis.count; ++i) v.push_back(axis.start(i));
    return v;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using namespace lintel;
    const Sheet s = parse(data, size);

    // Bound the periods: the span of the usable sale dates (and of a numeric base).
    double lo = std::numeric_limits<double>::infinity(), hi = -lo;
    for (double d : s.numbers(Date))
        if (isUsableSerial(d)) { lo = std::min(lo, d); hi = std::max(hi, d); }
    if (s.options.count("base")) {
        const double b = Sheet::number(s.options.at("base"));
        if (isUsableSerial(b)) { lo = std::min(lo, b); hi = std::max(hi, b); }
    }
    if (hi - lo > kMaxSpanDays) return -1;  // not added to the corpus
    const Named& opt = s.options;

    const SalesInput sales = salesOf(s);
    std::vector<double> meanIndex, medianIndex, hedonicIx, starts;

    // Raw mean and median.
    attempt([&] {
        const IndexResult r = indexMean(sales, optionsFor<RawIndexOptions>("INDEXMEAN", opt));
        meanIndex = r.table.index;
        starts = startsOf(r.table.axis);
    });
    attempt([&] { medianIndex = indexMedian(sales, optionsFor<RawIndexOptions>("INDEXMEDIAN", opt)).table.index; });

    // Mix-adjusted: one or two strata columns.
    attempt([&] {
        MixInput in;
        in.sales = sales;
        in.strata.push_back(s.text(Stratum));
        if (opt.count("chars") && opt.at("chars") == "0") in.strata.push_back(s.text(Kind));
        MixOptions o = optionsFor<MixOptions>("INDEXMIX", opt);
        o.reps = std::min(o.reps, 25);  // bootstrap replicates: enough to run the code
        indexMix(in, o);
    });

    // Hedonic: pooled or rolling (window), smoothed, coefficients, reference home.
    HedonicInput hin;
    hin.sales = sales;
    hin.characteristics = characteristicsOf(s);
    attempt([&] {
        const HedonicOptions o = optionsFor<HedonicOptions>("INDEXHEDONIC", opt);
        if (o.smoothed()) smoothedHedonicIndex(hin, o);
        else hedonicIx = hedonicIndex(hin, o).table.index;
    });
    attempt([&] { hedonicFit(hin, optionsFor<HedonicOptions>("HEDONICCOEFS", opt)); });
    attempt([&] {
        HomeInput home;
        if (opt.count("home"))
            for (const std::string& cell : splitBar(opt.at("home"))) {
                const double x = Sheet::number(cell);
                home.numbers.push_back(x);
                home.texts.push_back(std::isnan(x) ? cell : std::string());
            }
        referenceHomeValue(hin, home, optionsFor<HedonicOptions>("REFHOMEVALUE", opt));
    });

    // Repeat sales: chained (or smoothed), the pairs audit, from pairs.
    RepeatSalesInput rin;
    rin.id = s.text(Id);
    rin.sales = sales;
    rin.changed = changedOf(s);
    attempt([&] {
        const RepeatSalesOptions o = optionsFor<RepeatSalesOptions>("CHAINRS", opt);
        if (o.smoothed()) smoothedRepeatSalesIndex(rin, o);
        else repeatSalesIndex(rin, o);
    });
    attempt([&] { repeatSalesPairs(rin, optionsFor<RepeatSalesOptions>("RSPAIRS", opt)); });
    attempt([&] {
        RepeatSalesPairInput pin;
        for (std::size_t i = 0; i + 1 < sales.date.size(); i += 2) {
            pin.firstDate.push_back(sales.date[i]);
            pin.firstPrice.push_back(sales.price[i]);
            pin.secondDate.push_back(sales.date[i + 1]);
            pin.secondPrice.push_back(sales.price[i + 1]);
        }
        RepeatSalesOptions o = optionsFor<RepeatSalesOptions>("CHAINRS", opt);
        o.smooth = SmoothKind::None;
        o.seasonal = o.realtime = o.borrow = false;
        repeatSalesFromPairs(pin, o);
    });

    // Index-series analytics: on the mean index, and on the size column as a raw series with
    // the date column as its periods (values and periods as the fuzzer wrote them).
    if (!meanIndex.empty()) seriesAnalytics(meanIndex, starts, medianIndex, opt);
    if (!hedonicIx.empty() && hedonicIx.size() == starts.size()) seriesAnalytics(hedonicIx, starts, meanIndex, opt);
    seriesAnalytics(s.numbers(Size), s.numbers(Date), s.numbers(Price), opt);

    // Sales check: cells as Calc hands them (numbers or text), ids and one segment column.
    attempt([&] {
        SalesCheckInput in;
        for (const auto& r : s.rows) {
            in.dates.push_back(rawOf(r[Date]));
            in.prices.push_back(rawOf(r[Price]));
            in.ids.push_back(rawOf(r[Id]));
        }
        in.segments.emplace_back();
        for (const auto& r : s.rows) in.segments.back().push_back(rawOf(r[Stratum]));
        in.include = sales.include;
        SalesCheckOptions o;
        o.outliers = optionsFor<OutlierOptions>("SALESCHECK", opt);
        if (opt.count("dateorder"))
            if (const auto d = parseDateOrder(opt.at("dateorder"))) o.read.dateOrder = *d;
        if (opt.count("freq"))
            if (const auto f = parseFrequency(opt.at("freq"))) o.freq = *f;
        o.read.currentYear = 2026;
        o.cleanLabels = opt.count("labels") && opt.at("labels") == "clean";
        checkSales(in, o);
    });

    // Backtest with tiny folds and few revisions.
    attempt([&] {
        BacktestInput in;
        in.id = s.text(Id);
        in.sales = sales;
        in.characteristics = hin.characteristics;
        in.strata.push_back(s.text(Stratum));
        in.changed = rin.changed;
        in.methods = addin::parseMethodRows(
            opt.count("methods") ? splitBar(opt.at("methods"))
                                 : addin::defaultMethodRows(!in.characteristics.empty(), true));
        BacktestOptions o = optionsFor<BacktestOptions>("INDEXBACKTEST", opt);
        o.folds = std::min(o.folds, 3);
        o.revisions = std::min(o.revisionPeriods(), 2);
        backtest(in, o);
    });
    return 0;
}
