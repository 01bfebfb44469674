#!/usr/bin/python3
"""The operators' page in a real headless Chromium (run by test_web_page.sh).

Environment: HS_WEB_URL (the gateway's page), HS_WEB_SHOTS (screenshot
folder), HS_WEB_TMP (scratch). Prints TAP lines; exits 1 when any fails.
Waits are bounded polls for the condition needed, never fixed sleeps.
"""
import http.server
import json
import os
import re
import sys
import threading

from selenium import webdriver
from selenium.common.exceptions import StaleElementReferenceException, TimeoutException
from selenium.webdriver.chrome.service import Service
from selenium.webdriver.common.by import By
from selenium.webdriver.support.ui import WebDriverWait

URL = os.environ["HS_WEB_URL"]
SHOTS = os.environ["HS_WEB_SHOTS"]
TMP = os.environ["HS_WEB_TMP"]
PONDS = ["intake", "c1", "c2", "c3", "c4", "store", "x1", "x2", "bittern"]  # config/demo.ini
failed = False


def ok(cond, what):
    global failed
    print(("ok - " if cond else "not ok - ") + what, flush=True)
    if not cond:
        failed = True
    return cond


def wait(driver, cond, seconds=30):
    try:
        return WebDriverWait(driver, seconds, poll_frequency=0.1).until(lambda d: cond(d))
    except TimeoutException:
        return None


def browser():
    opt = webdriver.ChromeOptions()
    opt.binary_location = "/usr/bin/chromium"
    for a in ("--headless", "--no-sandbox", "--disable-gpu", "--window-size=1280,2200",
              "--disable-background-networking", "--disable-component-update",
              "--no-first-run", "--disable-sync", "--disable-dev-shm-usage",
              "--user-data-dir=" + os.path.join(TMP, "chromium")):
        opt.add_argument(a)
    opt.set_capability("goog:loggingPrefs", {"performance": "ALL", "browser": "ALL"})
    return webdriver.Chrome(service=Service("/usr/bin/chromedriver"), options=opt)


def requested_urls(driver):
    urls = []
    for entry in driver.get_log("performance"):
        msg = json.loads(entry["message"])["message"]
        if msg.get("method") == "Network.requestWillBeSent":
            urls.append(msg["params"]["request"]["url"])
    return urls


def login(driver, user, password):
    driver.get(URL + "/#/chain")
    if not wait(driver, lambda d: d.find_element(By.ID, "login").is_displayed()):
        return False
    driver.find_element(By.ID, "login-user").clear()
    driver.find_element(By.ID, "login-user").send_keys(user)
    driver.find_element(By.ID, "login-password").clear()
    driver.find_element(By.ID, "login-password").send_keys(password)
    driver.find_element(By.ID, "login-submit").click()
    return True


def logout(driver):
    driver.find_element(By.ID, "logout").click()
    wait(driver, lambda d: d.find_element(By.ID, "login").is_displayed())


def texts(driver, css, attr=None):
    """Texts (or an attribute) of every element matching css, read in one go
    by the page itself: the views redraw as live updates come."""
    return driver.execute_script(
        "return Array.from(document.querySelectorAll(arguments[0]))"
        ".map((e) => arguments[1] ? e.getAttribute(arguments[1]) : e.textContent)", css, attr)


def chain_ponds(driver):
    return texts(driver, "#chain li.pond", "data-pond")


def retry(fn, tries=5):
    """Runs an interaction again when the element was redrawn under it."""
    for i in range(tries):
        try:
            return fn()
        except StaleElementReferenceException:
            if i == tries - 1:
                raise


def shot(driver, name):
    path = os.path.join(SHOTS, name)
    driver.save_screenshot(path)
    return path


FETCH = """
const [path, body, done] = arguments;
(async () => {
  const s = await (await fetch('/api/v1/session')).json();
  const r = await fetch('/api/v1' + path, {method: 'POST', headers: {'Content-Type': 'application/json',
    'X-CSRF-Token': s.csrf_token || ''}, body: JSON.stringify(body)});
  done({status: r.status, body: await r.json()});
})().catch((e) => done({status: -1, body: String(e)}));
"""


def main():
    d = browser()
    try:
        run(d)
    finally:
        d.quit()


def run(d):
    # a viewer sees the chain; its acknowledgement is refused
    login(d, "look", "viewer-pass-1")
    got = wait(d, lambda x: chain_ponds(x) if len(chain_ponds(x)) == len(PONDS) else None)
    ok(got == PONDS, "a viewer sees every pond in flow order on the chain (%s)" % got)
    ok(len(d.find_elements(By.CSS_SELECTOR, "button.ack")) == 0, "a viewer is offered no acknowledge button")
    r = d.execute_async_script(FETCH, "/alarms/1/ack", {"note": "viewer tries"})
    ok(r["status"] == 403 and "viewer" in r["body"].get("error", ""),
       "a viewer's acknowledgement is refused with 403 and a reason (%s)" % r)
    logout(d)

    # the operator: every view with every pond
    login(d, "ops", "operator-pass-1")
    got = wait(d, lambda x: chain_ponds(x) if len(chain_ponds(x)) == len(PONDS) else None)
    ok(got == PONDS, "the operator's chain shows every pond in flow order")
    big = texts(d, "#chain li.pond .big")
    ok(len(big) == len(PONDS) and all(re.match(r"^\d+\.\d\d °Bé$", t) for t in big),
       "every pond shows its degree Baume at the reference temperature (%s)" % big)
    unc = texts(d, "#chain li.pond .unc")
    ok(len(unc) == len(PONDS) and all(re.match(r"^± \d+\.\d\d °Bé$", t) for t in unc),
       "every pond shows the standard uncertainty of its state (%s)" % unc)
    links = texts(d, "#chain li.link .advice")
    ok(len(links) == 4, "the chain shows the 4 transfers with their advice (%d)" % len(links))
    live = wait(d, lambda x: x.find_element(By.ID, "live").text == "live", 20)
    ok(live, "the live indicator says live (server-sent events)")
    shot(d, "web-chain.png")
    ok(True, "screenshot web-chain.png")

    for name in PONDS:
        d.get(URL + "/#/pond/" + name)
        drawn = wait(d, lambda x: x.find_element(By.ID, "pond-title").text == "Pond " + name and
                     x.find_elements(By.CSS_SELECTOR, "#chart-path svg polyline.path") and
                     x.find_elements(By.CSS_SELECTOR, "#chart-density svg") and
                     x.find_elements(By.CSS_SELECTOR, "#chart-level svg") and
                     x.find_elements(By.CSS_SELECTOR, "#chart-temperature svg"), 30)
        here = d.find_elements(By.CSS_SELECTOR, "#chart-path svg circle.here")
        ok(bool(drawn) and len(here) == 1,
           "pond view of %s: trends drawn and its point on the evaporation path" % name)
        if name in ("c2", "x1"):
            shot(d, "web-pond-%s.png" % name)

    # the operator acknowledges an alarm through the page; the journal shows it
    d.get(URL + "/#/alarms")
    sel = "#active li.alarm[data-pond='c2'][data-rule='web-test-depth'] button.ack"
    btn = wait(d, lambda x: x.find_elements(By.CSS_SELECTOR, sel), 40)
    ok(bool(btn), "the alarms view offers the active c2 alarm for acknowledgement")
    shot(d, "web-alarms-before.png")
    if btn:
        item_css = "#active li.alarm[data-pond='c2'][data-rule='web-test-depth']"

        def ack():
            item = d.find_element(By.CSS_SELECTOR, item_css)
            note = item.find_element(By.CSS_SELECTOR, "input")
            note.clear()
            note.send_keys("gauge checked on the dike")
            item.find_element(By.CSS_SELECTOR, "button.ack").click()
        retry(ack)

        def journal_row(x):
            rows = x.execute_script(
                "return Array.from(document.querySelectorAll('#journal tbody tr'))"
                ".map((tr) => Array.from(tr.cells).map((td) => td.textContent))")
            for cells in rows:
                if (len(cells) == 6 and cells[1] == "c2" and cells[2] == "web-test-depth" and
                        cells[3].startswith("active, acknowledged") and cells[4] == "ops" and
                        cells[5] == "gauge checked on the dike"):
                    return cells
            return None
        row = wait(d, journal_row, 30)
        ok(row is not None, "the journal shows the acknowledgement by ops with its note (%s)" % row)
    shot(d, "web-alarms.png")

    # hydrometer entry through the page
    def reading():
        d.find_element(By.ID, "hydro-pond").send_keys("c3")
        d.find_element(By.ID, "hydro-sg").send_keys("1.0850")
        d.find_element(By.ID, "hydro-submit").click()
    retry(reading)
    msg = wait(d, lambda x: x.find_element(By.ID, "hydro-msg").text.startswith("Recorded") and
               x.find_element(By.ID, "hydro-msg").text, 20)
    ok(bool(msg) and "1.0850" in msg and "c3" in msg, "an operator records a hydrometer reading (%s)" % msg)

    # a phone-sized window
    d.set_window_size(390, 1600)
    d.get(URL + "/#/chain")
    wait(d, lambda x: len(chain_ponds(x)) == len(PONDS))
    width = d.execute_script("return document.documentElement.scrollWidth")
    ok(width <= 400, "on a 390 px phone the chain needs no sideways scrolling (%d px)" % width)
    shot(d, "web-chain-phone.png")
    d.get(URL + "/#/alarms")
    wait(d, lambda x: x.find_elements(By.CSS_SELECTOR, "#forecast tbody tr"))
    width = d.execute_script("return document.documentElement.scrollWidth")
    ok(width <= 400, "on a 390 px phone the alarms view needs no sideways scrolling (%d px)" % width)
    shot(d, "web-alarms-phone.png")
    d.set_window_size(1280, 2200)

    # nothing but the gateway was asked for anything
    urls = requested_urls(d)
    # chrome:// and data: are the browser's own (its start page), not the network
    outside = [u for u in urls if not (u.startswith(URL + "/") or
                                       re.match(r"^(data|chrome|chrome-untrusted|about|blob):", u))]
    ok(len(urls) > 10 and not outside,
       "the page made %d requests, none outside the gateway %s" % (len(urls), outside[:3]))

    # a cross-site POST: a page on another origin submits a form to the gateway
    evil_dir = os.path.join(TMP, "evil")
    os.makedirs(evil_dir, exist_ok=True)
    with open(os.path.join(evil_dir, "evil.html"), "w") as f:
        f.write('<!doctype html><form id=f method=post enctype="text/plain" '
                'action="%s/api/v1/alarms/1/ack"><input name=\'{"note":"x","y\' value=\'"}\'>'
                '</form><script>document.getElementById("f").submit()</script>' % URL)
    handler = lambda *a, **k: http.server.SimpleHTTPRequestHandler(*a, directory=evil_dir, **k)
    srv = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler)
    threading.Thread(target=srv.serve_forever, daemon=True).start()
    d.get("http://127.0.0.1:%d/evil.html" % srv.server_address[1])
    body = wait(d, lambda x: x.current_url.startswith(URL) and x.find_element(By.TAG_NAME, "body").text, 20)
    srv.shutdown()
    ok(bool(body) and "cross-site request refused" in body,
       "a cross-site form POST is refused (%s)" % (body or "")[:80])
    # and nothing was acknowledged by it: c3's alarm is still waiting
    d.get(URL + "/#/alarms")
    still = wait(d, lambda x: x.find_elements(By.CSS_SELECTOR,
                 "#active li.alarm[data-pond='c3'][data-rule='web-test-depth'] button.ack"), 30)
    ok(bool(still), "after the cross-site POST the c3 alarm is still unacknowledged")

    # expected: the wrong password's 401 and the cross-site POST's 403
    # a wrong password is refused, and the page says so
    logout(d)
    login(d, "ops", "not-the-password")
    err = wait(d, lambda x: "wrong" in x.find_element(By.ID, "login-error").text and
               x.find_element(By.ID, "login-error").text, 15)
    ok(err is not None and "wrong user name or password" in err,
       "a wrong password is refused on the page (%r)" % err)
    ok(d.find_element(By.ID, "login").is_displayed() and
       not d.find_element(By.ID, "view-chain").is_displayed(), "after a wrong password the views stay hidden")


    logs = [e for e in d.get_log("browser") if e.get("level") == "SEVERE" and
            not re.search(r"/api/v1/session - .*status of 401|/api/v1/alarms/1/ack|evil", e.get("message", ""))]
    ok(not logs, "no errors in the browser console (%s)" % logs[:2])


if __name__ == "__main__":
    main()
    sys.exit(1 if failed else 0)
