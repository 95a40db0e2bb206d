#!/usr/bin/env python3
"""Load the demo's HTML report in a real browser (headless, the distribution's `chromium`
package) and check it.

Steps: find the browser, installing the package when missing (as root, with apt-get); write the demo report with the stillsky binary; check that the file is well-formed
(a strict XML parse and an HTML tag-balance pass) and names nothing outside itself; load it
headless through a recording proxy and check that the browser asked the network for nothing (a
probe page with one external image first proves the proxy sees requests); check the rendered
text (verdict, budget, image-motion, modes, checks and input tables, the sky map's best and worst
cells, one <svg> per plot) and
save a screenshot.

Without the browser the script fails, unless STILLSKY_BROWSER_OPTIONAL=1, when it says so and
skips. Standard library only.
"""

from __future__ import annotations

import argparse
import csv
import html.parser
import os
import re
import shutil
import socket
import struct
import subprocess
import sys
import tempfile
import threading
import xml.etree.ElementTree as ET
import zlib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
# Generous guard so that a hung browser cannot hang CI; nothing is timed.
BROWSER_GUARD_S = 180


def fail(msg: str) -> None:
    print(f"browser check FAILED: {msg}", file=sys.stderr)
    sys.exit(1)


def find_chromium() -> str | None:
    for name in ("chromium", "chromium-browser"):
        p = shutil.which(name)
        if p:
            return p
    return None


def ensure_chromium() -> str | None:
    """The browser binary, installed from the distribution's packages when missing."""
    found = find_chromium()
    if found:
        return found
    if os.name == "posix" and os.geteuid() == 0 and shutil.which("apt-get"):
        env = dict(os.environ, DEBIAN_FRONTEND="noninteractive")
        pkgs = ["chromium", "fonts-dejavu-core"]
        print("browser check: chromium not found; installing with apt-get:", " ".join(pkgs), flush=True)
        if subprocess.run(["apt-get", "install", "-y", "-q", *pkgs], env=env).returncode != 0:
            subprocess.run(["apt-get", "update", "-q"], env=env, check=False)
            subprocess.run(["apt-get", "install", "-y", "-q", *pkgs], env=env, check=False)
        return find_chromium()
    return None


class RecordingProxy:
    """A local HTTP proxy that answers every request with 403 and records its first line."""

    def __init__(self) -> None:
        self.requests: list[str] = []
        self.sock = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
        self.sock.bind(("127.0.0.1", 0))
        self.sock.listen(16)
        self.port = self.sock.getsockname()[1]
        self.lock = threading.Lock()
        threading.Thread(target=self._serve, daemon=True).start()

    def _serve(self) -> None:
        while True:
            try:
                conn, _ = self.sock.accept()
            except OSError:
                return
            with conn:
                conn.settimeout(5)
                try:
                    first = conn.recv(4096).split(b"\r\n", 1)[0].decode("latin-1")
                except OSError:
                    first = "(connection without a request line)"
                with self.lock:
                    self.requests.append(first)
                try:
                    conn.sendall(b"HTTP/1.1 403 Forbidden\r\nContent-Length: 0\r\nConnection: close\r\n\r\n")
                except OSError:
                    pass

    def taken(self) -> list[str]:
        with self.lock:
            out, self.requests = self.requests, []
        return out


def request_host(line: str) -> str:
    """The host of a proxy request line ('GET http://h/p HTTP/1.1' or 'CONNECT h:443 HTTP/1.1')."""
    parts = line.split()
    target = parts[1] if len(parts) > 1 else line
    target = re.sub(r"^[a-z]+://", "", target)
    return re.split(r"[/:]", target, maxsplit=1)[0]


def chromium_args(chromium: str, proxy: RecordingProxy, profile: Path) -> list[str]:
    args = [
        chromium,
        "--headless",
        "--disable-gpu",
        "--no-first-run",
        "--no-default-browser-check",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--disable-extensions",
        "--disable-default-apps",
        "--hide-scrollbars",
        # Quiet the browser's own background traffic (time, hints, search preconnect, sign-in),
        # so the proxy sees only what a page asks for.
        "--disable-domain-reliability",
        "--no-pings",
        "--disable-client-side-phishing-detection",
        "--disable-breakpad",
        "--disable-field-trial-config",
        "--metrics-recording-only",
        "--dns-prefetch-disable",
        "--disable-features=NetworkTimeServiceQuerying,OptimizationHints,OptimizationHintsFetching,"
        "OptimizationGuideModelDownloading,Translate,MediaRouter,AutofillServerCommunication,"
        "NetworkPrediction,PreconnectToSearch,AccountConsistency,SigninInterceptBubble",
        f"--user-data-dir={profile}",
        # Every request, loopback included, goes to the recording proxy.
        f"--proxy-server=http://127.0.0.1:{proxy.port}",
        "--proxy-bypass-list=<-loopback>",
    ]
    if os.name == "posix" and os.geteuid() == 0:
        args.append("--no-sandbox")
    return args


def run_browser(args: list[str]) -> subprocess.CompletedProcess[str]:
    r = subprocess.run(args, capture_output=True, text=True, timeout=BROWSER_GUARD_S)
    if r.returncode != 0:
        fail(f"chromium exited with {r.returncode}: {r.stderr[-2000:]}")
    return r


VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source", "track", "wbr"}


class Balance(html.parser.HTMLParser):
    """Tag balance of an HTML document (void elements excepted, self-closed tags allowed)."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.stack: list[tuple[str, tuple[int, int]]] = []
        self.problems: list[str] = []

    def handle_starttag(self, tag, attrs):
        if tag not in VOID:
            self.stack.append((tag, self.getpos()))

    def handle_startendtag(self, tag, attrs):
        pass

    def handle_endtag(self, tag):
        if tag in VOID:
            return
        if not self.stack:
            self.problems.append(f"</{tag}> at {self.getpos()} closes nothing")
        elif self.stack[-1][0] != tag:
            self.problems.append(f"</{tag}> at {self.getpos()} closes <{self.stack[-1][0]}> from {self.stack[-1][1]}")
            self.stack.pop()
        else:
            self.stack.pop()


URL_ATTRS = {"src", "href", "xlink:href", "action", "formaction", "poster", "data", "srcset", "background"}


class Collect(html.parser.HTMLParser):
    """Text, tables (id -> body rows), <svg> count and every URL-bearing attribute."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.text: list[str] = []
        self.tables: dict[str, int] = {}
        self.svgs = 0
        self.urls: list[str] = []
        self.tags: set[str] = set()
        self.styles: list[str] = []
        self._table: list[str | None] = []
        self._in_tbody = False
        self._in_style = False

    def handle_starttag(self, tag, attrs):
        self.tags.add(tag)
        a = dict(attrs)
        for k, v in attrs:
            if k in URL_ATTRS and v is not None:
                self.urls.append(f"{tag} {k}={v}")
            if k == "style" and v:
                self.styles.append(v)
        if tag == "svg":
            self.svgs += 1
        elif tag == "table":
            self._table.append(a.get("id"))
            if a.get("id"):
                self.tables[a["id"]] = 0
        elif tag == "tbody":
            self._in_tbody = True
        elif tag == "tr" and self._in_tbody and self._table and self._table[-1]:
            self.tables[self._table[-1]] += 1
        elif tag == "style":
            self._in_style = True

    def handle_endtag(self, tag):
        if tag == "table" and self._table:
            self._table.pop()
        elif tag == "tbody":
            self._in_tbody = False
        elif tag == "style":
            self._in_style = False

    def handle_data(self, data):
        if self._in_style:
            self.styles.append(data)
        else:
            self.text.append(data)


def external_references(doc: str) -> list[str]:
    """Everything in a document that could make a browser fetch something outside the file."""
    c = Collect()
    c.feed(doc)
    bad = [u for u in c.urls if not re.search(r"=(#|data:)", u)]
    bad += [f"<{t}>" for t in ("script", "link", "iframe", "object", "embed", "img", "video", "audio") if t in c.tags]
    for s in c.styles:
        bad += [f"css {m}" for m in re.findall(r"(url\([^)]*\)|@import[^;]*)", s)]
    # Any address at all, except the SVG namespace name (an identifier, never fetched).
    bad += [f"address {m}" for m in re.findall(r"https?://[^\s\"'<>]+", doc) if m != "http://www.w3.org/2000/svg"]
    return bad


def png_facts(path: Path) -> tuple[int, int, float, int]:
    """Width, height, share of pixels that are not white, and distinct colours in a sample.
    Decodes 8-bit non-interlaced RGB/RGBA PNGs (what the browser writes)."""
    data = path.read_bytes()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        fail(f"{path} is not a PNG")
    pos, idat, w = 8, b"", 0
    while pos < len(data):
        (n,) = struct.unpack(">I", data[pos : pos + 4])
        kind, body = data[pos + 4 : pos + 8], data[pos + 8 : pos + 8 + n]
        if kind == b"IHDR":
            w, h, depth, colour, _, _, interlace = struct.unpack(">IIBBBBB", body)
            if depth != 8 or colour not in (2, 6) or interlace:
                fail(f"{path}: PNG type depth={depth} colour={colour} interlace={interlace} not decoded here")
            bpp = 3 if colour == 2 else 4
        elif kind == b"IDAT":
            idat += body
        pos += 12 + n
    raw = zlib.decompress(idat)
    stride = w * bpp
    prev = bytearray(stride)
    nonwhite, colours, i = 0, set(), 0
    for y in range(h):
        f, line = raw[i], bytearray(raw[i + 1 : i + 1 + stride])
        i += 1 + stride
        for x in range(stride):
            a = line[x - bpp] if x >= bpp else 0
            b = prev[x]
            c = prev[x - bpp] if x >= bpp else 0
            if f == 1:
                line[x] = (line[x] + a) & 255
            elif f == 2:
                line[x] = (line[x] + b) & 255
            elif f == 3:
                line[x] = (line[x] + (a + b) // 2) & 255
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[x] = (line[x] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        prev = line
        for x in range(0, stride, bpp * 4):
            px = bytes(line[x : x + 3])
            colours.add(px)
            nonwhite += px != b"\xff\xff\xff"
    return w, h, nonwhite / (h * (w // 4 or 1)), len(colours)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--bin", required=True, help="the stillsky binary")
    ap.add_argument("--out", default=str(ROOT / "target" / "browser-check"), help="work folder")
    ap.add_argument("--screenshot", help="where to save the screenshot (default OUT/report.png)")
    args = ap.parse_args()
    out = Path(args.out).resolve()
    shot = Path(args.screenshot).resolve() if args.screenshot else out / "report.png"

    chromium = ensure_chromium()
    if chromium is None:
        if os.environ.get("STILLSKY_BROWSER_OPTIONAL") == "1":
            print("browser check SKIPPED: the chromium package is not installed and could not be installed "
                  "(STILLSKY_BROWSER_OPTIONAL=1 allows this)")
            return
        fail("the chromium package is not installed and could not be installed (run as root with apt-get, "
             "install it yourself, or set STILLSKY_BROWSER_OPTIONAL=1 to skip)")
    version = subprocess.run([chromium, "--version"], capture_output=True, text=True).stdout.strip()
    print(f"browser check: using {chromium} ({version})")

    shutil.rmtree(out, ignore_errors=True)
    out.mkdir(parents=True)
    demo = out / "demo"
    # From the repository root with relative paths, so the page (and screenshot) shows
    # docs/examples/... rather than this machine's folders.
    env = dict(os.environ, STILLSKY_EXAMPLES="docs/examples")
    rel = os.path.relpath(demo, ROOT)
    r = subprocess.run([str(Path(args.bin).resolve()), "demo", "--out", rel], capture_output=True, text=True,
                       cwd=ROOT, env=env)
    if r.returncode != 0:
        fail(f"demo exited with {r.returncode}: {r.stderr}")
    page = demo / "report.html"
    doc = page.read_text(encoding="utf-8")
    n_plot_files = len(list((demo / "plots").glob("*.svg")))

    # 1. Well-formed: a strict XML parse of the whole page, and HTML tag balance.
    try:
        ET.fromstring(re.sub(r"^<!DOCTYPE html>", "", doc))
    except ET.ParseError as e:
        fail(f"report.html is not well-formed: {e}")
    b = Balance()
    b.feed(doc)
    b.close()
    if b.problems or b.stack:
        fail(f"unbalanced tags: {b.problems[:5]} open at the end: {b.stack[:5]}")
    print("well-formed: XML parse and HTML tag balance OK")

    # 2. Nothing outside the file is named.
    bad = external_references(doc)
    if bad:
        fail(f"report.html refers outside itself: {bad[:10]}")
    print("self-contained: no scripts, links, images, CSS urls or addresses")

    proxy = RecordingProxy()
    with tempfile.TemporaryDirectory() as profile:
        base = chromium_args(chromium, proxy, Path(profile))
        # 3a. The proxy sees a fetch when there is one (else step 3b would prove nothing).
        probe = out / "probe.html"
        probe.write_text('<!DOCTYPE html><html><body><img src="http://stillsky-probe.invalid/x.png" alt="probe"/>'
                         "</body></html>", encoding="utf-8")
        run_browser([*base, "--dump-dom", probe.as_uri()])
        seen = proxy.taken()
        if not any("stillsky-probe.invalid" in s for s in seen):
            fail(f"the recording proxy did not see the probe page's image request (saw {seen}); "
                 "the network check would prove nothing")
        print(f"network probe: the proxy saw the probe page's request ({len(seen)} request(s) in all)")

        # 3b. A page with nothing to fetch gives the browser's own background traffic, if any.
        empty = out / "empty.html"
        empty.write_text("<!DOCTYPE html><html><body><p>empty</p></body></html>", encoding="utf-8")
        run_browser([*base, "--dump-dom", empty.as_uri()])
        background = {request_host(s) for s in proxy.taken()}
        if background:
            print(f"network: the browser itself contacts {sorted(background)}; these hosts are ignored below")

        # 3c. The report: rendered DOM, and no request beyond that background.
        dom = run_browser([*base, "--dump-dom", page.as_uri()]).stdout
        extra = [s for s in proxy.taken() if request_host(s) not in background]
        if extra:
            fail(f"loading report.html made network requests: {extra}")
        print("network: loading report.html made no request")

        # 4. Screenshot (the top of the page at a desktop width).
        shot.parent.mkdir(parents=True, exist_ok=True)
        run_browser([*base, f"--screenshot={shot}", "--window-size=1100,2200", page.as_uri()])
        extra = [s for s in proxy.taken() if request_host(s) not in background]
        if extra:
            fail(f"the screenshot run made network requests: {extra}")

    # 5. What the browser rendered.
    c = Collect()
    c.feed(dom)
    text = " ".join(" ".join(c.text).split())
    m = re.search(r"Verdict: (holds|marginal|does not hold)", text)
    if not m:
        fail("no 'Verdict: holds|marginal|does not hold' in the rendered text")
    for phrase in ("Star image budget", "Image motion", "Modes", "Static checks", "Inputs and defaults used",
                   "Isolator sweep", "licensed engineer", "program", "Sky map"):
        if phrase not in text:
            fail(f"rendered text lacks {phrase!r}")
    for t in ("budget", "image-motion", "modes", "checks", "inputs-table", "ranking-overall"):
        if c.tables.get(t, 0) < 1:
            fail(f"table {t!r} missing or empty in the rendered page (tables: {c.tables})")
    # The report's plots and one sweep ranking per wind case (calm and windy are ranked apart).
    with open(demo / "sweep.csv", newline="") as fh:
        winds = {row["wind"] for row in csv.DictReader(fh) if row["status"] == "ok"}
    # The sky map (altitude x azimuth for the demo's tripod) is one of the report's plots, and the
    # page names its best and worst cells in words; the equatorial run writes its own CSV and SVG.
    if not (demo / "plots" / "sky-map.svg").is_file():
        fail("the demo wrote no plots/sky-map.svg")
    if not re.search(r"Best: altitude [\d.]+°, azimuth [\d.]+° \([a-z-]+\), [\d.]+″ = [\d.]+ px; "
                     r"worst: altitude", text):
        fail("the rendered page does not name the sky map's best and worst cells")
    for f in ("sky-map-equatorial.csv", "sky-map-equatorial.svg"):
        if not (demo / f).is_file():
            fail(f"the demo wrote no {f}")
    expected_svgs = n_plot_files + len(winds)
    if c.svgs != expected_svgs:
        fail(f"{c.svgs} <svg> plots rendered, expected {expected_svgs}")
    print(f"rendered: verdict '{m.group(1)}'; tables {c.tables}; {c.svgs} SVG plots")

    w, h, share, colours = png_facts(shot)
    if w < 800 or h < 800 or share < 0.02 or colours < 8:
        fail(f"screenshot {shot} looks empty: {w}x{h}, {share:.1%} non-white, {colours} colours")
    print(f"screenshot: {shot} ({w}x{h}, {share:.1%} non-white, {colours} colours sampled)")
    print("browser check passed")


if __name__ == "__main__":
    main()
