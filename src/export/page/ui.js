// The map page's controls: layer switches, pan (drag, arrow keys), zoom (wheel, buttons, + and -),
// and the selection a click (or N, P, Enter) makes, shown in the side panel as text.
(function (M) {
  var D = M.data, canvas = document.getElementById('map');
  var NAMES = {
    zones: 'damage zones', network: 'road network', single_failures: 'roads with no way round',
    plan: D.scheduled ? 'plan, repairs by day' : 'plan (repairs not scheduled by day)',
    backup: 'backup links', corridors: 'corridors from the hub', qa: 'geometry checks (QA)',
    sites: 'sites by status'
  };

  var toggles = document.getElementById('toggles');
  M.order.forEach(function (id) {
    var L = M.layers[id];
    if (!L) return;
    var label = document.createElement('label'), box = document.createElement('input');
    box.type = 'checkbox'; box.checked = true; box.id = 'layer-' + id;
    box.addEventListener('change', function () { L.visible = box.checked; M.redraw(); });
    var n = document.createElement('span');
    n.className = 'n'; n.textContent = ' (' + L.feats.length + ')';
    label.appendChild(box);
    label.appendChild(document.createTextNode(' ' + NAMES[id]));
    label.appendChild(n);
    toggles.appendChild(label);
  });

  // Distance from (x, y) to the segment a–b, all in metres.
  function segment(x, y, ax, ay, bx, by) {
    var dx = bx - ax, dy = by - ay, l = dx * dx + dy * dy;
    var t = l > 0 ? Math.max(0, Math.min(1, ((x - ax) * dx + (y - ay) * dy) / l)) : 0;
    return Math.hypot(x - ax - t * dx, y - ay - t * dy);
  }
  function distance(f, x, y) {
    var p = f.p;
    if (p.length === 2) return Math.hypot(x - p[0], y - p[1]);
    var best = Infinity;
    for (var i = 2; i < p.length; i += 2) best = Math.min(best, segment(x, y, p[i - 2], p[i - 1], p[i], p[i + 1]));
    return best;
  }

  // What lies under a screen point: the nearest feature within a few pixels, sites before repairs
  // before the other layers.
  var PICK = ['sites', 'plan', 'backup', 'single_failures', 'corridors', 'qa'];
  function hit(px, py) {
    var m = M.toMetres(px, py), tol = 7 / M.view.z;
    var near = [m[0] - tol, m[1] - tol, m[0] + tol, m[1] + tol];
    for (var k = 0; k < PICK.length; k++) {
      var L = M.layers[PICK[k]];
      if (!L || !L.visible) continue;
      var best = null, bd = tol;
      L.feats.forEach(function (f, i) {
        if (PICK[k] === 'plan' && f.m[1] < 0) return;
        if (!M.meets(f.b, near)) return;
        var d = distance(f, m[0], m[1]);
        if (d <= bd) { bd = d; best = i; }
      });
      if (best !== null) return { layer: PICK[k], index: best };
    }
    return null;
  }

  function table(title, fields, values) {
    var box = document.getElementById('info');
    box.textContent = '';
    var h = document.createElement('h3');
    h.textContent = title;
    var t = document.createElement('table');
    fields.forEach(function (name, i) {
      var tr = document.createElement('tr'), th = document.createElement('th'), td = document.createElement('td');
      th.textContent = name; td.textContent = values[i];
      td.dataset.field = name;
      tr.appendChild(th); tr.appendChild(td); t.appendChild(tr);
    });
    box.appendChild(h); box.appendChild(t);
  }

  function select(s) {
    M.state.selected = s;
    document.body.dataset.selected = s ? s.layer + ':' + s.index : '';
    if (!s) {
      document.getElementById('info').textContent = 'Nothing here: click a repair or a site.';
    } else if (s.layer === 'plan' || s.layer === 'backup') {
      var f = M.layers[s.layer].feats[s.index], row = D.rows[f.m[s.layer === 'plan' ? 1 : 0]].concat([D.rowCaution]);
      table('Work order ' + row[0] + (s.layer === 'backup' ? ' (backup link)' : ''), D.header, row);
    } else {
      var info = D.info[s.layer], titles = { sites: 'Site', qa: 'Geometry check', single_failures: 'Road with no way round', corridors: 'Corridor' };
      table(titles[s.layer], info.fields, info.rows[s.index]);
    }
    M.redraw();
  }

  // The repairs in order, for N and P.
  var repairs = [];
  if (M.layers.plan) M.layers.plan.feats.forEach(function (f, i) { if (f.m[1] >= 0) repairs.push(i); });
  function step(by) {
    if (!repairs.length || !M.layers.plan.visible) return;
    var s = M.state.selected, at = s && s.layer === 'plan' ? repairs.indexOf(s.index) : -1;
    var i = repairs[(at + by + repairs.length) % repairs.length], f = M.layers.plan.feats[i];
    M.view.cx = (f.b[0] + f.b[2]) / 2; M.view.cy = (f.b[1] + f.b[3]) / 2;
    select({ layer: 'plan', index: i });
  }

  function zoom(k, px, py) {
    var r = canvas.getBoundingClientRect();
    if (px === undefined) { px = r.width / 2; py = r.height / 2; }
    var before = M.toMetres(px, py);
    M.view.z = Math.min(Math.max(M.view.z * k, M.view.fitZ / 4), M.view.fitZ * 4096);
    var after = M.toMetres(px, py);
    M.view.cx += before[0] - after[0]; M.view.cy += before[1] - after[1];
    M.redraw();
  }
  function pan(dx, dy) { M.view.cx -= dx / M.view.z; M.view.cy += dy / M.view.z; M.redraw(); }

  var drag = null;
  canvas.addEventListener('pointerdown', function (e) {
    drag = { x: e.clientX, y: e.clientY, moved: 0 };
    canvas.setPointerCapture(e.pointerId);
  });
  canvas.addEventListener('pointermove', function (e) {
    if (!drag) return;
    var dx = e.clientX - drag.x, dy = e.clientY - drag.y;
    drag.moved += Math.abs(dx) + Math.abs(dy);
    drag.x = e.clientX; drag.y = e.clientY;
    pan(dx, dy);
  });
  canvas.addEventListener('pointerup', function (e) {
    var r = canvas.getBoundingClientRect();
    if (drag && drag.moved < 5) select(hit(e.clientX - r.left, e.clientY - r.top));
    drag = null;
  });
  canvas.addEventListener('wheel', function (e) {
    e.preventDefault();
    var r = canvas.getBoundingClientRect();
    zoom(Math.exp(-e.deltaY * 0.0015), e.clientX - r.left, e.clientY - r.top);
  }, { passive: false });
  canvas.addEventListener('keydown', function (e) {
    var r = canvas.getBoundingClientRect(), k = e.key, d = 0.15;
    var acts = {
      ArrowLeft: function () { pan(r.width * d, 0); }, ArrowRight: function () { pan(-r.width * d, 0); },
      ArrowUp: function () { pan(0, r.height * d); }, ArrowDown: function () { pan(0, -r.height * d); },
      '+': function () { zoom(1.5); }, '=': function () { zoom(1.5); }, '-': function () { zoom(1 / 1.5); },
      '0': function () { M.fit(); M.redraw(); }, n: function () { step(1); }, p: function () { step(-1); },
      N: function () { step(1); }, P: function () { step(-1); },
      Enter: function () { select(hit(r.width / 2, r.height / 2)); }
    };
    if (acts[k]) { e.preventDefault(); acts[k](); }
  });
  document.getElementById('zoom-in').addEventListener('click', function () { zoom(1.5); });
  document.getElementById('zoom-out').addEventListener('click', function () { zoom(1 / 1.5); });
  document.getElementById('zoom-fit').addEventListener('click', function () { M.fit(); M.redraw(); });
  window.addEventListener('resize', M.redraw);

  M.select = select;
  M.hit = hit;
  window.reknitMap = M;
  M.fit();
  M.draw();
})(reknitMap);
