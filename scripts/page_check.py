#!/usr/bin/env python3
"""Opens a reknit map.html in headless Chromium through chromedriver (selenium) and reports what the
browser saw, as JSON on stdout; tests/map_page.rs judges it against the layers beside the page.

Usage: page_check.py CHROMEDRIVER CHROMIUM OUTPUT_FOLDER PROFILE_FOLDER SCREENSHOT.png

Reported: the features drawn per layer (the page's `document.body.dataset.drawn`), the browser's
console entries, every URL the page requested (the DevTools performance log's
Network.requestWillBeSent events made for a document loaded from a file, which are the page and
anything it loads, and the Performance API's entries), what a click on a few repairs
and sites showed in the side panel (the point clicked is taken from plan.geojson / sites.geojson and
placed on the screen with the page's own projection), the features drawn after switching each
layer off, and the title after load (a road name holding markup must not change it).
"""
import json
import os
import sys

os.environ.setdefault("SE_OFFLINE", "true")  # never let selenium fetch a driver or a browser
from selenium import webdriver  # noqa: E402
from selenium.webdriver.chrome.service import Service  # noqa: E402
from selenium.webdriver.common.action_chains import ActionChains  # noqa: E402
from selenium.webdriver.common.by import By  # noqa: E402
from selenium.webdriver.support.ui import WebDriverWait  # noqa: E402


def features(path):
    if not os.path.exists(path):
        return []
    with open(path, encoding="utf-8") as f:
        return json.load(f)["features"]


def click_point(coords):
    """The middle of the longest segment of a line (lon/lat), or the point itself."""
    if coords and isinstance(coords[0], (int, float)):
        return coords
    best, at = -1.0, coords[0]
    for a, b in zip(coords, coords[1:]):
        d = (a[0] - b[0]) ** 2 + (a[1] - b[1]) ** 2
        if d > best:
            best, at = d, [(a[0] + b[0]) / 2, (a[1] + b[1]) / 2]
    return at


def main():
    driver_path, chromium, folder, profile, shot = sys.argv[1:6]
    page = os.path.abspath(os.path.join(folder, "map.html"))
    opts = webdriver.ChromeOptions()
    opts.binary_location = chromium
    for a in ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
              "--disable-background-networking", "--disable-component-update", "--disable-sync",
              "--window-size=1400,1000", "--user-data-dir=" + profile]:
        opts.add_argument(a)
    opts.set_capability("goog:loggingPrefs", {"browser": "ALL", "performance": "ALL"})
    d = webdriver.Chrome(service=Service(executable_path=driver_path), options=opts)
    out = {}
    try:
        d.get_log("performance")  # the browser's own start-up requests: not the page's
        d.get("file://" + page)
        WebDriverWait(d, 30).until(lambda x: x.execute_script("return document.body.dataset.drawn"))
        out["title"] = d.title
        out["drawn"] = json.loads(d.execute_script("return document.body.dataset.drawn"))
        out["simplified"] = d.execute_script("return reknitMap.data.simplified")
        d.save_screenshot(shot)
        canvas = d.find_element(By.ID, "map")

        def click(lonlat):
            x, y = d.execute_script("return reknitMap.project(arguments[0], arguments[1])", *lonlat)
            r = d.execute_script("var r = arguments[0].getBoundingClientRect();"
                                 "return [r.left, r.top, r.width, r.height]", canvas)
            dx, dy = x - (r[0] + r[2] / 2), y - (r[1] + r[3] / 2)
            ActionChains(d).move_to_element_with_offset(canvas, int(round(dx)), int(round(dy))) \
                .click().perform()
            shown = d.execute_script(
                "var o = {}; document.querySelectorAll('#info td').forEach(function (t) {"
                " o[t.dataset.field] = t.textContent; }); return o")
            return {"selected": d.execute_script("return document.body.dataset.selected"),
                    "fields": shown}

        def zoom_to(lonlat):
            # Zoom in with the page's own + button, centred on the point, so neighbours stand apart.
            d.execute_script("reknitMap.fit(); var v = reknitMap.view, p = reknitMap.data.proj,"
                             "l = arguments[0], m = [(p[0] === 1 && l[0] < 0 ? l[0] + 360 : l[0]) - p[1],"
                             " l[1] - p[2]]; v.cx = m[0] * p[3]; v.cy = m[1] * p[4]; reknitMap.draw();",
                             lonlat)
            for _ in range(6):
                d.find_element(By.ID, "zoom-in").click()
            d.execute_script("reknitMap.draw()")

        repairs = [f for f in features(os.path.join(folder, "plan.geojson"))
                   if f["properties"].get("repair")]
        # Repairs of 30 m or more: a shorter one may lie under a site's symbol, which a click picks first.
        repairs = [f for f in repairs if f["properties"]["length_m"] >= 30] or repairs
        repairs.sort(key=lambda f: f["properties"]["order"])
        picks = [repairs[i] for i in sorted({0, len(repairs) // 2, len(repairs) - 1})] if repairs else []
        out["repair_clicks"] = []
        for f in picks:
            at = click_point(f["geometry"]["coordinates"])
            zoom_to(at)
            got = click(at)
            got["expected"] = f["properties"]["work_order"]
            got["expected_order"] = f["properties"]["order"]
            out["repair_clicks"].append(got)
        out["site_clicks"] = []
        for f in features(os.path.join(folder, "sites.geojson"))[:3]:
            at = f["geometry"]["coordinates"]
            zoom_to(at)
            got = click(at)
            got["expected"] = {k: f["properties"].get(k) for k in ("site_id", "status", "status_label", "reason")}
            out["site_clicks"].append(got)
        d.execute_script("reknitMap.fit(); reknitMap.draw()")
        out["off"] = {}
        for box in d.find_elements(By.CSS_SELECTOR, "#toggles input"):
            layer = box.get_attribute("id")[len("layer-"):]
            box.click()
            d.execute_script("reknitMap.draw()")
            drawn = json.loads(d.execute_script("return document.body.dataset.drawn"))
            out["off"][layer] = drawn
            box.click()
        d.execute_script("reknitMap.draw()")
        out["drawn_after"] = json.loads(d.execute_script("return document.body.dataset.drawn"))
        out["resources"] = d.execute_script(
            "return performance.getEntries().map(function (e) { return e.name; })"
            ".filter(function (n) { return n.indexOf(':') > 0; })")
        out["requests"] = []
        for entry in d.get_log("performance"):
            msg = json.loads(entry["message"])["message"]
            # Every request made on the page's behalf names it as its document (the browser's
            # own pages, such as a new tab, name themselves).
            params = msg.get("params", {})
            if msg.get("method") == "Network.requestWillBeSent" and \
                    params.get("documentURL", "").startswith("file:"):
                out["requests"].append(params["request"]["url"])
        out["console"] = [{"level": e["level"], "message": e["message"]} for e in d.get_log("browser")]
        out["title_after"] = d.title
    finally:
        d.quit()
    json.dump(out, sys.stdout, indent=1)


if __name__ == "__main__":
    main()
