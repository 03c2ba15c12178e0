"""The element timeline's own script and style, sent once per fragment.

What it does in the browser: reads the fragment's JSON (the boxes, the states as runs per
element and week, the layouts made by :mod:`reports.element_timeline.scene`), builds the
meshes of both 3D scenes and the flat view with plotly.js, recolours them when the week
changes (slider, play and pause) and keeps the two scenes on one camera. The data comes
from :class:`~reports.element_timeline.data.ElementTimeline`.

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
#{id} .counts {{ font-size: 0.85em; margin: 0.2em 0; }}
#{id} table {{ border-collapse: collapse; font-size: 0.85em; }}
#{id} td, #{id} th {{ border: 1px solid #ccc; padding: 0.15em 0.5em; text-align: left; }}
"""

#: The fragment's script; ``{id}`` is replaced by the outer ``div``'s id.
SCRIPT = r"""
(function (root) {
  "use strict";
  function start() {
    if (!window.Plotly) {
      root.querySelector('[data-role="status"]').textContent = "This figure needs plotly.js on the page.";
      return;
    }
    var data = JSON.parse(root.querySelector('script[data-role="timeline-data"]').textContent);
    var E = data.elements, F = data.frames.count;
    var slider = root.querySelector('[data-role="slider"]');
    var play = root.querySelector('[data-role="play"]');
    var label = root.querySelector('[data-role="date"]');
    var counts = root.querySelector('[data-role="counts"]');
    var first = Date.UTC(+data.frames.first.slice(0, 4), +data.frames.first.slice(5, 7) - 1,
                         +data.frames.first.slice(8, 10));
    function dateOf(frame) {
      return new Date(first + frame * data.frames.step_days * 86400000).toISOString().slice(0, 10);
    }
    function decode(text) {
      var items = text.split(","), offsets = new Int32Array(E + 1), starts = [], codes = [];
      for (var e = 0; e < E; e++) {
        offsets[e] = starts.length;
        var frame = 0, runs = items[e].split(".");
        for (var r = 0; r < runs.length; r++) {
          starts.push(frame);
          codes.push(+runs[r].charAt(0));
          frame += parseInt(runs[r].slice(1), 36);
        }
      }
      offsets[E] = starts.length;
      return {offsets: offsets, starts: Int32Array.from(starts), codes: Uint8Array.from(codes)};
    }
    var runs = data.views.map(function (v) { return decode(data.states[v.key]); });
    function statesAt(view, frame) {
      var r = runs[view], out = new Uint8Array(E);
      for (var e = 0; e < E; e++) {
        var k = r.offsets[e], last = r.offsets[e + 1] - 1;
        while (k < last && r.starts[k + 1] <= frame) k++;
        out[e] = r.codes[k];
      }
      return out;
    }
    var plots = [], three = data.figure3d, flat = data.figure2d;
    function intensities(states) {
      var drawn = three.drawn, out = new Float32Array(drawn.length * 8);
      for (var n = 0; n < drawn.length; n++) out.fill(states[drawn[n]], 8 * n, 8 * n + 8);
      return out;
    }
    function build3d(states) {
      var drawn = three.drawn, N = drawn.length, b = three.boxes;
      var x = new Float32Array(8 * N), y = new Float32Array(8 * N), z = new Float32Array(8 * N);
      var i = new Int32Array(12 * N), j = new Int32Array(12 * N), k = new Int32Array(12 * N);
      var text = new Array(8 * N), c, t, n;
      for (n = 0; n < N; n++) {
        for (c = 0; c < 8; c++) {
          var corner = three.corners[c], v = 8 * n + c;
          x[v] = b[6 * n] + corner[0] * b[6 * n + 3];
          y[v] = b[6 * n + 1] + corner[1] * b[6 * n + 4];
          z[v] = b[6 * n + 2] + corner[2] * b[6 * n + 5];
          text[v] = data.hover[drawn[n]];
        }
        for (t = 0; t < 12; t++) {
          var tri = three.triangles[t], f = 12 * n + t;
          i[f] = 8 * n + tri[0]; j[f] = 8 * n + tri[1]; k[f] = 8 * n + tri[2];
        }
      }
      var ex = [], ey = [], ez = [];
      three.outlined.forEach(function (n) {
        three.edges.forEach(function (edge) {
          [edge[0], edge[1]].forEach(function (c) {
            var corner = three.corners[c];
            ex.push(b[6 * n] + corner[0] * b[6 * n + 3]);
            ey.push(b[6 * n + 1] + corner[1] * b[6 * n + 4]);
            ez.push(b[6 * n + 2] + corner[2] * b[6 * n + 5]);
          });
          ex.push(null); ey.push(null); ez.push(null);
        });
      });
      var traces = three.traces.map(function (trace, number) {
        var copy = Object.assign({}, trace);
        if (number < 2) {
          Object.assign(copy, {x: x, y: y, z: z, i: i, j: j, k: k, text: text,
                               intensity: intensities(states[number])});
        } else {
          Object.assign(copy, {x: ex, y: ey, z: ez});
        }
        return copy;
      });
      var div = root.querySelector('[data-role="plot3d"]');
      return Plotly.newPlot(div, traces, three.layout, {responsive: true, displaylogo: false}).then(function () {
        var syncing = false;
        function follow(event) {
          if (syncing) return;
          var from = null, to = null;
          if (event["scene.camera"]) { from = "scene.camera"; to = "scene2.camera"; }
          else if (event["scene2.camera"]) { from = "scene2.camera"; to = "scene.camera"; }
          if (!from) return;
          syncing = true;
          var change = {}; change[to] = event[from];
          Plotly.relayout(div, change).then(function () { syncing = false; }, function () { syncing = false; });
        }
        div.on("plotly_relayout", follow);
        div.on("plotly_relayouting", follow);
        plots.push({div: div, update: function (s) {
          return Plotly.restyle(div, {intensity: [intensities(s[0]), intensities(s[1])]}, [0, 1]);
        }});
      });
    }
    function build2d(states) {
      var traces = flat.traces.map(function (trace, number) {
        var marker = Object.assign({}, trace.marker, {color: Float32Array.from(states[number])});
        return Object.assign({}, trace, {x: flat.x, y: flat.y, text: data.hover, marker: marker});
      });
      var div = root.querySelector('[data-role="plot2d"]');
      return Plotly.newPlot(div, traces, flat.layout, {responsive: true, displaylogo: false}).then(function () {
        plots.push({div: div, update: function (s) {
          return Plotly.restyle(div, {"marker.color": [Float32Array.from(s[0]), Float32Array.from(s[1])]}, [0, 1]);
        }});
      });
    }
    var current = 0, playing = false, timer = null;
    function describe(states) {
      return data.views.map(function (v, number) {
        var tally = [0, 0, 0, 0, 0];
        states[number].forEach(function (c) { tally[c]++; });
        var parts = [];
        tally.forEach(function (n, c) { if (n) parts.push(n + " " + data.state_names[c]); });
        return v.name + ": " + parts.join(", ");
      }).join(" | ");
    }
    function show(frame) {
      current = frame;
      slider.value = String(frame);
      root.dataset.frame = String(frame);
      label.textContent = "Week of Monday " + dateOf(frame) + " (week " + (frame + 1) + " of " + F + ")";
      var states = [statesAt(0, frame), statesAt(1, frame)];
      counts.textContent = describe(states);
      return states;
    }
    function setFrame(frame) {
      frame = Math.max(0, Math.min(F - 1, frame | 0));
      var states = show(frame);
      return Promise.all(plots.map(function (p) { return p.update(states); }));
    }
    function stop() {
      playing = false;
      if (timer) { clearTimeout(timer); timer = null; }
      play.textContent = "Play";
      play.setAttribute("aria-pressed", "false");
    }
    function step() {
      if (!playing) return;
      if (current >= F - 1) { stop(); return; }
      setFrame(current + 1).then(function () {
        if (playing) timer = setTimeout(step, data.play_milliseconds);
      });
    }
    slider.addEventListener("input", function () { setFrame(+slider.value); });
    play.addEventListener("click", function () {
      if (playing) { stop(); return; }
      playing = true;
      play.textContent = "Pause";
      play.setAttribute("aria-pressed", "true");
      (current >= F - 1 ? setFrame(0) : Promise.resolve()).then(function () {
        timer = setTimeout(step, data.play_milliseconds);
      });
    });
    var states = show(0), work = [];
    if (three) work.push(build3d(states));
    if (flat) work.push(build2d(states));
    root.elementTimeline = {setFrame: setFrame, statesAt: statesAt, frame: function () { return current; }};
    Promise.all(work).then(function () { root.dataset.ready = "true"; }, function (error) {
      root.querySelector('[data-role="status"]').textContent = "The figure could not be drawn: " + error;
      throw error;
    });
  }
  if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", start);
  else start();
})(document.getElementById("{id}"));
"""
