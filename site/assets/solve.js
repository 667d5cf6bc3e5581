// solve.js: the "Design to a target" section of every calculator — the
// value of one part that gives a wanted margin, impedance, gain or
// response — on the stage pages and the custom-circuit page alike. Plain
// JavaScript, a classic script run after zport.js, whose engine and
// helpers it uses through globalThis.zportSite (only zportSite.call
// reaches the engine, so the script keeps working wherever the engine
// runs). It inserts no user text as HTML: every piece of markup it
// inserts was rendered (and escaped) in Go by package zport/site/calc
// through the engine's bridge; messages go through textContent.
//
// Nothing runs at page start. The section is collapsed; opening it renders
// its settings (the circuit's parts and what can be reached). The search
// runs only on "Solve" (or once when a link brings its settings), in
// slices of about 8 ms of engine time, one task each, so the page keeps
// answering (zportSite.onRequest); Cancel stops it and keeps the previous
// results. A result's
// buttons apply a value: on a stage page to the parameter's input, on the
// custom page to the part's value in the circuit text (the engine
// rewrites that one token, calc.ApplyValue); the calculator then
// recomputes and the share link follows.
//
// The section attaches itself to every calculator element
// ([data-calculator] or [data-circuit-editor], with a [data-role="solve"]
// slot) and follows it through the events aids.js uses: zport:computed
// (a new result; its form is the circuit to solve on), zport:link
// (settings from the link: settings.solve restored, the section opened
// and the search run once) and zport:settings (to the calculator: {key:
// "solve", values}, the settings calc.SolveSettings names, which join the
// form and the share link as solve.part=Cf&solve.quantity=pm&…).
//
// The element details.solve carries data-solve-state: idle, running,
// done, cancelled or error.
(function () {
  'use strict';

  var site = globalThis.zportSite;
  if (!site) return;
  var KEY = 'solve'; // the analysis's key (calc.solveTarget)

  function empty(values) {
    if (!values) return true;
    for (var k in values) if (values[k]) return false;
    return true;
  }

  function Solve(host, slot) {
    this.host = host;
    this.custom = host.hasAttribute('data-circuit-editor');
    this.values = null; // the settings before the form is rendered
    this.form = null; // the calculator's last computed form
    this.rendered = false;
    this.partsKey = null;
    this.job = null;
    this.resultKey = null;
    this.drawing = null; // a form on its way
    this.timer = 0;
    this.applied = false; // a value was applied: the next result is its own
    this.autorun = false; // run once the form is rendered (a link's settings)

    var d = this.build(slot, 'solve', host.id + '-solve', 'Design to a target: solve for a part value', 'solve-content',
      'Opening this section lists the parts; the search runs when you press Solve.');
    var body = this.body;
    var self = this;
    body.addEventListener('click', function (e) {
      var b = e.target.closest ? e.target.closest('[data-solve-action], [data-solve-apply]') : null;
      if (!b || b.disabled) return;
      if (b.hasAttribute('data-solve-apply')) self.apply(b);
      else if (b.getAttribute('data-solve-action') === 'cancel') self.cancel();
    });
    body.addEventListener('submit', function (e) {
      e.preventDefault();
      self.run();
    });
    host.addEventListener('zport:computed', function (e) {
      if (!e.detail || !e.detail.form) return;
      self.form = e.detail.form;
      d.hidden = false;
      if (self.applied) {
        // The value applied is the one the results offered: they still hold.
        self.applied = false;
        self.resultKey = self.circuitKey();
      }
      self.update();
    });
    host.addEventListener('zport:link', function (e) {
      var values = e.detail && e.detail.settings && e.detail.settings[KEY];
      if (empty(values)) return;
      self.setValues(values);
      self.autorun = true;
      self.open();
    });
  }

  // The messages, the run's buttons, slices, results and their staleness
  // are those of every section that runs on request (zport.js).
  site.onRequest(Solve.prototype, {
    key: KEY, action: 'data-solve-action', state: 'data-solve-state', results: '[data-role="solve-results"]',
    msg: '[data-role="solve-msg"]', holder: '.field', start: 'solveStart', first: 2,
    step: 'solveStep', panel: 'solvePanel', release: 'solveRelease', max: 200, noun: 'search', measure: 'zport-solve', again: 'Solve again.',
    done: function (out) { return ' (' + out.done + ' analyses)'; }
  });

  // input is what every bridge call takes (calc.SolveInput): the
  // calculator's form with the solve's settings.
  Solve.prototype.input = function () {
    if (!this.form) return null;
    var f = Object.assign({}, this.form);
    f.settings = Object.assign({}, f.settings);
    f.settings[KEY] = this.current();
    f.fragment = undefined;
    f.csv = undefined;
    f.pins = undefined; // a solve is of the current design
    f.chartWidth = site.chartWidth(this.body) || undefined;
    return { form: f };
  };

  Solve.prototype.call = function (name) {
    var input = this.input();
    if (!input) return Promise.resolve({ error: { message: 'the calculator has no result yet' } });
    return site.call(name, input);
  };

  Solve.prototype.open = function () {
    if (this.details.open) this.opened();
    else this.details.open = true; // fires toggle, which renders
  };

  Solve.prototype.opened = function () {
    if (!site.ready() || !this.form) return;
    var self = this;
    (this.rendered ? Promise.resolve() : this.renderForm()).then(function () {
      if (self.autorun && self.rendered) {
        self.autorun = false;
        self.run();
      }
    });
  };

  Solve.prototype.q = function (sel) {
    return this.body.querySelector(sel);
  };

  // renderForm (re)draws the settings, keeping what is typed and the
  // results; a promise (the same one while a drawing is on its way).
  Solve.prototype.renderForm = function () {
    if (this.drawing) return this.drawing;
    if (this.rendered) this.values = this.collect();
    var self = this;
    this.drawing = this.call('solveForm').then(function (out) {
      self.drawing = null;
      if (out.error) {
        var msg = document.createElement('p');
        msg.className = 'calc-notice';
        msg.setAttribute('role', 'alert');
        msg.textContent = 'The solver cannot start: ' + out.error.message;
        self.body.replaceChildren(msg);
        self.rendered = false;
        return;
      }
      var results = self.rendered ? self.q('[data-role="solve-results"]') : null;
      var kept = results ? Array.prototype.slice.call(results.childNodes) : [];
      var status = self.rendered ? self.q('[data-role="run-status"]').textContent : '';
      site.insert(self.body, out.html);
      var again = self.q('[data-role="solve-results"]');
      if (kept.length) again.replaceChildren.apply(again, kept);
      if (status) self.q('[data-role="run-status"]').textContent = status;
      self.rendered = true;
      self.partsKey = out.parts;
      self.setRunning(!!self.job);
    });
    return this.drawing;
  };

  // collect reads the settings as typed (calc.SolveSettings): part,
  // quantity and port (from the one choice "z:out"), value, from, to,
  // series; empty ones left out.
  Solve.prototype.collect = function () {
    var v = {};
    var val = function (key) {
      var el = this.q('[data-solve="' + key + '"]');
      return el ? el.value : '';
    }.bind(this);
    var put = function (k, x) { if (x && x.trim() !== '') v[k] = x; };
    put('part', val('part'));
    var q = val('quantity').split(':');
    put('quantity', q[0]);
    put('port', q.slice(1).join(':'));
    put('value', val('value'));
    put('from', val('from'));
    put('to', val('to'));
    put('series', val('series'));
    return v;
  };

  Solve.prototype.setValues = function (values) {
    this.values = values || null;
    if (this.rendered) {
      this.rendered = false; // the new settings win over what is typed
      this.renderForm();
    }
  };

  Solve.prototype.edited = function (el) {
    if (!el || !el.hasAttribute || !el.hasAttribute('data-solve')) return;
    this.clearMessage(el);
    if (el.getAttribute('data-solve') === 'part') {
      // Another part has another unit and range: the range typed for the
      // last one means nothing for it.
      var opt = el.options[el.selectedIndex];
      var from = this.q('[data-solve="from"]'), to = this.q('[data-solve="to"]');
      if (from && to && opt) {
        from.value = '';
        to.value = '';
        from.placeholder = opt.getAttribute('data-from') || '';
        to.placeholder = opt.getAttribute('data-to') || '';
      }
    }
    this.notify();
  };

  // ---- messages and the search ----

  // showError puts the engine's message beside the setting it names
  // (a port belongs to the quantity's choice), or in the section's notice.
  Solve.prototype.showError = function (err) {
    var p = err.param === 'solve.target.port' ? 'solve.target.quantity' : err.param || '';
    if (site.showFieldError(this.body, { param: p, message: err.message })) return;
    var box = this.q('[data-role="solve-msg"]');
    if (!box) return;
    var where = err.line ? 'line ' + err.line + ', column ' + err.column + ': ' : '';
    box.textContent = where + (p ? p + ': ' : '') + err.message;
    box.hidden = false;
  };

  Solve.prototype.run = function () {
    if (!site.ready() || this.job || !this.rendered) return;
    this.clearMessages();
    // The share link gets the settings of this search; they are usually
    // there already (each edit sends them), and sending them again would
    // recompute the calculator while the search runs.
    if (JSON.stringify(this.collect()) !== JSON.stringify(this.values)) this.notify();
    this.begin();
  };

  Solve.prototype.progress = function (done, total) {
    var bar = this.q('[data-role="progress"]');
    if (bar) {
      bar.max = total;
      bar.value = done;
    }
    this.say('Solving: ' + done + ' analyses of the circuit so far');
  };

  Solve.prototype.cancel = function () {
    if (!this.job) return;
    var had = this.q('[data-role="solve-results"] [data-aid="solve"]');
    this.stop('Cancelled. ' + (had ? 'The results below are from the previous search.' : 'No results yet.'));
  };

  // ---- applying a value ----

  // apply sets the part to a value the results offer: a stage's input,
  // or the part's value in the circuit text; the calculator recomputes.
  Solve.prototype.apply = function (button) {
    var part = button.getAttribute('data-part');
    var text = button.getAttribute('data-text');
    var self = this;
    if (!this.custom) {
      var input = this.host.querySelector('[data-role="form"] input[name="' + site.cssName(part) + '"]');
      if (!input) return this.say(part + ' is not one of this calculator’s inputs.');
      input.value = text;
      this.applied = true;
      input.dispatchEvent(new Event('input', { bubbles: true }));
      this.say(part + ' set to ' + text + '; the results above follow.');
      return;
    }
    var ta = this.host.querySelector('[data-role="text"]');
    if (!ta) return;
    site.call('solveApply', { circuit: ta.value, part: part, text: text }).then(function (out) {
      if (out.error) return self.say('Not applied: ' + out.error.message);
      var top = ta.scrollTop;
      ta.value = out.circuit;
      ta.scrollTop = top;
      self.applied = true;
      ta.dispatchEvent(new Event('input', { bubbles: true }));
      self.say(part + ' set to ' + text + ' in the circuit text; the results above follow.');
    });
  };

  // update follows a change of the circuit: the results marked out of
  // date, and the form drawn again once edits pause, if its lists of parts
  // and quantities changed.
  Solve.prototype.update = function () {
    if (this.resultKey && this.resultKey !== this.circuitKey()) this.markStale();
    if (!this.details.open) return;
    if (!this.rendered) return this.opened();
    var self = this;
    clearTimeout(this.timer);
    this.timer = setTimeout(function () {
      if (!site.ready()) return;
      self.call('solveForm').then(function (probe) {
        if (!probe.error && probe.parts !== self.partsKey) self.renderForm();
      });
    }, 250);
  };

  var hosts = document.querySelectorAll('[data-calculator], [data-circuit-editor]');
  for (var i = 0; i < hosts.length; i++) {
    var slot = hosts[i].querySelector('[data-role="solve"]');
    if (slot) new Solve(hosts[i], slot);
  }
})();
