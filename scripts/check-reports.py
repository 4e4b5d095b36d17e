#!/usr/bin/env python3
"""Renders report.html files in headless Chromium at 1200 and 420 pixels wide,
keeps a full-page screenshot of each, and checks the layout in the browser:
nothing cut off at either edge, and no horizontal scrolling at any width except
inside tables (which scroll within their own box by design).

    scripts/check-reports.py OUT_DIR REPORT.html [REPORT.html ...]

Each report is shown in an iframe exactly WIDTH pixels wide (headless Chromium
will not make a window narrower than 500 pixels), with a probe script added to
a copy of the page; the report itself has no scripts. Screenshots are named
after the report's folder: OUT_DIR/<folder>-<width>.png. Exit code 1 lists
every problem found. Standard library only.
"""
import html
import json
import pathlib
import re
import shutil
import subprocess
import sys
import tempfile

WIDTHS = (1200, 420)
FLAGS = [
    "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
    "--disable-background-networking", "--disable-component-update", "--disable-sync",
    "--hide-scrollbars", "--force-device-scale-factor=1", "--allow-file-access-from-files",
]

# Runs inside the report's copy: measures the layout, then hands the result
# to the harness page around it.
PROBE = """<script>
window.addEventListener('load', function () {
  var W = window.innerWidth, de = document.documentElement, bad = [];
  if (de.scrollWidth > W + 1) bad.push('the page scrolls sideways: ' + de.scrollWidth + ' px wide in ' + W);
  document.querySelectorAll('body *').forEach(function (e) {
    if (e.closest('table') || (e.closest('svg') && e.tagName.toLowerCase() !== 'svg')) return;
    var r = e.getBoundingClientRect(), cs = getComputedStyle(e);
    var name = e.tagName.toLowerCase() + (e.id ? '#' + e.id : '');
    if (r.width > 0 && (r.right > W + 1 || r.left < -1))
      bad.push('cut off: ' + name + ' spans ' + Math.round(r.left) + ' to ' + Math.round(r.right) + ' px');
    if ((cs.overflowX === 'auto' || cs.overflowX === 'scroll') && e.scrollWidth > e.clientWidth + 1)
      bad.push('scrolls sideways: ' + name);
  });
  parent.document.getElementById('result').textContent = JSON.stringify({height: de.scrollHeight, bad: bad});
});
</script>"""


def chromium(args, profile):
    cmd = ["chromium", *FLAGS, f"--user-data-dir={profile}", *args]
    done = subprocess.run(cmd, capture_output=True, text=True, timeout=180)
    return done.stdout, done.stderr


def harness(folder, width, height):
    page = folder / f"harness-{width}-{height}.html"
    page.write_text(
        '<!DOCTYPE html><html><body style="margin:0"><iframe src="probe.html" '
        f'style="border:0;display:block;width:{width}px;height:{height}px"></iframe>'
        '<pre id="result"></pre></body></html>'
    )
    return page


def check(report, out_dir, profile):
    name = report.parent.name
    work = pathlib.Path(tempfile.mkdtemp())
    (work / "probe.html").write_text(report.read_text().replace("</body>", PROBE + "</body>"))
    problems = []
    for width in WIDTHS:
        # Headless Chromium sometimes dumps the page before the load event
        # under its virtual clock (seen once in CI on the demo at 420 px):
        # try again with more virtual time before calling it a failure.
        for budget in (5000, 20000, 60000):
            dom, _ = chromium([f"--virtual-time-budget={budget}", "--dump-dom", harness(work, width, 2000).as_uri()], profile)
            found = re.search(r'<pre id="result">(.*?)</pre>', dom, re.S)
            if found and found.group(1):
                break
            print(f"{name} at {width} px: no probe result within {budget} ms of virtual time, trying again")
        if not found or not found.group(1):
            problems.append(f"{name} at {width} px: the probe did not run")
            continue
        result = json.loads(html.unescape(found.group(1)))
        problems += [f"{name} at {width} px: {b}" for b in result["bad"]]
        height = min(int(result["height"]) + 20, 16000)
        shot = out_dir / f"{name}-{width}.png"
        page = harness(work, width, height)
        # Chromium now and then exits without writing the screenshot (seen
        # once in CI, on the sweep at 420 px, after every other shot worked):
        # three tries, each from a clean file, before calling it a failure.
        for attempt in range(1, 4):
            shot.unlink(missing_ok=True)
            _, err = chromium([f"--window-size={max(width, 500)},{height}", f"--screenshot={shot}", page.as_uri()], profile)
            if shot.exists() and shot.stat().st_size >= 10_000:
                break
            tail = " | ".join(err.strip().splitlines()[-3:])
            print(f"{name} at {width} px: no screenshot on try {attempt} (chromium said: {tail or 'nothing'})")
        if not shot.exists() or shot.stat().st_size < 10_000:
            problems.append(f"{name} at {width} px: no screenshot")
        else:
            print(f"{shot}: {width} px wide, page {result['height']} px tall, {len(result['bad'])} problems")
    shutil.rmtree(work)
    return problems


def main():
    out_dir = pathlib.Path(sys.argv[1]).resolve()
    out_dir.mkdir(parents=True, exist_ok=True)
    profile = tempfile.mkdtemp()
    problems = []
    for r in sys.argv[2:]:
        problems += check(pathlib.Path(r).resolve(), out_dir, profile)
    shutil.rmtree(profile, ignore_errors=True)
    for p in problems:
        print("problem:", p)
    if problems:
        sys.exit(1)
    print(f"check-reports: {len(sys.argv) - 2} reports at {' and '.join(map(str, WIDTHS))} px, no problems")


if __name__ == "__main__":
    main()
