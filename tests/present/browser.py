"""A headless Chromium driven over the DevTools protocol on a pipe, with the standard library only.

Chromium started with ``--remote-debugging-pipe`` reads protocol commands from its file descriptor 3 and writes
replies and events to descriptor 4, each message a JSON text ended by a NUL byte. That is all these tests need
(load a page, watch its console and network, resize, print to PDF, take screenshots), so no client package is
added. The flags are the ones this machine needs to run Chromium headless as root without reaching out to the
network on its own (no background networking, no component updates, no sync, no QUIC), with a new empty profile.
"""

from __future__ import annotations

import base64
import json
import os
import queue
import shutil
import subprocess
import tempfile
import threading
import time
from typing import Any

FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--disable-default-apps", "--disable-extensions", "--mute-audio", "--hide-scrollbars"]


def find_chromium() -> str | None:
    """The Chromium executable on PATH (Debian's package installs /usr/bin/chromium), or None."""
    for name in ("chromium", "chromium-browser"):
        path = shutil.which(name)
        if path:
            return path
    return None


class Browser:
    """One Chromium process and one page in it; :meth:`send` runs a command and returns its result."""

    def __init__(self, executable: str, timeout_s: float = 30.0) -> None:
        self.timeout_s = timeout_s
        self.profile = tempfile.mkdtemp(prefix="motorlib-chromium-")
        to_browser_r, self._to_browser = os.pipe()
        self._from_browser, from_browser_w = os.pipe()

        # bash (dash reads only one-digit descriptors) moves the two pipe ends to descriptors 3 and 4, then
        # becomes Chromium; no preexec_fn, which is unsafe once threads run.
        wiring = (f"exec 98<&{to_browser_r} 99>&{from_browser_w}; "  # copies first: a pipe end may itself be 3 or 4
                  'exec "$@" 3<&98 4>&99 98<&- 99>&-')
        self.process = subprocess.Popen(
            [shutil.which("bash") or "/bin/bash", "-c", wiring, "bash", executable, *FLAGS,
             f"--user-data-dir={self.profile}", "--remote-debugging-pipe", "about:blank"],
            stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
            pass_fds=(to_browser_r, from_browser_w))
        os.close(to_browser_r)
        os.close(from_browser_w)
        self._next_id = 0
        self._replies: dict[int, dict[str, Any]] = {}
        self._messages: queue.Queue[dict[str, Any] | None] = queue.Queue()
        self.events: list[dict[str, Any]] = []
        self._reader = threading.Thread(target=self._read, daemon=True)
        self._reader.start()
        targets = self.send("Target.getTargets")["targetInfos"]
        page = next(t for t in targets if t["type"] == "page")
        self.session = self.send("Target.attachToTarget", {"targetId": page["targetId"], "flatten": True})["sessionId"]

    def _read(self) -> None:
        buffer = b""
        while True:
            try:
                chunk = os.read(self._from_browser, 1 << 16)
            except OSError:
                chunk = b""
            if not chunk:
                self._messages.put(None)
                return
            buffer += chunk
            while b"\0" in buffer:
                raw, buffer = buffer.split(b"\0", 1)
                self._messages.put(json.loads(raw))

    def _pump(self, until: float) -> dict[str, Any] | None:
        try:
            message = self._messages.get(timeout=max(0.01, until - time.monotonic()))
        except queue.Empty:
            return None
        if message is None:
            raise RuntimeError("Chromium closed the DevTools pipe")
        if "id" in message:
            self._replies[message["id"]] = message
        else:
            self.events.append(message)
        return message

    def send(self, method: str, params: dict[str, Any] | None = None, *, page: bool | None = None) -> dict[str, Any]:
        """Run one protocol command (on the page's session unless it is a Target/Browser command)."""
        self._next_id += 1
        ident = self._next_id
        message: dict[str, Any] = {"id": ident, "method": method, "params": params or {}}
        on_page = page if page is not None else not method.startswith(("Target.", "Browser."))
        if on_page:
            message["sessionId"] = self.session
        os.write(self._to_browser, json.dumps(message).encode() + b"\0")
        until = time.monotonic() + self.timeout_s
        while ident not in self._replies:
            if time.monotonic() > until:
                raise TimeoutError(f"no reply to {method} within {self.timeout_s} s")
            self._pump(until)
        reply = self._replies.pop(ident)
        if "error" in reply:
            raise RuntimeError(f"{method}: {reply['error']}")
        return reply.get("result", {})

    def wait_for(self, method: str, timeout_s: float | None = None) -> dict[str, Any]:
        """Wait for an event ``method`` that arrives after this call (earlier ones are already in ``events``)."""
        start = len(self.events)
        until = time.monotonic() + (timeout_s or self.timeout_s)
        while True:
            for event in self.events[start:]:
                if event.get("method") == method:
                    return event
            start = len(self.events)
            if time.monotonic() > until:
                raise TimeoutError(f"no {method} event")
            self._pump(until)

    def evaluate(self, expression: str) -> Any:
        result = self.send("Runtime.evaluate", {"expression": expression, "returnByValue": True})
        if "exceptionDetails" in result:
            raise RuntimeError(f"{expression!r} raised {result['exceptionDetails']}")
        return result["result"].get("value")

    def load(self, url: str, width: int = 1280, height: int = 900, mobile: bool = False) -> None:
        """Open ``url`` at a viewport ``width`` CSS px wide and wait for its load event."""
        self.events.clear()
        for domain in ("Page", "Runtime", "Log", "Network"):
            self.send(f"{domain}.enable")
        self.resize(width, height, mobile)
        self.send("Page.navigate", {"url": url})
        self.wait_for("Page.loadEventFired")

    def resize(self, width: int, height: int = 900, mobile: bool = False) -> None:
        self.send("Emulation.setDeviceMetricsOverride",
                  {"width": width, "height": height, "deviceScaleFactor": 1, "mobile": mobile})

    def pdf(self, paper_width_in: float, paper_height_in: float) -> bytes:
        result = self.send("Page.printToPDF", {"paperWidth": paper_width_in, "paperHeight": paper_height_in,
                                               "printBackground": True, "displayHeaderFooter": False})
        return base64.b64decode(result["data"])

    def screenshot(self, clip: dict[str, float]) -> bytes:
        result = self.send("Page.captureScreenshot", {"format": "png", "captureBeyondViewport": True,
                                                      "clip": {**clip, "scale": 1}})
        return base64.b64decode(result["data"])

    def close(self) -> None:
        try:
            self.send("Browser.close")
        except (RuntimeError, TimeoutError, OSError):
            pass
        try:
            self.process.wait(timeout=10)
        except subprocess.TimeoutExpired:
            self.process.kill()
            self.process.wait()
        for fd in (self._to_browser, self._from_browser):
            try:
                os.close(fd)
            except OSError:
                pass
        shutil.rmtree(self.profile, ignore_errors=True)
