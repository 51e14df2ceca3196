#include "locale_facts.hpp"

#include <ctime>
#include <map>
#include <mutex>
#include <optional>
#include <string>

#include <com/sun/star/i18n/FormatElement.hpp>
#include <com/sun/star/i18n/LocaleDataItem.hpp>
#include <com/sun/star/i18n/NumberFormatIndex.hpp>
#include <com/sun/star/i18n/XLocaleData4.hpp>
#include <com/sun/star/lang/XMultiComponentFactory.hpp>
#include <com/sun/star/util/Date.hpp>

#include "date_text.hpp"
#include "number_text.hpp"
#include "periods.hpp"
#include "uno_cells.hpp"

namespace css = com::sun::star;
using css::uno::Reference;
using css::uno::UNO_QUERY;

namespace lintel::addin {

namespace {

struct LocaleFacts {
    DateOrder dateOrder = DateOrder::Unknown;
    NumberFormat numbers;
    std::string tag;
};

std::mutex& lock() {
    static std::mutex m;
    return m;
}
Reference<css::uno::XComponentContext>& officeContext() {
    static Reference<css::uno::XComponentContext> ctx;
    return ctx;
}

// "en-GB"; a locale given by its BCP 47 tag ("qlt" + Variant) as that tag.
std::string tagOf(const css::lang::Locale& l) {
    if (l.Language == "qlt") return utf8(l.Variant);
    std::string t = utf8(l.Language);
    if (!l.Country.isEmpty()) t += "-" + utf8(l.Country);
    return t;
}

// The order the locale's date acceptance patterns ("D/M/Y;D/M") agree on; Unknown when they
// disagree; nullopt when none has day, month and year.
std::optional<DateOrder> orderOfPatterns(const css::uno::Sequence<OUString>& patterns) {
    bool dmy = false, mdy = false, ymd = false;
    for (const OUString& p : patterns) {
        switch (dateOrderFromPattern(utf8(p))) {
            case DateOrder::DayMonthYear: dmy = true; break;
            case DateOrder::MonthDayYear: mdy = true; break;
            case DateOrder::YearMonthDay: ymd = true; break;
            case DateOrder::Unknown: break;
        }
    }
    if (dmy != mdy) return dmy ? DateOrder::DayMonthYear : DateOrder::MonthDayYear;
    if (dmy) return DateOrder::Unknown;
    if (ymd) return DateOrder::YearMonthDay;
    return std::nullopt;
}

LocaleFacts readFacts(const css::lang::Locale& locale, const Reference<css::uno::XComponentContext>& ctx) {
    LocaleFacts f;
    f.tag = tagOf(locale);
    f.dateOrder = dateOrderForLocaleTag(f.tag);
    if (!ctx.is()) return f;
    try {
        const Reference<css::i18n::XLocaleData4> data(
            ctx->getServiceManager()->createInstanceWithContext("com.sun.star.i18n.LocaleData", ctx), UNO_QUERY);
        if (!data.is()) return f;
        // The office's patterns decide; where they give none, the tag's order (common practice).
        if (const auto o = orderOfPatterns(data->getDateAcceptancePatterns(locale))) f.dateOrder = *o;
        const css::i18n::LocaleDataItem item = data->getLocaleItem(locale);
        NumberFormat n;
        n.decimal = utf8(item.decimalSeparator);
        n.group = utf8(item.thousandSeparator);
        // Indian grouping (12,34,567): the locale's thousands format groups by two.
        for (const css::i18n::FormatElement& e : data->getAllFormats(locale))
            if (e.formatIndex == css::i18n::NumberFormatIndex::NUMBER_1000INT)
                n.indianGrouping = e.formatCode.indexOf(",##,") >= 0;
        try {
            n.validate();
            f.numbers = n;
        } catch (...) {
            // Separators we cannot read by: keep the decimal separator alone, else the default.
            n.group.clear();
            n.indianGrouping = false;
            try {
                n.validate();
                f.numbers = n;
            } catch (...) {
            }
        }
    } catch (...) {
        // The office's locale data is not available: the tag's order and the defaults.
    }
    return f;
}

std::map<std::string, LocaleFacts>& cache() {
    static std::map<std::string, LocaleFacts> c;
    return c;
}

// Read once per locale (the service is not asked again for every call of a function).
LocaleFacts factsOf(const css::lang::Locale& locale) {
    const std::string key = tagOf(locale);
    Reference<css::uno::XComponentContext> ctx;
    {
        std::lock_guard<std::mutex> g(lock());
        const auto it = cache().find(key);
        if (it != cache().end()) return it->second;
        ctx = officeContext();
    }
    const LocaleFacts f = readFacts(locale, ctx);  // outside the lock: it calls the office
    std::lock_guard<std::mutex> g(lock());
    if (ctx.is()) cache().emplace(key, f);  // without the office's data, ask again next time
    return f;
}

}  // namespace

void rememberOfficeContext(const Reference<css::uno::XComponentContext>& ctx) {
    std::lock_guard<std::mutex> g(lock());
    if (ctx.is() && !officeContext().is()) officeContext() = ctx;
}

void applyLocale(const css::lang::Locale& locale, CallContext& ctx) noexcept {
    try {
        if (locale.Language.isEmpty()) return;
        const LocaleFacts f = factsOf(locale);
        ctx.dateOrder = f.dateOrder;
        ctx.numbers = f.numbers;
        ctx.locale = f.tag;
    } catch (...) {
        ctx.dateOrder = DateOrder::Unknown;
        ctx.numbers = NumberFormat{};
        ctx.locale.clear();
    }
}

CallContext documentContext(const Reference<css::beans::XPropertySet>& props) noexcept {
    CallContext ctx;
    try {
        const std::time_t now = std::time(nullptr);
        std::tm local{};
        if (localtime_r(&now, &local)) ctx.currentYear = local.tm_year + 1900;
    } catch (...) {
    }
    if (!props.is()) return ctx;
    try {
        css::util::Date d;
        if (props->getPropertyValue("NullDate") >>= d) ctx.dateOffset = serialFromCivil({d.Year, d.Month, d.Day});
    } catch (...) {
        // Keep the standard null date 1899-12-30.
    }
    try {
        css::lang::Locale locale;
        if (props->getPropertyValue("CharLocale") >>= locale) applyLocale(locale, ctx);
    } catch (...) {
        // No language: ISO dates, "." decimals.
    }
    return ctx;
}

}  // namespace lintel::addin
