#!/usr/bin/python3
"""Screenshots of the real GUI for the docs: Calc under Xvfb with the Lintel sidebar deck open
on a report built from the demo market. Needs the GUI office (libreoffice-calc), xvfb,
imagemagick and xdotool (`scripts/deps.sh gui`); writes docs/screenshots/*.png. A manual step,
checked by eye, not a test.

    scripts/deps.sh gui && scripts/screenshots.py --oxt build/lintel.oxt
"""
import argparse
import os
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.join(HERE, "..")
sys.path.insert(0, HERE)
sys.path.insert(0, os.path.join(ROOT, "demo-workbooks"))

from lintel_office import Office  # noqa: E402
import build_demo  # noqa: E402
import market_model  # noqa: E402
from com.sun.star.beans import NamedValue  # noqa: E402

DISPLAY = ":97"


def shoot(path, crop=None):
    cmd = ["import", "-display", DISPLAY, "-window", "root"]
    if crop:
        cmd += ["-crop", crop]
    subprocess.run(cmd + [path], check=True)
    print("wrote", path)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--oxt", required=True)
    ap.add_argument("--out", default=os.path.join(ROOT, "docs", "screenshots"))
    a = ap.parse_args()
    xvfb = subprocess.Popen(["Xvfb", DISPLAY, "-screen", "0", "1600x1000x24", "-nolisten", "tcp"])
    try:
        time.sleep(1.5)
        with Office(a.oxt, display=DISPLAY) as office:
            sales = market_model.generate()
            n = len(sales) + 1
            doc = office.desktop.loadComponentFromURL("private:factory/scalc", "_blank", 0, ())
            sheet = doc.Sheets.getByIndex(0)
            sheet.Name = "Sales"
            rows = [tuple(sales.columns)] + [tuple(r) for r in sales.itertuples(index=False)]
            sheet.getCellRangeByName(f"A1:J{n}").setDataArray(rows)
            sheet.getCellRangeByName(f"A2:A{n}").NumberFormat = build_demo.number_format(doc, "YYYY-MM-DD")
            settings = build_demo.report_settings(n, "segment.district=Varnholt|Quessenby")
            status = office.service("org.lintel.ReportBuilder").execute(
                (NamedValue("Document", doc), NamedValue("Settings", settings)))
            print(status)
            doc.DocumentProperties.UserDefinedProperties.addProperty("Lintel panel", 128, settings)
            frame = doc.CurrentController.Frame
            frame.ContainerWindow.setPosSize(0, 0, 1600, 1000, 15)
            sidebar = doc.CurrentController.getSidebar()
            sidebar.setVisible(True)
            sidebar.getDecks().getByName("LintelDeck").activate(True)
            time.sleep(3)
            shoot(os.path.join(a.out, "report-and-panel.png"))
            doc.CurrentController.setActiveSheet(sheet)
            doc.CurrentController.select(sheet.getCellRangeByName("A1"))
            time.sleep(2)
            shoot(os.path.join(a.out, "panel.png"), crop="420x1000+1180+0")
            # The function wizard on INDEXMEDIAN: its texts come from the function table.
            doc.CurrentController.select(sheet.getCellRangeByName("L2"))
            dispatcher = office.service("com.sun.star.frame.DispatchHelper")
            dispatcher.executeDispatch(frame, ".uno:FunctionDialog", "", 0, ())
            time.sleep(2)
            env = dict(os.environ, DISPLAY=DISPLAY)
            # Click into the wizard's search field, type, then pick the first function found
            # (positions of the 7.4 wizard, centred on a 1600 x 1000 screen).
            subprocess.run(["xdotool", "mousemove", "579", "335", "click", "1"], env=env, check=False)
            subprocess.run(["xdotool", "type", "--delay", "60", "INDEXMEDIAN"], env=env, check=False)
            time.sleep(1)
            subprocess.run(["xdotool", "mousemove", "520", "427", "click", "1"], env=env, check=False)
            time.sleep(1)
            shoot(os.path.join(a.out, "function-wizard.png"))
            subprocess.run(["xdotool", "key", "Escape"], env=env, check=False)
            time.sleep(1)
            doc.close(True)
    finally:
        xvfb.terminate()
        xvfb.wait()


if __name__ == "__main__":
    main()
