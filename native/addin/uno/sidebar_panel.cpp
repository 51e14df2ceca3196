// Lintel's Calc sidebar: a deck with one panel that configures a price index report (sales
// table, column roles, segment, frequency, base period, methods, band level, options) and
// builds or updates it with one click. The panel's layout is extension/dialogs/ReportPanel.xdl;
// the report itself is built by buildReport() (report_builder.cpp), the same code the headless
// org.lintel.ReportBuilder job runs. The panel's state is kept in the document.
#include <cppuhelper/implbase1.hxx>
#include <cppuhelper/implbase2.hxx>
#include <cppuhelper/implbase7.hxx>
#include <cppuhelper/supportsservice.hxx>

#include <com/sun/star/ui/dialogs/ExecutableDialogResults.hpp>
#include <com/sun/star/ui/dialogs/FilePicker.hpp>
#include <com/sun/star/ui/dialogs/TemplateDescription.hpp>
#include <com/sun/star/ui/dialogs/XFilePicker3.hpp>
#include <com/sun/star/accessibility/XAccessible.hpp>
#include <com/sun/star/awt/ContainerWindowProvider.hpp>
#include <com/sun/star/awt/PosSize.hpp>
#include <com/sun/star/awt/XActionListener.hpp>
#include <com/sun/star/awt/XButton.hpp>
#include <com/sun/star/awt/XCheckBox.hpp>
#include <com/sun/star/awt/XComboBox.hpp>
#include <com/sun/star/awt/XControl.hpp>
#include <com/sun/star/awt/XControlContainer.hpp>
#include <com/sun/star/awt/XFixedText.hpp>
#include <com/sun/star/awt/XItemListener.hpp>
#include <com/sun/star/awt/XListBox.hpp>
#include <com/sun/star/awt/XTextComponent.hpp>
#include <com/sun/star/awt/XWindow.hpp>
#include <com/sun/star/awt/XWindowListener.hpp>
#include <com/sun/star/awt/XWindowPeer.hpp>
#include <com/sun/star/beans/PropertyValue.hpp>
#include <com/sun/star/container/XIndexAccess.hpp>
#include <com/sun/star/container/XNamed.hpp>
#include <com/sun/star/deployment/PackageInformationProvider.hpp>
#include <com/sun/star/frame/XController.hpp>
#include <com/sun/star/frame/XFrame.hpp>
#include <com/sun/star/frame/XModel.hpp>
#include <com/sun/star/lang/XComponent.hpp>
#include <com/sun/star/lang/XServiceInfo.hpp>
#include <com/sun/star/sheet/ActivationEvent.hpp>
#include <com/sun/star/sheet/XActivationBroadcaster.hpp>
#include <com/sun/star/sheet/XActivationEventListener.hpp>
#include <com/sun/star/sheet/XArrayFormulaRange.hpp>
#include <com/sun/star/sheet/XCellRangeAddressable.hpp>
#include <com/sun/star/beans/XPropertySet.hpp>
#include <com/sun/star/sheet/XSheetCellCursor.hpp>
#include <com/sun/star/sheet/XSheetCellRange.hpp>
#include <com/sun/star/sheet/XSpreadsheet.hpp>
#include <com/sun/star/sheet/XSpreadsheetDocument.hpp>
#include <com/sun/star/sheet/XSpreadsheetView.hpp>
#include <com/sun/star/system/SystemShellExecute.hpp>
#include <com/sun/star/system/SystemShellExecuteFlags.hpp>
#include <com/sun/star/ui/LayoutSize.hpp>
#include <com/sun/star/ui/UIElementType.hpp>
#include <com/sun/star/ui/XSidebarPanel.hpp>
#include <com/sun/star/ui/XToolPanel.hpp>
#include <com/sun/star/ui/XUIElement.hpp>
#include <com/sun/star/ui/XUIElementFactory.hpp>
#include <com/sun/star/uno/XComponentContext.hpp>

#include <algorithm>

#include <rtl/ref.hxx>
#include <map>
#include <set>

#include <fmt/format.h>

#include "diagnostics.hpp"
#include "inputs.hpp"
#include "periods.hpp"
#include "report_builder.hpp"
#include "report_settings.hpp"
#include "text.hpp"
#include "uno_cells.hpp"

namespace css = com::sun::star;
using css::uno::Any;
using css::uno::Reference;
using css::uno::Sequence;
using css::uno::UNO_QUERY;
using css::uno::UNO_QUERY_THROW;

namespace lintel::addin {

namespace {

const char* kPanelStateKey = "Lintel panel";
const char* kNone = "(none)";
const char* kExtensionId = "org.lintel.calc";

Sequence<OUString> toSequence(const std::vector<std::string>& v) {
    Sequence<OUString> s(static_cast<sal_Int32>(v.size()));
    for (std::size_t i = 0; i < v.size(); ++i) s.getArray()[i] = ustr(v[i]);
    return s;
}

class ReportPanel
    : public cppu::WeakImplHelper7<css::ui::XToolPanel, css::ui::XSidebarPanel, css::lang::XComponent,
                                   css::awt::XActionListener, css::awt::XItemListener, css::awt::XWindowListener,
                                   css::sheet::XActivationEventListener> {
public:
    ReportPanel(const Reference<css::uno::XComponentContext>& ctx, const Reference<css::frame::XFrame>& frame,
                const Reference<css::awt::XWindow>& parent)
        : ctx_(ctx), frame_(frame), parent_(parent) {}

    // Creates the window and registers the panel as a listener. Called once the panel is held
    // by a Reference: registering `this` from the constructor would let a listener container
    // acquire and release it while its reference count is still 0, destroying it.
    void initialise() {
        const OUString location =
            css::deployment::PackageInformationProvider::get(ctx_)->getPackageLocation(OUString::createFromAscii(kExtensionId));
        extensionUrl_ = utf8(location);
        Reference<css::awt::XContainerWindowProvider> provider = css::awt::ContainerWindowProvider::create(ctx_);
        window_ = provider->createContainerWindow(location + "/dialogs/ReportPanel.xdl", OUString(),
                                                  Reference<css::awt::XWindowPeer>(parent_, UNO_QUERY), nullptr);
        controls_.set(window_, UNO_QUERY_THROW);
        for (const char* b : {"btnSelection", "btnBuild", "btnUpdate", "btnGuide", "btnFormat", "btnPdf", "btnValues"}) {
            Reference<css::awt::XButton> button(control(b), UNO_QUERY_THROW);
            button->setActionCommand(OUString::createFromAscii(b));
            button->addActionListener(this);
        }
        for (const char* l : {"lstSegCol", "lstSegVal", "lstOptMethod", "lstFreq"})
            list(l)->addItemListener(this);
        parent_->addWindowListener(this);
        activation_.set(frame_->getController(), UNO_QUERY);
        if (activation_.is()) activation_->addActivationEventListener(this);
        naturalWidth_ = window_->getPosSize().Width;  // the layout's width in pixels
        const css::awt::Rectangle r = parent_->getPosSize();
        window_->setPosSize(0, 0, r.Width, window_->getPosSize().Height, css::awt::PosSize::POSSIZE);
        window_->setVisible(true);
        try {
            if (!showActiveReport()) loadState();
        } catch (const std::exception& e) {
            status(std::string("Lintel: ") + e.what());
        } catch (const css::uno::Exception& e) {
            status("Lintel: " + utf8(e.Message));
        }
    }

    // XToolPanel
    Reference<css::awt::XWindow> SAL_CALL getWindow() override { return window_; }
    Reference<css::accessibility::XAccessible> SAL_CALL createAccessible(
        const Reference<css::accessibility::XAccessible>&) override {
        return Reference<css::accessibility::XAccessible>(window_, UNO_QUERY);
    }

    // XSidebarPanel
    css::ui::LayoutSize SAL_CALL getHeightForWidth(sal_Int32) override {
        const sal_Int32 h = window_.is() ? window_->getPosSize().Height : 400;
        return css::ui::LayoutSize(h, h, h);
    }
    sal_Int32 SAL_CALL getMinimalWidth() override { return std::max<sal_Int32>(naturalWidth_, 200); }

    // XComponent
    void SAL_CALL dispose() override {
        if (parent_.is()) parent_->removeWindowListener(this);
        try {
            if (activation_.is()) activation_->removeActivationEventListener(this);
        } catch (...) {
        }
        activation_.clear();
        Reference<css::lang::XComponent> c(window_, UNO_QUERY);
        if (c.is()) c->dispose();
        window_.clear();
        controls_.clear();
    }
    void SAL_CALL addEventListener(const Reference<css::lang::XEventListener>&) override {}
    void SAL_CALL removeEventListener(const Reference<css::lang::XEventListener>&) override {}

    // XEventListener
    void SAL_CALL disposing(const css::lang::EventObject&) override {}

    // XWindowListener: follow the sidebar's width.
    void SAL_CALL windowResized(const css::awt::WindowEvent& e) override {
        if (window_.is())
            window_->setPosSize(0, 0, std::max(e.Width, naturalWidth_), 0, css::awt::PosSize::WIDTH);
    }
    void SAL_CALL windowMoved(const css::awt::WindowEvent&) override {}
    void SAL_CALL windowShown(const css::lang::EventObject&) override {}
    void SAL_CALL windowHidden(const css::lang::EventObject&) override {}

    // XActivationEventListener: another sheet became active; a report sheet shows its settings.
    void SAL_CALL activeSpreadsheetChanged(const css::sheet::ActivationEvent&) override {
        guarded([&] { showActiveReport(); });
    }

    // XActionListener: the buttons.
    void SAL_CALL actionPerformed(const css::awt::ActionEvent& e) override {
        guarded([&] {
            const std::string cmd = utf8(e.ActionCommand);
            if (cmd == "btnSelection") useSelection();
            else if (cmd == "btnBuild") build(false);
            else if (cmd == "btnUpdate") build(true);
            else if (cmd == "btnGuide") openGuide();
            else if (cmd == "btnFormat") formatTable();
            else if (cmd == "btnPdf") exportPdf();
            else if (cmd == "btnValues") copyValues();
        });
    }

    // XItemListener: the lists whose choice changes other controls.
    void SAL_CALL itemStateChanged(const css::awt::ItemEvent& e) override {
        if (filling_) return;  // our own programmatic selections
        guarded([&] {
            Reference<css::uno::XInterface> src(e.Source, UNO_QUERY);
            if (src == Reference<css::uno::XInterface>(list("lstSegCol"), UNO_QUERY)) {
                saveSegmentValues();
                fillSegmentValues();
            } else if (src == Reference<css::uno::XInterface>(list("lstSegVal"), UNO_QUERY)) {
                saveSegmentValues();
            } else if (src == Reference<css::uno::XInterface>(list("lstOptMethod"), UNO_QUERY)) {
                settings_.advanced[methodKey(optionsMethod_)] = text("edtOptions");
                optionsMethod_ = report::allMethods()[std::max<sal_Int16>(0, list("lstOptMethod")->getSelectedItemPos())];
                setText("edtOptions", settings_.advanced[methodKey(optionsMethod_)]);
            } else if (src == Reference<css::uno::XInterface>(list("lstFreq"), UNO_QUERY)) {
                settings_.freq = std::string(1, "MQY"[std::max<sal_Int16>(0, list("lstFreq")->getSelectedItemPos())]);
                fillBasePeriods();
            }
        });
    }

private:
    template <class F>
    void guarded(F f) {
        try {
            f();
        } catch (const InputError& e) {
            status(std::string("Lintel: ") + e.what());
        } catch (const css::uno::Exception& e) {
            status("Lintel: " + utf8(e.Message));
        } catch (const std::exception& e) {
            status(std::string("Lintel: internal fault (a bug in Lintel; please report it): ") + e.what());
        } catch (...) {
            status("Lintel: internal fault (a bug in Lintel; please report it)");
        }
    }

    Reference<css::awt::XControl> control(const char* name) const {
        Reference<css::awt::XControl> c = controls_->getControl(OUString::createFromAscii(name));
        if (!c.is()) throw std::logic_error(fmt::format("the panel has no control {}", name));
        return c;
    }
    Reference<css::awt::XListBox> list(const char* name) const { return {control(name), UNO_QUERY_THROW}; }
    std::string text(const char* name) const {
        return utf8(Reference<css::awt::XTextComponent>(control(name), UNO_QUERY_THROW)->getText());
    }
    void setText(const char* name, const std::string& t) {
        Reference<css::awt::XTextComponent>(control(name), UNO_QUERY_THROW)->setText(ustr(t));
    }
    void label(const char* name, const std::string& t) {
        Reference<css::awt::XFixedText>(control(name), UNO_QUERY_THROW)->setText(ustr(t));
    }
    void status(const std::string& t) {
        try {
            label("txtStatus", t);
        } catch (...) {
        }
    }
    void checkbox(const char* name, bool on) {
        Reference<css::awt::XCheckBox>(control(name), UNO_QUERY_THROW)->setState(on ? 1 : 0);
    }
    bool checked(const char* name) const {
        return Reference<css::awt::XCheckBox>(control(name), UNO_QUERY_THROW)->getState() == 1;
    }

    Reference<css::sheet::XSpreadsheetDocument> document() const {
        Reference<css::frame::XController> c = frame_->getController();
        Reference<css::sheet::XSpreadsheetDocument> doc(c.is() ? c->getModel() : nullptr, UNO_QUERY);
        if (!doc.is()) throw InputError("this window holds no spreadsheet");
        return doc;
    }

    void fill(const char* name, const std::vector<std::string>& items) {
        Reference<css::awt::XListBox> l = list(name);
        l->removeItems(0, l->getItemCount());
        l->addItems(toSequence(items), 0);
    }
    void select(const char* name, const std::vector<std::string>& items, const std::vector<std::string>& chosen) {
        Reference<css::awt::XListBox> l = list(name);
        for (std::size_t i = 0; i < items.size(); ++i)
            if (std::find(chosen.begin(), chosen.end(), items[i]) != chosen.end())
                l->selectItemPos(static_cast<sal_Int16>(i), true);
    }
    std::vector<std::string> selected(const char* name, const std::vector<std::string>& items) const {
        std::vector<std::string> out;
        for (sal_Int16 p : list(name)->getSelectedItemsPos())
            if (p >= 0 && static_cast<std::size_t>(p) < items.size() && items[p] != kNone) out.push_back(items[p]);
        return out;
    }
    std::string selectedOne(const char* name, const std::vector<std::string>& items) const {
        const auto v = selected(name, items);
        return v.empty() ? std::string() : v.front();
    }

    std::vector<std::string> withNone() const {
        std::vector<std::string> v = {kNone};
        v.insert(v.end(), headers_.begin(), headers_.end());
        return v;
    }

    std::string guess(const std::vector<std::string>& words) const {
        for (const auto& w : words)
            for (const auto& h : headers_)
                if (lower(h).find(w) != std::string::npos) return h;
        return {};
    }

    // When the active sheet is a Lintel report, the panel shows its settings (Update report
    // then applies the panel's edits to it). Returns whether it did.
    bool showActiveReport() {
        Reference<css::sheet::XSpreadsheetView> view(frame_->getController(), UNO_QUERY);
        if (!view.is() || !view->getActiveSheet().is()) return false;
        const std::string sheet = utf8(Reference<css::container::XNamed>(view->getActiveSheet(), UNO_QUERY_THROW)->getName());
        const auto s = reportSettingsOnSheet(document(), sheet);
        if (!s) {
            reportSheet_.clear();
            return false;
        }
        settings_ = *s;
        reportSheet_ = sheet;
        if (!settings_.dataRange.empty()) readData(settings_.dataRange, false);
        status(fmt::format("Report \"{}\": its settings are shown; edit them and press Update report.", sheet));
        return true;
    }

    void loadState() {
        const std::string stored = loadDocumentText(document(), kPanelStateKey);
        if (stored.empty()) return;
        settings_ = report::ReportSettings::parse(stored);
        if (!settings_.dataRange.empty()) readData(settings_.dataRange, false);
        status(fmt::format("Settings restored from the document ({}).", settings_.dataRange));
    }

    void useSelection() {
        Reference<css::sheet::XSpreadsheetDocument> doc = document();
        Reference<css::frame::XModel> model(doc, UNO_QUERY_THROW);
        Reference<css::sheet::XCellRangeAddressable> sel(model->getCurrentSelection(), UNO_QUERY);
        if (!sel.is()) throw InputError("select the sales table (or one cell in it) first");
        css::table::CellRangeAddress a = sel->getRangeAddress();
        Reference<css::container::XIndexAccess> sheets(doc->getSheets(), UNO_QUERY_THROW);
        Reference<css::sheet::XSpreadsheet> sheet(sheets->getByIndex(a.Sheet), UNO_QUERY_THROW);
        if (a.StartRow == a.EndRow && a.StartColumn == a.EndColumn) {
            Reference<css::sheet::XSheetCellCursor> cursor = sheet->createCursorByRange(
                Reference<css::sheet::XSheetCellRange>(sheet->getCellRangeByPosition(a.StartColumn, a.StartRow, a.StartColumn, a.StartRow), UNO_QUERY_THROW));
            cursor->collapseToCurrentRegion();
            a = Reference<css::sheet::XCellRangeAddressable>(cursor, UNO_QUERY_THROW)->getRangeAddress();
        }
        const std::string sheetName = utf8(Reference<css::container::XNamed>(sheet, UNO_QUERY_THROW)->getName());
        const std::string range = fmt::format("{}.{}{}:{}{}", sheetName, report::columnName(a.StartColumn), a.StartRow + 1,
                                              report::columnName(a.EndColumn), a.EndRow + 1);
        report::ReportSettings fresh;
        fresh.methods = settings_.methods;
        fresh.freq = settings_.freq;
        fresh.level = settings_.level;
        settings_ = fresh;
        readData(range, true);
    }

    void readData(const std::string& range, bool guessRoles) {
        std::string used;
        data_ = readSalesTable(document(), range, false, used);
        settings_.dataRange = used;
        headers_.clear();
        for (std::size_t c = 0; c < data_.cells.cols; ++c) {
            std::string h = cellKey(data_.cells.at(0, c));
            headers_.push_back(h.empty() ? fmt::format("column {}", report::columnName(data_.firstCol + static_cast<int>(c))) : h);
        }
        if (guessRoles) {
            settings_.dateColumn = guess({"date", "sold", "closed"});
            settings_.priceColumn = guess({"price", "amount", "value"});
            settings_.idColumn = guess({"property", "parcel", "id"});
            settings_.changedColumn = guess({"renov", "changed", "rebuilt"});
        }
        label("txtData", fmt::format("{}\n{} rows, {} columns", used, data_.cells.rows - 1, data_.cells.cols));
        fillControls();
        if (guessRoles) status("Check the column roles, choose a segment and methods, then Build report.");
    }

    void fillControls() {
        struct Filling {
            bool& flag;
            explicit Filling(bool& f) : flag(f) { flag = true; }
            ~Filling() { flag = false; }
        } filling(filling_);
        fill("lstDate", headers_);
        select("lstDate", headers_, {settings_.dateColumn});
        fill("lstPrice", headers_);
        select("lstPrice", headers_, {settings_.priceColumn});
        const auto none = withNone();
        fill("lstId", none);
        select("lstId", none, {settings_.idColumn.empty() ? kNone : settings_.idColumn});
        fill("lstChanged", none);
        select("lstChanged", none, {settings_.changedColumn.empty() ? kNone : settings_.changedColumn});
        fill("lstChars", headers_);
        select("lstChars", headers_, settings_.characteristics);
        fill("lstStrata", headers_);
        select("lstStrata", headers_, settings_.strata);
        fill("lstSegBy", headers_);
        select("lstSegBy", headers_, settings_.segmentColumns);
        fill("lstSegCol", none);
        segmentColumn_ = settings_.segment.empty() ? std::string() : settings_.segment.front().column;
        select("lstSegCol", none, {segmentColumn_.empty() ? kNone : segmentColumn_});
        fillSegmentValues();
        const std::string freqs = "MQY";
        list("lstFreq")->selectItemPos(static_cast<sal_Int16>(std::max<std::size_t>(0, freqs.find(settings_.freq[0]))), true);
        fillBasePeriods();
        for (report::Method m : report::allMethods())
            checkbox(methodControl(m), settings_.has(m));
        setText("edtLevel", fmt::format("{}", settings_.level));
        setText("edtOptions", settings_.advanced[methodKey(optionsMethod_)]);
    }

    static const char* methodControl(report::Method m) {
        switch (m) {
            case report::Method::Median: return "chkMedian";
            case report::Method::Mean: return "chkMean";
            case report::Method::Mix: return "chkMix";
            case report::Method::Hedonic: return "chkHedonic";
            case report::Method::RepeatSales: return "chkRepeat";
            case report::Method::ReferenceHome: return "chkRefhome";
        }
        return "";
    }

    int headerIndex(const std::string& name) const {
        auto it = std::find(headers_.begin(), headers_.end(), name);
        return it == headers_.end() ? -1 : static_cast<int>(it - headers_.begin());
    }

    void fillSegmentValues() {
        segmentColumn_ = selectedOne("lstSegCol", withNone());
        segmentValues_.clear();
        const int c = headerIndex(segmentColumn_);
        if (c >= 0) {
            std::set<std::string> distinct;
            for (std::size_t r = 1; r < data_.cells.rows && distinct.size() < 500; ++r) {
                const std::string v = cellKey(data_.cells.at(r, static_cast<std::size_t>(c)));
                if (!v.empty()) distinct.insert(v);
            }
            segmentValues_.assign(distinct.begin(), distinct.end());
        }
        fill("lstSegVal", segmentValues_);
        for (const auto& f : settings_.segment)
            if (f.column == segmentColumn_) select("lstSegVal", segmentValues_, f.values);
    }

    // The values chosen for the current segment column go into the settings.
    void saveSegmentValues() {
        if (segmentColumn_.empty()) return;
        const auto chosen = selected("lstSegVal", segmentValues_);
        auto& seg = settings_.segment;
        seg.erase(std::remove_if(seg.begin(), seg.end(), [&](const report::SegmentFilter& f) { return f.column == segmentColumn_; }),
                  seg.end());
        if (!chosen.empty()) seg.push_back({segmentColumn_, chosen});
    }

    void fillBasePeriods() {
        const auto f = parseFrequency(settings_.freq).value_or(Frequency::Month);
        const int dc = headerIndex(settings_.dateColumn);
        std::set<long> keys;
        CallContext ctx;
        ctx.dateOffset = data_.dateOffset;
        if (dc >= 0)
            for (std::size_t r = 1; r < data_.cells.rows; ++r) {
                const double d = cellDate(data_.cells.at(r, static_cast<std::size_t>(dc)), ctx);
                if (isUsableSerial(d)) keys.insert(periodKey(d, f));
            }
        std::vector<std::string> items;
        for (long k : keys) {
            items.push_back(isoDate(periodStartOfKey(k, f)));
        }
        Reference<css::awt::XComboBox> box(control("cmbBase"), UNO_QUERY_THROW);
        box->removeItems(0, box->getItemCount());
        box->addItems(toSequence(items), 0);
        setText("cmbBase", settings_.baseDate);
    }

    void collect() {
        if (settings_.dataRange.empty()) throw InputError("choose the sales table first (Use selection)");
        settings_.dateColumn = selectedOne("lstDate", headers_);
        settings_.priceColumn = selectedOne("lstPrice", headers_);
        settings_.idColumn = selectedOne("lstId", withNone());
        settings_.changedColumn = selectedOne("lstChanged", withNone());
        settings_.characteristics = selected("lstChars", headers_);
        settings_.strata = selected("lstStrata", headers_);
        settings_.segmentColumns = selected("lstSegBy", headers_);
        saveSegmentValues();
        settings_.freq = std::string(1, "MQY"[std::max<sal_Int16>(0, list("lstFreq")->getSelectedItemPos())]);
        settings_.baseDate = text("cmbBase");
        const std::string level = text("edtLevel");
        char* end = nullptr;
        const double lv = std::strtod(level.c_str(), &end);
        if (level.empty() || *end || !(lv > 0 && lv < 1))
            throw InputError(fmt::format("band level must lie between 0 and 1, got \"{}\"", level));
        settings_.level = lv;
        settings_.methods.clear();
        for (report::Method m : report::allMethods())
            if (checked(methodControl(m))) settings_.methods.push_back(m);
        settings_.advanced[methodKey(optionsMethod_)] = text("edtOptions");
    }

    void build(bool update) {
        Reference<css::sheet::XSpreadsheetDocument> doc = document();
        std::string result;
        if (update) {
            Reference<css::sheet::XSpreadsheetView> view(frame_->getController(), UNO_QUERY_THROW);
            const std::string sheet = utf8(Reference<css::container::XNamed>(view->getActiveSheet(), UNO_QUERY_THROW)->getName());
            // The panel shows this report's settings (possibly edited): they are applied.
            std::string text;
            if (sheet == reportSheet_ && !settings_.dataRange.empty()) {
                collect();
                settings_.sheetName = sheet;
                text = settings_.serialize();
            }
            result = buildReport(doc, text, true, sheet);
        } else {
            collect();
            settings_.sheetName.clear();  // a new report is named after its segment
            settings_.reportId.clear();
            const std::string text = settings_.serialize();
            result = buildReport(doc, text, false, {});
            storeDocumentText(doc, kPanelStateKey, text);
        }
        status(result);
    }

    // Number formats for a hand-typed Lintel table at the cursor (Calc shows the whole array in
    // the date format of its first input): the formats come from the function table.
    void formatTable() {
        Reference<css::sheet::XSpreadsheetDocument> doc = document();
        Reference<css::frame::XModel> model(doc, UNO_QUERY_THROW);
        Reference<css::sheet::XCellRangeAddressable> sel(model->getCurrentSelection(), UNO_QUERY);
        if (!sel.is()) throw InputError("click a cell of a Lintel table first");
        const css::table::CellRangeAddress a = sel->getRangeAddress();
        Reference<css::container::XIndexAccess> sheets(doc->getSheets(), UNO_QUERY_THROW);
        Reference<css::sheet::XSpreadsheet> sheet(sheets->getByIndex(a.Sheet), UNO_QUERY_THROW);
        Reference<css::sheet::XSheetCellCursor> cursor = sheet->createCursorByRange(Reference<css::sheet::XSheetCellRange>(
            sheet->getCellRangeByPosition(a.StartColumn, a.StartRow, a.StartColumn, a.StartRow), UNO_QUERY_THROW));
        std::string formula;
        try {
            cursor->collapseToCurrentArray();
            formula = utf8(Reference<css::sheet::XArrayFormulaRange>(cursor, UNO_QUERY_THROW)->getArrayFormula());
        } catch (const css::uno::RuntimeException&) {
        }
        if (formula.empty()) throw InputError("the cell is not in an array formula: click a cell of a Lintel table");
        std::size_t b = formula.find_first_not_of("{=");
        std::size_t e = formula.find('(', b);
        std::string name = formula.substr(b, e == std::string::npos ? std::string::npos : e - b);
        for (char& ch : name) ch = static_cast<char>(std::toupper(static_cast<unsigned char>(ch)));
        const FunctionSpec* f = findFunctionByName(name);
        if (!f || f->columns.empty()) throw InputError(fmt::format("{} is not a Lintel table", name));
        const css::table::CellRangeAddress r = Reference<css::sheet::XCellRangeAddressable>(cursor, UNO_QUERY_THROW)->getRangeAddress();
        const int cols = std::min<int>(r.EndColumn - r.StartColumn + 1, static_cast<int>(f->columns.size()));
        for (int c = 0; c < cols; ++c) {
            if (f->columns[c].format.empty()) continue;
            Reference<css::beans::XPropertySet> col(
                sheet->getCellRangeByPosition(r.StartColumn + c, r.StartRow, r.StartColumn + c, r.EndRow), UNO_QUERY_THROW);
            col->setPropertyValue("NumberFormat", Any(numberFormatKey(doc, f->columns[c].format)));
        }
        status(fmt::format("Formatted the {} table ({} rows).", name, r.EndRow - r.StartRow + 1));
    }

    // The active sheet, which must be a Lintel report.
    std::string activeReport() {
        Reference<css::sheet::XSpreadsheetView> view(frame_->getController(), UNO_QUERY_THROW);
        const std::string sheet = utf8(Reference<css::container::XNamed>(view->getActiveSheet(), UNO_QUERY_THROW)->getName());
        if (!reportSettingsOnSheet(document(), sheet))
            throw InputError("open a report sheet first (the active sheet is no Lintel report)");
        return sheet;
    }

    void exportPdf() {
        const std::string sheet = activeReport();
        Reference<css::ui::dialogs::XFilePicker3> picker = css::ui::dialogs::FilePicker::createWithMode(
            ctx_, css::ui::dialogs::TemplateDescription::FILESAVE_AUTOEXTENSION);
        picker->appendFilter("PDF", "*.pdf");
        picker->setDefaultName(ustr(sheet + ".pdf"));
        if (picker->execute() != css::ui::dialogs::ExecutableDialogResults::OK) return;
        const Sequence<OUString> files = picker->getSelectedFiles();
        if (!files.hasElements()) return;
        exportReportPdf(ctx_, document(), sheet, utf8(files[0]));
        status(fmt::format("{}: client pages written to {}", sheet, utf8(files[0])));
    }

    void copyValues() {
        const std::string sheet = activeReport();
        valuesCopy(ctx_, document(), sheet, false);
        status(fmt::format("{}: copied as values into a new document; save it and send it (it needs no Lintel).", sheet));
    }

    void openGuide() {
        Reference<css::system::XSystemShellExecute> shell = css::system::SystemShellExecute::create(ctx_);
        shell->execute(ustr(extensionUrl_ + "/help/guide.html"), OUString(), css::system::SystemShellExecuteFlags::URIS_ONLY);
    }

    Reference<css::uno::XComponentContext> ctx_;
    Reference<css::frame::XFrame> frame_;
    Reference<css::awt::XWindow> parent_;
    Reference<css::awt::XWindow> window_;
    Reference<css::awt::XControlContainer> controls_;
    std::string extensionUrl_;
    report::ReportSettings settings_;
    report::SheetData data_;
    std::vector<std::string> headers_;
    std::string segmentColumn_;
    std::string reportSheet_;  // the report sheet whose settings the panel shows, or ""
    Reference<css::sheet::XActivationBroadcaster> activation_;
    std::vector<std::string> segmentValues_;
    report::Method optionsMethod_ = report::Method::Median;
    bool filling_ = false;
    sal_Int32 naturalWidth_ = 0;
};

class PanelElement : public cppu::WeakImplHelper1<css::ui::XUIElement> {
public:
    PanelElement(OUString url, Reference<css::frame::XFrame> frame, Reference<css::ui::XToolPanel> panel)
        : url_(std::move(url)), frame_(std::move(frame)), panel_(std::move(panel)) {}
    Reference<css::frame::XFrame> SAL_CALL getFrame() override { return frame_; }
    OUString SAL_CALL getResourceURL() override { return url_; }
    sal_Int16 SAL_CALL getType() override { return css::ui::UIElementType::TOOLPANEL; }
    Reference<css::uno::XInterface> SAL_CALL getRealInterface() override { return panel_; }

private:
    OUString url_;
    Reference<css::frame::XFrame> frame_;
    Reference<css::ui::XToolPanel> panel_;
};

class PanelFactory : public cppu::WeakImplHelper2<css::ui::XUIElementFactory, css::lang::XServiceInfo> {
public:
    explicit PanelFactory(Reference<css::uno::XComponentContext> ctx) : ctx_(std::move(ctx)) {}

    Reference<css::ui::XUIElement> SAL_CALL createUIElement(const OUString& url,
                                                           const Sequence<css::beans::PropertyValue>& args) override {
        Reference<css::frame::XFrame> frame;
        Reference<css::awt::XWindow> parent;
        for (const auto& a : args) {
            if (a.Name == "Frame") a.Value >>= frame;
            else if (a.Name == "ParentWindow") a.Value >>= parent;
        }
        if (!url.endsWith("/ReportPanel") || !frame.is() || !parent.is())
            throw css::lang::IllegalArgumentException("Lintel: unknown panel or missing frame", nullptr, 0);
        rtl::Reference<ReportPanel> panel(new ReportPanel(ctx_, frame, parent));
        panel->initialise();
        return new PanelElement(url, frame, Reference<css::ui::XToolPanel>(panel.get()));
    }

    OUString SAL_CALL getImplementationName() override { return "org.lintel.PanelFactory"; }
    sal_Bool SAL_CALL supportsService(const OUString& name) override { return cppu::supportsService(this, name); }
    Sequence<OUString> SAL_CALL getSupportedServiceNames() override {
        Sequence<OUString> s(1);
        s.getArray()[0] = "org.lintel.PanelFactory";
        return s;
    }

private:
    Reference<css::uno::XComponentContext> ctx_;
};

}  // namespace

}  // namespace lintel::addin

extern "C" SAL_DLLPUBLIC_EXPORT css::uno::XInterface* org_lintel_PanelFactory_get_implementation(
    css::uno::XComponentContext* ctx, css::uno::Sequence<css::uno::Any> const&) {
    return cppu::acquire(new lintel::addin::PanelFactory(ctx));
}
