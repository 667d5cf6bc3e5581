// calculator.js: the calculators of the stage pages. Plain JavaScript, a
// classic script run after zport.js, whose engine and helpers it uses
// through globalThis.zportSite. It inserts no user text as HTML: the only
// markup it inserts is the results panel the engine renders in Go.
//
// On every edit, once per animation frame at most, the form goes to the
// engine (zport.panel, calc.Compute) with the settings of every analysis
// (inputs with data-analysis and data-setting, and those that aids.js
// reports); the answer's panel replaces the results, or its error is
// shown beside the field it names while the last good panel stays, marked
// stale. A newer edit supersedes an answer still on its way. The form
// also carries the pinned designs (zportSite.PinBar: "Pin this design"
// keeps the parameters as typed) and, on a phone, the charts' width.
//
// A link (the address's fragment) is read by the engine by one rule (see
// zport/site/calc): what it cannot use is left out, the default shown in
// its place, and the engine's notice says which and why. What the user
// types, valid or not, is kept as a draft (zport.js) and comes back on a
// reload; a link that replaces typed values offers them back.
//
// The design aids (aids.js) follow each calculator through events on its
// element: zport:computed (detail: the panel output) after every result,
// zport:link (detail: the form) when settings came from the link or a
// draft, and zport:settings from aids.js ({key, values}: an analysis's
// settings kept outside the form), which join the form and so the share
// link.
(function () {
  'use strict';

  var site = globalThis.zportSite;
  if (!site) return;
  var calculators = [];

  function Calculator(el) {
    this.el = el;
    this.id = el.id;
    this.topology = el.getAttribute('data-topology');
    this.form = el.querySelector('[data-role="form"]');
    this.results = el.querySelector('[data-role="results"]');
    this.notice = el.querySelector('[data-role="notice"]');
    this.actionMsg = el.querySelector('[data-role="action-msg"]');
    this.share = el.querySelector('[data-action="share"]');
    this.last = null;
    this.scheduled = false;
    this.seq = 0; // the latest request; an older answer is dropped
    this.outside = {}; // analyses' settings kept outside the form, by key
    this.answered = 0; // the latest request answered (zportSite.settle)
    this.edited = false; // the inputs hold values the user typed
    this.started = false;
    var self = this;
    this.pins = new site.PinBar(this);
    site.onNarrow(function () { self.schedule(); });
    this.form.addEventListener('submit', function (e) {
      e.preventDefault();
      self.schedule();
    });
    var typed = function () {
      self.edited = true;
      self.keepDraft();
      self.schedule();
    };
    this.form.addEventListener('input', typed);
    this.form.addEventListener('change', typed);
    el.querySelector('[data-action="copy"]').addEventListener('click', function () { self.copy(); });
    el.querySelector('[data-action="csv"]').addEventListener('click', function () { self.download(); });
    el.querySelector('[data-action="reset"]').addEventListener('click', function () { self.reset(); });
    this.share.addEventListener('click', function (e) {
      // The link already holds the settings; following it only reloads them.
      e.preventDefault();
      self.copyLink();
    });
    site.hover(this.results);
    el.addEventListener('zport:settings', function (e) {
      if (!e.detail || !e.detail.key) return;
      self.outside[e.detail.key] = e.detail.values || {};
      typed();
    });
  }

  // keepDraft keeps the inputs as typed, with the address they belong to.
  Calculator.prototype.keepDraft = function () {
    var self = this;
    site.keepDraft(this.id, function () {
      return { form: self.values(), edited: self.edited, hash: self.owner() ? site.fragment() : '' };
    });
  };

  // inputsOf is what a form puts into the inputs, to compare two forms.
  function inputsOf(f) {
    var sorted = function (o) {
      var out = {};
      Object.keys(o || {}).sort().forEach(function (k) {
        out[k] = o[k] && typeof o[k] === 'object' ? sorted(o[k]) : o[k];
      });
      return out;
    };
    return JSON.stringify([sorted(f.params), f.frequency || '', sorted(f.sweep), sorted(f.settings)]);
  }

  Calculator.prototype.inputs = function () {
    return this.form.querySelectorAll('input[name]:not([data-analysis])');
  };

  // values collects the form as the engine's calc.Form.
  Calculator.prototype.values = function () {
    var f = { topology: this.topology, params: {}, sweep: {}, id: this.id };
    var inputs = this.inputs();
    for (var i = 0; i < inputs.length; i++) {
      var n = inputs[i].name, v = inputs[i].value;
      if (n === 'frequency') f.frequency = v;
      else if (n.indexOf('sweep.') === 0) f.sweep[n.slice(6)] = v;
      else f.params[n] = v;
    }
    f.settings = Object.assign(site.settings(this.form), this.outside);
    f.pins = this.pins.value();
    f.chartWidth = site.chartWidth(this.results);
    return f;
  };

  // design is what "Pin this design" keeps: the parameters as typed, or
  // nothing while a value is marked wrong.
  Calculator.prototype.design = function () {
    if (this.results.classList.contains('is-stale')) {
      this.say('Correct the marked value first: a pin keeps a design that can be analyzed.');
      return null;
    }
    return { params: this.values().params };
  };

  Calculator.prototype.fill = function (form) {
    var inputs = this.inputs();
    for (var i = 0; i < inputs.length; i++) {
      var n = inputs[i].name, v;
      if (n === 'frequency') v = form.frequency;
      else if (n.indexOf('sweep.') === 0) v = form.sweep && form.sweep[n.slice(6)];
      else v = form.params && form.params[n];
      if (typeof v === 'string') inputs[i].value = v;
    }
    site.fillSettings(this.form, form.settings);
    this.pins.set(form.pins);
    this.outside = {};
    var s = form.settings || {};
    for (var k in s) {
      if (!this.form.querySelector('[data-analysis="' + site.cssName(k) + '"]')) this.outside[k] = s[k];
    }
  };

  Calculator.prototype.call = function (extra, base) {
    var req = Object.assign({}, base || this.values(), extra);
    return site.call('panel', req);
  };

  // owner reports whether this calculator keeps its settings in the URL:
  // the first calculator of the page (of the visible section, in the
  // single-file export).
  Calculator.prototype.owner = function () {
    var sec = site.currentSection();
    var first = sec && sec.querySelector('[data-calculator]');
    return first === this.el;
  };

  // start reads the address: on the first start a draft of this page
  // comes back first, unless the address holds a link the draft was not
  // made from; a link is then read over the defaults, and values the user
  // had typed are offered back when it replaced them.
  Calculator.prototype.start = function () {
    var self = this;
    var frag = this.owner() ? site.fragment() : '';
    var previous = this.edited ? this.values() : null;
    var restored = null;
    if (!this.started) {
      this.started = true;
      var draft = site.readDraft(this.id);
      if (draft && draft.form && (!frag || draft.hash === frag)) {
        restored = draft;
        frag = '';
      } else if (draft && draft.form && draft.edited) {
        previous = draft.form;
      }
    }
    if (restored) {
      this.fill(restored.form);
      this.edited = !!restored.edited;
    }
    var seq = ++this.seq;
    var t0 = performance.now();
    var first = frag ? this.call({ fragment: frag }) : this.call({});
    first.then(function (out) {
      if (seq !== self.seq) return null;
      if (frag && out.error) {
        // Not the link's doing (the engine refuses a link's bad settings
        // one by one); show the defaults rather than nothing.
        self.pendingNotice = 'This link could not be shown (' + out.error.message + '). Showing the defaults instead.';
        return self.call({}).then(function (d) { return { out: d, linked: false }; });
      }
      return { out: out, linked: !!frag };
    }).then(function (r) {
      if (!r || seq !== self.seq) return;
      self.answered = seq;
      if (r.linked && r.out.form) {
        self.fill(r.out.form);
        self.edited = false;
        if (r.out.notice) self.pendingNotice = r.out.notice;
      }
      // The address changes only when it held settings (at once: a
      // refused setting must not stay there), or once the user edits: an
      // ordinary in-page anchor stays as it was.
      self.apply(r.out, t0, frag ? 'now' : false);
      var settled = r.linked ? r.out.form : restored ? self.values() : null;
      if (settled) self.el.dispatchEvent(new CustomEvent('zport:link', { detail: settled }));
      if (r.linked && previous && inputsOf(previous) !== inputsOf(self.values())) self.offerPrevious(previous);
      self.keepDraft();
      var buttons = self.el.querySelectorAll('button[data-action]');
      for (var i = 0; i < buttons.length; i++) buttons[i].disabled = false;
      self.pins.refresh();
      site.settled(self);
    });
  };

  // offerPrevious says that a link replaced the values the user had typed,
  // and offers them back.
  Calculator.prototype.offerPrevious = function (previous) {
    var self = this;
    site.offerRestore(this.el, 'The link replaced the values you had typed.', 'Restore your previous values', function () {
      self.fill(previous);
      self.edited = true;
      self.keepDraft();
      self.schedule();
      self.el.dispatchEvent(new CustomEvent('zport:link', { detail: previous })); // the design aids' settings too
    });
  };

  Calculator.prototype.schedule = function () {
    if (!site.ready() || this.scheduled) return; // one pending update at most
    this.scheduled = true;
    var self = this;
    requestAnimationFrame(function () {
      self.scheduled = false;
      var t0 = performance.now();
      var seq = ++self.seq;
      self.call({}).then(function (out) {
        if (seq !== self.seq) return;
        self.answered = seq;
        self.apply(out, t0, true);
        site.settled(self);
      });
    });
  };

  // apply shows one answer; address is false (leave the address alone),
  // true (update it once edits pause) or 'now'.
  Calculator.prototype.apply = function (out, t0, address) {
    this.clearMessages();
    if (out.error) {
      this.showError(out.error);
      this.setStale(true);
      return;
    }
    site.insert(this.results, out.html); // rendered and escaped by the engine (Go)
    this.last = out;
    this.pins.refresh();
    this.setStale(false);
    site.hover(this.results);
    this.updateCircuitLink();
    this.writeState(out.state, this.owner() ? address : false);
    site.recomputed(this.results, t0);
    // aids.js follows the calculator (after the measure: it is not part of it).
    this.el.dispatchEvent(new CustomEvent('zport:computed', { detail: out }));
  };

  Calculator.prototype.clearMessages = function () {
    site.clearFieldErrors(this.form);
    this.notice.hidden = true;
    this.notice.textContent = '';
  };

  Calculator.prototype.showError = function (err) {
    if (site.showFieldError(this.form, err)) return;
    var where = err.line ? 'line ' + err.line + ', column ' + err.column + ': ' : '';
    this.notice.textContent = where + (err.param ? err.param + ': ' : '') + err.message;
    this.notice.hidden = false;
  };

  Calculator.prototype.setStale = function (stale) {
    site.markStale(this.el, this.results, stale, 'value');
    if (this.pendingNotice) {
      this.notice.textContent = this.pendingNotice;
      this.notice.hidden = false;
      this.pendingNotice = '';
    }
  };

  // writeState puts the settings into the share link and, when address is
  // set, into the page's address (see apply).
  Calculator.prototype.writeState = function (state, address) {
    if (typeof state !== 'string') return;
    var page = site.single ? (this.el.closest('section.page') || {}).id : '';
    page = page ? page.replace(/^page-/, '') : 'index';
    var h = '#' + (site.single ? 'p=' + page + (state ? '&' : '') : '') + state;
    this.share.setAttribute('href', h);
    if (address) site.address(h, address === 'now');
  };

  Calculator.prototype.reset = function () {
    var inputs = this.form.querySelectorAll('input[name], select[name]');
    for (var i = 0; i < inputs.length; i++) inputs[i].value = inputs[i].getAttribute('data-default');
    this.edited = false;
    site.dropRestore(this.el);
    this.keepDraft();
    this.schedule();
  };

  Calculator.prototype.say = function (text) {
    this.actionMsg.textContent = text;
  };

  Calculator.prototype.copy = function () {
    if (this.last) site.copyResults(this, this.last.markdown, this.link());
  };

  // link is the share link of the settings shown.
  Calculator.prototype.link = function () {
    return location.href.split('#')[0] + (this.share.getAttribute('href') || '');
  };

  Calculator.prototype.copyLink = function () {
    site.copyText(this, this.link(), 'Link to these settings copied.');
  };

  Calculator.prototype.download = function () {
    if (!this.last || !site.ready()) return;
    var self = this;
    // The CSV of the last good result, computed now rather than on every edit.
    this.call({ csv: true, link: this.link(), pins: [] }, this.last.form).then(function (out) {
      if (out.error || !out.csv) {
        self.say('The CSV could not be made: ' + (out.error ? out.error.message : 'no sweep'));
        return;
      }
      var name = 'zport-' + self.topology + '.csv';
      site.saveFile(name, 'text/csv;charset=utf-8', out.csv);
      self.say('CSV of the sweep saved as ' + name + '.');
    });
  };

  // updateCircuitLink completes the "open as an editable circuit" link:
  // the generated text compressed under c=, then the data-state the
  // engine wrote (the stage's reference, ports, gain and frequencies). In
  // the single-file export the page is a section: #p=custom&c=….
  Calculator.prototype.updateCircuitLink = function () {
    var a = this.results.querySelector('a.open-circuit');
    var pre = this.results.querySelector('pre.circuit-text');
    if (!a || !pre) return;
    var page = 'custom.html#';
    if (site.single) {
      if (!document.getElementById('page-custom')) {
        a.parentNode.hidden = true;
        return;
      }
      page = '#p=custom&';
      a.setAttribute('href', '#p=custom');
    }
    if (typeof CompressionStream !== 'function') return;
    var state = a.getAttribute('data-state') || '';
    site.compress(pre.textContent).then(function (c) {
      a.setAttribute('href', page + 'c=' + c + (state ? '&' + state : ''));
    }, function () { /* the plain link still opens the page */ });
  };

  var els = document.querySelectorAll('[data-calculator]');
  for (var i = 0; i < els.length; i++) calculators.push(new Calculator(els[i]));
  for (var k = 0; k < calculators.length; k++) calculators[k].updateCircuitLink();
  window.addEventListener('hashchange', function () {
    if (!site.ready() || site.ownHash()) return;
    for (var j = 0; j < calculators.length; j++) {
      var c = calculators[j];
      if (c.owner() && site.fragment()) c.start();
    }
  });
  site.onEngine(function () {
    for (var j = 0; j < calculators.length; j++) calculators[j].start();
  });
})();
