"""Drives a real Kate (the KDE editor) under Xvfb for tests/editors/test_kate.py.

Kate has no batch mode, so the test runs it on a private X display and types
at it with xdotool, as a user would: Alt+Return opens the LSP Client's code
action menu, Down/Return picks an entry.  What Kate did is read back in two
ways: lsp_tap.py, set as the server command, writes down every message Kate
and calami exchange; and kate_commands.js adds two commands to Kate's own
command line (F7) that place the cursor and print the buffer.
"""

from __future__ import annotations

import json
import random
import re
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path
from typing import Any, Callable

HERE = Path(__file__).parent
TAP = HERE / "lsp_tap.py"
COMMANDS_JS = HERE / "kate_commands.js"
WINDOW_SIZE = (1200, 850)
STATE_LINE = re.compile(r"calami-test (\{.*\})")


def missing_programs() -> list[str]:
    return [name for name in ("kate", "Xvfb", "xdotool") if shutil.which(name) is None]


def wait_until(condition: Callable[[], Any], timeout: float, what: str) -> Any:
    """Poll `condition` until it returns something true; fail naming `what`."""
    deadline = time.monotonic() + timeout
    while True:
        value = condition()
        if value:
            return value
        if time.monotonic() > deadline:
            raise AssertionError(f"Kate: timed out after {timeout:.0f} s waiting for {what}")
        time.sleep(0.2)


class Tap:
    """The messages lsp_tap.py wrote down, in order."""

    def __init__(self, path: Path) -> None:
        self.path = path

    def messages(self) -> list[dict]:
        if not self.path.exists():
            return []
        out = []
        for line in self.path.read_text(encoding="utf-8").splitlines():
            try:
                out.append(json.loads(line))
            except ValueError:
                break  # a line still being written
        return out

    def from_editor(self, method: str) -> list[dict]:
        return [m["message"] for m in self.messages()
                if m["from"] == "editor" and m["message"].get("method") == method]

    def diagnostics(self, uri: str) -> list[list[dict]]:
        """Every publishDiagnostics list calami sent for `uri`, oldest first."""
        return [m["message"]["params"]["diagnostics"] for m in self.messages()
                if m["from"] == "server" and m["message"].get("method") == "textDocument/publishDiagnostics"
                and m["message"]["params"]["uri"] == uri]

    def response(self, request_id: Any) -> dict | None:
        for m in self.messages():
            if m["from"] == "server" and m["message"].get("id") == request_id and "method" not in m["message"]:
                return m["message"]
        return None


class Kate:
    """One Kate on its own Xvfb display, with a private HOME."""

    def __init__(self, tmp_path: Path, env: dict[str, str], timeout: float) -> None:
        self.tmp_path = tmp_path
        self.env = dict(env)
        self.timeout = timeout
        self.stderr_path = tmp_path / "kate-stderr.txt"
        self.xvfb: subprocess.Popen | None = None
        self.kate: subprocess.Popen | None = None
        self.window = ""
        self.runtime_dir = ""

    # --- set-up -------------------------------------------------------------
    def configure(self, settings: dict, allowed_command: list[str]) -> None:
        """The LSP Client's user server settings, the plugin enabled, the
        server's command line trusted (Kate asks otherwise), and the test commands."""
        config = Path(self.env["XDG_CONFIG_HOME"])
        (config / "kate" / "lspclient").mkdir(parents=True, exist_ok=True)
        (config / "kate" / "lspclient" / "settings.json").write_text(json.dumps(settings, indent=2), encoding="utf-8")
        (config / "katerc").write_text(
            "[Kate Plugins]\nlspclientplugin=true\n\n"
            f"[lspclient]\nAllowedServerCommandLines={' '.join(allowed_command)}\n",
            encoding="utf-8",
        )
        scripts = Path(self.env["XDG_DATA_HOME"]) / "katepart5" / "script" / "commands"
        scripts.mkdir(parents=True, exist_ok=True)
        shutil.copy(COMMANDS_JS, scripts / "calami_test.js")

    @staticmethod
    def _unused_display() -> int:
        """A display number no X server on this machine uses, by lock file or
        by socket (/proc/net/unix also lists the abstract sockets of X servers
        started by others in their own /tmp)."""
        sockets = Path("/proc/net/unix").read_text(encoding="utf-8", errors="replace")
        for number in random.sample(range(200, 1000), 100):
            if not Path(f"/tmp/.X{number}-lock").exists() and f"/.X11-unix/X{number}\n" not in sockets:
                return number
        raise AssertionError("no free X display number")

    def _start_display(self) -> bool:
        """An Xvfb of our own that answers; False to try again."""
        number = self._unused_display()
        self.xvfb = subprocess.Popen(
            ["Xvfb", f":{number}", "-screen", "0", "1280x900x24", "-nolisten", "tcp",
             "-noreset",  # else Xvfb resets when our check disconnects, and Kate may find no display
             "-fbdir", str(self.tmp_path)],  # the screen as an XWD file, Xvfb_screen0, to look at after a failure
            stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
        )
        self.env["DISPLAY"] = f":{number}"
        socket = Path(f"/tmp/.X11-unix/X{number}")
        deadline = time.monotonic() + self.timeout
        while not socket.exists() and self.xvfb.poll() is None and time.monotonic() < deadline:
            time.sleep(0.1)
        answers = socket.exists() and subprocess.run(
            ["xdotool", "getdisplaygeometry"], env=self.env, stdin=subprocess.DEVNULL,
            capture_output=True, timeout=60).returncode == 0
        if answers and self.xvfb.poll() is None:
            return True
        self.stop()
        return False

    def start(self, cwd: Path, file: str) -> None:
        # KIO puts sockets in XDG_RUNTIME_DIR; a socket path must stay under
        # 108 bytes, which pytest's temporary folders can pass.  (Kate then
        # shows a modal "Unable to create KIO worker" box.)
        self.runtime_dir = tempfile.mkdtemp(prefix="calami-kate-")
        self.env["XDG_RUNTIME_DIR"] = self.runtime_dir
        assert any(self._start_display() for _attempt in range(5)), "Xvfb did not start"
        with self.stderr_path.open("wb") as err:
            self.kate = subprocess.Popen(["kate", "-n", file], cwd=cwd, env=self.env,
                                         stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL, stderr=err)
        self.window = wait_until(lambda: self._main_window(file), self.timeout, f"Kate's window showing {file}")
        self.xdotool("windowsize", "--sync", self.window, *map(str, WINDOW_SIZE))
        self.focus()

    def stop(self) -> None:
        for proc in (self.kate, self.xvfb):
            if proc is not None and proc.poll() is None:
                proc.terminate()
                try:
                    proc.wait(timeout=3)  # Kate with an unsaved buffer asks before closing: then kill
                except subprocess.TimeoutExpired:
                    proc.kill()
                    proc.wait(timeout=15)

    def close(self) -> None:
        self.stop()
        if self.runtime_dir:
            shutil.rmtree(self.runtime_dir, ignore_errors=True)

    # --- input --------------------------------------------------------------
    def xdotool(self, *args: str) -> str:
        proc = subprocess.run(["xdotool", *args], env=self.env, stdin=subprocess.DEVNULL,
                              capture_output=True, text=True, timeout=60)
        return proc.stdout

    def _visible_windows(self) -> list[str]:
        return self.xdotool("search", "--onlyvisible", "--class", "kate").split()

    def _main_window(self, file: str) -> str:
        """Kate's main window once its title names `file` ("README.md — Kate")."""
        assert self.kate is not None and self.kate.poll() is None, f"Kate exited: {self.stderr_tail()}"
        for window in self._visible_windows():
            name = self.xdotool("getwindowname", window).strip()
            if name.startswith(file) and name.endswith("Kate"):
                return window
        return ""

    def focus(self) -> None:
        self.xdotool("windowfocus", "--sync", self.window)

    def focus_text(self) -> None:
        """The keyboard to the text: Kate may have moved it to a tool view
        (its Output view opens when the server logs a message)."""
        self.focus()
        self.xdotool("mousemove", "--window", self.window, str(WINDOW_SIZE[0] // 2), "250", "click", "1")
        time.sleep(0.2)

    def keep_screen(self) -> Path:
        """A copy of the screen (XWD) that outlives Xvfb, for a failure message."""
        target = self.tmp_path / "screen-at-failure.xwd"
        try:
            shutil.copy(self.tmp_path / "Xvfb_screen0", target)
        except OSError:
            pass
        return target

    def keys(self, *keys: str) -> None:
        self.xdotool("key", "--clearmodifiers", *keys)

    def command(self, text: str) -> dict:
        """Run a command on Kate's command line (F7); its printed state."""
        for _attempt in range(3):  # a key lost while Kate was busy: type it again
            seen = len(self.states())
            self.focus_text()
            self.keys("F7")
            time.sleep(1.0)  # the command line must have the keyboard before we type
            self.xdotool("type", "--delay", "30", text)
            self.keys("Return")
            try:
                return wait_until(lambda: self.states()[seen:] and self.states()[seen], self.timeout / 3, f"'{text}'")
            except AssertionError:
                self.keys("Escape", "Escape")
        raise AssertionError(f"Kate never ran '{text}' (screen: {self.keep_screen()}): {self.stderr_tail()}")

    def states(self) -> list[dict]:
        text = self.stderr_path.read_text(encoding="utf-8", errors="replace") if self.stderr_path.exists() else ""
        return [json.loads(m.group(1)) for m in STATE_LINE.finditer(text)]

    def goto(self, line: int, column: int) -> dict:
        state = self.command(f"calamigoto {line} {column}")
        assert (state["line"], state["column"]) == (line, column), state
        return state

    def pick_code_action(self, tap: Tap, line: int, column: int,
                         choose: Callable[[list[dict]], int]) -> tuple[dict, list[dict], int]:
        """Cursor to (line, column), Alt+Return (LSP Client > Code Action),
        then the entry `choose` names by its index in calami's answer.
        Returns Kate's request, calami's actions and the index picked."""
        windows = len(self._visible_windows())
        for _attempt in range(3):  # the keyboard taken away before Alt+Return arrived: again
            asked = len(tap.from_editor("textDocument/codeAction"))
            self.goto(line, column)
            self.keys("alt+Return")
            try:
                request = wait_until(lambda: tap.from_editor("textDocument/codeAction")[asked:], self.timeout / 3,
                                     "Kate's code action request")[0]
                break
            except AssertionError:
                continue
        else:
            raise AssertionError(f"Kate sent no code action request (screen: {self.keep_screen()})")
        actions = wait_until(lambda: tap.response(request["id"]), self.timeout, "calami's code actions")["result"]
        wait_until(lambda: len(self._visible_windows()) > windows, self.timeout, "the code action menu")
        time.sleep(0.5)  # the menu is mapped; let it take the keyboard
        index = choose(actions)
        self.keys(*["Down"] * (index + 1), "Return")
        wait_until(lambda: len(self._visible_windows()) <= windows, self.timeout, "the code action menu to close")
        return request, actions, index

    def stderr_tail(self) -> str:
        if not self.stderr_path.exists():
            return "(no stderr)"
        return self.stderr_path.read_text(encoding="utf-8", errors="replace")[-3000:]


def tap_command(log: Path, server: list[str]) -> list[str]:
    """The server command with lsp_tap.py in front, all absolute paths."""
    return [sys.executable, str(TAP), str(log), "--", *server]
