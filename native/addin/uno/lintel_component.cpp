// The UNO add-in component: the only file that knows UNO besides uno_cells.cpp. It answers
// Calc's XAddIn questions from the function table and forwards every spreadsheet function to
// dispatch(), which converts the arguments, runs the function and converts the result.
// No exception leaves a UNO entry point: failures become a "Lintel: ..." text cell.
#include <cppuhelper/implbase4.hxx>
#include <cppuhelper/supportsservice.hxx>
#include <rtl/ustring.hxx>
#include <sal/types.h>

#include <com/sun/star/beans/XPropertySet.hpp>
#include <com/sun/star/lang/Locale.hpp>
#include <com/sun/star/lang/XServiceInfo.hpp>
#include <com/sun/star/lang/XServiceName.hpp>
#include <com/sun/star/sheet/XAddIn.hpp>
#include <com/sun/star/uno/XComponentContext.hpp>
#include <org/lintel/XLintel.hpp>

#include "diagnostics.hpp"
#include "function_table.hpp"
#include "locale_facts.hpp"
#include "uno_cells.hpp"

namespace css = com::sun::star;
using namespace lintel::addin;

namespace {

constexpr const char* kImplementationName = "org.lintel.LintelFunctions";
constexpr const char* kServiceName = "org.lintel.LintelFunctions";

class LintelAddIn
    : public cppu::WeakImplHelper4<org::lintel::XLintel, css::sheet::XAddIn,
                                   css::lang::XServiceName, css::lang::XServiceInfo> {
public:
    LintelAddIn() = default;

    // org::lintel::XLintel: one forwarding method per table entry.
#include "lintel_methods.inc"

    // XAddIn
    OUString SAL_CALL getProgrammaticFuntionName(const OUString& displayName) override {
        const FunctionSpec* f = findFunctionByName(utf8(displayName));
        return f ? ustr(f->method) : OUString();
    }
    OUString SAL_CALL getDisplayFunctionName(const OUString& programmatic) override {
        const FunctionSpec* f = findFunctionByMethod(utf8(programmatic));
        return f ? ustr(f->name) : OUString();
    }
    OUString SAL_CALL getFunctionDescription(const OUString& programmatic) override {
        const FunctionSpec* f = findFunctionByMethod(utf8(programmatic));
        return f ? ustr(f->description) : OUString();
    }
    OUString SAL_CALL getDisplayArgumentName(const OUString& programmatic, sal_Int32 arg) override {
        const ArgSpec* a = argument(programmatic, arg);
        return a ? ustr(a->name) : OUString();
    }
    OUString SAL_CALL getArgumentDescription(const OUString& programmatic, sal_Int32 arg) override {
        const ArgSpec* a = argument(programmatic, arg);
        return a ? ustr(a->description) : OUString();
    }
    OUString SAL_CALL getProgrammaticCategoryName(const OUString&) override {
        return OUString::createFromAscii(kCategory);
    }
    OUString SAL_CALL getDisplayCategoryName(const OUString&) override {
        return OUString::createFromAscii(kCategoryDisplay);
    }

    // XLocalizable (texts are English only for now)
    void SAL_CALL setLocale(const css::lang::Locale& locale) override { locale_ = locale; }
    css::lang::Locale SAL_CALL getLocale() override { return locale_; }

    // XServiceName
    OUString SAL_CALL getServiceName() override { return OUString::createFromAscii(kServiceName); }

    // XServiceInfo
    OUString SAL_CALL getImplementationName() override {
        return OUString::createFromAscii(kImplementationName);
    }
    sal_Bool SAL_CALL supportsService(const OUString& name) override {
        return cppu::supportsService(this, name);
    }
    css::uno::Sequence<OUString> SAL_CALL getSupportedServiceNames() override {
        css::uno::Sequence<OUString> s(2);
        s.getArray()[0] = OUString::createFromAscii(kServiceName);
        s.getArray()[1] = "com.sun.star.sheet.AddIn";
        return s;
    }

private:
    // Calc counts the hidden document-properties parameter as argument 0.
    static const ArgSpec* argument(const OUString& programmatic, sal_Int32 arg) {
        const FunctionSpec* f = findFunctionByMethod(utf8(programmatic));
        if (!f || arg < 1 || static_cast<std::size_t>(arg) > f->args.size()) return nullptr;
        return &f->args[static_cast<std::size_t>(arg - 1)];
    }

    static CallContext context(const css::uno::Reference<css::beans::XPropertySet>& props) {
        return documentContext(props);  // never throws
    }

    // Reading the arguments, running the function and writing the result each fail in their
    // own words: an error cell in a cells argument is named, out of memory is said as such
    // (never "dates is required"), anything else is an internal fault, never dressed as an
    // input error.
    template <class ReadArgs>
    static css::uno::Any dispatch(const char* method,
                                  const css::uno::Reference<css::beans::XPropertySet>& props,
                                  ReadArgs readArgs) noexcept {
        const FunctionSpec* f = findFunctionByMethod(method);
        if (!f) return failureAny("internal fault: unknown function (a bug in Lintel; please report it)");
        std::vector<Arg> args;
        try {
            args = readArguments(*f, readArgs());
        } catch (const lintel::InputError& e) {
            return failureAny(std::string(e.what()));
        } catch (const std::bad_alloc&) {
            return failureAny("out of memory while reading the ranges: use smaller ranges");
        } catch (...) {
            return failureAny("internal fault while reading the arguments (a bug in Lintel; please report it)");
        }
        OutTable result = callFunction(*f, args, context(props));  // never throws
        try {
            return toAny(std::move(result));
        } catch (const std::bad_alloc&) {
            return failureAny("out of memory while writing the result: select a smaller range");
        } catch (...) {
            return failureAny("internal fault while writing the result (a bug in Lintel; please report it)");
        }
    }

    css::lang::Locale locale_;
};

}  // namespace

extern "C" SAL_DLLPUBLIC_EXPORT css::uno::XInterface* org_lintel_LintelFunctions_get_implementation(
    css::uno::XComponentContext* ctx, css::uno::Sequence<css::uno::Any> const&) {
    rememberOfficeContext(ctx);
    return cppu::acquire(new LintelAddIn());
}
