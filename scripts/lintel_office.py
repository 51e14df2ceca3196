"""A headless LibreOffice for the integration tests and the demo.

Office(oxt) makes a fresh profile in a temporary folder (or uses `profile`, a folder that is
kept), installs the extension into it with
unopkg, starts soffice.bin headless with a UNO socket on a free loopback port, and connects.
On exit it terminates the office and then kills it by its process id if it is still there.
As root (CI), unopkg and soffice run as the user `nobody`, since unopkg refuses to install
into a user profile as root.
"""
import os
import pwd
import shutil
import signal
import socket
import subprocess
import tempfile
import time

import uno  # Debian's python3-uno
from com.sun.star.beans import PropertyValue

PROGRAM = os.environ.get("LINTEL_LO_PROGRAM", "/usr/lib/libreoffice/program")


def prop(name, value):
    p = PropertyValue()
    p.Name = name
    p.Value = value
    return p


def _enterable(path, user):
    """True when every folder from / down to path lets `user` (a pwd entry) pass through."""
    path = os.path.abspath(path)
    while True:
        st = os.stat(path)
        if not (st.st_mode & 0o001 or (st.st_uid == user.pw_uid and st.st_mode & 0o100)
                or (st.st_gid == user.pw_gid and st.st_mode & 0o010)):
            return False
        parent = os.path.dirname(path)
        if parent == path:
            return True
        path = parent


def reachable_profile(profile, user):
    """The folder to use for a kept profile when the office runs as `user` (root's case).
    When user may not reach `profile` (a clone in a private folder), the profile lives in a
    folder of its own under /var/tmp and `profile` becomes a link to it, so the path the
    README names still works."""
    profile = os.path.abspath(profile)
    if os.path.islink(profile):
        return os.path.realpath(profile)
    parent = os.path.dirname(profile)
    os.makedirs(parent, exist_ok=True)
    if _enterable(parent, user):
        return profile
    import hashlib
    real = os.path.join("/var/tmp", "lintel-profile-" + hashlib.sha1(profile.encode()).hexdigest()[:12])
    os.makedirs(real, exist_ok=True)
    os.chmod(real, 0o755)
    if os.path.isdir(profile):
        shutil.rmtree(profile)  # an unusable earlier attempt
    os.symlink(real, profile)
    return real


def free_port():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


class Office:
    def __init__(self, oxt=None, keep=False, profile=None, display=None):
        """display: an X display (e.g. ":99" of an Xvfb) to run the real GUI on, for
        screenshots; default headless."""
        self.oxt = oxt
        self.display = display
        self.keep = keep
        self.fixed_profile = os.path.abspath(profile) if profile else None
        self.proc = None
        self.tmp = None

    # --- lifecycle -------------------------------------------------------------------------
    def __enter__(self):
        self.tmp = tempfile.mkdtemp(prefix="lintel-office-")
        os.chmod(self.tmp, 0o777)
        self.profile = self.fixed_profile or os.path.join(self.tmp, "profile")
        self.home = os.path.join(self.tmp, "home")
        os.makedirs(self.home)
        self.user = None
        if os.geteuid() == 0:
            nobody = pwd.getpwnam("nobody")
            self.user = (nobody.pw_uid, nobody.pw_gid)
            os.chown(self.home, *self.user)
            if self.fixed_profile:
                self.profile = reachable_profile(self.fixed_profile, nobody)
                os.makedirs(self.profile, exist_ok=True)
                for root, dirs, files in os.walk(self.profile):
                    for name in dirs + files:
                        os.lchown(os.path.join(root, name), *self.user)
                os.chown(self.profile, *self.user)
        if self.display:
            self.env = dict(os.environ, HOME=self.home, SAL_USE_VCLPLUGIN="gen", DISPLAY=self.display)
        else:
            self.env = dict(os.environ, HOME=self.home, SAL_USE_VCLPLUGIN="svp")
            self.env.pop("DISPLAY", None)
        self.profile_url = uno.systemPathToFileUrl(self.profile)
        # A profile that has never been started is wiped at the first start: start it once.
        self._run([os.path.join(PROGRAM, "soffice.bin"), "--headless", "--norestore",
                   "--terminate_after_init", f"-env:UserInstallation={self.profile_url}"], timeout=120)
        if self.oxt:
            oxt = os.path.join(self.tmp, os.path.basename(self.oxt))
            shutil.copy(self.oxt, oxt)
            os.chmod(oxt, 0o644)
            out = self._run([os.path.join(PROGRAM, "unopkg"), "add", "--suppress-license", "-f",
                             f"-env:UserInstallation={self.profile_url}", oxt], timeout=180)
            if out.returncode != 0:
                raise RuntimeError(f"unopkg add failed: {out.stdout}\n{out.stderr}")
        self.port = free_port()
        mode = ["--nologo"] if self.display else ["--headless", "--invisible", "--nologo"]
        self.proc = subprocess.Popen(
            [os.path.join(PROGRAM, "soffice.bin")] + mode + [
             "--norestore", "--nodefault", "--nolockcheck",
             f"-env:UserInstallation={self.profile_url}",
             f"--accept=socket,host=127.0.0.1,port={self.port};urp;StarOffice.ComponentContext"],
            env=self.env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, cwd=self.tmp,
            start_new_session=True, **self._user_kwargs())
        self.ctx = self._connect()
        self.smgr = self.ctx.ServiceManager
        self.desktop = self.smgr.createInstanceWithContext("com.sun.star.frame.Desktop", self.ctx)
        return self

    def __exit__(self, *exc):
        self.stop()
        if self.tmp and not self.keep:
            shutil.rmtree(self.tmp, ignore_errors=True)

    def stop(self):
        """Asks the office to quit, then makes sure of it by its process id."""
        if not self.proc:
            return
        try:
            self.desktop.terminate()
        except Exception:
            pass
        for sig, wait in ((None, 15), (signal.SIGTERM, 10), (signal.SIGKILL, 10)):
            if sig is not None and self.proc.poll() is None:
                os.kill(self.proc.pid, sig)
            try:
                self.proc.wait(timeout=wait)
                break
            except subprocess.TimeoutExpired:
                continue
        self.proc = None

    def alive(self):
        """True when the soffice process runs and answers over UNO."""
        if self.proc is None or self.proc.poll() is not None:
            return False
        try:
            self.desktop.getComponents()
            return True
        except Exception:
            return False

    # --- helpers ---------------------------------------------------------------------------
    # The office runs in its own temporary folder: as `nobody` it may not enter the caller's
    # folder (a clone in a private mktemp -d folder, say), and unopkg then fails silently.
    def _user_kwargs(self):
        return {"user": self.user[0], "group": self.user[1]} if self.user else {}

    def _run(self, cmd, timeout):
        return subprocess.run(cmd, env=self.env, capture_output=True, text=True, timeout=timeout,
                              cwd=self.tmp, **self._user_kwargs())

    def _connect(self, timeout=90):
        local = uno.getComponentContext()
        resolver = local.ServiceManager.createInstanceWithContext(
            "com.sun.star.bridge.UnoUrlResolver", local)
        url = f"uno:socket,host=127.0.0.1,port={self.port};urp;StarOffice.ComponentContext"
        deadline = time.time() + timeout
        while True:
            if self.proc.poll() is not None:
                raise RuntimeError(f"soffice exited with {self.proc.returncode} before accepting")
            try:
                return resolver.resolve(url)
            except Exception:
                if time.time() > deadline:
                    raise
                time.sleep(0.5)

    @property
    def scratch(self):
        """A folder the office process may write to (for storeToURL)."""
        return self.tmp

    def new_calc(self):
        return self.desktop.loadComponentFromURL("private:factory/scalc", "_blank", 0,
                                                 (prop("Hidden", True),))

    def load(self, path):
        return self.desktop.loadComponentFromURL(uno.systemPathToFileUrl(os.path.abspath(path)),
                                                 "_blank", 0, (prop("Hidden", True),))

    def service(self, name):
        return self.smgr.createInstanceWithContext(name, self.ctx)


def sheet_values(sheet, ref):
    """The cells of a range as a list of rows; each cell a float, a str, or ('error', code)."""
    rng = sheet.getCellRangeByName(ref)
    out = []
    for r in range(rng.Rows.Count):
        row = []
        for c in range(rng.Columns.Count):
            cell = rng.getCellByPosition(c, r)
            err = cell.getError()
            if err:
                row.append(("error", err))
                continue
            t = cell.FormulaResultType2 if cell.getType().value == "FORMULA" else None
            kind = cell.getType().value
            if kind == "EMPTY":
                row.append(None)
            elif kind == "VALUE" or (kind == "FORMULA" and t == 1):
                row.append(cell.getValue())
            else:
                row.append(cell.getString())
        out.append(row)
    return out


class SharedOffice:
    """One office for a whole test module:

        office = SharedOffice(os.environ["LINTEL_OXT"])
        setUpModule, tearDownModule = office.start, office.stop

    stop() fails the module when soffice did not survive its tests."""

    def __init__(self, oxt):
        self.oxt = oxt
        self._office = None

    def start(self):
        self._office = Office(self.oxt).__enter__()

    def stop(self):
        alive = self._office.alive()
        self._office.__exit__(None, None, None)
        if not alive:
            raise RuntimeError("soffice did not survive the tests")

    def __getattr__(self, name):
        return getattr(self._office, name)


class SheetCalls:
    """Mixin for test cases with `self.doc` and `self.sheet`: write a formula, recalculate,
    read the cells back."""

    def array(self, ref, formula):
        self.sheet.getCellRangeByName(ref).setArrayFormula(formula)
        self.doc.calculateAll()
        return sheet_values(self.sheet, ref)

    def formula(self, ref, formula):
        self.sheet.getCellRangeByName(ref).setFormula(formula)
        self.doc.calculateAll()
        return sheet_values(self.sheet, ref)[0][0]
