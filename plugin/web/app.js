/* halostage operators' page. Talks only to this gateway's /api/v1; every
 * number it shows comes from there (the page draws and formats, it never
 * computes brine chemistry). No libraries: DOM, fetch, EventSource, SVG. */
'use strict';

const S = {
  me: null,          // GET /api/v1/session
  doc: null,         // GET /api/v1/ponds
  alarms: null,      // GET /api/v1/alarms
  view: 'chain',
  pond: null,
  range: '7d',
  events: null,
  timer: null,
  busy: false,
  activeSig: '',
};
const STEP = { '1d': '5min', '7d': '1h', '30d': '6h' };
const $ = (id) => document.getElementById(id);

/* ---- small helpers ---- */

function el(tag, attrs, ...kids) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs || {})) {
    if (v === undefined || v === null || v === false) continue;
    if (k === 'text') e.textContent = v;
    else if (k === 'on') for (const [ev, fn] of Object.entries(v)) e.addEventListener(ev, fn);
    else e.setAttribute(k, v === true ? '' : v);
  }
  for (const kid of kids) if (kid !== null && kid !== undefined) e.append(kid);
  return e;
}

function sv(tag, attrs, text) {
  const e = document.createElementNS('http://www.w3.org/2000/svg', tag);
  for (const [k, v] of Object.entries(attrs || {})) e.setAttribute(k, v);
  if (text !== undefined) e.textContent = text;
  return e;
}

const fin = (x) => typeof x === 'number' && isFinite(x);


/* A measured value or limit with 4 significant digits and no trailing zeros. */
function sig4(x) { return fin(x) ? String(Number(x.toPrecision(4))) : '–'; }

function scaleSg() { return S.me && S.me.density_scale === 'sg'; }

function tref() {
  const t = S.me ? S.me.reference_temperature_c : 20;
  return `${fin(t) ? t.toFixed(t % 1 ? 1 : 0) : '?'} °C`;
}

/* The density as brine masters read it, at the reference temperature. */
function densityText(o, withUnit = true) {
  if (!o) return '–';
  if (scaleSg()) return fin(o.specific_gravity) ? `${withUnit ? 'SG ' : ''}${o.specific_gravity.toFixed(4)}` : '–';
  return fin(o.baume) ? `${o.baume.toFixed(2)}${withUnit ? ' °Bé' : ''}` : '–';
}

function otherDensityText(o) {
  if (!o) return '';
  if (scaleSg()) return fin(o.baume) ? `${o.baume.toFixed(2)} °Bé` : '';
  return fin(o.specific_gravity) ? `SG ${o.specific_gravity.toFixed(4)}` : '';
}

/* The state's standard uncertainty (k = 1) in the chosen scale. */
function uncertaintyText(o) {
  if (!o) return '';
  if (scaleSg()) return fin(o.specific_gravity_uncertainty) ? `± ${o.specific_gravity_uncertainty.toFixed(4)}` : '';
  return fin(o.baume_uncertainty) ? `± ${o.baume_uncertainty.toFixed(2)} °Bé` : '';
}

function scaleValue(o) { return o ? (scaleSg() ? o.specific_gravity : o.baume) : NaN; }

function pad2(n) { return String(n).padStart(2, '0'); }

function when(ms) {
  if (!fin(ms)) return '–';
  const d = new Date(ms);
  return `${d.getFullYear()}-${pad2(d.getMonth() + 1)}-${pad2(d.getDate())} ${pad2(d.getHours())}:${pad2(d.getMinutes())}`;
}

/* A span given in days, in the unit that reads best. */
function span(lo, hi) {
  if (!fin(lo) && !fin(hi)) return '–';
  const ref = fin(hi) ? hi : lo;
  let k = 1, u = 'd';
  if (ref < 1 / 24) { k = 1440; u = 'min'; } else if (ref < 1) { k = 24; u = 'h'; }
  const a = fin(lo) ? lo * k : NaN, b = fin(hi) ? hi * k : NaN;
  if (fin(a) && fin(b) && b - a >= 0.1 * b + 0.5) return `${a.toFixed(0)}–${b.toFixed(0)} ${u}`;
  return `${(fin(a) && fin(b) ? (a + b) / 2 : fin(b) ? b : a).toFixed(1)} ${u}`;
}

/* {low, expected, high} of the pond-state document, or nothing known. */
function range(r) { return r && typeof r === 'object' ? r : {}; }

function ageText(s) {
  if (!fin(s)) return '';
  if (s < 90) return `${Math.round(s)} s ago`;
  if (s < 5400) return `${Math.round(s / 60)} min ago`;
  return `${(s / 3600).toFixed(1)} h ago`;
}

const PRIORITY = { 1: 'urgent', 2: 'high', 3: 'medium', 4: 'low' };
const STATE_TEXT = {
  'unacknowledged': 'active, not acknowledged',
  'acknowledged': 'active, acknowledged',
  'returned-unacknowledged': 'cleared, not acknowledged',
  'shelved': 'shelved',
  'suppressed': 'suppressed',
  'out-of-service': 'out of service',
  'normal': 'normal',
};
function stateText(s) { return STATE_TEXT[s] || s; }
function stageClass(st) { return 'st-' + (st || 'none'); }
function edgeClass(st) { return 'edge-' + (st || 'none'); }

/* ---- the API ---- */

async function api(method, path, body) {
  const opt = { method, headers: {}, credentials: 'same-origin', cache: 'no-store' };
  if (body !== undefined) {
    opt.headers['Content-Type'] = 'application/json';
    opt.body = JSON.stringify(body);
  }
  if (method !== 'GET' && S.me && S.me.csrf_token) opt.headers['X-CSRF-Token'] = S.me.csrf_token;
  let r;
  try {
    r = await fetch('/api/v1' + path, opt);
  } catch (e) {
    return { status: 0, ok: false, body: { error: 'the gateway does not answer' } };
  }
  let j = null;
  try { j = await r.json(); } catch (e) { j = null; }
  if (r.status === 401 && method === 'GET') showLogin();
  return { status: r.status, ok: r.ok, body: j };
}

/* ---- session ---- */

function showLogin(message) {
  stopLive();
  $('login').hidden = false;
  for (const v of document.querySelectorAll('.view')) v.hidden = true;
  $('login-error').textContent = message || '';
  $('login-open').hidden = true;
  $('logout').hidden = true;
}

function paintUser() {
  const me = S.me || {};
  $('site-name').textContent = me.site || 'halostage';
  document.title = `${me.site || 'halostage'} · halostage`;
  $('who').textContent = me.user ? `${me.user} (${me.role})` : (me.role === 'public' ? 'public view' : '');
  $('logout').hidden = !me.user;
  $('login-open').hidden = !!me.user || !me.logins;
  for (const t of document.querySelectorAll('.tref')) t.textContent = tref();
}

async function login(ev) {
  ev.preventDefault();
  $('login-submit').disabled = true;
  const r = await api('POST', '/session', { user: $('login-user').value, password: $('login-password').value });
  $('login-submit').disabled = false;
  if (!r.ok) {
    $('login-password').value = '';
    $('login-error').textContent = (r.body && r.body.error) || `refused (${r.status})`;
    return;
  }
  $('login-password').value = '';
  S.me = r.body;
  $('login').hidden = true;
  start();
}

async function logout() {
  await api('DELETE', '/session');
  S.me = (await api('GET', '/session')).body;
  paintUser();
  if (!S.me || S.me.role !== 'public') showLogin('Logged out.');
  else start();
}

/* ---- live updates ---- */

function setLive(on) {
  const l = $('live');
  l.className = 'live ' + (on ? 'on' : 'off');
  l.textContent = on ? 'live' : 'offline';
}

function startLive() {
  if (S.events || typeof EventSource === 'undefined') return;
  S.events = new EventSource('/api/v1/events');
  S.events.addEventListener('open', () => setLive(true));
  S.events.addEventListener('error', () => setLive(false));
  S.events.addEventListener('update', () => { setLive(true); schedule(); });
}

function stopLive() {
  if (S.events) S.events.close();
  S.events = null;
  setLive(false);
}

/* At most one refresh every 2 s however fast the states come. */
function schedule() {
  if (S.timer) return;
  S.timer = setTimeout(() => { S.timer = null; refresh(false); }, 2000);
}

/* ---- routing ---- */

function loggedIn() { return !!(S.me && (S.me.user || S.me.role === 'public')); }

function route() {
  if (!loggedIn()) return; /* the log-in form stays alone until then */
  const h = location.hash.replace(/^#\/?/, '').split('/');
  S.view = ['chain', 'pond', 'alarms'].includes(h[0]) ? h[0] : 'chain';
  if (S.view === 'pond' && h[1]) S.pond = decodeURIComponent(h[1]);
  for (const v of ['chain', 'pond', 'alarms']) {
    $('view-' + v).hidden = v !== S.view;
    $('tab-' + v).classList.toggle('here', v === S.view);
    if (v === S.view) $('tab-' + v).setAttribute('aria-current', 'page');
    else $('tab-' + v).removeAttribute('aria-current');
  }
  refresh(true);
}

async function refresh(full) {
  if (!S.me || (!S.me.user && S.me.role !== 'public')) return;
  const d = await api('GET', '/ponds');
  if (!d.ok) return;
  S.doc = d.body;
  fillPondSelects();
  if (S.view === 'chain') drawChain();
  if (S.view === 'pond') await drawPond(full);
  if (S.view === 'alarms' || full) {
    const a = await api('GET', '/alarms?since=7d');
    if (a.ok) S.alarms = a.body;
  }
  countAlarms();
  if (S.view === 'alarms') drawAlarms();
}

function countAlarms() {
  let n = 0;
  for (const p of (S.doc ? S.doc.ponds : [])) n += (p.alarms || []).filter((a) => a.state !== 'shelved').length;
  const c = $('alarm-count');
  c.hidden = n === 0;
  c.textContent = String(n);
}

function fillPondSelects() {
  const names = S.doc.ponds.map((p) => p.pond);
  if (!S.pond || !names.includes(S.pond)) S.pond = names[0];
  for (const id of ['pond-select', 'hydro-pond']) {
    const sel = $(id);
    const have = Array.from(sel.options).map((o) => o.value).join(',');
    if (have !== names.join(',')) {
      const keep = sel.value;
      sel.replaceChildren(...names.map((n) => el('option', { value: n, text: n })));
      if (names.includes(keep)) sel.value = keep;
    }
  }
  $('pond-select').value = S.pond;
}

/* ---- the chain ---- */

/* Where the pond stands in its band: a bar with the band shaded and a mark. */
function gauge(p) {
  const lo = scaleValue(p.band && p.band.in), hi = scaleValue(p.band && p.band.out), now = scaleValue(p);
  if (!fin(now) || (!fin(lo) && !fin(hi))) return null;
  const a = Math.min(fin(lo) ? lo : now, now), b = Math.max(fin(hi) ? hi : now, now);
  const pad = (b - a) * 0.15 || (scaleSg() ? 0.002 : 0.2);
  const x0 = a - pad, x1 = b + pad, W = 400, X = (v) => 28 + (W - 56) * (v - x0) / (x1 - x0);
  const g = sv('svg', { viewBox: `0 0 ${W} 42`, class: 'gaugesvg', role: 'img',
    'aria-label': `density band ${densityText(p.band.in, false)} to ${densityText(p.band.out, false)}, now ${densityText(p, false)}` });
  g.append(sv('rect', { x: 2, y: 8, width: W - 4, height: 12, class: 'gaugebar' }));
  if (fin(lo) && fin(hi)) g.append(sv('rect', { x: X(lo), y: 8, width: Math.max(1, X(hi) - X(lo)), height: 12, class: 'gaugeband' }));
  else if (fin(lo)) g.append(sv('rect', { x: X(lo), y: 8, width: W - 2 - X(lo), height: 12, class: 'gaugeband' }));
  g.append(sv('path', { d: `M${X(now) - 7} 0 h14 l-7 7 z M${X(now) - 2} 6 h4 v17 h-4 z`, class: 'gaugemark' }));
  if (fin(lo)) g.append(sv('text', { x: X(lo), y: 39, 'text-anchor': 'middle', class: 'gaugetext' }, densityText(p.band.in, false)));
  if (fin(hi)) g.append(sv('text', { x: X(hi), y: 39, 'text-anchor': 'middle', class: 'gaugetext' }, densityText(p.band.out, false)));
  return el('div', { class: 'gauge' }, g);
}

function alarmChip(a) {
  const pr = PRIORITY[a.priority] || '';
  const cls = a.state === 'shelved' ? 'chip shelvedchip' : `chip p${a.priority}`;
  return el('span', { class: cls, title: stateText(a.state) }, `${a.rule}`, el('span', { text: a.state === 'shelved' ? '(shelved)' : `(${pr})` }));
}

function pondCard(p) {
  const stale = p.quality !== 'good' || (fin(p.age_s) && p.age_s > 300);
  const li = el('li', { class: `pond ${edgeClass(p.stage)}${stale ? ' stale' : ''}`, 'data-pond': p.pond });
  li.append(
    el('div', {},
      el('h3', {}, el('a', { href: `#/pond/${encodeURIComponent(p.pond)}`, text: p.pond }), ' ',
        el('span', { class: 'role', text: p.role })),
      el('span', { class: `stage ${stageClass(p.stage)}`, text: p.stage || 'no state' }),
      p.next_stage ? el('span', { class: 'muted', text: ` → ${p.next_stage}` }) : null),
    el('div', {},
      el('div', { class: 'big', text: densityText(p) }),
      el('div', { class: 'small' },
        el('span', { class: 'unc', title: 'standard uncertainty of the state (coverage factor 1); decisions keep twice this from a limit', text: uncertaintyText(p) }),
        `${uncertaintyText(p) ? ' · ' : ''}${otherDensityText(p)} at ${tref()}`)),
    el('div', { class: 'facts' },
      el('span', {}, 'Level ', el('b', { text: fin(p.depth_m) ? `${p.depth_m.toFixed(2)} m` : '–' })),
      el('span', {}, 'To target ', el('b', { text: span(range(p.days_to_target).low, range(p.days_to_target).high) })),
      el('span', {}, 'Next stage in ', el('b', { text: span(range(p.days_to_next_stage).low, range(p.days_to_next_stage).high) })),
      el('span', {}, 'Data ', el('b', { text: `${p.quality}${fin(p.age_s) ? ', ' + ageText(p.age_s) : ''}` }))),
    gauge(p));
  if ((p.alarms || []).length) li.append(el('div', { class: 'alarm-chips' }, ...p.alarms.map(alarmChip)));
  return li;
}

function transferLink(t) {
  const reasons = (t.reasons || []).map((r) => r.text || r.name).join('; ');
  return el('li', { class: 'link', 'data-transfer': t.transfer },
    el('span', { class: 'flowarrow', 'aria-hidden': 'true', text: '↓' }),
    el('span', { class: 'linkname' }, el('b', { text: t.transfer }), ` to ${t.destination} `),
    el('span', { class: `advice ${t.advice || 'none'}`, text: t.advice || 'no decision yet' }),
    el('span', { class: 'muted reasons', text: reasons }));
}

function drawChain() {
  const doc = S.doc;
  $('chain-time').textContent = `as of ${when(doc.time_ms)}`;
  $('chain-legend').textContent = `Densities at ${tref()} (${scaleSg() ? 'specific gravity' : 'degree Baumé, modulus ' + doc.baume_modulus}); the bar shows each pond's band from arrival to transfer density.`;
  const items = [];
  for (const p of doc.ponds) {
    items.push(pondCard(p));
    for (const t of doc.transfers.filter((x) => x.source === p.pond)) items.push(transferLink(t));
  }
  $('chain').replaceChildren(...items);
}

/* ---- charts ---- */

function niceTicks(lo, hi, n) {
  const raw = (hi - lo) / n, mag = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw) || raw;
  const out = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(v);
  return { ticks: out, step };
}

function decimalsFor(step) { return Math.max(0, Math.min(4, -Math.floor(Math.log10(step) + 1e-9))); }

/* A time chart: mean line and min-max span of [t, min, mean, max] rows;
 * opt.band = [lo, hi] shaded; opt.limits = [values] dashed. */
function timeChart(box, rows, opt) {
  const W = 900, H = 260, L = 62, R = 12, T = 12, B = 34;
  const g = sv('svg', { viewBox: `0 0 ${W} ${H}`, class: 'plot', role: 'img', 'aria-label': opt.label });
  const pts = rows.filter((r) => fin(r[2]));
  const t1 = Date.now(), t0 = t1 - opt.sinceMs;
  if (!pts.length) {
    g.append(sv('text', { x: W / 2, y: H / 2, 'text-anchor': 'middle', class: 'empty' },
      'No rollups in this range yet (minutes are folded after they end).'));
    box.replaceChildren(g);
    return;
  }
  let lo = Infinity, hi = -Infinity;
  for (const r of pts) { lo = Math.min(lo, fin(r[1]) ? r[1] : r[2]); hi = Math.max(hi, fin(r[3]) ? r[3] : r[2]); }
  for (const v of [...(opt.band || []), ...(opt.limits || [])]) if (fin(v)) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
  if (hi - lo < opt.minSpan) { const m = (hi + lo) / 2; lo = m - opt.minSpan / 2; hi = m + opt.minSpan / 2; }
  const padv = (hi - lo) * 0.06; lo -= padv; hi += padv;
  const X = (t) => L + (W - L - R) * (t - t0) / (t1 - t0), Y = (v) => T + (H - T - B) * (hi - v) / (hi - lo);
  const { ticks, step } = niceTicks(lo, hi, 5), dec = decimalsFor(step);
  for (const v of ticks) {
    g.append(sv('line', { x1: L, x2: W - R, y1: Y(v), y2: Y(v), class: 'grid' }));
    g.append(sv('text', { x: L - 6, y: Y(v) + 4, 'text-anchor': 'end' }, v.toFixed(dec)));
  }
  const day = 86400000, tstep = opt.sinceMs <= day ? 4 * 3600000 : opt.sinceMs <= 7 * day ? day : 5 * day;
  const off = new Date().getTimezoneOffset() * 60000;
  for (let t = Math.ceil((t0 - off) / tstep) * tstep + off; t <= t1; t += tstep) {
    g.append(sv('line', { x1: X(t), x2: X(t), y1: T, y2: H - B, class: 'grid' }));
    const d = new Date(t);
    const label = tstep < day ? `${pad2(d.getHours())}:00` : `${pad2(d.getMonth() + 1)}-${pad2(d.getDate())}`;
    g.append(sv('text', { x: X(t), y: H - B + 18, 'text-anchor': 'middle' }, label));
  }
  if (opt.band && fin(opt.band[0]) && fin(opt.band[1]))
    g.append(sv('rect', { x: L, width: W - L - R, y: Y(opt.band[1]), height: Math.max(1, Y(opt.band[0]) - Y(opt.band[1])), class: 'band' }));
  for (const v of opt.band || []) if (fin(v)) g.append(sv('line', { x1: L, x2: W - R, y1: Y(v), y2: Y(v), class: 'bandline' }));
  (opt.limits || []).forEach((v, i) => {
    if (!fin(v)) return;
    g.append(sv('line', { x1: L, x2: W - R, y1: Y(v), y2: Y(v), class: 'limit' }));
    if (opt.limitNames) g.append(sv('text', { x: W - R - 4, y: Y(v) - 4, 'text-anchor': 'end', class: 'limitname' }, opt.limitNames[i]));
  });
  if (opt.band && opt.bandNames) opt.band.forEach((v, i) => {
    if (fin(v)) g.append(sv('text', { x: W - R - 4, y: Y(v) - 4, 'text-anchor': 'end', class: 'limitname' }, opt.bandNames[i]));
  });
  const top = pts.map((r) => `${X(r[0]).toFixed(1)},${Y(fin(r[3]) ? r[3] : r[2]).toFixed(1)}`);
  const bot = pts.slice().reverse().map((r) => `${X(r[0]).toFixed(1)},${Y(fin(r[1]) ? r[1] : r[2]).toFixed(1)}`);
  g.append(sv('polygon', { points: top.concat(bot).join(' '), class: 'span' }));
  g.append(sv('polyline', { points: pts.map((r) => `${X(r[0]).toFixed(1)},${Y(r[2]).toFixed(1)}`).join(' '), class: 'mean' }));
  if (pts.length === 1) g.append(sv('circle', { cx: X(pts[0][0]), cy: Y(pts[0][2]), r: 4, class: 'here' }));
  g.append(sv('line', { x1: L, x2: L, y1: T, y2: H - B, class: 'axis' }));
  g.append(sv('line', { x1: L, x2: W - R, y1: H - B, y2: H - B, class: 'axis' }));
  box.replaceChildren(g);
}

/* The feed's evaporation path: density scale against concentration factor
 * (log axis), mineral onsets marked, the pond's point on it. */
function pathChart(box, path) {
  const W = 900, H = 340, L = 62, R = 16, T = 16, B = 40;
  const g = sv('svg', { viewBox: `0 0 ${W} ${H}`, class: 'plot', role: 'img', 'aria-label': `evaporation path of ${path.feed}` });
  const yi = scaleSg() ? 1 : 2;
  const pts = path.points.filter((r) => fin(r[0]) && fin(r[yi]) && r[0] > 0);
  if (!pts.length) { box.replaceChildren(g); return; }
  const cf0 = 1, cf1 = Math.max(...pts.map((r) => r[0]), fin(path.now && path.now.concentration_factor) ? path.now.concentration_factor : 1) * 1.15;
  let lo = Math.min(...pts.map((r) => r[yi])), hi = Math.max(...pts.map((r) => r[yi]));
  const padv = (hi - lo) * 0.06; lo -= padv; hi += padv;
  const X = (cf) => L + (W - L - R) * Math.log10(cf / cf0) / Math.log10(cf1 / cf0), Y = (v) => T + (H - T - B) * (hi - v) / (hi - lo);
  const { ticks, step } = niceTicks(lo, hi, 6), dec = decimalsFor(step);
  for (const v of ticks) {
    g.append(sv('line', { x1: L, x2: W - R, y1: Y(v), y2: Y(v), class: 'grid' }));
    g.append(sv('text', { x: L - 6, y: Y(v) + 4, 'text-anchor': 'end' }, v.toFixed(dec)));
  }
  for (const cf of [1, 2, 5, 10, 20, 50, 100, 200]) {
    if (cf > cf1) break;
    g.append(sv('line', { x1: X(cf), x2: X(cf), y1: T, y2: H - B, class: 'grid' }));
    g.append(sv('text', { x: X(cf), y: H - B + 18, 'text-anchor': 'middle' }, `${cf}×`));
  }
  g.append(sv('text', { x: W - R, y: H - 4, 'text-anchor': 'end' }, 'concentration factor (log scale)'));
  path.onsets.forEach((o, i) => {
    if (!fin(o.concentration_factor)) return;
    const x = X(o.concentration_factor);
    g.append(sv('line', { x1: x, x2: x, y1: T, y2: H - B, class: 'onset' }));
    g.append(sv('text', { x: x + 4, y: T + 14 + (i % 4) * 16, class: 'onsetname' }, o.mineral));
  });
  g.append(sv('polyline', { points: pts.map((r) => `${X(r[0]).toFixed(1)},${Y(r[yi]).toFixed(1)}`).join(' '), class: 'path' }));
  const now = path.now;
  const nv = now ? (scaleSg() ? now.specific_gravity : now.baume) : NaN;
  if (now && fin(now.concentration_factor) && fin(nv)) {
    const x = X(now.concentration_factor), y = Y(nv);
    g.append(sv('circle', { cx: x, cy: y, r: 9, class: 'here' }));
    g.append(sv('text', { x: x + (x > W - 200 ? -14 : 14), y: y - 12, 'text-anchor': x > W - 200 ? 'end' : 'start', class: 'herelabel' },
      `${path.pond} now: ${densityText(now)}, ${now.concentration_factor.toFixed(2)}×`));
  }
  g.append(sv('line', { x1: L, x2: L, y1: T, y2: H - B, class: 'axis' }));
  g.append(sv('line', { x1: L, x2: W - R, y1: H - B, y2: H - B, class: 'axis' }));
  box.replaceChildren(g);
}

/* ---- a pond ---- */

async function drawPond(full) {
  const p = S.doc.ponds.find((x) => x.pond === S.pond);
  if (!p) return;
  $('pond-title').textContent = `Pond ${p.pond}`;
  $('pond-now').replaceChildren(
    el('span', {}, 'Density ', el('b', { text: densityText(p) }), ` ${uncertaintyText(p)} (${otherDensityText(p)}) at ${tref()}`),
    el('span', {}, 'Stage ', el('span', { class: `stage ${stageClass(p.stage)}`, text: p.stage || 'no state' })),
    el('span', {}, 'Level ', el('b', { text: fin(p.depth_m) ? `${p.depth_m.toFixed(2)} m` : '–' })),
    el('span', {}, 'Temperature ', el('b', { text: fin(p.temperature_c) ? `${p.temperature_c.toFixed(1)} °C` : '–' })),
    el('span', {}, 'Method ', el('b', { text: p.method || '–' })));
  for (const b of document.querySelectorAll('.range button')) b.classList.toggle('here', b.dataset.range === S.range);
  $('cap-density').textContent = `Density at ${tref()} (${scaleSg() ? 'SG' : '°Bé'}), mean and min–max per step, band shaded`;
  if (!full) return;
  const [h, path] = await Promise.all([
    api('GET', `/ponds/${encodeURIComponent(p.pond)}/history?since=${S.range}&step=${STEP[S.range]}`),
    api('GET', `/ponds/${encodeURIComponent(p.pond)}/path`),
  ]);
  const sinceMs = { '1d': 86400000, '7d': 7 * 86400000, '30d': 30 * 86400000 }[S.range];
  if (h.ok) {
    const ser = h.body.series, band = h.body.band, lim = h.body.level_limits_m;
    timeChart($('chart-density'), scaleSg() ? ser.specific_gravity : ser.baume,
      { sinceMs, band: [scaleValue(band.in), scaleValue(band.out)], bandNames: ['arrives', 'leaves'], minSpan: scaleSg() ? 0.002 : 0.2, label: `density of ${p.pond}` });
    timeChart($('chart-level'), ser.depth_m, { sinceMs, limits: [lim.min, lim.max, lim.freeboard], limitNames: ['low', 'high', 'dike crest'], minSpan: 0.05, label: `level of ${p.pond}` });
    timeChart($('chart-temperature'), ser.temperature_c, { sinceMs, minSpan: 1, label: `temperature of ${p.pond}` });
  }
  if (path.ok) {
    $('cap-path').textContent = `Where ${p.pond} stands on the evaporation path of its feed (${path.body.feed}): ${scaleSg() ? 'SG' : '°Bé'} at ${tref()} against concentration factor; dashed lines: a mineral starts to deposit`;
    pathChart($('chart-path'), path.body);
  } else {
    $('cap-path').textContent = (path.body && path.body.error) || 'no evaporation path';
    $('chart-path').replaceChildren();
  }
}

/* ---- alarms ---- */

function canWrite() { return S.me && S.me.role === 'operator'; }

async function act(path, body, msgEl) {
  msgEl.textContent = 'sending…';
  const r = await api('POST', path, body);
  msgEl.textContent = r.ok ? `done: ${(r.body && (r.body.result || 'ok'))}` : `refused: ${(r.body && r.body.error) || r.status}`;
  msgEl.className = r.ok ? 'msg' : 'msg error';
  await refresh(true);
  return r;
}

function activeItem(a) {
  const msg = el('span', { class: 'msg', role: 'status' });
  const note = el('input', { placeholder: 'note (why)', maxlength: '200', 'aria-label': `note for ${a.pond} ${a.rule}` });
  const dur = el('select', { 'aria-label': 'shelve for' },
    ...[['1 h', 3600], ['4 h', 14400], ['8 h', 28800], ['24 h', 86400]].map(([t, v]) => el('option', { value: String(v), text: t })));
  const needsAck = a.state === 'unacknowledged' || a.state === 'returned-unacknowledged';
  const acts = el('div', { class: 'acts' });
  if (canWrite()) {
    acts.append(note);
    if (needsAck)
      acts.append(el('button', { type: 'button', class: 'primary ack', 'data-event': String(a.event_id),
        on: { click: () => act(`/alarms/${a.event_id}/ack`, note.value ? { note: note.value } : {}, msg) } }, 'Acknowledge'));
    if (a.state === 'shelved')
      acts.append(el('button', { type: 'button', on: { click: () => act(`/alarms/${encodeURIComponent(a.pond)}/${encodeURIComponent(a.rule)}/unshelve`, note.value ? { note: note.value } : {}, msg) } }, 'Unshelve'));
    else
      acts.append(dur, el('button', { type: 'button', class: 'shelve',
        on: { click: () => act(`/alarms/${encodeURIComponent(a.pond)}/${encodeURIComponent(a.rule)}/shelve`, Object.assign({ duration_s: Number(dur.value) }, note.value ? { note: note.value } : {}), msg) } }, 'Shelve'));
  }
  acts.append(msg);
  return el('li', { class: `alarm ${a.state}`, 'data-pond': a.pond, 'data-rule': a.rule },
    el('div', { class: 'what' },
      el('span', { class: `chip p${a.priority}`, text: PRIORITY[a.priority] || String(a.priority) }),
      el('b', { text: `${a.pond}: ${a.rule}` }),
      el('span', { text: stateText(a.state) }),
      el('span', { class: 'muted', text: `since ${when(a.time_ms)}${fin(a.value) ? ', value ' + sig4(a.value) : ''}${fin(a.limit) ? ', limit ' + sig4(a.limit) : ''}` }),
      a.state === 'shelved' && a.shelved_until_ms ? el('span', { text: `until ${when(a.shelved_until_ms)}` }) : null),
    acts);
}

function drawAlarms() {
  const al = S.alarms || { active: [], journal: [] };
  const order = (a) => (a.state === 'unacknowledged' ? 0 : a.state === 'returned-unacknowledged' ? 1 : a.state === 'acknowledged' ? 2 : 3) * 10 + a.priority;
  const act = al.active.slice().sort((x, y) => order(x) - order(y));
  /* redraw the list only when it changed, so a note being typed survives */
  const sig = JSON.stringify([S.me && S.me.role, act.map((a) => [a.event_id, a.state])]);
  if (sig !== S.activeSig) S.activeSig = sig;
  else return drawRest(al);
  $('active').replaceChildren(...(act.length ? act.map(activeItem) : [el('li', { class: 'muted', text: 'Nothing needs attention.' })]));
  drawRest(al);
}

function drawRest(al) {
  $('hydro-form').hidden = !canWrite();
  const fc = $('forecast').tBodies[0];
  fc.replaceChildren(...S.doc.ponds.map((p) => el('tr', {},
    el('td', { text: p.pond }), el('td', {}, el('span', { class: `stage ${stageClass(p.stage)}`, text: p.stage || '–' })),
    el('td', { text: p.next_stage || '–' }),
    el('td', { text: span(range(p.days_to_target).low, range(p.days_to_target).high) }),
    el('td', { text: span(range(p.days_to_next_stage).low, range(p.days_to_next_stage).high) }))));
  const jb = $('journal').tBodies[0];
  jb.replaceChildren(...(al.journal.length ? al.journal.slice(0, 200).map((j) => el('tr', { 'data-event': String(j.event_id) },
    el('td', { text: when(j.time_ms) }), el('td', { text: j.pond }), el('td', { text: j.rule }),
    el('td', { text: `${stateText(j.state)} (${j.cause})` }), el('td', { text: j.actor || '' }),
    el('td', { text: j.note || '' }))) : [el('tr', {}, el('td', { colspan: '6', class: 'muted', text: 'No alarm events in the last 7 days.' }))]));
}

async function recordReading(ev) {
  ev.preventDefault();
  const msg = $('hydro-msg');
  const sg = Number($('hydro-sg').value);
  const body = { pond: $('hydro-pond').value, specific_gravity: sg };
  if ($('hydro-note').value) body.note = $('hydro-note').value;
  $('hydro-submit').disabled = true;
  const r = await api('POST', '/hydrometer', body);
  $('hydro-submit').disabled = false;
  msg.className = r.ok ? 'msg' : 'msg error';
  msg.textContent = r.ok ? `Recorded SG ${r.body.specific_gravity.toFixed(4)} for ${r.body.pond} at ${when(r.body.time_ms)}.`
    : `Refused: ${(r.body && r.body.error) || r.status}`;
  if (r.ok) { $('hydro-sg').value = ''; $('hydro-note').value = ''; }
}

/* ---- start ---- */

function start() {
  paintUser();
  $('login').hidden = true;
  startLive();
  route();
}

async function boot() {
  $('login-form').addEventListener('submit', login);
  $('logout').addEventListener('click', logout);
  $('login-open').addEventListener('click', () => showLogin());
  $('hydro-form').addEventListener('submit', recordReading);
  $('pond-select').addEventListener('change', (e) => { location.hash = `#/pond/${encodeURIComponent(e.target.value)}`; });
  for (const b of document.querySelectorAll('.range button'))
    b.addEventListener('click', () => { S.range = b.dataset.range; refresh(true); });
  window.addEventListener('hashchange', route);
  const r = await api('GET', '/session');
  S.me = r.body;
  paintUser();
  if (!S.me || (!S.me.user && S.me.role !== 'public')) showLogin();
  else start();
}

document.addEventListener('DOMContentLoaded', boot);
