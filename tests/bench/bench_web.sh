#!/usr/bin/env bash
# The operators' page under load while the daemon polls the simulator:
#  1. the first view (log-in done, the chain with every pond drawn) in a real
#     headless Chromium: time from navigation start and bytes transferred,
#     median of 5 fresh loads (goal: <= 1 s, <= 300 KB);
#  2. GET /api/v1/ponds from 20 concurrent clients (20 processes, each with
#     its own keep-alive connection): latency percentiles (goal: p95 <= 20 ms)
#     and requests per second.
set -u
cd "$(dirname "$0")/../.."
HS_BUILD=${HS_BUILD:-build}
. tests/integration/lib.sh
. tests/integration/web_lib.sh
hs_web_site || { echo "bench_web: the simulator or halostaged did not start"; tail -5 "$HS_TMP/halostaged.log"; exit 1; }
HS_WEB_URL=$HS_WEB_URL HS_WEB_TMP=$HS_TMP /usr/bin/python3 - <<'PY'
import http.client, json, multiprocessing, os, statistics, time, urllib.parse

URL = os.environ["HS_WEB_URL"]
TMP = os.environ["HS_WEB_TMP"]
host = urllib.parse.urlparse(URL)

def login():
    c = http.client.HTTPConnection(host.hostname, host.port, timeout=20)
    c.request("POST", "/api/v1/session", json.dumps({"user": "look", "password": "viewer-pass-1"}),
              {"Content-Type": "application/json", "Origin": URL})
    r = c.getresponse(); r.read()
    return r.getheader("Set-Cookie").split(";")[0]

cookie = login()

# 1. first view in Chromium
try:
    from selenium import webdriver
    from selenium.webdriver.chrome.service import Service
    opt = webdriver.ChromeOptions()
    opt.binary_location = "/usr/bin/chromium"
    for a in ("--headless", "--no-sandbox", "--disable-gpu", "--window-size=1280,900",
              "--user-data-dir=" + os.path.join(TMP, "bench-chromium")):
        opt.add_argument(a)
    d = webdriver.Chrome(service=Service("/usr/bin/chromedriver"), options=opt)
    d.get(URL + "/no-such-page")  # to set the cookie on the gateway's origin
    d.add_cookie({"name": cookie.split("=")[0], "value": cookie.split("=")[1], "path": "/"})
    times, sizes = [], []
    for i in range(6):
        d.execute_cdp_cmd("Network.clearBrowserCache", {}) if i else None
        d.get("about:blank")
        d.get(URL + "/#/chain")
        t0 = time.monotonic()
        while time.monotonic() - t0 < 30:
            done = d.execute_script(
                "return document.querySelectorAll('#chain li.pond').length >= 9 ? performance.now() : null")
            if done:
                break
            time.sleep(0.01)
        size = d.execute_script(
            "return performance.getEntriesByType('navigation').concat(performance.getEntriesByType('resource'))"
            ".reduce((s, e) => s + (e.transferSize || e.encodedBodySize || 0), 0)")
        if i:  # the first load warms chromium itself
            times.append(done)
            sizes.append(size)
    d.quit()
    print("first view (chain with every pond, cold cache): median %.0f ms, max %.0f ms over %d loads; %.1f KB transferred (goal <= 1000 ms, <= 300 KB)"
          % (statistics.median(times), max(times), len(times), statistics.median(sizes) / 1024))
except Exception as e:  # report, do not hide
    print("first view: could not measure: %s" % e)

# 2. 20 concurrent clients on /api/v1/ponds
N, PER = 20, 150

def client(q):
    c = http.client.HTTPConnection(host.hostname, host.port, timeout=20)
    lat = []
    for _ in range(PER):
        t = time.perf_counter()
        c.request("GET", "/api/v1/ponds", headers={"Cookie": cookie})
        r = c.getresponse(); body = r.read()
        lat.append((time.perf_counter() - t) * 1000)
        if r.status != 200 or len(body) < 1000:
            lat[-1] = float("inf")
    q.put(lat)

q = multiprocessing.Queue()
procs = [multiprocessing.Process(target=client, args=(q,)) for _ in range(N)]
t0 = time.perf_counter()
for p in procs: p.start()
lat = []
for _ in procs: lat += q.get()
for p in procs: p.join()
wall = time.perf_counter() - t0
lat.sort()
pct = lambda p: lat[min(len(lat) - 1, int(p / 100 * len(lat)))]
bad = sum(1 for x in lat if x == float("inf"))
print("/api/v1/ponds, %d clients x %d requests while polling: p50 %.1f ms, p95 %.1f ms, p99 %.1f ms, max %.1f ms; %.0f requests/s; %d failed (goal p95 <= 20 ms)"
      % (N, PER, pct(50), pct(95), pct(99), lat[-1], len(lat) / wall, bad))
PY
