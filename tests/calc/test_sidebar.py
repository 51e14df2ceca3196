"""The sidebar panel, driven headless: the panel factory registered by the extension creates
the panel for a document's frame (as the sidebar does), the buttons are pressed through their
accessibility actions, as a screen reader would, and the panel's state is kept in the
document and restored when the saved file is opened again.

Test data: the generated workbook of test_report.py (model stated there).
"""
import os
import sys
import time
import unittest

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "scripts"))
sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import uno  # noqa: E402
from lintel_office import SharedOffice, prop  # noqa: E402
from test_report import sales_rows  # noqa: E402

OXT = os.environ.get("LINTEL_OXT")
PANEL_URL = "private:resource/toolpanel/LintelPanelFactory/ReportPanel"
office = SharedOffice(OXT)
setUpModule, tearDownModule = office.start, office.stop


def open_panel(doc):
    frame = doc.CurrentController.Frame
    factory = office.service("org.lintel.PanelFactory")
    element = factory.createUIElement(PANEL_URL, (prop("Frame", frame), prop("ParentWindow", frame.ContainerWindow)))
    return element.getRealInterface()


def press(window, button, timeout=10.0):
    """Clicks a button through its accessibility action; the click is handled by the office's
    event loop, so wait until the status line changes (or the timeout passes)."""
    before = window.getControl("txtStatus").Text
    window.getControl(button).getPeer().getAccessibleContext().doAccessibleAction(0)
    deadline = time.time() + timeout
    while time.time() < deadline:
        time.sleep(0.1)
        if window.getControl("txtStatus").Text != before:
            break


class SidebarTest(unittest.TestCase):
    def setUp(self):
        self.doc = office.new_calc()
        self.sales = self.doc.Sheets.getByIndex(0)
        self.sales.Name = "Sales"
        rows = sales_rows()
        # Some districts typed by hand: the panel and the report take them as the same value.
        west = [k for k in range(1, len(rows)) if rows[k][3] == "West"][:3]
        for k, spelling in zip(west, ["West ", "west", "\u00a0WEST"]):
            rows[k] = rows[k][:3] + (spelling,) + rows[k][4:]
        self.sales.getCellRangeByName(f"A1:E{len(rows)}").setDataArray(rows)

    def tearDown(self):
        self.doc.close(True)

    def test_panel_builds_a_report_and_its_state_survives_reload(self):
        panel = open_panel(self.doc)
        self.assertGreater(panel.getHeightForWidth(300).Preferred, 200)
        self.assertGreaterEqual(panel.getMinimalWidth(), 200)
        win = panel.Window
        self.assertIn("Use selection", win.getControl("btnSelection").Model.Label)
        self.assertIn("not one home", win.getControl("txtCaution").Text)
        self.assertEqual(win.getControl("btnPdf").Model.Label, "Export PDF")
        self.assertEqual(win.getControl("btnValues").Model.Label, "Copy as values")
        # Pick one cell of the table: the panel takes the region around it.
        self.doc.CurrentController.select(self.sales.getCellRangeByName("C7"))
        press(win, "btnSelection")
        self.assertEqual(win.getControl("txtData").Text, "Sales.A1:E901\n900 rows, 5 columns")
        self.assertEqual(win.getControl("lstDate").SelectedItem, "Sold")     # guessed roles
        self.assertEqual(win.getControl("lstPrice").SelectedItem, "Price")
        self.assertEqual(win.getControl("lstId").SelectedItem, "Id")
        self.assertEqual(win.getControl("lstChanged").SelectedItem, "(none)")
        # Segment values are listed from the data, each cleaned value once with its count.
        win.getControl("lstSegCol").selectItem("District", True)
        self.assertEqual(win.getControl("lstSegVal").Items, ("East (445)", "West (455)"))
        win.getControl("lstSegVal").selectItem("West (455)", True)
        win.getControl("lstFreq").selectItem("Quarter", True)
        base = win.getControl("cmbBase")
        self.assertEqual(base.Items[:2], ("2021-01-01", "2021-04-01"))  # period starts of the data
        base.Text = "2022-01-01"
        win.getControl("edtLevel").Text = "0.9"
        win.getControl("chkMean").State = 0
        press(win, "btnBuild")
        status = win.getControl("txtStatus").Text
        # All 455 West sales, the three typed otherwise included.
        self.assertTrue(status.startswith("Report West: 455 sales, 1 segment, 12 periods"), status)
        self.assertIn("12 periods (2021-Q1 .. 2023-Q4)", status)
        rep = self.doc.Sheets.getByName("Report West")
        self.assertEqual(rep.getCellRangeByName("B88").getValue(), 44562.0)  # 2022-01-01
        self.assertEqual(rep.getCellRangeByName("B89").getValue(), 0.9)
        table = self.doc.NamedRanges.getByName("Lintel_r1_all_median").ReferredCells
        self.assertEqual(table.getCellByPosition(1, 4).getValue(), 100.0)   # 2022-Q1 = 100
        self.assertFalse(self.doc.NamedRanges.hasByName("Lintel_r1_all_mean"))  # mean left out
        # Update report on the active report sheet rebuilds it in place.
        press(win, "btnUpdate")
        self.assertTrue(win.getControl("txtStatus").Text.startswith("Report West:"))
        # Save, reopen: a new panel shows the stored state.
        path = os.path.join(office.scratch, "sidebar-test.ods")
        self.doc.storeToURL(uno.systemPathToFileUrl(path), (prop("FilterName", "calc8"),))
        self.doc.close(True)
        self.doc = office.load(path)
        win = open_panel(self.doc).Window
        self.assertEqual(win.getControl("txtData").Text, "Sales.A1:E901\n900 rows, 5 columns")
        self.assertEqual(win.getControl("lstFreq").SelectedItem, "Quarter")
        self.assertEqual(win.getControl("cmbBase").Text, "2022-01-01")
        self.assertEqual(win.getControl("edtLevel").Text, "0.9")
        self.assertEqual(win.getControl("chkMean").State, 0)
        self.assertEqual(win.getControl("chkMedian").State, 1)
        self.assertEqual(win.getControl("lstSegCol").SelectedItem, "District")
        self.assertEqual(win.getControl("lstSegVal").SelectedItems, ("West (455)",))
        self.assertTrue(win.getControl("txtStatus").Text.startswith("Settings restored"))
        # Going to the report sheet shows that report's settings.
        self.doc.CurrentController.setActiveSheet(self.doc.Sheets.getByName("Report West"))
        time.sleep(0.3)
        self.assertEqual(win.getControl("txtStatus").Text,
                         'Report "Report West": its settings are shown; edit them and press Update report.')
        self.assertEqual(win.getControl("lstSegVal").SelectedItems, ("West (455)",))

    def test_panel_follows_the_active_report_and_edits_it(self):
        from com.sun.star.beans import NamedValue
        job = office.service("org.lintel.ReportBuilder")
        base = ("data=Sales.A1:E901\ndate=Sold\nprice=Price\nid=Id\ncharacteristics=Area\n"
                "freq=Q\nlevel=0.9\nmethods=median|hedonic\n")
        for seg in ["East", "West"]:
            job.execute((NamedValue("Document", self.doc),
                         NamedValue("Settings", base + f"segment.District={seg}\n")))
        win = open_panel(self.doc).Window
        view = self.doc.CurrentController
        for seg in ["East", "West"]:
            view.setActiveSheet(self.doc.Sheets.getByName(f"Report {seg}"))
            time.sleep(0.3)
            self.assertEqual(win.getControl("txtStatus").Text,
                             f'Report "Report {seg}": its settings are shown; edit them and press Update report.')
            self.assertEqual(win.getControl("lstSegVal").SelectedItems, ({"East": "East (445)", "West": "West (455)"}[seg],))
        # Edit the shown report's options in the panel: a bad hedonic option is said.
        win.getControl("lstOptMethod").selectItem("Hedonic", True)
        time.sleep(0.2)
        win.getControl("edtOptions").Text = "colour=red"
        press(win, "btnUpdate")
        status = win.getControl("txtStatus").Text
        self.assertTrue(status.startswith("Report West: "), status)
        self.assertIn('1 method failed: Hedonic time dummy: unknown option "colour"', status)
        # The other report was not touched.
        east = self.doc.Sheets.getByName("Report East")
        self.assertFalse(east.getCellRangeByName("A1").getString() == "")
        self.assertTrue(office.alive())

    def test_format_index_table(self):
        # A hand-typed table shows in the date format of its dates until formatted.
        self.sales.getCellRangeByName("H2:L37").setArrayFormula("=INDEXMEDIAN(A2:A901;B2:B901)")
        self.doc.calculateAll()
        win = open_panel(self.doc).Window
        self.doc.CurrentController.select(self.sales.getCellRangeByName("J10"))
        press(win, "btnFormat")
        self.assertEqual(win.getControl("txtStatus").Text, "Formatted the INDEXMEDIAN table (36 rows).")
        fmt = lambda ref: self.doc.NumberFormats.getByKey(self.sales.getCellRangeByName(ref).NumberFormat).FormatString
        self.assertEqual([fmt(c) for c in ("H5", "I5", "J5", "K5", "L37")],
                         ["YYYY-MM-DD", "0.0", "0", "0.0", "0.0"])
        self.doc.CurrentController.select(self.sales.getCellRangeByName("A5"))
        press(win, "btnFormat")
        self.assertEqual(win.getControl("txtStatus").Text,
                         "Lintel: the cell is not in an array formula: click a cell of a Lintel table")

    def test_build_without_a_table_says_what_to_do(self):
        win = open_panel(self.doc).Window
        press(win, "btnBuild")
        self.assertEqual(win.getControl("txtStatus").Text,
                         "Lintel: choose the sales table first (Use selection)")
        self.doc.CurrentController.select(self.sales.getCellRangeByName("A1"))
        press(win, "btnSelection")
        win.getControl("edtLevel").Text = "95"
        press(win, "btnBuild")
        self.assertEqual(win.getControl("txtStatus").Text,
                         'Lintel: band level must lie between 0 and 1, got "95"')
        self.assertTrue(office.alive())


if __name__ == "__main__":
    unittest.main(verbosity=2)
