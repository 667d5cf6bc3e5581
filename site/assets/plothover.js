// plothover.js: a cursor and readout for the Bode charts that
// zport/site/plot draws (svg.zplot with a data-freq attribute). Pointer
// movement or keyboard focus shows a vertical cursor and, inside the SVG,
// the frequency and each trace's magnitude and phase at the nearest point.
// Arrow keys move the cursor (PageUp/PageDown by ten points, Home/End to
// the ends, Escape hides it).
//
// Charts present at load are wired up, and so are charts added later (a
// MutationObserver watches the page); window.zportPlotHover(root) does the
// same for the charts inside root at once. Attaching twice does nothing.
//
// Plain script for pages with a strict Content-Security-Policy: no inline
// handlers, no style attributes, no innerHTML; text goes in by textContent.
// The data attributes it reads are described in site/plot/doc.go.
(function () {
  "use strict";

  var NS = "http://www.w3.org/2000/svg";
  var MINUS = "\u2212";
  var PREFIXES = { "-15": "f", "-12": "p", "-9": "n", "-6": "\u00b5", "-3": "m", "0": "", "3": "k", "6": "M", "9": "G", "12": "T" };

  // formatValue mirrors value.Format (zport/engine/value): sig significant
  // digits, an SI prefix putting the mantissa in [1, 1000), U+2212 minus,
  // "—" for non-finite values, an exponent beyond the prefixes.
  function formatValue(v, unit, sig) {
    if (sig < 1) sig = 1;
    if (!isFinite(v)) return "\u2014";
    var sep = unit === "" ? "" : " ";
    if (v === 0) return "0" + sep + unit;
    var sign = "";
    if (v < 0) {
      sign = MINUS;
      v = -v;
    }
    var e = Math.floor(Math.log10(v));
    var scale = Math.pow(10, sig - 1 - e);
    var r = Math.round(v * scale) / scale;
    if (r >= Math.pow(10, e + 1)) e++;
    var eng = 3 * Math.floor(e / 3);
    if (eng < -15 || eng > 12) {
      var s = r.toExponential(sig - 1).replace("e", "\u00d710^");
      return sign + s + sep + unit;
    }
    var m = r / Math.pow(10, eng);
    var decimals = Math.max(0, sig - 1 - (e - eng));
    var sym = PREFIXES[String(eng)];
    if (unit === "" && sym !== "") sep = "";
    else if (sym !== "" || unit !== "") sep = " ";
    return sign + m.toFixed(decimals) + sep + sym + unit;
  }

  // fixed writes v with d decimals and the typographic minus, for degrees
  // and decibels, which carry no prefix.
  function fixed(v, d) {
    if (!isFinite(v)) return "\u2014";
    var s = v.toFixed(d);
    if (s.charAt(0) === "-") s = /[1-9]/.test(s) ? MINUS + s.slice(1) : s.slice(1);
    return s;
  }

  function numbers(s) {
    s = (s || "").trim();
    return s === "" ? [] : s.split(/\s+/).map(Number);
  }

  function make(name, attrs, parent) {
    var e = document.createElementNS(NS, name);
    for (var k in attrs) e.setAttribute(k, attrs[k]);
    if (parent) parent.appendChild(e);
    return e;
  }

  function attach(svg) {
    if (svg.zportHover || !svg.hasAttribute("data-freq")) return;
    svg.zportHover = true;

    var freq = numbers(svg.getAttribute("data-freq"));
    var x0 = Number(svg.getAttribute("data-x0"));
    var x1 = Number(svg.getAttribute("data-x1"));
    var lf0 = Math.log10(Number(svg.getAttribute("data-fmin")));
    var lf1 = Math.log10(Number(svg.getAttribute("data-fmax")));
    var my = numbers(svg.getAttribute("data-my")); // top bottom lo hi
    // A chart without data-py has no phase panel; its values are
    // magnitudes alone (plot.Bode.NoPhase).
    var py = svg.hasAttribute("data-py") ? numbers(svg.getAttribute("data-py")) : null;
    var stride = py ? 2 : 1;
    var db = svg.getAttribute("data-mscale") === "db";
    var unit = svg.getAttribute("data-unit") || "";
    if (!(freq.length > 0 && x1 > x0 && lf1 > lf0 && my.length === 4 && (!py || py.length === 4))) return;

    var xs = freq.map(function (f) {
      return f > 0 ? x0 + ((Math.log10(f) - lf0) / (lf1 - lf0)) * (x1 - x0) : NaN;
    });
    var traces = [];
    svg.querySelectorAll("path[data-values]").forEach(function (p) {
      var cls = (p.getAttribute("class") || "").replace(/\bdashed\b/, "").trim();
      traces.push({ name: p.getAttribute("data-name") || "", cls: cls, vals: numbers(p.getAttribute("data-values")) });
    });

    function panelY(r, v) {
      return r[1] + ((v - r[2]) / (r[3] - r[2])) * (r[0] - r[1]);
    }

    var ui = null; // built on first use
    var current = -1;

    function build() {
      var g = make("g", { "class": "zcur", "aria-hidden": "true" }, svg);
      var line = make("path", { "class": "zcur-line", fill: "none", stroke: "currentColor" }, g);
      var dots = traces.map(function (t) {
        return [
          make("circle", { "class": t.cls + " zcur-dot", r: "3.5", fill: "none", stroke: "currentColor" }, g),
          make("circle", { "class": t.cls + " zcur-dot", r: "3.5", fill: "none", stroke: "currentColor" }, g),
        ];
      });
      var box = make("rect", { "class": "zcur-box", rx: "3", fill: "none", stroke: "currentColor" }, g);
      var head = make("text", { "class": "zcur-f" }, g);
      var rows = traces.map(function (t) {
        return {
          swatch: make("path", { "class": t.cls, fill: "none", stroke: "currentColor", "stroke-width": "2" }, g),
          text: make("text", {}, g),
        };
      });
      return { g: g, line: line, dots: dots, box: box, head: head, rows: rows };
    }

    function place(dot, y) {
      if (isFinite(y)) {
        dot.setAttribute("cx", ui.x.toFixed(1));
        dot.setAttribute("cy", y.toFixed(1));
        dot.removeAttribute("display");
      } else {
        dot.setAttribute("display", "none");
      }
    }

    function show(i) {
      if (i < 0 || i >= xs.length || !isFinite(xs[i])) return;
      if (!ui) ui = build();
      current = i;
      var x = xs[i];
      ui.x = x;
      ui.g.removeAttribute("display");
      ui.line.setAttribute("d", "M" + x.toFixed(1) + " " + my[0] + "V" + (py ? py[1] : my[1]));
      ui.head.textContent = formatValue(freq[i], "Hz", 3);
      traces.forEach(function (t, k) {
        var m = t.vals[stride * i], p = py ? t.vals[stride * i + 1] : 0;
        var ok = m > 0 && isFinite(m) && isFinite(p);
        var ms = !ok ? "\u2014" : db ? fixed(20 * Math.log10(m), 1) + " dB" : formatValue(m, unit, 3);
        var ps = ok && py ? "  \u2220 " + fixed(p, 1) + "\u00b0" : "";
        ui.rows[k].text.textContent = t.name + ": " + ms + ps;
        place(ui.dots[k][0], ok ? panelY(my, db ? 20 * Math.log10(m) : Math.log10(m)) : NaN);
        place(ui.dots[k][1], ok && py ? panelY(py, p) : NaN);
      });
      layout(x);
    }

    function layout(x) {
      var lineH = 15, pad = 7, sw = 16;
      var w = ui.head.getComputedTextLength();
      ui.rows.forEach(function (r) {
        w = Math.max(w, sw + 5 + r.text.getComputedTextLength());
      });
      w += 2 * pad;
      var h = lineH * (1 + ui.rows.length) + 2 * pad - 4;
      var left = x + 10;
      if (left + w > x1) left = Math.max(x0, x - 10 - w);
      var top = my[0] + 4;
      ui.box.setAttribute("x", left.toFixed(1));
      ui.box.setAttribute("y", top.toFixed(1));
      ui.box.setAttribute("width", w.toFixed(1));
      ui.box.setAttribute("height", h.toFixed(1));
      var y = top + pad + 11;
      ui.head.setAttribute("x", (left + pad).toFixed(1));
      ui.head.setAttribute("y", y.toFixed(1));
      ui.rows.forEach(function (r) {
        y += lineH;
        r.swatch.setAttribute("d", "M" + (left + pad).toFixed(1) + " " + (y - 4).toFixed(1) + "h" + sw);
        r.text.setAttribute("x", (left + pad + sw + 5).toFixed(1));
        r.text.setAttribute("y", y.toFixed(1));
      });
    }

    function hide() {
      if (ui) ui.g.setAttribute("display", "none");
    }

    function nearest(x) {
      var best = -1, bd = Infinity;
      for (var i = 0; i < xs.length; i++) {
        var d = Math.abs(xs[i] - x);
        if (d < bd) {
          bd = d;
          best = i;
        }
      }
      return best;
    }

    // step moves the cursor n drawable points from i, stopping at the ends.
    function step(i, n) {
      var dir = n < 0 ? -1 : 1, j = i, last = i;
      for (var k = Math.abs(n); k > 0; ) {
        j += dir;
        if (j < 0 || j >= xs.length) break;
        if (isFinite(xs[j])) {
          last = j;
          k--;
        }
      }
      return last;
    }

    function pointer(e) {
      var ctm = svg.getScreenCTM();
      if (!ctm) return;
      var pt = svg.createSVGPoint();
      pt.x = e.clientX;
      pt.y = e.clientY;
      show(nearest(pt.matrixTransform(ctm.inverse()).x));
    }

    if (!svg.hasAttribute("tabindex")) svg.setAttribute("tabindex", "0");
    svg.addEventListener("pointermove", pointer);
    svg.addEventListener("pointerdown", pointer);
    svg.addEventListener("pointerleave", function () {
      if (document.activeElement !== svg) hide();
    });
    svg.addEventListener("focus", function () {
      show(current >= 0 ? current : nearest((x0 + x1) / 2));
    });
    svg.addEventListener("blur", hide);
    svg.addEventListener("keydown", function (e) {
      var i = current >= 0 ? current : nearest((x0 + x1) / 2);
      var to;
      switch (e.key) {
        case "ArrowRight": case "ArrowUp": to = step(i, 1); break;
        case "ArrowLeft": case "ArrowDown": to = step(i, -1); break;
        case "PageUp": to = step(i, 10); break;
        case "PageDown": to = step(i, -10); break;
        case "Home": to = step(-1, 1); break;
        case "End": to = step(xs.length, -1); break;
        case "Escape": hide(); return;
        default: return;
      }
      e.preventDefault();
      show(to);
    });
  }

  function scan(root) {
    if (!root) return;
    if (root.matches && root.matches("svg.zplot")) attach(root);
    if (root.querySelectorAll) root.querySelectorAll("svg.zplot").forEach(attach);
  }

  window.zportPlotHover = function (root) {
    scan(root || document);
  };

  function start() {
    scan(document);
    if (window.MutationObserver) {
      new MutationObserver(function (records) {
        records.forEach(function (r) {
          r.addedNodes.forEach(function (n) {
            if (n.nodeType === 1) scan(n);
          });
        });
      }).observe(document.documentElement, { childList: true, subtree: true });
    }
  }

  if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", start);
  else start();

  // For tests of the formatter against value.Format.
  window.zportPlotHover.formatValue = formatValue;
})();
