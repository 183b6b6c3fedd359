"""Opens an mzsift report.html in headless Chromium with the network disabled and checks it.

Checks: no console error, no request other than the page itself, no script, one compound
section per halogenated row of batch_compounds.tsv, one heat-map cell per file and compound.
Writes a screenshot and prints the load time (median of --loads page loads).

usage: check_report.py REPORT.html OUTDIR SCREENSHOT.png [--loads N]
(OUTDIR: the run folder, for batch_compounds.tsv)
"""
import csv
import json
import statistics
import sys
import tempfile
import time
from pathlib import Path

from selenium import webdriver
from selenium.webdriver.chrome.service import Service

# The fixed columns of batch_compounds.tsv (issue 14); every later column is a file.
FIXED = ["batch_compound", "neutral_mass", "rt_min", "polarity", "n_cl", "n_br", "halogen",
         "odd_nominal", "files_detected", "in_blank", "blank_max", "above_blank",
         "formula_candidates"]


def expected_counts(outdir):
    path = Path(outdir) / "batch_compounds.tsv"
    if not path.exists():
        return 0, 0
    with open(path, newline="") as f:
        rows = list(csv.reader(f, delimiter="\t"))
    header, body = rows[0], rows[1:]
    last_fixed = max(i for i, h in enumerate(header) if h in FIXED)
    files = len(header) - last_fixed - 1
    halogen = header.index("halogen")
    return sum(1 for r in body if r[halogen] == "true"), files * len(body)


def main():
    report, outdir, shot = sys.argv[1:4]
    loads = int(sys.argv[sys.argv.index("--loads") + 1]) if "--loads" in sys.argv else 1
    opts = webdriver.ChromeOptions()
    opts.binary_location = "/usr/bin/chromium"
    profile = tempfile.mkdtemp(prefix="mzsift-chromium-")
    for a in ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
              "--disable-background-networking", "--disable-component-update", "--disable-sync",
              f"--user-data-dir={profile}", "--window-size=1280,2600",
              # Network off: every host resolves to nothing and any proxy use fails.
              "--host-resolver-rules=MAP * ~NOTFOUND", "--proxy-server=127.0.0.1:9"]:
        opts.add_argument(a)
    opts.set_capability("goog:loggingPrefs", {"browser": "ALL", "performance": "ALL"})
    driver = webdriver.Chrome(service=Service("/usr/bin/chromedriver"), options=opts)
    problems = []
    try:
        driver.execute_cdp_cmd("Network.enable", {})
        driver.execute_cdp_cmd("Network.emulateNetworkConditions", {
            "offline": True, "latency": 0, "downloadThroughput": 0, "uploadThroughput": 0})
        url = Path(report).resolve().as_uri()
        times, log = [], []
        for _ in range(loads):
            driver.get("about:blank")
            driver.get_log("performance")  # drop what the browser did before the page
            t0 = time.perf_counter()
            driver.get(url)  # returns after the load event
            wall = time.perf_counter() - t0
            nav = driver.execute_script(
                "const n = performance.getEntriesByType('navigation')[0];"
                "return [n.domContentLoadedEventEnd, n.loadEventEnd];")
            times.append((wall, nav[0] / 1000, nav[1] / 1000))
            log += driver.get_log("performance")
        requests = []
        for entry in log:
            msg = json.loads(entry["message"])["message"]
            if msg["method"] == "Network.requestWillBeSent":
                u = msg["params"]["request"]["url"]
                if not (u == url or u.startswith("data:") or u == "about:blank"):
                    requests.append(u)
        if requests:
            problems.append(f"requests left the page: {requests[:5]}")
        errors = [e for e in driver.get_log("browser") if e["level"] == "SEVERE"]
        if errors:
            problems.append(f"console errors: {errors[:5]}")
        count = lambda css: driver.execute_script(f"return document.querySelectorAll('{css}').length")
        if count("script"):
            problems.append("the page holds a script")
        sections, cells = count("section.compound"), count("svg.heatmap rect.cell")
        want_sections, want_cells = expected_counts(outdir)
        if sections != want_sections:
            problems.append(f"{sections} compound sections, {want_sections} halogenated rows")
        if cells != want_cells:
            problems.append(f"{cells} heat-map cells, {want_cells} files x compounds")
        if not count("aside.caution"):
            problems.append("no caution")
        driver.save_screenshot(shot)
        med = [statistics.median(t[i] for t in times) for i in range(3)]
        size = Path(report).stat().st_size
        print(f"{report}: {size / 1e6:.2f} MB, {sections} compound sections, {cells} heat-map cells; "
              f"median of {loads} loads: driver.get {med[0]:.3f} s, DOMContentLoaded {med[1]:.3f} s, "
              f"load event {med[2]:.3f} s; screenshot {shot}")
    finally:
        driver.quit()
    for p in problems:
        print("FAIL:", p)
    sys.exit(1 if problems else 0)


if __name__ == "__main__":
    main()
