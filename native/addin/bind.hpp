// Bindings: how the value of one argument or option becomes a field of an Options struct.
// Each builder takes the struct (O) and the field, and gives a Param: the typed setter with
// its validator, and the default text the docs show, taken from the struct's own default
// (O{}.*field), so the docs say what the code does.
//
//   option("minsales", whole<HedonicOptions>(&HedonicOptions::minSales, 1), "Periods with ...")
//   param("freq", frequency<HedonicOptions>(&HedonicOptions::freq), "Period length ...")
//
// A field may be std::optional<T> (its default is derived from something else, e.g. the
// frequency): the builder then needs the default in words, .withDefault("one year").
// The value readers (read::) are shared by arguments and options, so "freq" as an argument
// and "freq" as an option accept the same text and say the same thing.
#pragma once

#include <optional>
#include <string>
#include <type_traits>
#include <utility>
#include <vector>

#include <fmt/format.h>

#include "cell_model.hpp"
#include "diagnostics.hpp"
#include "function_table.hpp"
#include "periods.hpp"

namespace lintel::addin {

// ---- Value readers: one cell -> a typed value, or InputError naming `what`. --------------
namespace read {
// A finite number: a number cell, or text that is unambiguously one number ("0.9", "0,9",
// "1e5"; not "1,000", "0x10", "12abc", "inf").
double number(const Cell& c, const std::string& what);
// A whole number in [min, max].
long whole(const Cell& c, const std::string& what, long min, long max);
// 1/0, TRUE/FALSE, yes/no, on/off.
bool flag(const Cell& c, const std::string& what);
// One of the allowed words (compared in lower case); returns its position.
std::size_t word(const Cell& c, const std::string& what, const std::vector<std::string>& allowed);
// "M", "Q", "Y" (month, quarter, year).
Frequency frequency(const Cell& c, const std::string& what);
// A date cell (document serial, shifted to day 0 = 1899-12-30) or ISO text.
double date(const Cell& c, const std::string& what, const CallContext& ctx);
// Column numbers "1,3" or "1 3" (1 = leftmost), each >= 1.
std::vector<int> columns(const Cell& c, const std::string& what);
// "auto" (nullopt), "DMY", "MDY" or "YMD".
std::optional<DateOrder> dateOrder(const Cell& c, const std::string& what);
}  // namespace read

// ---- Params ----------------------------------------------------------------------------
struct Param {
    Binding binding;
    std::string defaultText;
    Param&& withDefault(std::string text) && {
        defaultText = std::move(text);
        return std::move(*this);
    }
};

OptionSpec option(std::string key, Param p, std::string description);
ArgSpec param(std::string name, Param p, std::string description);  // an optional argument

namespace detail {
template <class T> struct IsOptional : std::false_type {};
template <class T> struct IsOptional<std::optional<T>> : std::true_type {};
template <class O, class M>
using FieldOf = std::remove_reference_t<decltype(std::declval<O&>().*std::declval<M>())>;
template <class F> struct ValueOf { using type = F; };
template <class T> struct ValueOf<std::optional<T>> { using type = T; };

// A binding that assigns convert(cell, ctx, what) to the field.
template <class O, class M, class Convert>
Binding bindField(M member, Convert convert) {
    Binding b;
    b.target = typeid(O);
    b.make = [] { return std::static_pointer_cast<void>(std::make_shared<O>()); };
    b.set = [member, convert](void* object, const Cell& c, const CallContext& ctx,
                              const std::string& what) {
        using F = FieldOf<O, M>;
        using V = typename ValueOf<F>::type;
        using R = std::decay_t<decltype(convert(c, ctx, what))>;
        if constexpr (std::is_same_v<R, F>)
            static_cast<O*>(object)->*member = convert(c, ctx, what);  // e.g. an optional as is
        else
            static_cast<O*>(object)->*member = static_cast<V>(convert(c, ctx, what));
    };
    return b;
}
// The default text of a plain field (empty for an optional one: say it in words).
template <class O, class M, class Format>
std::string defaultOf(M member, Format format) {
    using F = FieldOf<O, M>;
    if constexpr (IsOptional<F>::value) {
        const O o{};
        return (o.*member) ? format(*(o.*member)) : std::string();
    } else {
        const O o{};
        return format(o.*member);
    }
}
inline std::string numberText(double x) { return fmt::format("{}", x); }
}  // namespace detail

// A whole number in [min, max] into an integral (or optional integral) field.
template <class O, class M>
Param whole(M member, long min, long max = 2'000'000'000L) {
    Param p;
    p.binding = detail::bindField<O>(member, [min, max](const Cell& c, const CallContext&,
                                                        const std::string& what) {
        return read::whole(c, what, min, max);
    });
    p.defaultText = detail::defaultOf<O>(member, [](auto v) { return fmt::format("{}", v); });
    return p;
}

// A number into a double (or optional double) field; `check` (may be null) is the validator:
// it returns an error text such as "must lie between 0 and 1" or "" when fine.
template <class O, class M>
Param number(M member, std::string (*check)(double) = nullptr) {
    Param p;
    p.binding = detail::bindField<O>(member, [check](const Cell& c, const CallContext&,
                                                     const std::string& what) {
        const double x = read::number(c, what);
        if (check) {
            const std::string why = check(x);
            if (!why.empty()) throw InputError(fmt::format("{} {}, got {}", what, why, x));
        }
        return x;
    });
    p.defaultText = detail::defaultOf<O>(member, [](double v) { return detail::numberText(v); });
    return p;
}

template <class O, class M>
Param flag(M member) {
    Param p;
    p.binding = detail::bindField<O>(member, [](const Cell& c, const CallContext&,
                                                const std::string& what) {
        return read::flag(c, what);
    });
    p.defaultText = detail::defaultOf<O>(member, [](bool v) { return std::string(v ? "1" : "0"); });
    return p;
}

// One of a list of words, each standing for a value of the field (an enum, usually). The
// docs' default is the word of the struct's default value.
template <class O, class M, class E>
Param choice(M member, std::vector<std::pair<std::string, E>> words) {
    std::vector<std::string> allowed;
    for (const auto& w : words) allowed.push_back(w.first);
    Param p;
    p.binding = detail::bindField<O>(member, [words, allowed](const Cell& c, const CallContext&,
                                                              const std::string& what) {
        return words[read::word(c, what, allowed)].second;
    });
    p.defaultText = detail::defaultOf<O>(member, [words](const E& v) {
        for (const auto& w : words)
            if (w.second == v) return w.first;
        return std::string();
    });
    return p;
}

template <class O, class M>
Param columns(M member) {
    Param p;
    p.binding = detail::bindField<O>(member, [](const Cell& c, const CallContext&,
                                                const std::string& what) {
        return read::columns(c, what);
    });
    p.defaultText = "none";
    return p;
}

template <class O, class M>
Param frequency(M member) {
    Param p;
    p.binding = detail::bindField<O>(member, [](const Cell& c, const CallContext&,
                                                const std::string& what) {
        return read::frequency(c, what);
    });
    p.defaultText = detail::defaultOf<O>(member, [](Frequency f) { return std::string(frequencyCode(f)); });
    return p;
}

template <class O, class M>
Param date(M member) {
    Param p;
    p.binding = detail::bindField<O>(member, [](const Cell& c, const CallContext& ctx,
                                                const std::string& what) {
        return read::date(c, what, ctx);
    });
    return p;
}

// ---- Reading a sales table: options every function that reads sales shares ----------------
// labels: how text in label columns (segments, strata, categories, ids) is compared.
enum class LabelMode {
    Exact,  // as written: "North" and "north " are two values (blanks around ids are trimmed)
    Clean,  // by label key (label_text.hpp): blanks trimmed and collapsed, case folded; each
            // group shows as its most frequent spelling
};
// The reading options of the index functions and SALESCHECK (bound by spec::dateorder and
// spec::labels, applied by the cell conversion in inputs.cpp).
struct ReadOptions {
    // Order of day and month in dates written as text; nullopt ("auto"): the document's, and
    // where that gives none the order the column's texts show.
    std::optional<DateOrder> dateOrder;
    LabelMode labels = LabelMode::Exact;
};
// ISSEGMENT's options: it compares cleaned labels unless told otherwise.
struct SegmentOptions {
    LabelMode labels = LabelMode::Clean;
};

// "auto" (nullopt), "DMY", "MDY", "YMD" (any case; also "D/M/Y" and the like).
template <class O, class M>
Param dateOrderChoice(M member) {
    Param p;
    p.binding = detail::bindField<O>(member, [](const Cell& c, const CallContext&, const std::string& what) {
        return read::dateOrder(c, what);
    });
    p.defaultText = "auto";
    return p;
}
template <class O, class M>
Param labelMode(M member) {
    return choice<O>(member, std::vector<std::pair<std::string, LabelMode>>{{"exact", LabelMode::Exact},
                                                                           {"clean", LabelMode::Clean}});
}

// ---- Presentation options every table function may take --------------------------------
// header: the input ranges start with a header row; titles: a titles row above the output;
// notes: the diagnostics below it.
struct TableLayout {
    bool header = false;
    bool titles = false;
    bool notes = false;
};

// ---- Arguments and options shared by several functions, described once -----------------
namespace spec {
OptionSpec header();
OptionSpec titles();
OptionSpec notes();
ArgSpec dates();
ArgSpec prices();
ArgSpec include();
ArgSpec options();
std::string indexOutput();  // the docs' description of the shared index layout
// period | index | count | lower | upper, the count column titled countTitle.
std::vector<OutputColumn> indexColumns(const char* countTitle = "sales");

template <class O>
ArgSpec freq(std::string extra = {}) {
    return param("freq", frequency<O>(&O::freq),
                 "Period length: \"M\" month (default), \"Q\" quarter, \"Y\" year." + extra);
}
template <class O>
ArgSpec base() {
    return param("base", date<O>(&O::baseDate).withDefault("first period with a value"),
                 "A date; the period that contains it is the base period (index 100). Empty: "
                 "the first period with a value.");
}
template <class O>
OptionSpec minsales(std::string description =
                        "Periods with fewer sales than this show no index value (blank, skipped "
                        "by AVERAGE and left as a gap in charts).") {
    return option("minsales", whole<O>(&O::minSales, 1), std::move(description));
}
std::string levelCheck(double x);
// dateorder=auto|DMY|MDY|YMD (into O::dateOrder, a std::optional<DateOrder>).
template <class O = ReadOptions>
OptionSpec dateorder() {
    return option("dateorder", dateOrderChoice<O>(&O::dateOrder),
                  "Order of day and month in dates written as text: \"DMY\" (15/03/2024), "
                  "\"MDY\" (03/15/2024), \"YMD\" (2024/03/15); \"auto\": the document's "
                  "language, and where that does not tell, the order the column's texts show. "
                  "Also applies to a base date written as text.");
}
// labels=exact|clean (into O::labels); `columns` names the label columns read.
template <class O = ReadOptions>
OptionSpec labels(const std::string& columns) {
    return option("labels", labelMode<O>(&O::labels),
                  "How text in " + columns +
                      " is compared: \"exact\" as written; \"clean\": blanks around and "
                      "inside trimmed (also no-break spaces) and case ignored, so \"Ellenford \", "
                      "\"ellenford\" and \"Ellenford\" are one value.");
}
template <class O>
OptionSpec level(std::string description =
                     "Confidence level of the lower and upper band, between 0 and 1.") {
    return option("level", number<O>(&O::level, &levelCheck), std::move(description));
}
}  // namespace spec

}  // namespace lintel::addin
