"""Drive a headless Chromium through the DevTools protocol on a pipe (no websocket).

Chromium started with ``--remote-debugging-pipe`` reads protocol commands from
file descriptor 3 and writes replies and events to descriptor 4, each message a
JSON object followed by a NUL byte. That is all a test needs to load a page,
collect its console errors, emulate screen or print media and take screenshots
or a PDF, with no Python dependency beyond the standard library.
"""

from __future__ import annotations

import base64
import json
import os
import select
import shutil
import subprocess
import tempfile
import time
from pathlib import Path

# Flags for a sandboxed machine without a network or a display (as root).
CHROMIUM_FLAGS = (
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--disable-dev-shm-usage",
    "--hide-scrollbars",
)
INSTALL_HINT = "apt-get install -y chromium"
TIMEOUT_S = 60.0


def find_chromium() -> str | None:
    """Path of a Chromium executable, or None."""
    for name in ("chromium", "chromium-browser"):
        path = shutil.which(name)
        if path:
            return path
    return "/usr/bin/chromium" if Path("/usr/bin/chromium").exists() else None


class Browser:
    """One headless Chromium process and one page target in it."""

    def __init__(self, executable: str) -> None:
        self._profile = tempfile.TemporaryDirectory(prefix="simheat-chromium-")
        commands_r, self._commands_w = os.pipe()
        self._replies_r, replies_w = os.pipe()

        def wire_pipes() -> None:  # in the child: fd 3 reads, fd 4 writes
            os.dup2(commands_r, 3)
            os.dup2(replies_w, 4)

        self.process = subprocess.Popen(
            [
                executable,
                *CHROMIUM_FLAGS,
                f"--user-data-dir={self._profile.name}",
                "--remote-debugging-pipe",
                "about:blank",
            ],
            stdin=subprocess.DEVNULL,
            stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL,
            pass_fds=(3, 4),
            preexec_fn=wire_pipes,  # noqa: PLW1509 - single-threaded test helper
        )
        os.close(commands_r)
        os.close(replies_w)
        self._buffer = b""
        self._next_id = 0
        self.events: list[dict] = []
        target = self.call("Target.createTarget", {"url": "about:blank"})["targetId"]
        self.session = self.call(
            "Target.attachToTarget", {"targetId": target, "flatten": True}
        )["sessionId"]
        for domain in ("Page", "Runtime", "Log"):
            self.call(f"{domain}.enable", session=True)

    # -- protocol ---------------------------------------------------------------
    def _send(self, message: dict) -> None:
        data = json.dumps(message).encode() + b"\0"
        while data:
            written = os.write(self._commands_w, data)
            data = data[written:]

    def _receive(self, deadline: float) -> dict:
        while b"\0" not in self._buffer:
            left = deadline - time.monotonic()
            if left <= 0.0:
                raise TimeoutError("Chromium did not answer in time")
            ready, _, _ = select.select([self._replies_r], [], [], left)
            if ready:
                chunk = os.read(self._replies_r, 1 << 16)
                if not chunk:
                    raise RuntimeError("Chromium closed its DevTools pipe")
                self._buffer += chunk
        message, _, self._buffer = self._buffer.partition(b"\0")
        return json.loads(message)

    def call(self, method: str, params: dict | None = None, session: bool = False):
        """Send one command and return its result; events seen meanwhile are kept."""
        self._next_id += 1
        message = {"id": self._next_id, "method": method, "params": params or {}}
        if session:
            message["sessionId"] = self.session
        self._send(message)
        deadline = time.monotonic() + TIMEOUT_S
        while True:
            reply = self._receive(deadline)
            if reply.get("id") == self._next_id:
                if "error" in reply:
                    raise RuntimeError(f"{method}: {reply['error']}")
                return reply.get("result", {})
            self.events.append(reply)

    def wait_for(self, method: str) -> dict:
        """Wait for an event of the page's session (or take one already seen)."""
        for i, event in enumerate(self.events):
            if event.get("method") == method:
                return self.events.pop(i)
        deadline = time.monotonic() + TIMEOUT_S
        while True:
            event = self._receive(deadline)
            if event.get("method") == method:
                return event
            self.events.append(event)

    # -- what the tests use ------------------------------------------------------
    def load(self, url: str) -> None:
        """Navigate and wait until the page has loaded."""
        self.call("Page.navigate", {"url": url}, session=True)
        self.wait_for("Page.loadEventFired")

    def console_errors(self) -> list[str]:
        """Errors the page reported: console errors, exceptions, failed loads."""
        self.call("Runtime.evaluate", {"expression": "1"}, session=True)  # flush
        errors = []
        for event in self.events:
            method, params = event.get("method"), event.get("params", {})
            if method == "Runtime.exceptionThrown":
                errors.append(json.dumps(params.get("exceptionDetails", {})))
            elif method == "Runtime.consoleAPICalled" and params.get("type") in (
                "error",
                "assert",
            ):
                errors.append(json.dumps(params.get("args", [])))
            elif method == "Log.entryAdded":
                entry = params.get("entry", {})
                if entry.get("level") == "error":
                    errors.append(f"{entry.get('source')}: {entry.get('text')}")
        return errors

    def screenshot(self, width: int, height: int, media: str = "screen") -> bytes:
        """PNG of the top of the page in a viewport of that size and media."""
        self.call("Emulation.setEmulatedMedia", {"media": media}, session=True)
        self.call(
            "Emulation.setDeviceMetricsOverride",
            {"width": width, "height": height, "deviceScaleFactor": 1, "mobile": False},
            session=True,
        )
        shot = self.call("Page.captureScreenshot", {"format": "png"}, session=True)
        return base64.b64decode(shot["data"])

    def pdf(self) -> bytes:
        """The page printed to PDF with its own print stylesheet's page size."""
        result = self.call(
            "Page.printToPDF",
            {"preferCSSPageSize": True, "printBackground": True},
            session=True,
        )
        return base64.b64decode(result["data"])

    def close(self) -> None:
        """Close the browser and wait for it."""
        try:
            self.call("Browser.close")
        except (RuntimeError, TimeoutError, OSError):
            pass
        try:
            self.process.wait(timeout=10)
        except subprocess.TimeoutExpired:
            self.process.kill()
            self.process.wait()
        os.close(self._commands_w)
        os.close(self._replies_r)
        self._profile.cleanup()
