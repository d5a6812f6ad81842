// Spatial map page: our own small plain JavaScript, no libraries. Draws the stations in SVG over the
// coastline, hillshade and predicted-surface layers of a results folder served by 'spatial view'.
'use strict';
(function () {
  const SVGNS = 'http://www.w3.org/2000/svg';
  const KM_PER_DEG = 111.32; // one degree of latitude, km (spherical approximation for the map and its scale bar)
  const $ = (id) => document.getElementById(id);
  const state = { meta: null, variable: '', data: null, view: null, lon0: 0, lat0: 0, cos0: 1, home: null, station: null, curve: null };

  // ---- Colour scales of our own, interpolated in OKLab (Ottosson 2020). ----
  // "fellside": sequential, pale cream (low) to deep blue-violet (high), lightness falls monotonically.
  // "thaw-frost": diverging around 0, warm brown (negative) through near-white to cold blue (positive).
  const SCALES = {
    fellside: ['#fff7d1', '#b9e0a5', '#5fb3a4', '#3b7aa8', '#3b4a93', '#2c1e5c'],
    'thaw-frost': ['#7a3413', '#c9793f', '#edcfb0', '#f3f2ee', '#b5cde4', '#4f86bd', '#173d73'],
  };
  const toLinear = (c) => (c <= 0.04045 ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4));
  const toGamma = (c) => (c <= 0.0031308 ? 12.92 * c : 1.055 * Math.pow(c, 1 / 2.4) - 0.055);
  function hexToOklab(hex) {
    const r = toLinear(parseInt(hex.slice(1, 3), 16) / 255), g = toLinear(parseInt(hex.slice(3, 5), 16) / 255), b = toLinear(parseInt(hex.slice(5, 7), 16) / 255);
    const l = Math.cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
    const m = Math.cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
    const s = Math.cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
    return [0.2104542553 * l + 0.7936177850 * m - 0.0040720468 * s, 1.9779984951 * l - 2.4285922050 * m + 0.4505937099 * s, 0.0259040371 * l + 0.7827717662 * m - 0.8086757660 * s];
  }
  function oklabToHex(L, a, b) {
    const l = Math.pow(L + 0.3963377774 * a + 0.2158037573 * b, 3), m = Math.pow(L - 0.1055613458 * a - 0.0638541728 * b, 3), s = Math.pow(L - 0.0894841775 * a - 1.2914855480 * b, 3);
    const rgb = [4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s, -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s, -0.0041960863 * l - 0.7034186147 * m + 1.7076147010 * s];
    return '#' + rgb.map((c) => Math.round(Math.min(1, Math.max(0, toGamma(c))) * 255).toString(16).padStart(2, '0')).join('');
  }
  const LUT = {};
  for (const [name, anchors] of Object.entries(SCALES)) {
    const lab = anchors.map(hexToOklab), n = 256, table = new Array(n);
    for (let i = 0; i < n; i++) {
      const t = (i / (n - 1)) * (lab.length - 1), j = Math.min(lab.length - 2, Math.floor(t)), f = t - j;
      table[i] = oklabToHex(...[0, 1, 2].map((c) => lab[j][c] + f * (lab[j + 1][c] - lab[j][c])));
    }
    LUT[name] = table;
  }
  function colourScale(variable, values) {
    const finite = values.filter((v) => v !== null && Number.isFinite(v));
    let lo = Math.min(...finite), hi = Math.max(...finite);
    if (!finite.length) { lo = 0; hi = 1; }
    const diverging = variable && variable.scale === 'diverging';
    if (diverging) { const m = Math.max(Math.abs(lo), Math.abs(hi)) || 1; lo = -m; hi = m; }
    if (hi === lo) { hi = lo + 1; }
    const table = LUT[diverging ? 'thaw-frost' : 'fellside'];
    return { name: diverging ? 'thaw-frost' : 'fellside', lo, hi, table, colour: (v) => table[Math.max(0, Math.min(255, Math.round(((v - lo) / (hi - lo)) * 255)))] };
  }

  // ---- Numbers ----
  function fmt(v, digits) {
    if (v === null || v === undefined || !Number.isFinite(v)) return '—';
    const a = Math.abs(v);
    if (a !== 0 && (a >= 1e6 || a < 1e-3)) return v.toExponential(2);
    return Number(v.toPrecision(digits || 3)).toLocaleString('en', { maximumFractionDigits: 6 });
  }
  function niceTicks(lo, hi, count) {
    const span = hi - lo, step0 = span / count, mag = Math.pow(10, Math.floor(Math.log10(step0))), r = step0 / mag;
    const step = (r < 1.5 ? 1 : r < 3 ? 2 : r < 7 ? 5 : 10) * mag, ticks = [];
    for (let t = Math.ceil(lo / step) * step; t <= hi + step * 1e-9; t += step) ticks.push(Math.abs(t) < step * 1e-9 ? 0 : t);
    return ticks;
  }
  function el(name, attrs, parent) {
    const e = document.createElementNS(SVGNS, name);
    for (const k in attrs) e.setAttribute(k, attrs[k]);
    if (parent) parent.appendChild(e);
    return e;
  }
  function html(tag, text, parent, cls) {
    const e = document.createElement(tag);
    if (text !== undefined && text !== null) e.textContent = text;
    if (cls) e.className = cls;
    if (parent) parent.appendChild(e);
    return e;
  }
  function status(text) { $('status').textContent = text; }
  async function getJson(url) {
    const r = await fetch(url, { headers: { Accept: 'application/json' } });
    const body = await r.json().catch(() => ({}));
    if (!r.ok) throw new Error(body.error || ('HTTP ' + r.status));
    return body;
  }

  // ---- Projection: equirectangular with longitudes scaled by cos(centre latitude); km units, y down. ----
  const px = (lon) => (lon - state.lon0) * state.cos0 * KM_PER_DEG;
  const py = (lat) => -(lat - state.lat0) * KM_PER_DEG;

  // ---- View: centre (km) and km per screen pixel ----
  function applyView() {
    const svg = $('map'), w = svg.clientWidth || 800, h = svg.clientHeight || 600, v = state.view;
    // When the map's box changes (window resized, station panel opened), keep the area that was in view.
    if (state.box && (state.box.w !== w || state.box.h !== h)) v.k = Math.max((v.k * state.box.w) / w, (v.k * state.box.h) / h);
    state.box = { w, h };
    svg.setAttribute('viewBox', [v.cx - (w / 2) * v.k, v.cy - (h / 2) * v.k, w * v.k, h * v.k].join(' '));
    // Marks shrink for dense networks (radius in screen pixels), strokes stay hairline-thin.
    const n = state.data ? state.data.stations.length : 0, rpx = n > 3000 ? 2.5 : n > 800 ? 3.5 : 5;
    svg.style.setProperty('--r', String(rpx * v.k));
    svg.style.setProperty('--sw', String((n > 3000 ? 0.4 : 0.7) * v.k));
    svg.style.setProperty('--sw-hl', String(2.5 * v.k));
    drawScaleBar(v.k);
  }
  function fitView(b) {
    const svg = $('map'), w = svg.clientWidth || 800, h = svg.clientHeight || 600;
    const x0 = px(b.west), x1 = px(b.east), y0 = py(b.north), y1 = py(b.south);
    const k = Math.max((x1 - x0) / (w - 60), (y1 - y0) / (h - 60), 1e-3);
    state.view = { cx: (x0 + x1) / 2, cy: (y0 + y1) / 2, k };
    state.box = null;
    applyView();
  }
  function zoom(factor, sx, sy) {
    const svg = $('map'), w = svg.clientWidth, h = svg.clientHeight, v = state.view;
    if (sx === undefined) { sx = w / 2; sy = h / 2; }
    const mx = v.cx + (sx - w / 2) * v.k, my = v.cy + (sy - h / 2) * v.k;
    const k = Math.min(Math.max(v.k / factor, state.home.k / 2000), state.home.k * 8);
    v.cx = mx - (sx - w / 2) * k; v.cy = my - (sy - h / 2) * k; v.k = k;
    applyView();
  }
  function home() { fitView(state.homeBounds); }
  function pan(dx, dy) { state.view.cx -= dx * state.view.k; state.view.cy -= dy * state.view.k; applyView(); }
  function drawScaleBar(k) {
    const bar = $('scalebar');
    bar.replaceChildren();
    const target = 120 * k, mag = Math.pow(10, Math.floor(Math.log10(target))), r = target / mag;
    const len = (r >= 5 ? 5 : r >= 2 ? 2 : 1) * mag, w = len / k;
    el('rect', { x: 4, y: 16, width: w, height: 5, fill: '#1d2330' }, bar);
    el('rect', { x: 4 + w / 2, y: 16, width: w / 2, height: 5, fill: '#fff', stroke: '#1d2330', 'stroke-width': 1 }, bar);
    el('text', { x: 4, y: 12 }, bar).textContent = (len >= 1 ? fmt(len) + ' km' : fmt(len * 1000) + ' m') + ' (approx.)';
  }

  // ---- Layers ----
  function drawImage(group, layer) {
    group.replaceChildren();
    if (!layer) return;
    el('image', { href: layer.url, x: px(layer.west), y: py(layer.north), width: px(layer.east) - px(layer.west), height: py(layer.south) - py(layer.north), preserveAspectRatio: 'none', 'data-layer': layer.key }, group);
  }
  async function drawCoast() {
    const r = await fetch('/api/layers/coastline.geojson');
    if (!r.ok) throw new Error('coastline: HTTP ' + r.status);
    const gj = await r.json(), g = $('g-coast'), parts = [];
    const ring = (coords, close) => coords.map((c, i) => (i ? 'L' : 'M') + px(c[0]).toFixed(3) + ' ' + py(c[1]).toFixed(3)).join('') + (close ? 'Z' : '');
    const geom = (gm) => {
      if (!gm) return;
      if (gm.type === 'Polygon') parts.push(gm.coordinates.map((c) => ring(c, true)).join(''));
      else if (gm.type === 'MultiPolygon') gm.coordinates.forEach((p) => parts.push(p.map((c) => ring(c, true)).join('')));
      else if (gm.type === 'LineString') parts.push(ring(gm.coordinates, false));
      else if (gm.type === 'MultiLineString') gm.coordinates.forEach((c) => parts.push(ring(c, false)));
      else if (gm.type === 'GeometryCollection') gm.geometries.forEach(geom);
    };
    (gj.type === 'FeatureCollection' ? gj.features.map((f) => f.geometry) : gj.type === 'Feature' ? [gj.geometry] : [gj]).forEach(geom);
    const land = $('g-land');
    g.replaceChildren();
    land.replaceChildren();
    for (const d of parts) { el('path', { d }, g); el('path', { d }, land); }
  }
  function updateLayerVisibility() {
    $('g-coast').style.display = $('g-land').style.display = $('layer-coast').checked ? '' : 'none';
    $('g-hill').style.display = $('layer-hill').checked ? '' : 'none';
    const key = $('underlay').value, layer = state.meta.layers.predicted.find((p) => p.key === key);
    drawImage($('g-underlay'), layer || null);
    $('underlay-note').textContent = layer ? `${layer.label}: ${fmt(layer.min)} to ${fmt(layer.max)} ${layer.unit} (colours as drawn by the export)` : '';
  }

  // ---- Stations ----
  function queryString() {
    const p = new URLSearchParams();
    if (state.variable) p.set('variable', state.variable);
    for (const [id, key] of [['from', 'from'], ['to', 'to'], ['min-days', 'min_days'], ['max-residual', 'max_residual']]) {
      const v = $(id).value.trim();
      if (v !== '' && !$(id).disabled) p.set(key, v);
    }
    const s = p.toString();
    return s ? '?' + s : '';
  }
  let loadSeq = 0;
  async function loadStations() {
    const seq = ++loadSeq, qs = queryString();
    $('download').href = '/api/stations.geojson' + qs;
    let data;
    const t0 = performance.now();
    try { data = await getJson('/api/stations' + qs); } catch (e) { status('Cannot show the stations: ' + e.message); return; }
    if (seq !== loadSeq) return;
    const t1 = performance.now();
    const resize = !state.data || state.data.stations.length !== data.stations.length;
    state.data = data;
    drawStations();
    if (resize) applyView();
    // Where the time of the latest redraw went (read by the benchmark): fetch + parse, then drawing.
    document.documentElement.dataset.fetchMs = (t1 - t0).toFixed(1);
    document.documentElement.dataset.drawMs = (performance.now() - t1).toFixed(1);
    status(`${data.count} of ${state.meta.station_count} stations shown` + (data.variable ? ` · ${data.variable.label}` + (data.variable.recomputed ? ' (over the seasons that count)' : '') : ''));
  }
  const esc = (t) => String(t).replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;');
  function drawStations() {
    const data = state.data, g = $('g-stations'), scale = colourScale(data.variable, data.stations.map((s) => s.value));
    // One string parsed once is much faster than 10,000 createElementNS calls.
    const parts = new Array(data.stations.length);
    for (let i = 0; i < data.stations.length; i++) {
      const s = data.stations[i], none = s.value === null, hl = state.station === s.id;
      parts[i] = `<circle cx="${px(s.lon).toFixed(3)}" cy="${py(s.lat).toFixed(3)}" data-station="${esc(s.id)}" data-value="${none ? '' : s.value}"` +
        (none ? ` class="none${hl ? ' hl' : ''}"` : ` fill="${scale.colour(s.value)}"${hl ? ' class="hl"' : ''}`) + '/>';
    }
    g.innerHTML = parts.join('');
    drawLegend(data.variable, scale);
  }
  function fillStationNames() {
    if ($('station-names').childElementCount || !state.data) return;
    const names = document.createDocumentFragment();
    for (const s of state.data.stations) { const o = document.createElement('option'); o.value = s.id; o.label = s.name; names.appendChild(o); }
    $('station-names').appendChild(names);
  }
  function drawLegend(variable, scale) {
    const box = $('legend');
    box.replaceChildren();
    box.dataset.variable = variable ? variable.key : '';
    box.dataset.scale = scale.name;
    if (!variable) { html('p', 'Stations uncoloured: no variable in this results folder.', box, 'note'); return; }
    html('p', `${variable.label} (${variable.unit})`, box, 'legend-title');
    const w = 230, svg = el('svg', { width: w, height: 46, role: 'img', 'aria-label': `Colour scale from ${fmt(scale.lo)} to ${fmt(scale.hi)} ${variable.unit}` }, box);
    const grad = el('linearGradient', { id: 'legend-grad', x1: 0, x2: 1, y1: 0, y2: 0 }, el('defs', {}, svg));
    for (let i = 0; i <= 16; i++) el('stop', { offset: i / 16, 'stop-color': scale.table[Math.round((i / 16) * 255)] }, grad);
    el('rect', { x: 8, y: 4, width: w - 16, height: 14, fill: 'url(#legend-grad)', stroke: '#8a8f99' }, svg);
    for (const t of niceTicks(scale.lo, scale.hi, 4)) {
      const x = 8 + ((t - scale.lo) / (scale.hi - scale.lo)) * (w - 16);
      el('line', { x1: x, x2: x, y1: 18, y2: 23, stroke: '#1d2330' }, svg);
      el('text', { x, y: 35, 'text-anchor': 'middle', class: 'tick' }, svg).textContent = fmt(t);
    }
    const none = state.data.stations.filter((s) => s.value === null).length;
    if (none) html('p', `${none} without a value (white, grey ring)`, box, 'note');
  }

  // ---- Tooltip ----
  function showTip(target, clientX, clientY) {
    const s = state.data.stations.find((x) => x.id === target.getAttribute('data-station'));
    if (!s) return;
    const tip = $('tooltip'), wrap = $('map-wrap').getBoundingClientRect(), v = state.data.variable;
    tip.textContent = `${s.name || s.id} (${s.id})` + (v ? `: ${fmt(s.value)} ${s.value === null ? '' : v.unit}` : '');
    tip.hidden = false;
    tip.style.left = (clientX - wrap.left + 12) + 'px';
    tip.style.top = (clientY - wrap.top + 12) + 'px';
  }

  // ---- Station panel ----
  async function openStation(id) {
    let info, seasons;
    try { [info, seasons] = await Promise.all([getJson('/api/stations/' + encodeURIComponent(id)), getJson('/api/stations/' + encodeURIComponent(id) + '/seasons')]); } catch (e) { status('Cannot open station ' + id + ': ' + e.message); return; }
    state.station = id;
    $('tooltip').hidden = true;
    document.querySelectorAll('#g-stations circle.hl').forEach((c) => c.classList.remove('hl'));
    const mark = document.querySelector(`#g-stations circle[data-station="${CSS.escape(id)}"]`);
    if (mark) mark.classList.add('hl');
    const panel = $('panel');
    panel.hidden = false;
    panel.dataset.station = id;
    $('panel-title').textContent = `${info.name || info.id} (${info.id})`;
    const facts = $('panel-facts');
    facts.replaceChildren();
    const fact = (k, v) => { html('dt', k, facts); html('dd', v, facts); };
    fact('Station id', info.id);
    fact('Name', info.name || '—');
    fact('Position', `${fmt(Math.abs(info.latitude), 6)}° ${info.latitude < 0 ? 'S' : 'N'}, ${fmt(Math.abs(info.longitude), 6)}° ${info.longitude < 0 ? 'W' : 'E'} (WGS 84)`);
    fact('Elevation (listed)', info.elevation_listed_m === null ? '—' : fmt(info.elevation_listed_m, 4) + ' m');
    fact('Elevation (terrain model)', info.elevation_dem_m === null ? '—' : fmt(info.elevation_dem_m, 4) + ' m');
    fact('Distance to the coast', info.coast_km === null ? '—' : fmt(info.coast_km) + ' km');
    fact('Seasons on record', String(info.season_count));
    // Trends
    const trends = $('panel-trends');
    trends.replaceChildren();
    if (!info.trends.length) html('p', 'No trends in this results folder.', trends, 'note');
    else table(trends, ['quantity', 'Sen slope per decade', 'unit', 'Mann-Kendall z', 'p'], info.trends.map((t) => [t.label, fmt(t.sen_per_decade), t.unit, fmt(t.mk_z), fmt(t.mk_p)]));
    const reg = $('panel-regression');
    reg.replaceChildren();
    if (!info.regression.length) html('p', 'No regression results in this results folder.', reg, 'note');
    else table(reg, ['response', 'observed', 'fitted', 'residual'], info.regression.map((r) => [r.response, fmt(r.observed), fmt(r.fitted), fmt(r.residual)]));
    // Seasons table
    const box = $('panel-seasons');
    box.replaceChildren();
    const sel = $('season');
    sel.replaceChildren();
    if (!seasons.rows.length) {
      html('p', 'No seasons in this results folder.', box, 'note');
      $('chart').replaceChildren();
      $('chart-note').textContent = 'No season to draw.';
      return;
    }
    const rows = seasons.rows.map((r) => r.map((v, i) => (i === 0 ? String(v) : fmt(v))));
    const t = table(box, seasons.columns, rows);
    t.querySelectorAll('tbody tr').forEach((tr, i) => {
      tr.tabIndex = 0;
      const pick = () => { sel.value = String(seasons.rows[i][0]); loadCurve(); };
      tr.addEventListener('click', pick);
      tr.addEventListener('keydown', (e) => { if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); pick(); } });
    });
    // Seasons in year order; the latest is drawn first.
    for (const r of seasons.rows) { const o = document.createElement('option'); o.value = String(r[0]); o.textContent = String(r[0]); sel.appendChild(o); }
    sel.value = String(seasons.rows[seasons.rows.length - 1][0]);
    const k = $('k');
    k.max = String(Math.max(1, state.meta.components));
    k.value = k.max;
    $('k-out').textContent = k.value;
    await loadCurve();
  }
  function table(parent, header, rows) {
    const t = html('table', null, parent), thead = html('thead', null, t), tr = html('tr', null, thead), tbody = html('tbody', null, t);
    header.forEach((h) => html('th', h, tr));
    rows.forEach((r) => { const row = html('tr', null, tbody); r.forEach((v) => html('td', v, row)); });
    return t;
  }
  async function loadCurve() {
    const id = state.station, season = $('season').value;
    if (!id || !season || !state.meta.components) { $('chart').replaceChildren(); $('chart-note').textContent = state.meta.components ? '' : 'No basis in this results folder: no curve to draw.'; return; }
    try { state.curve = await getJson(`/api/stations/${encodeURIComponent(id)}/curve?season=${encodeURIComponent(season)}`); } catch (e) { $('chart-note').textContent = 'Cannot draw the curve: ' + e.message; return; }
    document.querySelectorAll('#panel-seasons tbody tr').forEach((tr) => tr.classList.toggle('sel', tr.firstChild.textContent === season));
    drawChart();
  }
  function drawChart() {
    const c = state.curve, svg = $('chart'), k = Number($('k').value);
    $('k-out').textContent = String(k);
    svg.replaceChildren();
    if (!c) return;
    const W = 460, H = 240, L = 44, R = 10, T = 22, B = 28, recon = c.reconstructions[k - 1] || c.mean;
    const all = c.mean.concat(recon, c.observed || []).filter((v) => v !== null && Number.isFinite(v));
    let hi = Math.max(1, ...all), lo = Math.min(0, ...all);
    const ticks = niceTicks(lo, hi, 5);
    lo = Math.min(lo, ticks[0]); hi = Math.max(hi, ticks[ticks.length - 1]);
    const x = (d) => L + (d / 364) * (W - L - R), y = (v) => T + (1 - (v - lo) / (hi - lo)) * (H - T - B);
    for (const t of ticks) {
      el('line', { x1: L, x2: W - R, y1: y(t), y2: y(t), class: 'grid' }, svg);
      el('text', { x: L - 4, y: y(t) + 3, 'text-anchor': 'end' }, svg).textContent = fmt(t);
    }
    const [mm, dd] = (c.season_start || '09-01').split('-').map(Number), start = Date.UTC(2001, mm - 1, dd);
    for (let d = 0; d < 365; d += 61) {
      const date = new Date(start + d * 86400000);
      el('text', { x: x(d), y: H - B + 14, 'text-anchor': 'middle' }, svg).textContent = date.toLocaleString('en', { month: 'short', day: 'numeric', timeZone: 'UTC' });
    }
    el('path', { d: `M${L} ${T}V${H - B}H${W - R}`, class: 'axis' }, svg);
    el('text', { x: 4, y: 12 }, svg).textContent = `snow depth (${c.units}), season ${c.season}`;
    const line = (v) => { let d = '', pen = false; v.forEach((val, i) => { if (val === null || !Number.isFinite(val)) { pen = false; return; } d += (pen ? 'L' : 'M') + x(i).toFixed(1) + ' ' + y(val).toFixed(1); pen = true; }); return d; };
    el('path', { d: line(c.mean), class: 'mean', 'data-series': 'mean' }, svg);
    if (c.observed) el('path', { d: line(c.observed), class: 'observed', 'data-series': 'observed' }, svg);
    el('path', { d: line(recon), class: 'recon', 'data-series': 'reconstruction' }, svg);
    const key = [['mean', 'mean curve'], ['recon', `reconstruction, ${k} component${k > 1 ? 's' : ''}`]];
    if (c.observed) key.splice(1, 0, ['observed', 'observed']);
    key.forEach(([cls, text], i) => { const yy = T + 6 + i * 13; el('line', { x1: W - 200, x2: W - 180, y1: yy, y2: yy, class: cls }, svg); el('text', { x: W - 176, y: yy + 3 }, svg).textContent = text; });
    const coeffs = c.coefficients.slice(0, k).map((v, i) => `c${i + 1} (${c.labels[i]}) = ${fmt(v)}`).join(', ');
    $('chart-note').textContent = (c.observed ? '' : `Observed daily curve not shown (${c.observed_note}): mean and reconstruction only. `) + coeffs;
  }

  // ---- Controls ----
  function fillVariables() {
    const sel = $('variable');
    sel.replaceChildren();
    const groups = new Map();
    for (const v of state.meta.variables) {
      if (!groups.has(v.group)) { const g = document.createElement('optgroup'); g.label = v.group; groups.set(v.group, g); sel.appendChild(g); }
      const o = document.createElement('option'); o.value = v.key; o.textContent = `${v.label} (${v.unit})`; groups.get(v.group).appendChild(o);
    }
    if (!state.meta.variables.length) { const o = document.createElement('option'); o.value = ''; o.textContent = 'no variables in this results folder'; sel.appendChild(o); sel.disabled = true; }
    state.variable = state.meta.variables.length ? state.meta.variables[0].key : '';
    sel.value = state.variable;
  }
  function wire() {
    let timer = 0;
    const later = () => { clearTimeout(timer); timer = setTimeout(loadStations, 250); };
    $('variable').addEventListener('change', () => { state.variable = $('variable').value; loadStations(); });
    ['from', 'to', 'min-days', 'max-residual'].forEach((id) => { $(id).addEventListener('input', later); $(id).addEventListener('change', later); });
    $('clear-filters').addEventListener('click', () => { ['from', 'to', 'min-days', 'max-residual'].forEach((id) => { $(id).value = ''; }); loadStations(); });
    $('layer-coast').addEventListener('change', updateLayerVisibility);
    $('layer-hill').addEventListener('change', updateLayerVisibility);
    $('underlay').addEventListener('change', updateLayerVisibility);
    $('zoom-in').addEventListener('click', () => zoom(1.5));
    $('zoom-out').addEventListener('click', () => zoom(1 / 1.5));
    $('zoom-reset').addEventListener('click', home);
    const find = () => {
      const q = $('find').value.trim().toLowerCase();
      if (!q || !state.data) return;
      const s = state.data.stations.find((x) => x.id.toLowerCase() === q) || state.data.stations.find((x) => x.name.toLowerCase().includes(q));
      if (s) openStation(s.id); else status(`No station shown matches '${$('find').value.trim()}'.`);
    };
    $('find').addEventListener('focus', fillStationNames);
    $('find-go').addEventListener('click', find);
    $('find').addEventListener('keydown', (e) => { if (e.key === 'Enter') { e.preventDefault(); find(); } });
    $('panel-close').addEventListener('click', closePanel);
    $('season').addEventListener('change', loadCurve);
    $('k').addEventListener('input', drawChart);
    document.addEventListener('keydown', (e) => { if (e.key === 'Escape' && !$('panel').hidden) closePanel(); });
    const map = $('map');
    map.addEventListener('keydown', (e) => {
      const step = 60, keys = { ArrowLeft: [step, 0], ArrowRight: [-step, 0], ArrowUp: [0, step], ArrowDown: [0, -step] };
      if (e.key === '+' || e.key === '=') zoom(1.5);
      else if (e.key === '-' || e.key === '_') zoom(1 / 1.5);
      else if (e.key === '0') home();
      else if (keys[e.key]) pan(...keys[e.key]);
      else return;
      e.preventDefault();
    });
    map.addEventListener('wheel', (e) => {
      e.preventDefault();
      const r = map.getBoundingClientRect();
      zoom(Math.pow(1.0015, -e.deltaY), e.clientX - r.left, e.clientY - r.top);
    }, { passive: false });
    let drag = null;
    map.addEventListener('pointerdown', (e) => { if (e.button !== 0) return; drag = { x: e.clientX, y: e.clientY, moved: false, id: e.pointerId }; });
    map.addEventListener('pointermove', (e) => {
      if (drag && e.pointerId === drag.id) {
        const dx = e.clientX - drag.x, dy = e.clientY - drag.y;
        if (!drag.moved && Math.hypot(dx, dy) > 4) { drag.moved = true; map.setPointerCapture(e.pointerId); map.classList.add('dragging'); $('tooltip').hidden = true; }
        if (drag.moved) { pan(dx, dy); drag.x = e.clientX; drag.y = e.clientY; }
        return;
      }
      const t = e.target;
      if (t instanceof SVGCircleElement && t.hasAttribute('data-station')) showTip(t, e.clientX, e.clientY); else $('tooltip').hidden = true;
    });
    const endDrag = (e) => {
      if (!drag) return;
      const wasDrag = drag.moved;
      drag = null;
      map.classList.remove('dragging');
      if (!wasDrag && e.type === 'pointerup') {
        const t = document.elementFromPoint(e.clientX, e.clientY);
        if (t instanceof SVGCircleElement && t.hasAttribute('data-station')) openStation(t.getAttribute('data-station'));
      }
    };
    map.addEventListener('pointerup', endDrag);
    map.addEventListener('pointercancel', endDrag);
    map.addEventListener('pointerleave', () => { $('tooltip').hidden = true; });
    // The map's box changes with the window and when the station panel opens or closes.
    new ResizeObserver(() => { if (state.view) applyView(); }).observe(map);
  }
  function closePanel() {
    $('panel').hidden = true;
    state.station = null;
    document.querySelectorAll('#g-stations circle.hl').forEach((c) => c.classList.remove('hl'));
    $('map').focus();
  }

  async function main() {
    const meta = await getJson('/api/meta');
    state.meta = meta;
    const b = meta.bounds;
    state.lon0 = (b.west + b.east) / 2;
    state.lat0 = (b.south + b.north) / 2;
    state.cos0 = Math.cos((state.lat0 * Math.PI) / 180);
    fillVariables();
    $('coast-row').hidden = !meta.layers.coastline;
    $('hill-row').hidden = !meta.layers.hillshade;
    $('underlay-row').hidden = !meta.layers.predicted.length;
    for (const p of meta.layers.predicted) { const o = document.createElement('option'); o.value = p.key; o.textContent = p.label; $('underlay').appendChild(o); }
    if (meta.seasons) {
      for (const id of ['from', 'to']) { $(id).min = String(meta.seasons.first); $(id).max = String(meta.seasons.last); $(id).placeholder = String(id === 'from' ? meta.seasons.first : meta.seasons.last); }
      $('max-residual').disabled = !meta.has_residual;
      $('max-residual-label').hidden = $('max-residual').hidden = !meta.has_residual;
    } else {
      $('filters').hidden = true;
      ['from', 'to', 'min-days', 'max-residual'].forEach((id) => { $(id).disabled = true; });
    }
    // Fit the whole network (with a margin of a twentieth of its size each side) to the window, widened to
    // the hillshade's box (the region) when that is not far larger than the network.
    const sx = Math.max(b.east - b.west, 0.01), sy = Math.max(b.north - b.south, 0.01), hb = meta.layers.hillshade;
    const home = { west: b.west - sx * 0.05, east: b.east + sx * 0.05, south: b.south - sy * 0.05, north: b.north + sy * 0.05 };
    if (hb) {
      home.west = Math.min(home.west, Math.max(hb.west, b.west - sx * 0.5));
      home.east = Math.max(home.east, Math.min(hb.east, b.east + sx * 0.5));
      home.south = Math.min(home.south, Math.max(hb.south, b.south - sy * 0.5));
      home.north = Math.max(home.north, Math.min(hb.north, b.north + sy * 0.5));
    }
    state.homeBounds = home;
    fitView(state.homeBounds);
    state.home = { ...state.view };
    wire();
    drawImage($('g-hill'), meta.layers.hillshade);
    const layers = meta.layers.coastline ? drawCoast().catch((e) => status('Coastline not drawn: ' + e.message)) : Promise.resolve();
    updateLayerVisibility();
    await Promise.all([layers, loadStations()]);
    // First complete render: after the frame that paints the stations.
    requestAnimationFrame(() => requestAnimationFrame(() => {
      document.documentElement.dataset.renderMs = performance.now().toFixed(1);
      document.documentElement.dataset.ready = '1';
    }));
  }
  main().catch((e) => status('The map cannot start: ' + e.message));
})();
