"""The element timeline's own script and style, sent once per fragment.

What it does in the browser: reads the fragment's JSON (the boxes, the states as runs per
element and week, the layouts made by :mod:`reports.element_timeline.scene`), builds the
meshes of both 3D scenes and the flat view with plotly.js, and redraws them when the week
changes (slider, play and pause) or when fewer levels are asked for. Work begun is drawn
solid, work not begun as faint wire frames, elements with no linked activity as dotted
grey wire frames, and
begun work that a delay event affected outlined (the rule of
:func:`reports.element_timeline.scene.drawn_parts`). Turning either scene turns the other:
the two keep one camera. The data comes from
:class:`~reports.element_timeline.data.ElementTimeline` (the baseline's early dates and the
as-built record).

The script is a handful of small functions inside one closure; ``root.elementTimeline``
exposes ``setFrame``, ``setTopLevel``, ``statesAt`` and ``frame`` to the page (and tests).

``SCRIPT`` and ``STYLE`` hold the text ``{id}`` where the fragment's element id goes.
"""

from __future__ import annotations

__all__ = ["SCRIPT", "STYLE"]

#: The fragment's CSS, a template for ``str.format(id=...)``.
STYLE = """
#{id} {{ font-family: system-ui, -apple-system, "Segoe UI", sans-serif; color: #222; }}
#{id} h3 {{ font-size: 1.05em; margin: 0.4em 0; }}
#{id} .legend {{ list-style: none; padding: 0; margin: 0.3em 0; columns: 2 22em; font-size: 0.9em; }}
#{id} .legend li {{ margin: 0.15em 0; }}
#{id} .swatch {{ display: inline-block; width: 0.9em; height: 0.9em; margin-right: 0.4em;
  vertical-align: -0.1em; border: 1px solid #555; box-sizing: border-box; }}
#{id} .controls {{ display: flex; align-items: center; gap: 0.8em; margin: 0.4em 0; }}
#{id} .controls input[type=range] {{ flex: 1; }}
#{id} .controls button {{ min-width: 5em; padding: 0.25em 0.8em; }}
#{id} .controls select {{ padding: 0.15em 0.3em; }}
#{id} .controls label {{ white-space: nowrap; }}
#{id} .swatch.ghost {{ border: 1px solid #A9B2BC; }}
#{id} .swatch.wire {{ background: #FFFFFF !important; border: 2px dotted #9A9A9A; }}
#{id} .counts {{ font-size: 0.85em; margin: 0.2em 0; }}
#{id} table {{ border-collapse: collapse; font-size: 0.85em; }}
#{id} td, #{id} th {{ border: 1px solid #ccc; padding: 0.15em 0.5em; text-align: left; }}
"""

#: The fragment's script; ``{id}`` is replaced by the outer ``div``'s id.
SCRIPT = r"""
(function (root) {
  "use strict";
  var ROLES = ["solid", "ghost", "unlinked", "outline"], SOLID = {1: true, 2: true, 3: true}, UNLINKED = 4;

  // -- states: runs "<code><frames in base 36>" joined by ".", elements by ","
  function decodeRuns(text, count) {
    var items = text.split(","), offsets = new Int32Array(count + 1), starts = [], codes = [];
    for (var e = 0; e < count; e++) {
      offsets[e] = starts.length;
      var frame = 0, runs = items[e].split(".");
      for (var r = 0; r < runs.length; r++) {
        starts.push(frame);
        codes.push(+runs[r].charAt(0));
        frame += parseInt(runs[r].slice(1), 36);
      }
    }
    offsets[count] = starts.length;
    return {count: count, offsets: offsets, starts: Int32Array.from(starts), codes: Uint8Array.from(codes)};
  }
  function statesAt(runs, frame) {
    var out = new Uint8Array(runs.count);
    for (var e = 0; e < runs.count; e++) {
      var k = runs.offsets[e], last = runs.offsets[e + 1] - 1;
      while (k < last && runs.starts[k + 1] <= frame) k++;
      out[e] = runs.codes[k];
    }
    return out;
  }

  // -- geometry: vertex 8 n + c is corner c of box n; boxes hold x, y, z, dx, dy, dz
  function vertices(three, hover) {
    var b = three.boxes, N = three.drawn.length, x = new Float32Array(8 * N), y = new Float32Array(8 * N),
        z = new Float32Array(8 * N), text = new Array(8 * N);
    for (var n = 0; n < N; n++) {
      for (var c = 0; c < 8; c++) {
        var corner = three.corners[c], v = 8 * n + c;
        x[v] = b[6 * n] + corner[0] * b[6 * n + 3];
        y[v] = b[6 * n + 1] + corner[1] * b[6 * n + 4];
        z[v] = b[6 * n + 2] + corner[2] * b[6 * n + 5];
        text[v] = hover[three.drawn[n]];
      }
    }
    return {x: x, y: y, z: z, text: text};
  }
  function triangles(three, numbers) {
    var count = 12 * numbers.length, i = new Int32Array(count), j = new Int32Array(count), k = new Int32Array(count);
    numbers.forEach(function (n, place) {
      three.triangles.forEach(function (tri, t) {
        var f = 12 * place + t;
        i[f] = 8 * n + tri[0]; j[f] = 8 * n + tri[1]; k[f] = 8 * n + tri[2];
      });
    });
    return {i: i, j: j, k: k};
  }
  function edges(three, numbers, margin) {
    var b = three.boxes, x = [], y = [], z = [];
    numbers.forEach(function (n) {
      three.edges.forEach(function (edge) {
        edge.forEach(function (c) {
          var corner = three.corners[c];
          x.push(b[6 * n] - margin + corner[0] * (b[6 * n + 3] + 2 * margin));
          y.push(b[6 * n + 1] - margin + corner[1] * (b[6 * n + 4] + 2 * margin));
          z.push(b[6 * n + 2] - margin + corner[2] * (b[6 * n + 5] + 2 * margin));
        });
        x.push(null); y.push(null); z.push(null);
      });
    });
    return {x: x, y: y, z: z};
  }
  // which boxes a view draws solid, faint, as wire frames and outlined (scene.drawn_parts)
  function parts(three, states, starts, frame, top) {
    var out = {solid: [], ghost: [], unlinked: [], outline: []};
    for (var n = 0; n < three.drawn.length; n++) {
      if (three.box_levels[n] > top) continue;
      var e = three.drawn[n], code = states[e];
      if (code === UNLINKED) { out.unlinked.push(n); continue; }
      if (SOLID[code] && starts[e] <= frame) {
        out.solid.push(n);
        if (three.isOutlined[n]) out.outline.push(n);
      } else {
        out.ghost.push(n);
      }
    }
    return out;
  }
  function intensities(three, states) {
    var out = new Float32Array(three.drawn.length * 8);
    for (var n = 0; n < three.drawn.length; n++) out.fill(states[three.drawn[n]], 8 * n, 8 * n + 8);
    return out;
  }

  // -- the 3D scenes: trace 2 r + v is role ROLES[r] in view v
  function sceneTraces(three, corners, states, starts, frame, top) {
    var drawn = [0, 1].map(function (v) { return parts(three, states[v], starts[v], frame, top); });
    var colours = [0, 1].map(function (v) { return intensities(three, states[v]); });
    return three.traces.map(function (style, number) {
      var role = ROLES[number >> 1], v = number & 1, boxes = drawn[v][role], trace = Object.assign({}, style);
      if (role === "solid") return Object.assign(trace, corners, triangles(three, boxes), {intensity: colours[v]});
      Object.assign(trace, edges(three, boxes, role === "outline" ? three.margin : 0));
      if (role === "ghost") {  // each edge is two ends and a gap: three colour values
        var codes = new Uint8Array(3 * three.edges.length * boxes.length);
        boxes.forEach(function (n, place) {
          codes.fill(states[v][three.drawn[n]], 3 * three.edges.length * place, 3 * three.edges.length * (place + 1));
        });
        trace.line = Object.assign({}, style.line, {color: codes});
      }
      return trace;
    });
  }
  // turning one scene turns the other: copy each camera change across, the latest last
  function linkCameras(div) {
    var writing = null, pending = null;  // the scene being turned to follow, and the next turn
    function write(change) {
      writing = change.scene;
      var update = {};
      update[change.scene + ".camera"] = change.camera;
      Plotly.relayout(div, update).then(next, next);
    }
    function next() {
      writing = null;
      if (pending) { var change = pending; pending = null; write(change); }
    }
    function follow(event) {
      var from = ["scene", "scene2"].filter(function (s) {
        return Object.keys(event).some(function (key) { return key.indexOf(s + ".camera") === 0; });
      })[0];
      if (!from || from === writing) return;  // no camera moved, or the echo of a turn made here
      var camera = event[from + ".camera"] || div.layout[from].camera;
      var change = {scene: from === "scene" ? "scene2" : "scene", camera: JSON.parse(JSON.stringify(camera))};
      if (writing) pending = change; else write(change);
    }
    div.on("plotly_relayout", follow);
    div.on("plotly_relayouting", follow);
  }
  function build3d(root, data, view) {
    var three = data.figure3d, corners = vertices(three, data.hover);
    three.isOutlined = new Uint8Array(three.drawn.length);
    three.outlined.forEach(function (n) { three.isOutlined[n] = 1; });
    var div = root.querySelector('[data-role="plot3d"]');
    function traces() {
      return sceneTraces(three, corners, view.states, data.starts, view.frame, view.top);
    }
    return Plotly.newPlot(div, traces(), three.layout, {responsive: true, displaylogo: false}).then(function () {
      linkCameras(div);
      return {div: div, update: function () { return Plotly.react(div, traces(), div.layout); }};
    });
  }

  // -- the flat view by level and zone
  function build2d(root, data, view) {
    var flat = data.figure2d, div = root.querySelector('[data-role="plot2d"]');
    var traces = flat.traces.map(function (trace, number) {
      var marker = Object.assign({}, trace.marker, {color: Float32Array.from(view.states[number])});
      return Object.assign({}, trace, {x: flat.x, y: flat.y, text: data.hover, marker: marker});
    });
    return Plotly.newPlot(div, traces, flat.layout, {responsive: true, displaylogo: false}).then(function () {
      return {div: div, update: function () {
        var colours = view.states.map(function (s) { return Float32Array.from(s); });
        return Plotly.restyle(div, {"marker.color": colours}, [0, 1]);
      }};
    });
  }

  // -- the controls: week slider, play and pause, levels shown
  function describe(data, states) {
    return data.views.map(function (v, number) {
      var tally = [0, 0, 0, 0, 0], parts = [];
      states[number].forEach(function (c) { tally[c]++; });
      tally.forEach(function (n, c) { if (n) parts.push(n + " " + data.state_names[c]); });
      return v.name + ": " + parts.join(", ");
    }).join(" | ");
  }
  function player(root, data, show) {
    var play = root.querySelector('[data-role="play"]'), F = data.frames.count, playing = false, timer = null;
    function stop() {
      playing = false;
      if (timer) { clearTimeout(timer); timer = null; }
      play.textContent = "Play";
      play.setAttribute("aria-pressed", "false");
    }
    function step() {
      if (!playing) return;
      if (show.frame() >= F - 1) { stop(); return; }
      show.setFrame(show.frame() + 1).then(function () {
        if (playing) timer = setTimeout(step, data.play_milliseconds);
      });
    }
    play.addEventListener("click", function () {
      if (playing) { stop(); return; }
      playing = true;
      play.textContent = "Pause";
      play.setAttribute("aria-pressed", "true");
      (show.frame() >= F - 1 ? show.setFrame(0) : Promise.resolve()).then(function () {
        timer = setTimeout(step, data.play_milliseconds);
      });
    });
  }
  function start() {
    var status = root.querySelector('[data-role="status"]');
    if (!window.Plotly) { status.textContent = "This figure needs plotly.js on the page."; return; }
    var data = JSON.parse(root.querySelector('script[data-role="timeline-data"]').textContent);
    var F = data.frames.count, slider = root.querySelector('[data-role="slider"]');
    var levels = root.querySelector('[data-role="levels"]'), label = root.querySelector('[data-role="date"]');
    var runs = data.views.map(function (v) { return decodeRuns(data.states[v.key], data.elements); });
    data.starts = data.views.map(function (v) { return data.start_frames[v.key]; });
    var first = Date.parse(data.frames.first + "T00:00:00Z"), plots = [];
    var view = {frame: 0, top: levels ? +levels.value : Infinity, states: null};
    root.dataset.topLevel = String(view.top);
    function show(frame) {
      view.frame = frame;
      view.states = runs.map(function (r) { return statesAt(r, frame); });
      slider.value = String(frame);
      root.dataset.frame = String(frame);
      var date = new Date(first + frame * data.frames.step_days * 86400000).toISOString().slice(0, 10);
      label.textContent = "Week of Monday " + date + " (week " + (frame + 1) + " of " + F + ")";
      root.querySelector('[data-role="counts"]').textContent = describe(data, view.states);
    }
    // one drawing at a time; the calls made meanwhile share one more, of the latest week
    var busy = null, queued = null;
    function again() { queued = null; return redraw(); }
    function redraw() {
      if (busy) {
        if (!queued) queued = busy.then(again, again);
        return queued;
      }
      var drawn = view.frame + ":" + view.top;
      busy = Promise.all(plots.map(function (p) { return p.update(); })).then(function () {
        busy = null;
        root.dataset.drawn = drawn;  // the week and the highest level now on screen
      }, function (error) {
        busy = null;
        status.textContent = "The figure could not be redrawn: " + error;
        throw error;
      });
      return busy;
    }
    var control = {
      frame: function () { return view.frame; },
      setFrame: function (frame) { show(Math.max(0, Math.min(F - 1, frame | 0))); return redraw(); },
      setTopLevel: function (top) {
        view.top = +top;
        if (levels) levels.value = String(top);
        root.dataset.topLevel = String(top);
        return redraw();
      },
      statesAt: function (v, frame) { return statesAt(runs[v], frame); }
    };
    slider.addEventListener("input", function () { control.setFrame(+slider.value); });
    if (levels) levels.addEventListener("change", function () { control.setTopLevel(+levels.value); });
    player(root, data, control);
    show(0);
    var work = [];
    if (data.figure3d) work.push(build3d(root, data, view));
    if (data.figure2d) work.push(build2d(root, data, view));
    root.elementTimeline = control;
    Promise.all(work).then(function (built) {
      plots = built;
      root.dataset.drawn = view.frame + ":" + view.top;
      root.dataset.ready = "true";
    }, function (error) {
      status.textContent = "The figure could not be drawn: " + error;
      throw error;
    });
  }
  if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", start);
  else start();
})(document.getElementById("{id}"));
"""
