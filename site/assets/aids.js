// aids.js: the "Design aids" section of every calculator — tolerance
// spread, standard values and sensitivity — on the stage pages and the
// custom-circuit page alike. Plain JavaScript, a classic script run after
// zport.js, whose engine and helpers it uses through globalThis.zportSite.
// It inserts no user text as HTML: every piece of markup it inserts was
// rendered (and escaped) in Go by package zport/site/calc through the
// engine's bridge; messages go through textContent.
//
// Nothing runs at page start. The section is collapsed; opening it renders
// its settings (a list of the circuit's parts) and computes the standard
// values and sensitivities, which then follow the calculator while the
// section is open: a quarter second after the last edit, each in a task of
// its own (together some tens of milliseconds in the engine, too much to
// redo on every key). The tolerance study runs only on "Run", in slices of
// about 8 ms of engine time each, one task at a time, so the page keeps
// answering (zportSite.onRequest); Cancel stops it and keeps the previous
// results.
//
// The section attaches itself to every calculator element
// ([data-calculator] or [data-circuit-editor], with a [data-role="aids"]
// slot) and follows it through three events on that element:
//   zport:computed  (from the calculator) a new result; detail is the panel
//                   output, whose form is the circuit the aids study
//   zport:link      (from the calculator) settings read from the URL
//                   fragment; detail is the form, whose settings.aid (if
//                   any) are restored
//   zport:settings  (to the calculator) the settings changed; detail is
//                   {key: "aid", values}, the study as the engine's
//                   calc.Study settings ("tol", "tol.R1", "seed", "t1" …),
//                   which the calculator keeps in its form and share link
//
// Performance marks for the benchmark (go run ./build/bench): a measure
// "zport-tolerance" from Run to the results on the page, with
// "zport-tolerance-engine" (the time spent in the engine's steps), and
// "zport-aids-panels" for each standard-value and sensitivity update.
(function () {
  'use strict';

  var site = globalThis.zportSite;
  if (!site) return;
  var REFRESH_MS = 250; // quiet time before the fast panels follow an edit
  var KEY = 'aid'; // the analysis's key (calc.designAids)

  function empty(values) {
    if (!values) return true;
    for (var k in values) if (values[k]) return false;
    return true;
  }

  // ---- one section ----

  function Aids(host, slot) {
    this.host = host;
    this.id = host.id;
    this.values = null; // the settings before the form is rendered
    this.form = null; // the calculator's last computed form
    this.rendered = false;
    this.partsKey = null;
    this.job = null;
    this.resultKey = null;
    this.panelsKey = null;
    this.refreshTimer = 0;

    var d = this.build(slot, 'aids', this.id + '-aids', 'Design aids: tolerance spread, standard values, sensitivity', 'aids-content',
      'Opening this section lists the parts; the studies run on request.');
    var body = this.body;
    var self = this;
    body.addEventListener('click', function (e) {
      var b = e.target.closest ? e.target.closest('[data-aid-action]') : null;
      if (b && !b.disabled) self.action(b.getAttribute('data-aid-action'), b);
    });
    body.addEventListener('submit', function (e) {
      e.preventDefault();
      self.run();
    });
    host.addEventListener('zport:computed', function (e) {
      if (!e.detail || !e.detail.form) return;
      self.form = e.detail.form;
      d.hidden = false;
      self.update();
    });
    host.addEventListener('zport:link', function (e) {
      var values = e.detail && e.detail.settings && e.detail.settings[KEY];
      if (empty(values)) return;
      self.setValues(values);
      self.open();
    });
  }

  // The messages, the run's buttons, slices, results and their staleness
  // are those of every section that runs on request (zport.js).
  site.onRequest(Aids.prototype, {
    key: KEY, action: 'data-aid-action', state: 'data-aid-state', results: '[data-role="tolerance-results"]',
    msg: '[data-role="tolerance-msg"]', holder: '.field, td, li', start: 'toleranceStart', first: 25,
    step: 'toleranceStep', panel: 'tolerancePanel', release: 'toleranceRelease', max: 2000,
    noun: 'study', measure: 'zport-tolerance', again: 'Run the study again.',
    done: function () { return ''; }
  });

  // input is what every bridge call takes: the calculator's form with the
  // study's settings (calc.AidsInput).
  Aids.prototype.input = function (extra) {
    if (!this.form) return null;
    var f = Object.assign({}, this.form);
    f.settings = Object.assign({}, f.settings);
    f.settings[KEY] = this.current();
    f.fragment = undefined;
    f.csv = undefined;
    f.pins = undefined; // the studies are of the current design
    // On a phone, this section's charts are drawn for its own column.
    f.chartWidth = site.chartWidth(this.details.querySelector('[data-role="aids-content"]')) || undefined;
    return Object.assign({ form: f }, extra);
  };

  Aids.prototype.call = function (name, extra) {
    var input = this.input(extra);
    if (!input) return Promise.resolve({ error: { message: 'the calculator has no result yet' } });
    return site.call(name, input);
  };

  Aids.prototype.open = function () {
    this.details.open = true; // fires toggle, which renders
  };

  Aids.prototype.opened = function () {
    if (!site.ready()) return;
    var self = this;
    (this.rendered ? Promise.resolve() : this.renderForm()).then(function () { self.refresh(); });
  };

  // renderForm (re)draws the settings, keeping what is typed; a promise.
  Aids.prototype.renderForm = function () {
    if (this.rendered) this.values = this.collect();
    var self = this;
    return this.call('aidsForm').then(function (out) {
      if (out.error) {
        var msg = document.createElement('p');
        msg.className = 'calc-notice';
        msg.setAttribute('role', 'alert');
        msg.textContent = 'The design aids cannot start: ' + out.error.message;
        self.body.replaceChildren(msg);
        self.rendered = false;
        return;
      }
      var results = self.rendered ? self.q('[data-role="tolerance-results"]') : null;
      var kept = results ? Array.prototype.slice.call(results.childNodes) : [];
      var status = self.rendered ? self.q('[data-role="run-status"]').textContent : '';
      site.insert(self.body, out.html);
      if (kept.length) self.q('[data-role="tolerance-results"]').replaceChildren.apply(self.q('[data-role="tolerance-results"]'), kept);
      if (status) self.q('[data-role="run-status"]').textContent = status;
      self.rendered = true;
      self.partsKey = out.parts;
      self.panelsKey = null;
      self.setRunning(!!self.job);
    });
  };

  Aids.prototype.q = function (sel) {
    return this.body.querySelector(sel);
  };

  // collect reads the settings as typed into the study's settings
  // (calc.Study.Values): "tol", "tol.NAME", "a0.NAME", "gbw.NAME",
  // "dist", "seed", "n", "t1" … "t8", "e", "ec"; empty ones left out.
  Aids.prototype.collect = function () {
    var b = this.body, v = {};
    var put = function (k, x) { if (x && x.trim() !== '') v[k] = x; };
    var val = function (sel) {
      var el = b.querySelector(sel);
      return el ? el.value : '';
    };
    put('tol', val('[data-study="tolerance"]'));
    var parts = b.querySelectorAll('[data-study="part"]');
    for (var i = 0; i < parts.length; i++) put('tol.' + parts[i].getAttribute('data-name'), parts[i].value);
    var amps = b.querySelectorAll('[data-study^="a0Min-"], [data-study^="gbwMin-"]');
    for (var j = 0; j < amps.length; j++) {
      var a0 = amps[j].getAttribute('data-study').indexOf('a0Min') === 0;
      put((a0 ? 'a0.' : 'gbw.') + amps[j].getAttribute('data-name'), amps[j].value);
    }
    put('dist', val('[data-study="distribution"]'));
    put('seed', val('[data-study="seed"]'));
    put('n', val('[data-study="trials"]'));
    var rows = b.querySelectorAll('[data-role="targets"] > [data-role="target"]');
    for (var k = 0; k < rows.length; k++) {
      var q = rows[k].querySelector('[data-study="target-quantity"]').value;
      var op = rows[k].querySelector('[data-study="target-op"]').value;
      var x = rows[k].querySelector('[data-study="target-value"]').value;
      v['t' + (k + 1)] = q + op + x;
    }
    put('e', val('[data-study="series"]'));
    put('ec', val('[data-study="capSeries"]'));
    return v;
  };

  Aids.prototype.setValues = function (values) {
    this.values = values || null;
    if (this.rendered) {
      this.rendered = false; // drop what is typed: the new settings win
      var self = this;
      this.renderForm().then(function () { self.refresh(); });
    }
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

  // ---- messages and the tolerance study ----

  // showError puts the engine's message beside the setting it names, or
  // in the study's notice.
  Aids.prototype.showError = function (err, notice) {
    var p = err.param || '';
    var m = /^tolerance\.targets\[(\d+)\]\.port$/.exec(p);
    if (m) p = 'tolerance.targets[' + m[1] + '].quantity';
    if (site.showFieldError(this.body, { param: p, message: err.message })) return;
    var box = notice || this.q('[data-role="tolerance-msg"]');
    if (!box) return;
    var where = err.line ? 'line ' + err.line + ', column ' + err.column + ': ' : '';
    box.textContent = where + (p ? p + ': ' : '') + err.message;
    box.hidden = false;
  };

  Aids.prototype.run = function () {
    if (!site.ready() || this.job || !this.rendered) return;
    this.clearMessages();
    this.notify(); // the share link gets the seed of this study
    this.begin();
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

  Aids.prototype.cancel = function () {
    var job = this.job;
    if (!job) return;
    var bar = this.q('[data-role="progress"]');
    var done = bar ? bar.value : 0;
    var had = this.q('[data-role="tolerance-results"] [data-aid="tolerance"]');
    this.stop('Cancelled after ' + done + ' of ' + (job.total || 0) + '. ' +
      (had ? 'The results below are from the previous run.' : 'No results yet.'));
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
    if (!this.details.open || !this.rendered || !site.ready()) return;
    var self = this;
    site.later(function () {
      if (!self.details.open || !site.ready()) return;
      self.call('aidsForm').then(function (probe) { // the part list only; no analysis
        var redraw = !probe.error && probe.parts !== self.partsKey ? self.renderForm() : Promise.resolve();
        return redraw;
      }).then(function () {
        var key = self.circuitKey() + '|' + self.val('series') + '|' + self.val('capSeries');
        if (key === self.panelsKey) return;
        var t0 = performance.now();
        self.panel('standard').then(function () {
          site.later(function () {
            self.panel('sensitivity').then(function () {
              self.panelsKey = key;
              performance.measure('zport-aids-panels', { start: t0, end: performance.now() });
            });
          });
        });
      });
    });
  };

  // panel computes and shows one of the fast panels, "standard" or
  // "sensitivity"; a promise.
  Aids.prototype.panel = function (which) {
    var t0 = performance.now();
    var self = this;
    return this.call('aidsPanels', { only: which }).then(function (out) {
      var el = self.q('[data-role="' + which + '-results"]');
      var err = out.error || out[which + 'Error'];
      if (err) {
        if (!site.showFieldError(self.body, err)) self.failed(el, err);
      } else if (el) {
        site.insert(el, out[which]);
      }
      void self.body.offsetHeight;
      performance.measure('zport-aids-' + which, { start: t0, end: performance.now() });
    });
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

  var hosts = document.querySelectorAll('[data-calculator], [data-circuit-editor]');
  for (var i = 0; i < hosts.length; i++) {
    var slot = hosts[i].querySelector('[data-role="aids"]');
    if (slot) new Aids(hosts[i], slot);
  }
})();
