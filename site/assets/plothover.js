// plothover.js: a cursor and readout for the charts that zport/site/plot
// draws: Bode charts (svg.zplot with data-freq), time charts (data-time),
// Nyquist charts (data-nyquist) and curves of a quantity against a part
// (data-curve). Pointer movement or keyboard focus shows a cursor and,
// inside the SVG, the frequency (or time, or the part's value) and each
// trace's value at the nearest point: magnitude and phase, the value, or
// |T| and ∠T.
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
  // digits, rounded half up from the shortest decimal that reads back as v
  // (from its exact value for a subnormal), an SI prefix putting the
  // mantissa in [1, 1000), U+2212 minus, "—" for non-finite values, an
  // exponent beyond the prefixes. String work only, so the smallest and the
  // largest numbers cannot overflow into NaN.
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
    var r = roundDigits(v, sig), d = r[0], e = r[1];
    var eng = 3 * Math.floor(e / 3);
    if (eng < -15 || eng > 12) {
      var exp = String(Math.abs(e));
      if (exp.length < 2) exp = "0" + exp;
      var mant = d.charAt(0) + (sig > 1 ? "." + d.slice(1) : "");
      return sign + mant + "\u00d710^" + (e < 0 ? "-" : "+") + exp + sep + unit;
    }
    var whole = e - eng + 1; // digits before the point
    var m = d;
    while (m.length < whole) m += "0";
    if (sig > whole) m = d.slice(0, whole) + "." + d.slice(whole);
    var sym = PREFIXES[String(eng)];
    if (unit === "" && sym !== "") sep = "";
    else if (sym !== "" || unit !== "") sep = " ";
    return sign + m + sep + sym + unit;
  }

  // roundDigits returns [the first sig digits of v > 0, the power of ten
  // of the first], as value.Format's roundDigits.
  function roundDigits(v, sig) {
    var s = v < 2.2250738585072014e-308 ? v.toExponential(sig - 1) : v.toExponential();
    var i = s.indexOf("e");
    var e = parseInt(s.slice(i + 1), 10);
    var d = (s.charAt(0) + s.slice(2, i)).split("");
    if (d.length <= sig) {
      while (d.length < sig) d.push("0");
      return [d.join(""), e];
    }
    var up = d[sig] >= "5";
    d.length = sig;
    for (var k = sig - 1; up && k >= 0; k--) {
      if (d[k] === "9") {
        d[k] = "0";
        continue;
      }
      d[k] = String(Number(d[k]) + 1);
      up = false;
    }
    if (up) {
      d[0] = "1";
      e++;
    }
    return [d.join(""), e];
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

  // cursor wires the shared readout to a chart: pointer and keyboard pick
  // a point index, and k.show(i) says what to draw for it. k holds:
  //   count       the number of points
  //   ok(i)       whether point i can be shown
  //   nearest(p)  the index nearest the pointer p (SVG coordinates)
  //   home()      the index shown on focus before any other
  //   show(i)     {head, rows: [{text, cls, y, dx?}], x, line} for point i:
  //               the readout's heading and rows, the dots (x with each
  //               row's y, or dx/y pairs), and the cursor line's path
  //   area        [left, right, top]: where the readout box may go
  function cursor(svg, k, rowCls) {
    var ui = null; // built on first use
    var current = -1;

    function build() {
      var g = make("g", { "class": "zcur", "aria-hidden": "true" }, svg);
      var line = make("path", { "class": "zcur-line", fill: "none", stroke: "currentColor" }, g);
      var dots = rowCls.map(function (c) {
        return [
          make("circle", { "class": c + " zcur-dot", r: "3.5", fill: "none", stroke: "currentColor" }, g),
          make("circle", { "class": c + " zcur-dot", r: "3.5", fill: "none", stroke: "currentColor" }, g),
        ];
      });
      var box = make("rect", { "class": "zcur-box", rx: "3", fill: "none", stroke: "currentColor" }, g);
      var head = make("text", { "class": "zcur-f" }, g);
      var rows = rowCls.map(function (c) {
        return {
          swatch: make("path", { "class": c, fill: "none", stroke: "currentColor", "stroke-width": "2" }, g),
          text: make("text", {}, g),
        };
      });
      return { g: g, line: line, dots: dots, box: box, head: head, rows: rows };
    }

    function place(dot, x, y) {
      if (isFinite(x) && isFinite(y)) {
        dot.setAttribute("cx", x.toFixed(1));
        dot.setAttribute("cy", y.toFixed(1));
        dot.removeAttribute("display");
      } else {
        dot.setAttribute("display", "none");
      }
    }

    function show(i) {
      if (i < 0 || i >= k.count || !k.ok(i)) return;
      if (!ui) ui = build();
      current = i;
      var v = k.show(i);
      ui.g.removeAttribute("display");
      if (v.line) ui.line.setAttribute("d", v.line);
      else ui.line.setAttribute("d", "");
      ui.head.textContent = v.head;
      v.rows.forEach(function (r, j) {
        ui.rows[j].text.textContent = r.text;
        place(ui.dots[j][0], r.x, r.y);
        place(ui.dots[j][1], r.x, r.y2);
      });
      layout(v.x);
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
      if (left + w > k.area[1]) left = Math.max(k.area[0], x - 10 - w);
      var top = k.area[2] + 4;
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

    // step moves the cursor n showable points from i, stopping at the ends.
    function step(i, n) {
      var dir = n < 0 ? -1 : 1, j = i, last = i;
      for (var c = Math.abs(n); c > 0; ) {
        j += dir;
        if (j < 0 || j >= k.count) break;
        if (k.ok(j)) {
          last = j;
          c--;
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
      show(k.nearest(pt.matrixTransform(ctm.inverse())));
    }

    if (!svg.hasAttribute("tabindex")) svg.setAttribute("tabindex", "0");
    svg.addEventListener("pointermove", pointer);
    svg.addEventListener("pointerdown", pointer);
    svg.addEventListener("pointerleave", function () {
      if (document.activeElement !== svg) hide();
    });
    svg.addEventListener("focus", function () {
      show(current >= 0 ? current : k.home());
    });
    svg.addEventListener("blur", hide);
    svg.addEventListener("keydown", function (e) {
      var i = current >= 0 ? current : k.home();
      var to;
      switch (e.key) {
        case "ArrowRight": case "ArrowUp": to = step(i, 1); break;
        case "ArrowLeft": case "ArrowDown": to = step(i, -1); break;
        case "PageUp": to = step(i, 10); break;
        case "PageDown": to = step(i, -10); break;
        case "Home": to = step(-1, 1); break;
        case "End": to = step(k.count, -1); break;
        case "Escape": hide(); return;
        default: return;
      }
      e.preventDefault();
      show(to);
    });
  }

  // traces lists a chart's paths with hover data: name, colour class and
  // values.
  function traces(svg) {
    var out = [];
    svg.querySelectorAll("path[data-values]").forEach(function (p) {
      var cls = (p.getAttribute("class") || "").replace(/\bdashed\b/, "").trim();
      out.push({ name: p.getAttribute("data-name") || "", cls: cls, vals: numbers(p.getAttribute("data-values")) });
    });
    return out;
  }

  // nearestX is the index of the x position in xs nearest to x.
  function nearestX(xs, x) {
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

  function panelY(r, v) {
    return r[1] + ((v - r[2]) / (r[3] - r[2])) * (r[0] - r[1]);
  }

  // A Bode chart: frequency on a log axis, magnitude and (unless the chart
  // has no phase panel) phase per trace.
  function attachBode(svg) {
    var freq = numbers(svg.getAttribute("data-freq"));
    var x0 = Number(svg.getAttribute("data-x0"));
    var x1 = Number(svg.getAttribute("data-x1"));
    var lf0 = Math.log10(Number(svg.getAttribute("data-fmin")));
    var lf1 = Math.log10(Number(svg.getAttribute("data-fmax")));
    var my = numbers(svg.getAttribute("data-my")); // top bottom lo hi
    var py = numbers(svg.getAttribute("data-py"));
    var phase = py.length === 4;
    var db = svg.getAttribute("data-mscale") === "db";
    var unit = svg.getAttribute("data-unit") || "";
    if (!(freq.length > 0 && x1 > x0 && lf1 > lf0 && my.length === 4)) return;
    var xs = freq.map(function (f) {
      return f > 0 ? x0 + ((Math.log10(f) - lf0) / (lf1 - lf0)) * (x1 - x0) : NaN;
    });
    var ts = traces(svg);
    var bottom = phase ? py[1] : my[1];
    cursor(svg, alongX(xs, x0, x1, my[0], function (i) {
      var x = xs[i];
      return {
        head: formatValue(freq[i], "Hz", 3),
        x: x,
        line: "M" + x.toFixed(1) + " " + my[0] + "V" + bottom,
        rows: ts.map(function (t) {
          var m = t.vals[2 * i], p = t.vals[2 * i + 1];
          var ok = m > 0 && isFinite(m) && isFinite(p);
          var ms = !ok ? "\u2014" : db ? fixed(20 * Math.log10(m), 1) + " dB" : formatValue(m, unit, 3);
          var text = t.name + ": " + ms;
          if (ok && phase) text += "  \u2220 " + fixed(p, 1) + "\u00b0";
          return {
            text: text,
            x: x,
            y: ok ? panelY(my, db ? 20 * Math.log10(m) : Math.log10(m)) : NaN,
            y2: ok && phase ? panelY(py, p) : NaN,
          };
        }),
      };
    }), ts.map(function (t) { return t.cls; }));
  }

  // alongX is the cursor of a chart whose points lie along the x axis at
  // xs (NaN: not shown): the nearest point by x, the middle one first.
  function alongX(xs, x0, x1, top, show) {
    return {
      count: xs.length,
      ok: function (i) { return isFinite(xs[i]); },
      nearest: function (p) { return nearestX(xs, p.x); },
      home: function () { return nearestX(xs, (x0 + x1) / 2); },
      area: [x0, x1, top],
      show: show,
    };
  }

  // plain writes a ratio with sig significant digits and no prefix.
  function plain(v, sig) {
    if (!isFinite(v)) return "\u2014";
    var s = String(Number(v.toPrecision(sig)));
    return s.charAt(0) === "-" ? MINUS + s.slice(1) : s;
  }

  // A time chart: time on a linear axis, one value per trace.
  function attachTime(svg) {
    var time = numbers(svg.getAttribute("data-time"));
    var x0 = Number(svg.getAttribute("data-x0"));
    var x1 = Number(svg.getAttribute("data-x1"));
    var t0 = Number(svg.getAttribute("data-tmin"));
    var t1 = Number(svg.getAttribute("data-tmax"));
    var ya = numbers(svg.getAttribute("data-y"));
    var unit = svg.getAttribute("data-unit") || "";
    if (!(time.length > 0 && x1 > x0 && t1 > t0 && ya.length === 4)) return;
    var xs = time.map(function (t) {
      return isFinite(t) ? x0 + ((t - t0) / (t1 - t0)) * (x1 - x0) : NaN;
    });
    var ts = traces(svg);
    cursor(svg, alongX(xs, x0, x1, ya[0], function (i) {
      var x = xs[i];
      return {
        head: "t = " + formatValue(time[i], "s", 4),
        x: x,
        line: "M" + x.toFixed(1) + " " + ya[0] + "V" + ya[1],
        rows: ts.map(function (t) {
          var v = t.vals[i];
          return {
            text: t.name + ": " + (unit === "" ? plain(v, 4) : formatValue(v, unit, 4)),
            x: x,
            y: isFinite(v) ? panelY(ya, v) : NaN,
            y2: NaN,
          };
        }),
      };
    }), ts.map(function (t) { return t.cls; }));
  }

  // quantityText writes a value in unit: degrees, decibels and percent
  // with two decimals, a ratio without a prefix, others as value.Format.
  function quantityText(v, unit) {
    if (unit === "\u00b0") return fixed(v, 2) + "\u00b0";
    if (unit === "dB" || unit === "%") return fixed(v, 2) + " " + unit;
    if (unit === "") return plain(v, 4);
    return formatValue(v, unit, 4);
  }

  // A curve: a quantity against a part's value on a log axis (drawn by
  // magnitude), on a linear or log value axis.
  function attachCurve(svg) {
    var xsv = numbers(svg.getAttribute("data-curve"));
    var x0 = Number(svg.getAttribute("data-x0"));
    var x1 = Number(svg.getAttribute("data-x1"));
    var l0 = Math.log10(Number(svg.getAttribute("data-xmin")));
    var l1 = Math.log10(Number(svg.getAttribute("data-xmax")));
    var ya = numbers(svg.getAttribute("data-y"));
    var ylog = svg.getAttribute("data-yscale") === "log";
    var unit = svg.getAttribute("data-unit") || "";
    var xunit = svg.getAttribute("data-xunit") || "";
    var xname = svg.getAttribute("data-xname") || "";
    if (!(xsv.length > 0 && x1 > x0 && l1 > l0 && ya.length === 4)) return;
    var xs = xsv.map(function (v) {
      var a = Math.abs(v);
      return a > 0 && isFinite(a) ? x0 + ((Math.log10(a) - l0) / (l1 - l0)) * (x1 - x0) : NaN;
    });
    var ts = traces(svg);
    cursor(svg, alongX(xs, x0, x1, ya[0], function (i) {
      var x = xs[i];
      return {
        head: (xname ? xname + " = " : "") + formatValue(xsv[i], xunit, 4),
        x: x,
        line: "M" + x.toFixed(1) + " " + ya[0] + "V" + ya[1],
        rows: ts.map(function (t) {
          var v = t.vals[i];
          var c = ylog ? (v > 0 ? Math.log10(v) : NaN) : v;
          return {
            text: t.name + ": " + quantityText(v, unit),
            x: x,
            y: isFinite(c) ? panelY(ya, c) : NaN,
            y2: NaN,
          };
        }),
      };
    }), ts.map(function (t) { return t.cls; }));
  }

  // A Nyquist chart: T at each frequency on the compressed polar plane.
  function attachNyquist(svg) {
    var freq = numbers(svg.getAttribute("data-nyquist"));
    var cx = Number(svg.getAttribute("data-cx"));
    var cy = Number(svg.getAttribute("data-cy"));
    var R = Number(svg.getAttribute("data-r"));
    var floor = Number(svg.getAttribute("data-floor"));
    var ceil = Number(svg.getAttribute("data-ceil"));
    var ts = traces(svg);
    if (!(freq.length > 0 && R > 0 && floor > 0 && ceil > floor && ts.length === 1)) return;
    var t = ts[0];
    var span = Math.log10(1 + ceil / floor);
    var pts = freq.map(function (f, i) {
      var m = t.vals[2 * i], p = (t.vals[2 * i + 1] * Math.PI) / 180;
      if (!(isFinite(m) && isFinite(p))) return null;
      var r = Math.min(1, Math.log10(1 + m / floor) / span) * R;
      return [cx + r * Math.cos(p), cy - r * Math.sin(p)];
    });
    cursor(svg, {
      count: pts.length,
      ok: function (i) { return pts[i] !== null; },
      nearest: function (q) {
        var best = -1, bd = Infinity;
        pts.forEach(function (p, i) {
          if (!p) return;
          var d = (p[0] - q.x) * (p[0] - q.x) + (p[1] - q.y) * (p[1] - q.y);
          if (d < bd) {
            bd = d;
            best = i;
          }
        });
        return best;
      },
      home: function () {
        for (var i = 0; i < pts.length; i++) if (pts[i]) return i;
        return -1;
      },
      area: [cx - R, cx + R, cy - R],
      show: function (i) {
        var m = t.vals[2 * i], p = t.vals[2 * i + 1];
        return {
          head: formatValue(freq[i], "Hz", 3),
          x: pts[i][0],
          line: "",
          rows: [{
            text: t.name + ": " + formatValue(m, "", 3) + "  \u2220 " + fixed(p, 1) + "\u00b0  (" + fixed(20 * Math.log10(m), 1) + " dB)",
            x: pts[i][0],
            y: pts[i][1],
            y2: NaN,
          }],
        };
      },
    }, [t.cls]);
  }

  function attach(svg) {
    if (svg.zportHover) return;
    if (svg.hasAttribute("data-freq")) attachBode(svg);
    else if (svg.hasAttribute("data-time")) attachTime(svg);
    else if (svg.hasAttribute("data-nyquist")) attachNyquist(svg);
    else if (svg.hasAttribute("data-curve")) attachCurve(svg);
    else return;
    svg.zportHover = true;
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
