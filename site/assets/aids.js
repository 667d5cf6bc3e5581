// aids.js: the "Design aids" section of a calculator — tolerance spread,
// standard values and sensitivity. Plain JavaScript, a classic script run
// after zport.js. It inserts no user text as HTML: every piece of markup it
// inserts was rendered (and escaped) in Go by package zport/site/render
// through the engine's bridge; messages go through textContent.
//
// Nothing runs at page start. The section is collapsed; opening it renders
// its settings (a list of the circuit's parts) and computes the standard
// values and sensitivities, which then follow the calculator while the
// section is open: a quarter second after the last edit, each in a task of
// its own (together some tens of milliseconds in the engine, too much to
// redo on every key). The tolerance study runs only on "Run", in
// slices of about 8 ms of engine time each, one task at a time, so the
// page keeps answering; Cancel stops it and keeps the previous results.
//
// On the topology pages this script attaches itself to every calculator of
// zport.js (the element [data-role="aids"] inside [data-calculator]) and
// speaks to it through three events on the calculator element:
//   zport:computed  (from zport.js) a new result; detail is the panel
//                   output, whose form is the circuit the aids study
//   zport:link      (from zport.js) settings read from the URL fragment;
//                   detail is the form, whose study (if any) is restored
//   zport:study     (to zport.js) the study settings changed; detail is
//                   the study, which zport.js writes into the share link
//
// Other pages (a circuit of the user's own) mount the same section:
//
//   var aids = zportAids.mount(containerElement, {
//     id: 'custom',                       // prefix of element ids
//     request: function () { return req },// the engine request (circuit,
//                                         // reference, ports, gain,
//                                         // frequency), without aid keys
//     study: null,                        // settings to start from, or
//     fragment: 'aid.tol=J&aid.seed=7',   // ... the same from a share link
//     onStudy: function (study, state) {} // settings changed; state is the
//                                         // study as "aid.…" fragment pairs
//   });
//   aids.update();    // after every change of the circuit
//   aids.study();     // the current settings; aids.state() as fragment pairs
//   aids.setStudy(s); aids.open(); aids.cancel();
//
// Performance marks for the benchmark (go run ./build/bench): a measure
// "zport-tolerance" from Run to the results on the page, with
// "zport-tolerance-engine" (the time spent in the engine's steps), and
// "zport-aids-panels" for each standard-value and sensitivity update.
(function () {
  'use strict';

  var root = document.documentElement;
  var SLICE_MS = 8; // engine time per slice
  var REFRESH_MS = 250; // quiet time before the fast panels follow an edit
  var controllers = {};

  function engine() {
    var z = globalThis.zport;
    return root.getAttribute('data-engine') === 'ready' && z && typeof z.aidsForm === 'function' ? z : null;
  }

  function parse(text) {
    try {
      return JSON.parse(text);
    } catch (e) {
      return { error: { message: 'the engine gave an unreadable answer' } };
    }
  }

  // insert replaces el's content by markup rendered and escaped in Go.
  function insert(el, html) {
    var tpl = document.createElement('template');
    tpl.innerHTML = html;
    el.replaceChildren(tpl.content);
  }

  // later runs fn in a task of its own, soon: a MessageChannel task is not
  // throttled as nested timers are, and input and painting get their turn
  // between tasks.
  var queue = [];
  var channel = new MessageChannel();
  channel.port1.onmessage = function () {
    var fn = queue.shift();
    if (fn) fn();
  };
  function later(fn) {
    queue.push(fn);
    channel.port2.postMessage(0);
  }

  function cssName(s) {
    return String(s).replace(/["\\]/g, '');
  }

  function empty(study) {
    if (!study) return true;
    for (var k in study) {
      var v = study[k];
      if (v && (typeof v !== 'object' || Object.keys(v).length)) return false;
    }
    return true;
  }

  // ---- one section ----

  function Aids(container, opt) {
    this.opt = opt || {};
    this.id = this.opt.id || 'aids';
    this.studyObj = this.opt.study || null;
    this.fragment = typeof this.opt.fragment === 'string' ? this.opt.fragment : null;
    this.rendered = false;
    this.partsKey = null;
    this.job = null;
    this.resultKey = null;
    this.panelsKey = null;
    this.refreshTimer = 0;

    var d = document.createElement('details');
    d.className = 'aids';
    d.id = this.id + '-aids';
    d.hidden = true;
    d.setAttribute('data-aid-state', 'idle');
    var s = document.createElement('summary');
    s.textContent = 'Design aids: tolerance spread, standard values, sensitivity';
    var body = document.createElement('div');
    body.setAttribute('data-role', 'aids-content');
    var p = document.createElement('p');
    p.className = 'explain';
    p.textContent = 'Opening this section lists the parts; the studies run on request.';
    body.appendChild(p);
    d.appendChild(s);
    d.appendChild(body);
    container.appendChild(d);
    this.details = d;
    this.body = body;

    var self = this;
    d.addEventListener('toggle', function () {
      if (d.open) self.opened();
    });
    body.addEventListener('input', function (e) { self.edited(e.target); });
    body.addEventListener('change', function (e) { self.edited(e.target); });
    body.addEventListener('click', function (e) {
      var b = e.target.closest ? e.target.closest('[data-aid-action]') : null;
      if (b && !b.disabled) self.action(b.getAttribute('data-aid-action'), b);
    });
    body.addEventListener('submit', function (e) {
      e.preventDefault();
      self.run();
    });
    if (engine()) this.enable();
  }

  Aids.prototype.enable = function () {
    this.details.hidden = false;
  };

  // base is the circuit part of every call: {form} or {request}.
  Aids.prototype.base = function () {
    var r = this.opt.request ? this.opt.request() : null;
    if (!r) return null;
    return r.form ? { form: r.form } : { request: r };
  };

  // circuitKey changes when the circuit or its spot frequency does.
  Aids.prototype.circuitKey = function () {
    var b = this.base();
    if (!b) return '';
    if (b.form) return JSON.stringify([b.form.topology, b.form.params, b.form.circuit, b.form.frequency]);
    return JSON.stringify(b.request);
  };

  Aids.prototype.input = function (extra) {
    var b = this.base();
    if (!b) return null;
    b.id = this.id;
    if (this.fragment !== null && !this.studyObj) b.fragment = this.fragment;
    else b.study = this.studyObj || {};
    for (var k in extra) b[k] = extra[k];
    return b;
  };

  Aids.prototype.call = function (name, extra) {
    var z = engine();
    var input = this.input(extra);
    if (!z || !input) return { error: { message: 'the live engine is not running' } };
    return parse(z[name](JSON.stringify(input)));
  };

  Aids.prototype.open = function () {
    this.details.open = true; // fires toggle, which renders
  };

  Aids.prototype.opened = function () {
    if (!engine()) return;
    if (!this.rendered) this.renderForm();
    this.refresh();
  };

  // renderForm (re)draws the settings, keeping what is typed.
  Aids.prototype.renderForm = function () {
    if (this.rendered) this.studyObj = this.collect();
    var out = this.call('aidsForm');
    if (out.error) {
      var msg = document.createElement('p');
      msg.className = 'calc-notice';
      msg.setAttribute('role', 'alert');
      msg.textContent = 'The design aids cannot start: ' + out.error.message;
      this.body.replaceChildren(msg);
      this.rendered = false;
      return;
    }
    var results = this.rendered ? this.body.querySelector('[data-role="tolerance-results"]') : null;
    var kept = results ? Array.prototype.slice.call(results.childNodes) : [];
    var status = this.rendered ? this.q('[data-role="run-status"]').textContent : '';
    insert(this.body, out.html);
    if (kept.length) this.q('[data-role="tolerance-results"]').replaceChildren.apply(this.q('[data-role="tolerance-results"]'), kept);
    if (status) this.q('[data-role="run-status"]').textContent = status;
    this.rendered = true;
    this.partsKey = out.parts;
    if (out.study) this.studyObj = out.study;
    this.fragment = null;
    this.panelsKey = null;
    this.setRunning(!!this.job);
  };

  Aids.prototype.q = function (sel) {
    return this.body.querySelector(sel);
  };

  // collect reads the settings as typed into a render.Study.
  Aids.prototype.collect = function () {
    var b = this.body, s = {};
    var val = function (sel) {
      var el = b.querySelector(sel);
      return el ? el.value : '';
    };
    s.tolerance = val('[data-study="tolerance"]');
    var parts = b.querySelectorAll('[data-study="part"]');
    for (var i = 0; i < parts.length; i++) {
      if (parts[i].value.trim() === '') continue;
      s.parts = s.parts || {};
      s.parts[parts[i].getAttribute('data-name')] = parts[i].value;
    }
    var amps = b.querySelectorAll('[data-study^="a0Min-"], [data-study^="gbwMin-"]');
    for (var j = 0; j < amps.length; j++) {
      if (amps[j].value.trim() === '') continue;
      var name = amps[j].getAttribute('data-name');
      s.amps = s.amps || {};
      s.amps[name] = s.amps[name] || {};
      s.amps[name][amps[j].getAttribute('data-study').indexOf('a0Min') === 0 ? 'a0Min' : 'gbwMin'] = amps[j].value;
    }
    s.distribution = val('[data-study="distribution"]');
    s.seed = val('[data-study="seed"]');
    s.trials = val('[data-study="trials"]');
    var rows = b.querySelectorAll('[data-role="targets"] > [data-role="target"]');
    for (var k = 0; k < rows.length; k++) {
      var q = rows[k].querySelector('[data-study="target-quantity"]').value;
      var c = q.indexOf(':');
      var t = {
        quantity: c < 0 ? q : q.slice(0, c),
        op: rows[k].querySelector('[data-study="target-op"]').value,
        value: rows[k].querySelector('[data-study="target-value"]').value
      };
      if (c >= 0) t.port = q.slice(c + 1);
      s.targets = s.targets || [];
      s.targets.push(t);
    }
    s.series = val('[data-study="series"]');
    s.capacitorSeries = val('[data-study="capSeries"]');
    return s;
  };

  Aids.prototype.study = function () {
    return this.rendered ? this.collect() : this.studyObj;
  };

  // state is the study as URL fragment pairs ("aid.…"), from the engine.
  Aids.prototype.state = function () {
    var out = this.call('aidsStudy');
    return out.error ? '' : out.state || '';
  };

  Aids.prototype.setStudy = function (study) {
    this.studyObj = study || null;
    this.fragment = null;
    if (this.rendered) {
      this.rendered = false; // drop what is typed: the new settings win
      this.renderForm();
      this.refresh();
    }
  };

  // notify tells the page that the settings changed.
  Aids.prototype.notify = function () {
    this.studyObj = this.collect();
    if (this.opt.onStudy) this.opt.onStudy(this.studyObj, this.state());
  };

  Aids.prototype.edited = function (el) {
    if (!el || !el.hasAttribute || !el.hasAttribute('data-study')) return;
    this.clearMessage(el);
    var key = el.getAttribute('data-study');
    this.notify();
    if (key === 'series' || key === 'capSeries') this.refresh();
  };

  Aids.prototype.action = function (what, button) {
    switch (what) {
      case 'run':
        return; // the form's submit event runs it
      case 'cancel':
        return this.cancel();
      case 'new-seed':
        var seed = this.q('[data-study="seed"]');
        var a = new Uint32Array(1);
        crypto.getRandomValues(a);
        seed.value = String(a[0] % 999999 + 1);
        this.clearMessage(seed);
        return this.notify();
      case 'add-target':
        var list = this.q('[data-role="targets"]');
        var tpl = this.q('template[data-role="target-row"]');
        if (!list || !tpl) return;
        if (list.children.length >= 8) {
          this.say('At most 8 targets.');
          return;
        }
        list.appendChild(tpl.content.cloneNode(true));
        this.numberTargets();
        var last = list.lastElementChild.querySelector('[data-study="target-value"]');
        if (last) last.focus();
        return this.notify();
      case 'remove-target':
        var row = button.closest('[data-role="target"]');
        if (row) row.remove();
        this.numberTargets();
        return this.notify();
    }
  };

  // numberTargets gives each target's inputs the contract path the
  // engine names in its errors.
  Aids.prototype.numberTargets = function () {
    var rows = this.body.querySelectorAll('[data-role="targets"] > [data-role="target"]');
    for (var i = 0; i < rows.length; i++) {
      var set = function (sel, field) {
        var el = rows[i].querySelector(sel);
        if (el) el.setAttribute('data-param', 'tolerance.targets[' + i + '].' + field);
      };
      set('[data-study="target-quantity"]', 'quantity');
      set('[data-study="target-op"]', 'op');
      set('[data-study="target-value"]', 'value');
    }
  };

  // ---- messages ----

  Aids.prototype.say = function (text) {
    var s = this.q('[data-role="run-status"]');
    if (s) s.textContent = text;
  };

  Aids.prototype.clearMessage = function (el) {
    el.removeAttribute('aria-invalid');
    var holder = el.closest('.field, td, li');
    var msg = holder && holder.querySelector('[data-role="msg"]');
    if (msg) msg.textContent = '';
  };

  Aids.prototype.clearMessages = function () {
    var bad = this.body.querySelectorAll('[aria-invalid="true"]');
    for (var i = 0; i < bad.length; i++) this.clearMessage(bad[i]);
    var n = this.q('[data-role="tolerance-msg"]');
    if (n) {
      n.hidden = true;
      n.textContent = '';
    }
  };

  // showError puts the engine's message beside the setting it names, or
  // in the study's notice.
  Aids.prototype.showError = function (err, notice) {
    var p = err.param || '';
    var m = /^tolerance\.targets\[(\d+)\]\.port$/.exec(p);
    if (m) p = 'tolerance.targets[' + m[1] + '].quantity';
    var el = p ? this.body.querySelector('[data-param="' + cssName(p) + '"]') : null;
    if (el) {
      el.setAttribute('aria-invalid', 'true');
      var holder = el.closest('.field, td, li');
      var msg = holder && holder.querySelector('[data-role="msg"]');
      if (msg) {
        msg.textContent = err.message;
        return;
      }
    }
    var box = notice || this.q('[data-role="tolerance-msg"]');
    if (!box) return;
    var where = err.line ? 'line ' + err.line + ', column ' + err.column + ': ' : '';
    box.textContent = where + (p && !el ? p + ': ' : '') + err.message;
    box.hidden = false;
  };

  // ---- the tolerance study ----

  // setRunning switches the Run and Cancel buttons, handing the focus
  // from the one being disabled to the other.
  Aids.prototype.setRunning = function (on) {
    var run = this.q('[data-aid-action="run"]');
    var cancel = this.q('[data-aid-action="cancel"]');
    var bar = this.q('[data-role="progress"]');
    var focus = document.activeElement;
    if (run) run.disabled = on;
    if (cancel) cancel.disabled = !on;
    if (bar) bar.hidden = !on;
    if (on && focus === run && cancel) cancel.focus();
    if (!on && focus === cancel && run) run.focus();
  };

  Aids.prototype.setState = function (state) {
    this.details.setAttribute('data-aid-state', state);
  };

  Aids.prototype.run = function () {
    var z = engine();
    if (!z || this.job || !this.rendered) return;
    this.clearMessages();
    this.notify(); // the share link gets the seed of this study
    var t0 = performance.now();
    var started = this.call('toleranceStart');
    if (started.error) {
      this.showError(started.error);
      this.say('Not run: see the marked setting.');
      this.setState('error');
      return;
    }
    this.job = { run: started.run, total: started.total, t0: t0, engineMs: 0, n: 25, key: this.circuitKey() };
    this.setRunning(true);
    this.setState('running');
    this.progress(0, started.total);
    var self = this, job = this.job;
    later(function () { self.slice(job); });
  };

  // progress moves the bar on every slice, and the words (which a screen
  // reader announces) a few times a second.
  Aids.prototype.progress = function (done, total) {
    var bar = this.q('[data-role="progress"]');
    if (bar) {
      bar.max = total;
      bar.value = done;
    }
    var now = performance.now();
    if (done === 0 || now - (this.said || 0) > 500) {
      this.said = now;
      this.say('Running: ' + done + ' of ' + total + ' (the corners first, then the trials)');
    }
  };

  Aids.prototype.slice = function (job) {
    if (!job || job !== this.job) return; // cancelled
    var z = engine();
    if (!z) return this.stop('The live engine stopped; the study did not finish.');
    var t = performance.now();
    var st = parse(z.toleranceStep(job.run, job.n));
    var dt = performance.now() - t;
    job.engineMs += dt;
    if (st.error) return this.stop('The study stopped: ' + st.error.message);
    // Aim each slice at SLICE_MS of engine time, changing by at most 2×.
    var f = Math.min(2, Math.max(0.5, SLICE_MS / Math.max(dt, 0.25)));
    job.n = Math.max(1, Math.min(2000, Math.round(job.n * f)));
    this.progress(st.done, st.total);
    if (st.done < st.total) {
      var self = this;
      later(function () { self.slice(job); });
      return;
    }
    this.finish();
  };

  // finish renders the panel in one task and puts it on the page in the
  // next, so neither holds the page for long.
  Aids.prototype.finish = function () {
    var job = this.job, z = engine();
    var out = parse(z.tolerancePanel(job.run));
    z.toleranceRelease(job.run);
    var self = this;
    later(function () {
      if (self.job === job) self.show(job, out);
    });
  };

  Aids.prototype.show = function (job, out) {
    this.job = null;
    this.setRunning(false);
    if (out.error) {
      this.setState('error');
      return this.say('The results could not be shown: ' + out.error.message);
    }
    var results = this.q('[data-role="tolerance-results"]');
    insert(results, out.html);
    results.classList.remove('is-stale');
    this.resultKey = job.key;
    if (job.key !== this.circuitKey()) this.markStale();
    void results.offsetHeight; // lay the panel out inside the measure
    var t1 = performance.now();
    performance.measure('zport-tolerance', { start: job.t0, end: t1 });
    performance.measure('zport-tolerance-engine', { start: job.t0, duration: job.engineMs });
    this.setState('done');
    this.say('Done in ' + Math.round(t1 - job.t0) + ' ms.');
  };

  Aids.prototype.stop = function (text) {
    var job = this.job, z = engine();
    if (job && z) z.toleranceRelease(job.run);
    this.job = null;
    this.setRunning(false);
    this.setState('cancelled');
    this.say(text);
  };

  Aids.prototype.cancel = function () {
    var job = this.job;
    if (!job) return;
    var bar = this.q('[data-role="progress"]');
    var done = bar ? bar.value : 0;
    var had = this.q('[data-role="tolerance-results"] [data-aid="tolerance"]');
    this.stop('Cancelled after ' + done + ' of ' + job.total + '. ' +
      (had ? 'The results below are from the previous run.' : 'No results yet.'));
  };

  Aids.prototype.markStale = function () {
    var results = this.q('[data-role="tolerance-results"]');
    if (!results || !results.firstChild || results.classList.contains('is-stale')) return;
    results.classList.add('is-stale');
    var note = document.createElement('p');
    note.className = 'stale-note';
    note.textContent = 'Out of date: these results are for earlier values of the circuit. Run the study again.';
    results.insertBefore(note, results.firstChild);
  };

  // ---- standard values and sensitivity ----

  // refreshSoon brings the settings' part list and the standard values
  // and sensitivities up to date once the circuit has stopped changing for
  // a moment (typing a value changes it on every key).
  Aids.prototype.refreshSoon = function () {
    var self = this;
    clearTimeout(this.refreshTimer);
    this.refreshTimer = setTimeout(function () { self.refresh(); }, REFRESH_MS);
  };

  // refresh runs each step in a task of its own (each takes a few to some
  // tens of milliseconds in the engine), so input and painting come
  // between them: the part list, the standard values, the sensitivities.
  Aids.prototype.refresh = function () {
    clearTimeout(this.refreshTimer);
    if (!this.details.open || !this.rendered || !engine()) return;
    var self = this;
    later(function () {
      if (!self.details.open || !engine()) return;
      var probe = self.call('aidsForm'); // the part list only; no analysis
      if (!probe.error && probe.parts !== self.partsKey) self.renderForm();
      var key = self.circuitKey() + '|' + self.val('series') + '|' + self.val('capSeries');
      if (key === self.panelsKey) return;
      var t0 = performance.now();
      self.panel('standard');
      later(function () {
        self.panel('sensitivity');
        self.panelsKey = key;
        performance.measure('zport-aids-panels', { start: t0, end: performance.now() });
      });
    });
  };

  // panel computes and shows one of the fast panels, "standard" or
  // "sensitivity".
  Aids.prototype.panel = function (which) {
    var t0 = performance.now();
    var out = this.call('aidsPanels', { only: which, study: this.collect(), fragment: undefined });
    var el = this.q('[data-role="' + which + '-results"]');
    var err = out.error || out[which + 'Error'];
    if (err) {
      var sel = err.param ? this.body.querySelector('[data-param="' + cssName(err.param) + '"]') : null;
      if (sel) this.showError(err);
      else this.failed(el, err);
    } else if (el) {
      insert(el, out[which]);
    }
    void this.body.offsetHeight;
    performance.measure('zport-aids-' + which, { start: t0, end: performance.now() });
  };

  Aids.prototype.val = function (key) {
    var el = this.q('[data-study="' + key + '"]');
    return el ? el.value : '';
  };

  Aids.prototype.failed = function (el, err) {
    if (!el) return;
    var p = document.createElement('p');
    p.className = 'calc-notice';
    p.textContent = err.message;
    el.replaceChildren(p);
  };

  // update follows a change of the circuit.
  Aids.prototype.update = function () {
    if (!this.details.open || !this.rendered) return;
    if (this.resultKey && this.resultKey !== this.circuitKey()) this.markStale();
    this.refreshSoon();
  };

  // ---- the topology pages ----

  function attach(calc) {
    var slot = calc.querySelector('[data-role="aids"]');
    if (!slot || controllers[calc.id]) return;
    var form = null;
    var a = new Aids(slot, {
      id: calc.id,
      request: function () { return form ? { form: form } : null; },
      onStudy: function (study) {
        calc.dispatchEvent(new CustomEvent('zport:study', { detail: study }));
      }
    });
    a.setForm = function (f) { form = f; };
    controllers[calc.id] = a;
    calc.addEventListener('zport:computed', function (e) {
      if (!e.detail || !e.detail.form) return;
      a.setForm(e.detail.form);
      a.enable();
      a.update();
    });
    calc.addEventListener('zport:link', function (e) {
      var study = e.detail && e.detail.study;
      if (empty(study)) return;
      a.setStudy(study);
      a.open();
    });
  }

  var calcs = document.querySelectorAll('[data-calculator]');
  for (var i = 0; i < calcs.length; i++) attach(calcs[i]);

  // Show the sections once the engine runs (zport.js sets data-engine).
  new MutationObserver(function () {
    if (!engine()) return;
    for (var id in controllers) controllers[id].enable();
    for (var j = 0; j < mounted.length; j++) mounted[j].enable();
  }).observe(root, { attributes: true, attributeFilter: ['data-engine'] });

  var mounted = [];

  // ---- the API for other pages ----

  globalThis.zportAids = {
    mount: function (container, opt) {
      var a = new Aids(container, opt);
      mounted.push(a);
      return {
        element: a.details,
        update: function () { a.update(); },
        study: function () { return a.study(); },
        state: function () { return a.state(); },
        setStudy: function (s) { a.setStudy(s); },
        open: function () { a.open(); },
        cancel: function () { a.cancel(); }
      };
    },
    // byCalculator returns the section of a topology page's calculator,
    // for tests and tools: zportAids.byCalculator('calc-inverting').
    byCalculator: function (id) { return controllers[id] || null; }
  };
})();
