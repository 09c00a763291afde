#!/usr/bin/python3
"""The what-if page in a real browser (Debian's chromium, chromium-driver, python3-selenium).

Usage: whatif_page.py TOCSIN_BINARY SCRATCH_DIR

Runs a small sweep (and a run) of an invented scenario whose swept plan and one
ward carry hostile names, loads the sweep's whatif.html (and the run's), and checks:
  keyboard   a control moved with the arrow key selects the next grid point (on the
             run's page, without a grid, the plan list selects the next plan);
  figures    every figure shown equals the sweep's CSV row for that plan
             (plan_comparison.csv, plan_unit_comparison.csv): the shown text is
             the CSV's rounded as the page rounds, and a plan's figure carries
             the CSV's exact text in data-exact;
  budget     the plan is marked within the budget exactly when its mean budget
             figure in the CSV is within the limit;
  frontier   the neighbours on the frontier are the nearest lighter and heavier
             plans that frontier.csv puts on it;
  console    the browser's console holds no message;
  inert      the hostile names show as text: no element or script came from them;
  print      printing hides the controls and keeps selection, figures and cautions;
  screenshot the page is not blank;
  static     no http(s) URL, no src/href, the embedded JSON cannot end its script.
Each check also runs on a page broken on purpose and must fail there (the controls).
Exits 77 (CTest: skipped) with a message when the browser or its driver is absent.
"""
import csv
import html.parser
import json
import os
import re
import shutil
import struct
import subprocess
import sys
import zlib

CHROMIUM, DRIVER = "/usr/bin/chromium", "/usr/bin/chromedriver"
try:
    from selenium import webdriver
    from selenium.webdriver.chrome.service import Service
    from selenium.webdriver.common.by import By
    from selenium.webdriver.common.keys import Keys
    from selenium.common.exceptions import WebDriverException
except ImportError:
    webdriver = None

HOSTILE_PLAN = '</script><script>window.pwned=1</script><img src=x onerror="window.pwned=2">&amp; "q" \'a\'\u2028 page'
HOSTILE_WARD = '<b onmouseover="window.pwned=3">4 North</b> & <svg onload="window.pwned=4">'
LIMIT = "1.5"  # the budget: worst ward's 90th percentile of notices per night


def fail(message):
    print("FAILED: " + message)
    sys.exit(1)


# ---- the sweep -------------------------------------------------------------

def write_scenario(source_dir, scratch):
    """The demo scenario, shortened, with hostile names on the swept plan and one ward."""
    text = open(os.path.join(source_dir, "scenarios", "demo.yaml"), encoding="utf-8").read()
    text = text.replace('end: "2026-11-30 07:00:00"', 'end: "2026-10-26 07:00:00"')
    text = text.replace("{name: 4 North medicine,", "{name: " + json.dumps(HOSTILE_WARD) + ",")
    text = text.replace("  - name: page-70\n", "  - name: " + json.dumps(HOSTILE_PLAN) + "\n")
    path = os.path.join(scratch, "hostile.yaml")
    open(path, "w", encoding="utf-8").write(text)
    return path


def run_tocsin(tocsin, command, scenario, out, *options):
    shutil.rmtree(out, ignore_errors=True)
    command = [tocsin, command, scenario, *options, "--out", out]
    result = subprocess.run(command, capture_output=True, text=True)
    if result.returncode != 0:
        fail(" ".join(command) + " failed:\n" + result.stdout + result.stderr)


def read_csv(path):
    with open(path, newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f))


def format_real(text, decimals):
    """models/text.cpp format_real on the CSV's exact text: %.Nf, trailing zeros cut, -0 as 0."""
    if text == "":
        return ""
    s = "%.*f" % (decimals, float(text))
    if "." in s:
        s = s.rstrip("0").rstrip(".")
    return "0" if s == "-0" else s


# ---- the browser -----------------------------------------------------------

def start_browser():
    options = webdriver.ChromeOptions()
    for a in ("--headless=new", "--no-sandbox", "--disable-gpu", "--window-size=1400,1600", "--hide-scrollbars",
              "--disable-background-networking", "--disable-component-update", "--no-first-run"):
        options.add_argument(a)
    options.binary_location = CHROMIUM
    options.set_capability("goog:loggingPrefs", {"browser": "ALL"})
    return webdriver.Chrome(service=Service(DRIVER), options=options)


def load(driver, path):
    driver.get("file://" + os.path.abspath(path))
    driver.get_log("browser")  # start each page with an empty log
    driver.refresh()


def page_data(driver):
    return json.loads(driver.find_element(By.ID, "whatif-data").get_attribute("textContent"))


def selected(driver):
    return driver.find_element(By.ID, "selected-name").get_attribute("textContent")


def check_keyboard(driver):
    """Arrow right on the first control moves to the next value of that axis, the others kept."""
    data = page_data(driver)
    before = selected(driver)
    at = next(p["at"] for p in data["plans"] if p["name"] == before)
    try:
        driver.find_element(By.ID, "axis-0").send_keys(Keys.RIGHT)
    except WebDriverException as e:
        return ["the first control does not take the keyboard: " + e.msg]
    after = selected(driver)
    want = next((p["name"] for p in data["plans"] if p["at"] == [at[0] + 1] + at[1:]), None)
    problems = []
    if want is None or after != want:
        problems.append("after arrow right the page shows %r, expected %r" % (after, want))
    output = driver.find_element(By.ID, "axis-0-value").get_attribute("textContent")
    if output != data["axes"][0]["values"][at[0] + 1]:
        problems.append("the control's value reads %r" % output)
    return problems


def check_plan_choice(driver):
    """A run's page (no sweep): no sliders; arrow down on the plan list selects the next plan."""
    plans = page_data(driver)["plans"]
    problems = ["%d sliders on a run's page" % len(driver.find_elements(By.CSS_SELECTOR, "#controls input"))]
    problems = problems if "0 sliders" not in problems[0] else []
    try:
        driver.find_element(By.ID, "plan-choice").send_keys(Keys.DOWN)
    except WebDriverException as e:
        return problems + ["the plan list does not take the keyboard: " + e.msg]
    if len(plans) < 2 or selected(driver) != plans[1]["name"]:
        problems.append("after arrow down the page shows %r, expected the second plan" % selected(driver))
    return problems


def compare_cells(problems, where, mean_cell, interval_cell, row, decimals, exact=True):
    """The shown text against the CSV's rounded as the page rounds; with `exact`, the data-exact texts too."""
    got = (mean_cell.get_attribute("data-exact"), interval_cell.get_attribute("data-exact"),
           interval_cell.get_attribute("data-exact-high"))
    want = (row["mean"], row["ci_low"], row["ci_high"])
    if exact and got != want:
        problems.append("%s: page has %r, CSV has %r" % (where, got, want))
    shown_mean = format_real(row["mean"], decimals) or "\u2013"
    shown_interval = (format_real(row["ci_low"], decimals) + " to " + format_real(row["ci_high"], decimals)
                      if row["ci_low"] != "" else "\u2013")
    if (mean_cell.text, interval_cell.text) != (shown_mean, shown_interval):
        problems.append("%s: shows %r, CSV rounds to %r" % (where, (mean_cell.text, interval_cell.text),
                                                            (shown_mean, shown_interval)))


def check_figures(driver, out):
    """Every figure and every ward figure of the selected plan against the sweep's CSV rows."""
    plan = selected(driver)
    data = page_data(driver)
    decimals = {f["name"]: f["decimals"] for f in data["figures"]}
    rows = {r["metric"]: r for r in read_csv(os.path.join(out, "plan_comparison.csv")) if r["plan"] == plan}
    problems = []
    trs = driver.find_elements(By.CSS_SELECTOR, "#figures tbody tr")
    if len(trs) != len(data["figures"]) or not rows:
        problems.append("%d figure rows shown, %d CSV rows for %r" % (len(trs), len(rows), plan))
    for tr in trs:
        metric = tr.get_attribute("data-metric")
        cells = tr.find_elements(By.TAG_NAME, "td")
        compare_cells(problems, metric, cells[0], cells[1], rows.get(metric, {"mean": "?", "ci_low": "?", "ci_high": "?"}),
                      decimals[metric])
    ward_decimals = [f["decimals"] for f in data["ward_figures"]]
    ward_rows = {(r["unit"], r["metric"]): r for r in read_csv(os.path.join(out, "plan_unit_comparison.csv"))
                 if r["plan"] == plan}
    for tr in driver.find_elements(By.CSS_SELECTOR, "#wards tbody tr"):
        unit = data["units"][int(tr.get_attribute("data-unit"))]
        if tr.find_element(By.TAG_NAME, "th").get_attribute("textContent") != unit:
            problems.append("ward name shown differs from %r" % unit)
        cells = tr.find_elements(By.TAG_NAME, "td")
        for k, f in enumerate(data["ward_figures"]):
            compare_cells(problems, unit + "/" + f["name"], cells[2 * k], cells[2 * k + 1],
                          ward_rows.get((unit, f["name"]), {"mean": "?", "ci_low": "?", "ci_high": "?"}), ward_decimals[k],
                          exact=False)
    return problems


def check_budget(driver, out):
    plan = selected(driver)
    rows = [r for r in read_csv(os.path.join(out, "plan_comparison.csv"))
            if r["plan"] == plan and r["metric"] == "worst_unit_night_p90"]
    within = bool(rows) and rows[0]["mean"] != "" and float(rows[0]["mean"]) <= float(LIMIT)
    shown = driver.find_element(By.ID, "selected-budget").text
    want = "Within the budget." if within else "Over the budget."
    return [] if shown.endswith(want) else ["budget shows %r, CSV says %r" % (shown, want)]


def check_frontier_neighbours(driver, out):
    plan = selected(driver)
    frontier = read_csv(os.path.join(out, "frontier.csv"))
    me = next(r for r in frontier if r["plan"] == plan)
    x = float(me["burden"])
    others = [r for r in frontier if r["plan"] != plan and r["on_frontier"] == "1"
              and r["compared_within"] == me["compared_within"]]
    lighter = max((r for r in others if float(r["burden"]) < x), key=lambda r: float(r["burden"]), default=None)
    heavier = min((r for r in others if float(r["burden"]) >= x), key=lambda r: float(r["burden"]), default=None)
    want = {k: r["plan"] for k, r in (("next lighter", lighter), ("next heavier", heavier)) if r}
    got = {}
    for tr in driver.find_elements(By.CSS_SELECTOR, "#neighbours tbody tr"):
        label = tr.find_element(By.TAG_NAME, "th").text
        if label.startswith("on the frontier, "):
            got[label[len("on the frontier, "):]] = tr.find_element(By.TAG_NAME, "button").get_attribute("textContent")
    return [] if got == want else ["frontier neighbours shown %r, frontier.csv gives %r" % (got, want)]


def check_console(driver):
    return ["console: %s" % e["message"] for e in driver.get_log("browser")]


def check_inert(driver):
    problems = []
    if driver.execute_script("return window.pwned === undefined") is not True:
        problems.append("a hostile name ran as script")
    for tag in ("img", "b", "script[src]"):
        if driver.find_elements(By.CSS_SELECTOR, "main " + tag + ", .side " + tag):
            problems.append("a hostile name became a <%s> element" % tag)
    if HOSTILE_PLAN not in selected(driver):
        problems.append("the plan's name is not shown as its own text")
    return problems


def check_print(driver):
    driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {"media": "print"})
    try:
        shown = {i: driver.find_element(By.ID, i).is_displayed()
                 for i in ("controls", "selected-name", "figures", "cautions", "chart-svg")}
    finally:
        driver.execute_cdp_cmd("Emulation.setEmulatedMedia", {"media": ""})
    want = {"controls": False, "selected-name": True, "figures": True, "cautions": True, "chart-svg": True}
    return [] if shown == want else ["printed, the page shows %r (expected %r)" % (shown, want)]


def png_looks(png):
    """(distinct colours, share of dark pixels) of Chromium's 8-bit RGB(A) PNG (PNG specification, W3C 2003)."""
    width, height, depth, colour = struct.unpack(">IIBB", png[16:26])
    channels = {2: 3, 6: 4}[colour]
    idat, at = b"", 8
    while at < len(png):
        length = struct.unpack(">I", png[at:at + 4])[0]
        if png[at + 4:at + 8] == b"IDAT":
            idat += png[at + 8:at + 8 + length]
        at += 12 + length
    raw, stride = zlib.decompress(idat), width * channels
    previous, colours, dark = bytearray(stride), set(), 0
    for y in range(height):
        kind, line = raw[y * (stride + 1)], bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for i in range(stride):
            a = line[i - channels] if i >= channels else 0
            b, c = previous[i], previous[i - channels] if i >= channels else 0
            if kind == 1: line[i] = (line[i] + a) & 255
            elif kind == 2: line[i] = (line[i] + b) & 255
            elif kind == 3: line[i] = (line[i] + (a + b) // 2) & 255
            elif kind == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[i] = (line[i] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        if y % 4 == 0:  # every fourth row is plenty to tell a page from a blank
            for x in range(0, width, 2):
                px = bytes(line[x * channels:x * channels + 3])
                colours.add(px)
                dark += sum(px) < 3 * 128
        previous = line
    return len(colours), dark / ((height + 3) // 4 * ((width + 1) // 2))


def check_screenshot(driver, save_to=None):
    png = driver.get_screenshot_as_png()
    if save_to:
        open(save_to, "wb").write(png)
    colours, ink = png_looks(png)
    # A page of text, tables and a chart: many colours (anti-aliased text) and
    # a few percent of dark pixels; a blank page has one colour and no ink.
    return [] if colours >= 20 and ink >= 0.005 else ["screenshot looks blank: %d colours, %.4f ink" % (colours, ink)]


class Elements(html.parser.HTMLParser):
    """Every element and attribute as a browser's tokenizer sees them (script content is raw text)."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags, self.attributes = [], []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        self.attributes += [name for name, _ in attrs]


def check_static(page_text):
    problems = []
    if re.search(r"https?:", page_text):
        problems.append("an http(s) URL in the page")
    elements = Elements()
    elements.feed(page_text)
    fetching = {"src", "href", "srcset", "action", "xlink:href", "poster", "data"} & set(elements.attributes)
    if fetching:
        problems.append("attributes that fetch: " + ", ".join(sorted(fetching)))
    embedding = {"img", "link", "iframe", "object", "embed", "audio", "video"} & set(elements.tags)
    if embedding or elements.tags.count("script") != 2:
        problems.append("%d script elements (2 expected); elements that fetch: %s"
                        % (elements.tags.count("script"), ", ".join(sorted(embedding)) or "none"))
    data = re.search(r'<script type="application/json" id="whatif-data">(.*?)</script>', page_text, re.S)
    try:
        names = [p["name"] for p in json.loads(data.group(1))["plans"]]
    except (AttributeError, ValueError) as e:
        return problems + ["the embedded JSON does not parse up to its end tag: %s" % e]
    if re.search(r"[<>&\u2028\u2029]", data.group(1)):
        problems.append("the embedded JSON holds a raw < > & or line separator")
    if not any(n.startswith(HOSTILE_PLAN + " t") for n in names):
        problems.append("the embedded JSON does not give back the plan's name")
    return problems


# ---- the controls: pages broken on purpose ----------------------------------

def broken(page_text, scratch, name, old, new):
    if old not in page_text:
        fail("control %s: %r is not in the page, so it cannot be broken there" % (name, old))
    path = os.path.join(scratch, "control-" + name + ".html")
    open(path, "w", encoding="utf-8").write(page_text.replace(old, new, 1))
    return path


def main():
    if len(sys.argv) != 3:
        fail(__doc__)
    tocsin, scratch = sys.argv[1], sys.argv[2]
    missing = [p for p in (CHROMIUM, DRIVER) if not os.path.exists(p)] + ([] if webdriver else ["python3-selenium"])
    if missing:
        print("SKIPPED: the what-if page's browser test needs chromium, chromium-driver and python3-selenium "
              "(./go test installs them); missing: " + ", ".join(missing))
        sys.exit(77)
    os.makedirs(scratch, exist_ok=True)
    source_dir = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
    out, run_out = os.path.join(scratch, "sweep"), os.path.join(scratch, "run")
    scenario = write_scenario(source_dir, scratch)
    run_tocsin(tocsin, "sweep", scenario, out, "--plan", HOSTILE_PLAN, "--vary", "plan.rule.threshold=50:70:10",
               "--vary", "plan.rule.snooze_minutes=60,240", "--replications", "4", "--max-burden", LIMIT)
    run_tocsin(tocsin, "run", scenario, run_out, "--replications", "3")
    page = os.path.join(out, "whatif.html")
    page_text = open(page, encoding="utf-8").read()
    results = []

    def expect(name, problems, should_fail=False):
        ok = bool(problems) == should_fail
        results.append(ok)
        print("%s %s%s%s" % ("ok  " if ok else "FAIL", "control: " if should_fail else "", name,
                              "" if ok and not should_fail else ": " + ("; ".join(problems) or "no problem found")[:300]))

    expect("static", check_static(page_text))
    expect("static", check_static(page_text.replace("</header>", '<img src="https://example.invalid/x.png"></header>')), True)
    expect("static", check_static(page_text.replace("\\u003c/script\\u003e", "</script>", 1)), True)
    driver = start_browser()
    try:
        load(driver, page)
        expect("keyboard", check_keyboard(driver))
        expect("figures", check_figures(driver, out))
        expect("budget", check_budget(driver, out))
        expect("frontier", check_frontier_neighbours(driver, out))
        expect("inert", check_inert(driver))
        expect("print", check_print(driver))
        expect("screenshot", check_screenshot(driver, os.path.join(scratch, "whatif.png")))
        expect("console", check_console(driver))

        load(driver, os.path.join(run_out, "whatif.html"))
        expect("run: inert", check_inert(driver))  # its first plan, shown on opening, has the hostile name
        expect("run: plan list", check_plan_choice(driver))
        expect("run: figures", check_figures(driver, run_out))
        expect("run: console", check_console(driver))

        load(driver, broken(page_text, scratch, "keyboard", "input.type = \"range\";", "input.type = \"range\"; input.disabled = true;"))
        expect("keyboard", check_keyboard(driver), True)
        load(driver, broken(page_text, scratch, "figures", "valueCells(tr, p.f[k]);", "valueCells(tr, plans[0].f[k]);"))
        check_keyboard(driver)
        expect("figures", check_figures(driver, out), True)
        load(driver, broken(page_text, scratch, "budget", "p.budget ? \"Within the budget.\"", "!p.budget ? \"Within the budget.\""))
        expect("budget", check_budget(driver, out), True)
        load(driver, broken(page_text, scratch, "frontier", '["on the frontier, next lighter", lighter]',
                                    '["on the frontier, next heavier", lighter]'))
        expect("frontier", check_frontier_neighbours(driver, out), True)
        load(driver, broken(page_text, scratch, "inert", "getElementById(\"selected-name\").textContent", "getElementById(\"selected-name\").innerHTML"))
        expect("inert", check_inert(driver), True)
        load(driver, broken(page_text, scratch, "print", "@media print", "@media speech"))
        expect("print", check_print(driver), True)
        load(driver, broken(page_text, scratch, "console", "buildControls();\n  show(current);", "buildControls();\n  show(current);\n  console.error(\"control\");"))
        expect("console", check_console(driver), True)
        load(driver, broken(page_text, scratch, "blank", "<body>", "<body style=\"visibility: hidden\">"))
        expect("screenshot", check_screenshot(driver), True)
    finally:
        driver.quit()
    if not all(results):
        fail("%d of %d checks went wrong" % (results.count(False), len(results)))
    print("all %d checks and controls passed" % len(results))


if __name__ == "__main__":
    main()
