#!/usr/bin/python3
"""/api/v1 of the operators' page, endpoint by endpoint, including bad input
and unauthorised writes (run by test_web_api.sh against the simulator).

Environment: HS_WEB_URL, HS_WEB_CONF, HS_WEB_PID (the daemon, for SIGHUP),
HS_WEB_TMP. Prints TAP lines; exits 1 when any fails. Waits are bounded
polls, never fixed sleeps.
"""
import json
import os
import signal
import ssl
import subprocess
import sys
import time
import urllib.error
import urllib.request

URL = os.environ["HS_WEB_URL"]
CONF = os.environ["HS_WEB_CONF"]
PID = int(os.environ["HS_WEB_PID"])
TMP = os.environ["HS_WEB_TMP"]
PONDS = ["intake", "c1", "c2", "c3", "c4", "store", "x1", "x2", "bittern"]  # config/demo.ini
failed = False


def ok(cond, what):
    global failed
    print(("ok - " if cond else "not ok - ") + what, flush=True)
    if not cond:
        failed = True
    return cond


class Client:
    """One browser-like client: keeps its session cookie and CSRF token."""

    def __init__(self, base=URL, context=None):
        self.base, self.cookie, self.csrf, self.context = base, None, None, context

    def call(self, method, path, body=None, raw=None, ctype="application/json", origin=True,
             csrf=True, headers=None):
        data = raw if raw is not None else (json.dumps(body).encode() if body is not None else None)
        req = urllib.request.Request(self.base + path, data=data, method=method)
        if data is not None and ctype:
            req.add_header("Content-Type", ctype)
        if origin is True:
            req.add_header("Origin", self.base)
        elif origin:
            req.add_header("Origin", origin)
        if self.cookie:
            req.add_header("Cookie", self.cookie)
        if csrf and self.csrf:
            req.add_header("X-CSRF-Token", self.csrf)
        for k, v in (headers or {}).items():
            req.add_header(k, v)
        try:
            r = urllib.request.urlopen(req, timeout=20, context=self.context)
            status, hdrs, text = r.status, r.headers, r.read()
        except urllib.error.HTTPError as e:
            status, hdrs, text = e.code, e.headers, e.read()
        sc = hdrs.get("Set-Cookie")
        if sc:
            self.cookie = sc.split(";")[0]
        try:
            j = json.loads(text) if hdrs.get("Content-Type", "").startswith("application/json") else None
        except ValueError:
            j = None
        return status, j, hdrs, text

    def login(self, user, password):
        s, j, _, _ = self.call("POST", "/api/v1/session", {"user": user, "password": password})
        if s == 200:
            self.csrf = j["csrf_token"]
        return s, j


def until(fn, seconds=30):
    """Polls fn until it is true; a refused connection (the server is
    restarting on reload) counts as not yet."""
    end = time.monotonic() + seconds
    while time.monotonic() < end:
        try:
            v = fn()
        except (urllib.error.URLError, ConnectionError, ssl.SSLError, TimeoutError):
            v = None
        if v:
            return v
        time.sleep(0.1)
    return None


def err(j, field=None):
    return isinstance(j, dict) and isinstance(j.get("error"), str) and (field is None or j.get("field") == field)


def main():
    anon = Client()
    s, _, h, text = anon.call("GET", "/")
    ok(s == 200 and h["Content-Type"].startswith("text/html") and b"app.js" in text, "GET / serves the page")
    ok("default-src 'self'" in h.get("Content-Security-Policy", ""), "the page forbids loading from elsewhere (CSP)")
    s, _, h, text = anon.call("GET", "/app.js")
    ok(s == 200 and h["Content-Type"].startswith("text/javascript") and len(text) > 1000, "GET /app.js")
    s, _, _, _ = anon.call("GET", "/no-such-file.js")
    ok(s == 404, "an unknown file is 404")
    s, j, _, _ = anon.call("GET", "/api/v1/ponds")
    ok(s == 401 and err(j), "GET /api/v1/ponds without a login: 401 with a JSON reason")
    s, j, _, _ = anon.call("GET", "/api/v1/session")
    ok(s == 200 and j["user"] is None and j["site"] == "demo-works" and j["density_scale"] == "baume",
       "GET /api/v1/session without a login says who is asking (nobody)")
    s, j, _, _ = anon.call("POST", "/api/v1/alarms/1/ack", {})
    ok(s == 401 and err(j), "an ack without a login: 401")

    # logging in: bad input, wrong password, slowing down
    s, j, _, _ = anon.call("POST", "/api/v1/session", raw=b"{not json", ctype="application/json")
    ok(s == 400 and err(j, "body"), "login with a body that is not JSON: 400 naming body")
    s, j, _, _ = anon.call("POST", "/api/v1/session", raw=b'user=ops', ctype="application/x-www-form-urlencoded")
    ok(s == 415 and err(j), "login as a form: 415 (JSON only)")
    s, j, _, _ = anon.call("POST", "/api/v1/session", {"password": "x"})
    ok(s == 400 and err(j, "user"), "login without user: 400 naming user")
    s, j, _, _ = anon.call("POST", "/api/v1/session", {"user": "ops", "password": 5})
    ok(s == 400 and err(j, "password"), "login with a number as password: 400 naming password")
    s, j = anon.login("ops", "wrong-password")
    ok(s == 401 and err(j), "a wrong password: 401")
    s, j, h, _ = anon.call("POST", "/api/v1/session", {"user": "ops", "password": "operator-pass-1"})
    ok(s == 429 and h.get("Retry-After") and j.get("retry_after_s", 0) >= 1,
       "right after a failed login the next try for that name is slowed down (429, Retry-After)")
    s, j, _, _ = anon.call("POST", "/api/v1/session", {"user": "ops", "password": "operator-pass-1"},
                           origin="http://elsewhere.example")
    ok(s == 403 and err(j), "a login from another origin: 403")

    viewer = Client()
    s, j = viewer.login("look", "viewer-pass-1")
    ok(s == 200 and j["role"] == "viewer" and len(j["csrf_token"]) == 64, "a viewer logs in")
    ok("HttpOnly" in (viewer.call("POST", "/api/v1/session", {"user": "look", "password": "viewer-pass-1"})[2]
                      .get("Set-Cookie", "")) and True, "the session cookie is HttpOnly")
    viewer.login("look", "viewer-pass-1")
    sc = viewer.call("POST", "/api/v1/session", {"user": "look", "password": "viewer-pass-1"})[2].get("Set-Cookie", "")
    ok("SameSite=Strict" in sc and "HttpOnly" in sc, "the session cookie is SameSite=Strict (%s)" % sc[-40:])
    viewer.login("look", "viewer-pass-1")

    # reads
    s, j, _, _ = viewer.call("GET", "/api/v1/ponds")
    ok(s == 200 and [p["pond"] for p in j["ponds"]] == PONDS, "GET /api/v1/ponds: every pond in flow order")
    have = until(lambda: all(p.get("baume") and p.get("stage") for p in viewer.call("GET", "/api/v1/ponds")[1]["ponds"]))
    ok(bool(have), "every pond has a stage and a degree Baume at the reference temperature")
    p2 = [p for p in viewer.call("GET", "/api/v1/ponds")[1]["ponds"] if p["pond"] == "c2"][0]
    ok(p2["band"]["in"]["density_kg_m3"] == 1060.0 and 1.0 < p2["band"]["in"]["specific_gravity"] < 1.1 and
       p2["reference_temperature_c"] == 20.0, "a pond carries its band in kg/m3, SG and deg Be at 20 degC")
    ok(len(j["transfers"]) == 4 and all("advice" in t for t in j["transfers"]), "the document carries the transfers")
    s, j, _, _ = viewer.call("GET", "/api/v1/ponds/c2/history?since=7d&step=1h")
    ser = j["series"] if s == 200 else {}
    ok(s == 200 and j["step_s"] == 3600 and len(ser.get("baume", [])) >= 150 and
       all(len(r) == 4 for r in ser["baume"]), "history: 7 days at 1 h from the rollups (%d points)"
       % len(ser.get("baume", [])))
    ok(set(ser) == {"specific_gravity", "baume", "density_kg_m3", "temperature_c", "depth_m"},
       "history carries density (SG, deg Be, kg/m3), temperature and level")
    for q, field in (("since=7x", "since"), ("since=7d&step=10s", "step"), ("since=400d&step=1min", "step"),
                     ("since=1d&step=90s", "step"), ("since=-1d", "since")):
        s, j, _, _ = viewer.call("GET", "/api/v1/ponds/c2/history?" + q)
        ok(s == 400 and err(j, field), "history ?%s: 400 naming %s" % (q, field))
    s, j, _, _ = viewer.call("GET", "/api/v1/ponds/nowhere/history")
    ok(s == 404 and err(j, "pond"), "history of an unknown pond: 404 naming pond")
    s, j, _, _ = viewer.call("GET", "/api/v1/ponds/x1/path")
    minerals = [o["mineral"] for o in j.get("onsets", [])] if s == 200 else []
    ok(s == 200 and "gypsum" in minerals and "halite" in minerals and len(j["points"]) > 20 and
       j["now"] and j["now"]["concentration_factor"] > 1, "the evaporation path with onsets and the pond's point")
    s, j, _, _ = viewer.call("GET", "/api/v1/ponds/nowhere/path")
    ok(s == 404 and err(j, "pond"), "path of an unknown pond: 404")
    active = until(lambda: [a for a in viewer.call("GET", "/api/v1/alarms")[1]["active"]
                            if a["rule"] == "web-test-depth" and a["state"] == "unacknowledged"], 40)
    ok(active and {a["pond"] for a in active} == {"c2", "c3"}, "GET /api/v1/alarms: the two test alarms are active")
    s, j, _, _ = viewer.call("GET", "/api/v1/alarms?pond=nowhere")
    ok(s == 400 and err(j, "pond"), "alarms of an unknown pond: 400 naming pond")
    s, j, _, _ = viewer.call("GET", "/api/v1/alarms?since=soon")
    ok(s == 400 and err(j, "since"), "alarms ?since=soon: 400 naming since")
    s, j, _, _ = viewer.call("GET", "/api/v1/transfers")
    ok(s == 200 and [t["transfer"] for t in j["transfers"]] == ["intake-feed", "c4-to-store", "store-to-x1", "x1-drain"],
       "GET /api/v1/transfers")
    s, j, _, _ = viewer.call("GET", "/api/v1/hydrometer")
    ok(s == 200 and isinstance(j["readings"], list), "GET /api/v1/hydrometer")
    req = urllib.request.Request(URL + "/api/v1/events", headers={"Cookie": viewer.cookie})
    with urllib.request.urlopen(req, timeout=20) as r:
        first = r.readline() + r.readline()
        ev = b""
        while b"event: update" not in ev:
            line = r.readline()
            if not line:
                break
            ev += line
    ok(r.status == 200 and first.startswith(b"retry:") and b"event: update" in ev,
       "GET /api/v1/events streams server-sent events as states arrive")
    s, j, _, _ = viewer.call("GET", "/api/v2/ponds")
    ok(s == 404 and err(j), "an unknown API version: 404")
    s, j, _, _ = viewer.call("PUT", "/api/v1/ponds", {})
    ok(s == 405 and err(j), "PUT: 405")

    # a viewer cannot write
    c3 = [a for a in active if a["pond"] == "c3"][0]
    s, j, _, _ = viewer.call("POST", "/api/v1/alarms/%d/ack" % c3["event_id"], {})
    ok(s == 403 and "viewer" in j.get("error", ""), "a viewer's ack: 403 with the reason")
    s, j, _, _ = viewer.call("POST", "/api/v1/hydrometer", {"pond": "c3", "specific_gravity": 1.08})
    ok(s == 403, "a viewer's hydrometer reading: 403")
    s, j, _, _ = viewer.call("POST", "/api/v1/alarms/c3/web-test-depth/shelve", {"duration_s": 600})
    ok(s == 403, "a viewer's shelve: 403")

    # the operator
    op = Client()
    s = until(lambda: op.login("ops", "operator-pass-1")[0] == 200, 70)
    ok(s, "the operator logs in once the slow-down after the failed login has passed")
    e = c3["event_id"]
    s, j, _, _ = op.call("POST", "/api/v1/alarms/%d/ack" % e, {}, csrf=False)
    ok(s == 403 and "CSRF" in j.get("error", ""), "an ack without the CSRF token: 403")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/%d/ack" % e, {}, headers={"X-CSRF-Token": "0" * 64}, csrf=False)
    ok(s == 403, "an ack with a wrong CSRF token: 403")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/%d/ack" % e, {}, origin="http://127.0.0.1:1")
    ok(s == 403 and "cross-site" in j.get("error", ""), "an ack from another origin: 403 cross-site")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/%d/ack" % e, raw=b"{}", ctype="text/plain")
    ok(s == 415, "an ack with a text/plain body: 415")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/12x/ack", {})
    ok(s == 400 and err(j, "event_id"), "ack of event 12x: 400 naming event_id")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/%d/ack" % e, {"note": "x" * 300})
    ok(s == 400 and err(j, "note"), "a 300-byte note: 400 naming note")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/%d/ack" % e, {"pump": "on"})
    ok(s == 400 and err(j, "pump"), "an unknown field: 400 naming it")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/99999999/ack", {})
    ok(s == 409 and j["ok"] is False and "unknown" in j["error"], "ack of an unknown event: 409 with the daemon's reason")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/%d/ack" % e, {"note": "seen from the office"})
    ok(s == 200 and j["ok"] is True, "the operator acknowledges the c3 alarm (%s)" % j)
    s, j, _, _ = viewer.call("GET", "/api/v1/alarms?pond=c3")
    row = [r for r in j["journal"] if r["rule"] == "web-test-depth" and r["state"] == "acknowledged"]
    ok(row and row[0]["actor"] == "ops" and row[0]["note"] == "seen from the office",
       "the journal shows the acknowledgement by ops with its note")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/c2/web-test-depth/shelve", {"note": "dike work"})
    ok(s == 400 and err(j, "duration_s"), "shelve without duration_s: 400 naming it")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/c2/web-test-depth/shelve", {"duration_s": 10 ** 9})
    ok(s == 400 and err(j, "duration_s"), "shelve for 30 years: 400 naming duration_s")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/nowhere/web-test-depth/shelve", {"duration_s": 600})
    ok(s == 404 and err(j, "pond"), "shelve on an unknown pond: 404 naming pond")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/c2/no-such-rule/shelve", {"duration_s": 600})
    ok(s == 409 and j["ok"] is False, "shelve of an unknown rule: 409 with the daemon's reason")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/c2/web-test-depth/shelve", {"duration_s": 600, "note": "dike work"})
    ok(s == 200 and j["ok"] is True, "the operator shelves the c2 alarm for 10 min")
    shelved = [a for a in viewer.call("GET", "/api/v1/alarms")[1]["active"] if a["pond"] == "c2" and a["rule"] == "web-test-depth"]
    ok(shelved and shelved[0]["state"] == "shelved" and shelved[0]["shelved_until_ms"] > 0, "the alarm is shelved")
    s, j, _, _ = op.call("POST", "/api/v1/alarms/c2/web-test-depth/unshelve", {"note": "work done"})
    ok(s == 200 and j["ok"] is True, "and unshelved")

    for body, field in (({"specific_gravity": 1.1}, "pond"), ({"pond": "nowhere", "specific_gravity": 1.1}, "pond"),
                        ({"pond": "c3", "specific_gravity": "1.1"}, "specific_gravity"),
                        ({"pond": "c3", "specific_gravity": 2.5}, "specific_gravity"),
                        ({"pond": "c3", "specific_gravity": 1.1, "reference_temperature_c": 99}, "reference_temperature_c"),
                        ({"pond": "c3", "specific_gravity": 1.1, "time": 1}, "time")):
        s, j, _, _ = op.call("POST", "/api/v1/hydrometer", body)
        ok(s == 400 and err(j, field), "hydrometer %s: 400 naming %s" % (json.dumps(body), field))
    s, j, _, _ = op.call("POST", "/api/v1/hydrometer", {"pond": "c3", "specific_gravity": 1.0912, "note": "dike 3 north"})
    ok(s == 201 and j["operator"] == "ops", "the operator records a hydrometer reading (201)")
    s, j, _, _ = viewer.call("GET", "/api/v1/hydrometer?pond=c3")
    ok(s == 200 and j["readings"] and j["readings"][0]["specific_gravity"] == 1.0912 and
       j["readings"][0]["operator"] == "ops", "the reading is in the store with its operator")
    out = subprocess.run(["%s/halostage" % os.environ.get("HS_BUILD", "build"), "calibrate", "--config", CONF,
                          "--list", "--pond", "c3", "--json"], capture_output=True, text=True)
    listed = json.loads(out.stdout) if out.returncode == 0 else []
    ok(any(abs(r["specific_gravity"] - 1.0912) < 1e-9 and r["operator"] == "ops" for r in listed),
       "halostage calibrate --list sees the page's reading (%s%s)" % (out.stdout[-120:], out.stderr[-200:]))
    s, j, _, _ = op.call("POST", "/api/v1/hydrometer", raw=b"{" + b" " * 9000 + b"}")
    ok(s == 413 and err(j), "a 9 KB body: 413")
    s, j, _, _ = op.call("POST", "/api/v1/ponds", {})
    ok(s == 404, "POST to a read-only resource: 404 (nothing to write there)")

    s, j, _, _ = op.call("DELETE", "/api/v1/session", csrf=False)
    ok(s == 403, "log out without the CSRF token: 403")
    s, j, _, _ = op.call("DELETE", "/api/v1/session")
    ok(s == 200 and j["user"] is None, "log out")
    s, j, _, _ = op.call("GET", "/api/v1/ponds")
    ok(s == 401, "after logging out the views need a login again")

    # reload with public_view, then with HTTPS
    with open(CONF) as f:
        conf = f.read()
    with open(CONF, "w") as f:
        f.write(conf.replace("users_file = users\n", "users_file = users\npublic_view = yes\n"))
    os.kill(PID, signal.SIGHUP)
    got = until(lambda: Client().call("GET", "/api/v1/ponds")[0] == 200, 30)
    ok(got, "after a reload with public_view = yes the views need no login")
    s, j, _, _ = Client().call("POST", "/api/v1/hydrometer", {"pond": "c3", "specific_gravity": 1.09})
    ok(s == 401, "public_view never opens the writes (401)")

    cert, key = os.path.join(TMP, "web.pem"), os.path.join(TMP, "web.key")
    subprocess.run(["openssl", "req", "-x509", "-newkey", "rsa:2048", "-nodes", "-days", "2", "-subj", "/CN=127.0.0.1",
                    "-addext", "subjectAltName=IP:127.0.0.1", "-keyout", key, "-out", cert],
                   check=True, capture_output=True)
    with open(CONF, "w") as f:
        f.write(conf.replace("users_file = users\n", "users_file = users\ntls_cert = %s\ntls_key = %s\n" % (cert, key)))
    os.kill(PID, signal.SIGHUP)
    ctx = ssl.create_default_context(cafile=cert)
    https = Client(URL.replace("http://", "https://"), ctx)

    ok(until(lambda: https.call("GET", "/api/v1/session")[0] == 200, 30), "after a reload with tls_cert/tls_key the page is served over HTTPS")
    s, j = https.login("ops", "operator-pass-1")
    sc = https.call("POST", "/api/v1/session", {"user": "ops", "password": "operator-pass-1"})[2].get("Set-Cookie", "")
    ok(s == 200 and "Secure" in sc, "over HTTPS the session cookie is Secure")
    with open(CONF, "w") as f:
        f.write(conf)


if __name__ == "__main__":
    main()
    sys.exit(1 if failed else 0)
