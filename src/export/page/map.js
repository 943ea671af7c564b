'use strict';
// The map page's drawing: the data decoded from the JSON element, the view (centre and zoom in
// metres of the district's local frame) and the layers drawn on the canvas in the picture's order
// (corridors under the plan, so the repairs' day colours stay visible)
// and colours. ui.js adds the controls. Text from the data is only ever set as text, never as markup.
var reknitMap = (function () {
  var D = JSON.parse(document.getElementById('map-data').textContent);
  var R = D.res, C = D.colours;
  var canvas = document.getElementById('map');
  var ctx = canvas.getContext('2d');
  var ORDER = ['zones', 'network', 'single_failures', 'corridors', 'plan', 'backup', 'qa', 'sites'];
  var STATUS = ['joined', 'not_attached', 'left_out_by_budget', 'unreachable'];

  // A feature: its leading numbers (m), its points in metres (p) and its bounding box (b).
  function decode(f, meta) {
    var n = (f.length - meta) >> 1, p = new Float64Array(2 * n), x = 0, y = 0;
    var b = [Infinity, Infinity, -Infinity, -Infinity];
    for (var i = 0; i < n; i++) {
      x += f[meta + 2 * i]; y += f[meta + 2 * i + 1];
      var px = x * R, py = y * R;
      p[2 * i] = px; p[2 * i + 1] = py;
      if (px < b[0]) b[0] = px;
      if (py < b[1]) b[1] = py;
      if (px > b[2]) b[2] = px;
      if (py > b[3]) b[3] = py;
    }
    return { m: f.slice(0, meta), p: p, b: b };
  }

  var layers = {};
  ORDER.forEach(function (id) {
    var L = D.layers[id];
    if (!L) return;
    layers[id] = { id: id, visible: true, feats: L.f.map(function (f) { return decode(f, L.meta); }) };
  });

  var view = { cx: 0, cy: 0, z: 1, fitZ: 1 }, W = 1, H = 1;
  var state = { selected: null, drawn: {} };

  function extent() {
    var b = [Infinity, Infinity, -Infinity, -Infinity];
    ['network', 'sites'].forEach(function (id) {
      (layers[id] ? layers[id].feats : []).forEach(function (f) {
        b = [Math.min(b[0], f.b[0]), Math.min(b[1], f.b[1]), Math.max(b[2], f.b[2]), Math.max(b[3], f.b[3])];
      });
    });
    return isFinite(b[0]) ? b : [0, 0, 1, 1];
  }

  function size() {
    var r = canvas.getBoundingClientRect(), dpr = window.devicePixelRatio || 1;
    W = Math.max(1, r.width); H = Math.max(1, r.height);
    var w = Math.round(W * dpr), h = Math.round(H * dpr);
    if (canvas.width !== w || canvas.height !== h) { canvas.width = w; canvas.height = h; }
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
  }

  function fit() {
    size();
    var b = extent(), pad = 52;
    var z = Math.min((W - 2 * pad) / Math.max(b[2] - b[0], 1), (H - 2 * pad) / Math.max(b[3] - b[1], 1));
    view.z = view.fitZ = Math.max(z, 1e-6);
    view.cx = (b[0] + b[2]) / 2; view.cy = (b[1] + b[3]) / 2;
  }

  function sx(x) { return W / 2 + (x - view.cx) * view.z; }
  function sy(y) { return H / 2 - (y - view.cy) * view.z; }
  function box() {
    return [view.cx - W / 2 / view.z, view.cy - H / 2 / view.z, view.cx + W / 2 / view.z, view.cy + H / 2 / view.z];
  }
  function meets(b, v) { return b[0] <= v[2] && b[2] >= v[0] && b[1] <= v[3] && b[3] >= v[1]; }

  // Line widths follow the picture's base width and grow a little as the reader zooms in.
  function lw(k) { return Math.max(0.6, D.base * k) * Math.min(4, Math.max(1, Math.pow(view.z / view.fitZ, 0.3))); }

  function trace(f, close) {
    var p = f.p;
    if (p.length < 2) return;
    ctx.moveTo(sx(p[0]), sy(p[1]));
    for (var i = 2; i < p.length; i += 2) ctx.lineTo(sx(p[i]), sy(p[i + 1]));
    if (p.length === 2) ctx.lineTo(sx(p[0]) + 0.01, sy(p[1]));
    if (close) ctx.closePath();
  }

  // Strokes the features of `L` that `keep` accepts and the view meets, in one style; returns how many.
  function lines(L, v, keep, colour, width, dash) {
    var n = 0;
    ctx.beginPath();
    L.feats.forEach(function (f, i) {
      if (keep(f, i) && meets(f.b, v)) { trace(f); n++; }
    });
    ctx.setLineDash(dash || []);
    ctx.strokeStyle = colour; ctx.lineWidth = width;
    ctx.lineCap = 'round'; ctx.lineJoin = 'round';
    ctx.stroke();
    ctx.setLineDash([]);
    return n;
  }

  function siteSymbol(x, y, hub, status) {
    ctx.lineWidth = 1.5;
    if (hub) {
      ctx.fillStyle = C.ink; ctx.strokeStyle = C.paper;
      ctx.fillRect(x - 6, y - 6, 12, 12); ctx.strokeRect(x - 6, y - 6, 12, 12);
      return;
    }
    ctx.beginPath(); ctx.arc(x, y, 5, 0, 2 * Math.PI);
    ctx.fillStyle = status === 0 ? C.ink : C.paper; ctx.fill();
    ctx.strokeStyle = C.ink;
    ctx.setLineDash(status === 1 ? [2, 2] : []);
    ctx.stroke(); ctx.setLineDash([]);
    ctx.lineWidth = 1; ctx.beginPath();
    if (status === 2) { ctx.moveTo(x - 3, y); ctx.lineTo(x + 3, y); }
    if (status === 3) { ctx.moveTo(x - 2.5, y - 2.5); ctx.lineTo(x + 2.5, y + 2.5); ctx.moveTo(x + 2.5, y - 2.5); ctx.lineTo(x - 2.5, y + 2.5); }
    ctx.stroke();
  }

  // Text with a paper halo, unless it would cover text already placed.
  function label(text, x, y, font, taken) {
    ctx.font = font;
    var w = ctx.measureText(text).width, b = [x, y - 11, x + w, y + 3];
    for (var i = 0; i < taken.length; i++) if (meets(taken[i], b)) return;
    taken.push(b);
    ctx.lineWidth = 3; ctx.strokeStyle = C.paper; ctx.strokeText(text, x, y);
    ctx.fillStyle = C.ink; ctx.fillText(text, x, y);
  }

  function midpoint(p) {
    var n = p.length >> 1, k = n >> 1;
    if (n % 2 === 0 && n > 1) return [(p[2 * k - 2] + p[2 * k]) / 2, (p[2 * k - 1] + p[2 * k + 1]) / 2];
    return [p[2 * k], p[2 * k + 1]];
  }

  var DRAW = {
    zones: function (L, v) {
      var n = 0;
      ctx.beginPath();
      L.feats.forEach(function (f) { if (meets(f.b, v)) { trace(f, true); n++; } });
      ctx.fillStyle = C.zoneFill; ctx.fill();
      ctx.strokeStyle = C.zoneEdge; ctx.lineWidth = 1; ctx.stroke();
      return n;
    },
    network: function (L, v) {
      return lines(L, v, function (f) { return f.m[0] === 0; }, C.road, lw(1)) +
        lines(L, v, function (f) { return f.m[0] === 1; }, C.damaged, lw(1.4)) +
        lines(L, v, function (f) { return f.m[0] === 2; }, C.impassable, lw(1.2), [4, 3]);
    },
    single_failures: function (L, v) {
      return lines(L, v, function () { return true; }, C.singleFailure, Math.max(6, lw(5)));
    },
    plan: function (L, v) {
      var n = lines(L, v, function (f) { return f.m[0] < 0; }, C.planIntact, lw(1.8));
      D.dayColours.forEach(function (c, k) {
        n += lines(L, v, function (f) { return f.m[0] === k; }, c, Math.max(2, lw(3)));
      });
      return n;
    },
    backup: function (L, v) {
      return lines(L, v, function () { return true; }, C.backup, Math.max(1.5, lw(2.4)), [7, 4]);
    },
    corridors: function (L, v) {
      return lines(L, v, function () { return true; }, C.corridor, 2.5, [2, 3]);
    },
    qa: function (L, v) {
      var n = 0;
      ctx.beginPath();
      L.feats.forEach(function (f) {
        if (!meets(f.b, v)) return;
        var x = sx(f.p[0]), y = sy(f.p[1]);
        ctx.moveTo(x, y - 3); ctx.lineTo(x + 3, y); ctx.lineTo(x, y + 3); ctx.lineTo(x - 3, y); ctx.closePath();
        n++;
      });
      ctx.fillStyle = C.qa; ctx.fill();
      return n;
    },
    sites: function (L, v) {
      var n = 0;
      L.feats.forEach(function (f) {
        if (!meets(f.b, v)) return;
        siteSymbol(sx(f.p[0]), sy(f.p[1]), f.m[0] === 1, f.m[1]);
        n++;
      });
      return n;
    }
  };

  // Repair numbers and site labels, placed clear of each other (sites first, as on the picture).
  function texts(v) {
    var taken = [], rows = D.rows, info = D.info.sites.rows;
    if (layers.sites && layers.sites.visible) {
      layers.sites.feats.forEach(function (f, i) {
        if (!meets(f.b, v)) return;
        var x = sx(f.p[0]), y = sy(f.p[1]);
        taken.push([x - 7, y - 7, x + 7, y + 7]);
      });
      ctx.textAlign = 'left';
      layers.sites.feats.forEach(function (f, i) {
        if (!meets(f.b, v)) return;
        label(info[i][1] || info[i][0], sx(f.p[0]) + 9, sy(f.p[1]) + 4, '13px "DejaVu Sans", Arial, sans-serif', taken);
      });
    }
    if (layers.plan && layers.plan.visible) {
      var shown = 0;
      layers.plan.feats.forEach(function (f) {
        if (f.m[1] < 0 || shown >= 400 || !meets(f.b, v)) return;
        var c = midpoint(f.p);
        label(rows[f.m[1]][0], sx(c[0]) + 3, sy(c[1]) - 3, 'bold 11px "DejaVu Sans", Arial, sans-serif', taken);
        shown++;
      });
    }
  }

  function highlight() {
    var s = state.selected;
    if (!s || !layers[s.layer] || !layers[s.layer].visible) return;
    var f = layers[s.layer].feats[s.index];
    ctx.strokeStyle = C.ink; ctx.globalAlpha = 0.45;
    if (f.p.length === 2) {
      ctx.lineWidth = 3; ctx.beginPath(); ctx.arc(sx(f.p[0]), sy(f.p[1]), 11, 0, 2 * Math.PI); ctx.stroke();
    } else {
      ctx.lineWidth = 10; ctx.beginPath(); trace(f); ctx.stroke();
    }
    ctx.globalAlpha = 1;
  }

  function draw() {
    size();
    ctx.fillStyle = C.paper; ctx.fillRect(0, 0, W, H);
    var v = box(), drawn = {};
    ORDER.forEach(function (id) {
      var L = layers[id];
      if (L) drawn[id] = L.visible ? DRAW[id](L, v) : 0;
    });
    highlight();
    texts(v);
    state.drawn = drawn;
    document.body.dataset.drawn = JSON.stringify(drawn);
  }

  var pending = false;
  function redraw() {
    if (pending) return;
    pending = true;
    window.requestAnimationFrame(function () { pending = false; draw(); });
  }

  // Screen position (page pixels) of a lon/lat point: the page's own projection, for tests and tools.
  function project(lon, lat) {
    var P = D.proj, r = canvas.getBoundingClientRect();
    var l = P[0] === 1 && lon < 0 ? lon + 360 : lon;
    return [r.left + sx((l - P[1]) * P[3]), r.top + sy((lat - P[2]) * P[4])];
  }

  return {
    data: D, layers: layers, order: ORDER, status: STATUS, view: view, state: state,
    fit: fit, draw: draw, redraw: redraw, project: project, sx: sx, sy: sy, meets: meets,
    toMetres: function (x, y) { return [view.cx + (x - W / 2) / view.z, view.cy - (y - H / 2) / view.z]; }
  };
})();
