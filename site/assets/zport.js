// zport.js: the one loader of the WebAssembly engine, and the glue of the
// calculators. Plain JavaScript, a classic script run after the document is
// parsed (defer, or at the end of body in the single-file export). It
// inserts no user text as HTML: messages go through textContent, and the
// only markup it inserts is the results panel the engine renders in Go,
// whose text is escaped there.
//
// Loading: zport-engine.js sets the global string zportEngine, the wasm
// module gzip-compressed and base64-encoded, because browsers will not
// fetch or stream-compile a .wasm file from file://. It is decoded,
// inflated with DecompressionStream and compiled with instantiateStreaming
// from a synthetic Response. wasm_exec.js (Go's own) supplies Go. The
// engine registers the global object zport with analyze, catalog, panel
// and exit. The root element's data-engine says "loading", "ready" or
// "failed"; a failure's reason is shown in every calculator.
//
// URL fragment: a calculator's settings live in the fragment, written by
// the engine (see package zport/site/render), e.g.
//   #R1=10k&R2=47k&…&f=1k&from=10&to=100M&points=400
// In the single-file export, p=NAME comes first and selects the page.
// A fragment without "=" is an ordinary in-page anchor and is left alone.
//
// The custom-circuit page's script (circuit.js, loaded after this one)
// shares this file's engine and helpers through globalThis.zportSite:
// onEngine(cb) runs cb(engine) once the engine is ready; copyText,
// saveFile, hover and recomputed are the calculators' own; compress and
// decompress are the c= encoding below; fragment() is the settings part
// of the address and page() the page shown.
//
// The design aids (aids.js, loaded after this one) follow each calculator
// through events on its element: zport:computed (detail: the panel
// output) after every result, zport:link (detail: the form) when settings
// came from the link, and zport:study from aids.js with its settings, which
// join the form (Form.Study) and so the share link.
//
// Performance marks for the benchmark (go run ./build/bench):
// "zport-engine-ready" when the engine has started, "zport-first-live" when
// the first panel computed by it is on the page, and a measure
// "zport-recompute" for every recompute (engine call, insertion, layout).
(function () {
  'use strict';

  var root = document.documentElement;
  var single = root.getAttribute('data-single') === 'true';
  var engine = null;
  var calculators = [];
  var firstLive = false;
  var readyCallbacks = []; // zportSite.onEngine

  // ---- the single-file export: one section per page, chosen by p= ----

  function hashPage() {
    var m = /^#(?:.*&)?p=([a-z0-9-]+)(?:&|$)/.exec(location.hash);
    return m ? m[1] : null;
  }

  function currentSection() {
    if (!single) return document;
    var name = hashPage() || 'index';
    return document.getElementById('page-' + name) || document.getElementById('page-index');
  }

  function showPage() {
    if (!single) return;
    var want = currentSection();
    var pages = document.querySelectorAll('section.page');
    for (var i = 0; i < pages.length; i++) pages[i].hidden = pages[i] !== want;
    var h = want && want.querySelector('h1');
    if (h) document.title = h.textContent + ' · zport';
  }

  // ---- engine ----

  function decodeBase64(s) {
    if (typeof Uint8Array.fromBase64 === 'function') return Uint8Array.fromBase64(s);
    var bin = atob(s);
    var out = new Uint8Array(bin.length);
    for (var i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
    return out;
  }

  function loadEngine() {
    var b64 = globalThis.zportEngine;
    if (typeof b64 !== 'string') return Promise.reject(new Error('the engine file zport-engine.js did not load'));
    if (typeof Go !== 'function') return Promise.reject(new Error('wasm_exec.js did not load'));
    if (typeof DecompressionStream !== 'function') return Promise.reject(new Error('this browser has no DecompressionStream'));
    if (typeof WebAssembly !== 'object' || typeof WebAssembly.instantiateStreaming !== 'function') {
      return Promise.reject(new Error('this browser cannot run WebAssembly'));
    }
    var bytes;
    try {
      bytes = decodeBase64(b64);
    } catch (e) {
      return Promise.reject(new Error('the engine file is damaged (' + e.message + ')'));
    }
    globalThis.zportEngine = undefined; // the text is no longer needed
    var stream = new Blob([bytes]).stream().pipeThrough(new DecompressionStream('gzip'));
    var go = new Go();
    var wasm = new Response(stream, { headers: { 'Content-Type': 'application/wasm' } });
    return WebAssembly.instantiateStreaming(wasm, go.importObject).then(function (result) {
      var exited = go.run(result.instance); // runs main until it waits for exit
      if (!globalThis.zport || typeof globalThis.zport.panel !== 'function') {
        throw new Error('the engine started but did not register itself');
      }
      exited.then(function () {
        engine = null;
        setStatus('failed', 'The live engine has stopped; reload the page to start it again.');
      });
      window.addEventListener('pagehide', function (e) {
        if (!e.persisted && engine) {
          var z = engine;
          engine = null;
          z.exit();
        }
      });
      return globalThis.zport;
    });
  }

  var statusText = {
    loading: 'These results were computed when the page was built. The live engine is starting.',
    ready: 'Live: the results follow every edit.'
  };

  function setStatus(state, text) {
    root.setAttribute('data-engine', state);
    var els = document.querySelectorAll('[data-role="engine-status"]');
    for (var i = 0; i < els.length; i++) {
      els[i].textContent = text;
      els[i].setAttribute('data-state', state);
    }
  }

  // ---- calculators ----

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
    this.lastHash = null;
    this.study = null; // design-aid settings (aids.js), kept in the share link
    var self = this;
    this.form.addEventListener('submit', function (e) {
      e.preventDefault();
      self.schedule();
    });
    this.form.addEventListener('input', function () { self.schedule(); });
    el.querySelector('[data-action="copy"]').addEventListener('click', function () { self.copy(); });
    el.querySelector('[data-action="csv"]').addEventListener('click', function () { self.download(); });
    el.querySelector('[data-action="reset"]').addEventListener('click', function () { self.reset(); });
    this.share.addEventListener('click', function (e) {
      // The link already holds the settings; following it only reloads them.
      e.preventDefault();
      self.copyLink();
    });
    hover(this.results);
    // aids.js reports its settings; they join the form and so the link.
    el.addEventListener('zport:study', function (e) {
      self.study = e.detail || null;
      self.schedule();
    });
  }

  Calculator.prototype.inputs = function () {
    return this.form.querySelectorAll('input[name]');
  };

  // values collects the form as the engine's render.Form.
  Calculator.prototype.values = function () {
    var f = { topology: this.topology, params: {}, sweep: {}, id: this.id };
    var inputs = this.inputs();
    for (var i = 0; i < inputs.length; i++) {
      var n = inputs[i].name, v = inputs[i].value;
      if (n === 'frequency') f.frequency = v;
      else if (n.indexOf('sweep.') === 0) f.sweep[n.slice(6)] = v;
      else f.params[n] = v;
    }
    if (this.study) f.study = this.study;
    return f;
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
  };

  Calculator.prototype.call = function (extra, base) {
    var req = Object.assign({}, base || this.values());
    for (var k in extra) req[k] = extra[k];
    var t0 = performance.now();
    var text = engine.panel(JSON.stringify(req));
    performance.measure('zport-engine-call', { start: t0, end: performance.now() });
    try {
      return JSON.parse(text);
    } catch (e) {
      return { error: { message: 'the engine gave an unreadable answer' } };
    }
  };

  // owner reports whether this calculator keeps its settings in the URL:
  // the first calculator of the page (of the visible section, in the
  // single-file export).
  Calculator.prototype.owner = function () {
    var sec = currentSection();
    var first = sec && sec.querySelector('[data-calculator]');
    return first === this.el;
  };

  // fragment is the calculator state in the URL, or "" when there is none.
  function fragmentState() {
    var h = location.hash.slice(1);
    if (h.indexOf('=') < 0) return '';
    if (single) h = h.replace(/^p=[a-z0-9-]+(&|$)/, '');
    return h;
  }

  Calculator.prototype.start = function () {
    var frag = this.owner() ? fragmentState() : '';
    var out;
    if (frag) {
      out = this.call({ fragment: frag });
      if (out.error) {
        this.showNotice('The settings in this link were not used (' + out.error.message + '). Showing the defaults instead.');
        out = this.call({});
      } else if (out.form) {
        this.fill(out.form);
        this.study = out.form.study || null;
      }
    } else {
      out = this.call({});
    }
    // The address changes only when it held settings, or once the user
    // edits: an ordinary in-page anchor stays as it was.
    this.apply(out, performance.now(), !!frag);
    if (frag && !out.error && out.form) {
      this.el.dispatchEvent(new CustomEvent('zport:link', { detail: out.form }));
    }
    var buttons = this.el.querySelectorAll('button[data-action]');
    for (var i = 0; i < buttons.length; i++) buttons[i].disabled = false;
  };

  Calculator.prototype.schedule = function () {
    if (!engine || this.scheduled) return; // one pending update at most
    this.scheduled = true;
    var self = this;
    requestAnimationFrame(function () {
      self.scheduled = false;
      var t0 = performance.now();
      self.apply(self.call({}), t0, true);
    });
  };

  Calculator.prototype.apply = function (out, t0, address) {
    this.clearMessages();
    if (out.error) {
      this.showError(out.error);
      this.setStale(true);
      return;
    }
    var tpl = document.createElement('template');
    tpl.innerHTML = out.html; // rendered and escaped by the engine (Go)
    this.results.replaceChildren(tpl.content);
    this.last = out;
    this.setStale(false);
    hover(this.results);
    this.updateCircuitLink();
    this.writeState(out.state, address && this.owner());
    recomputed(this.results, t0);
    // aids.js follows the calculator (after the measure: it is not part of it).
    this.el.dispatchEvent(new CustomEvent('zport:computed', { detail: out }));
  };

  // recomputed closes the "zport-recompute" measure begun at t0 once the
  // new panel in results is laid out, and marks the first live result.
  function recomputed(results, t0) {
    void results.offsetHeight; // lay the new panel out inside the measure
    var t1 = performance.now();
    performance.measure('zport-recompute', { start: t0, end: t1 });
    if (!firstLive) {
      firstLive = true;
      performance.mark('zport-first-live');
    }
  }

  Calculator.prototype.clearMessages = function () {
    var inputs = this.inputs();
    for (var i = 0; i < inputs.length; i++) inputs[i].removeAttribute('aria-invalid');
    var msgs = this.form.querySelectorAll('[data-role="msg"]');
    for (var j = 0; j < msgs.length; j++) msgs[j].textContent = '';
    this.notice.hidden = true;
    this.notice.textContent = '';
  };

  Calculator.prototype.showNotice = function (text) {
    this.pendingNotice = text;
  };

  Calculator.prototype.showError = function (err) {
    var input = err.param ? this.form.querySelector('input[name="' + cssName(err.param) + '"]') : null;
    if (input) {
      input.setAttribute('aria-invalid', 'true');
      var msg = input.closest('.field').querySelector('[data-role="msg"]');
      msg.textContent = err.message;
      return;
    }
    var where = err.line ? 'line ' + err.line + ', column ' + err.column + ': ' : '';
    this.notice.textContent = where + err.message;
    this.notice.hidden = false;
  };

  // cssName keeps a field name usable inside a quoted attribute selector.
  function cssName(s) {
    return String(s).replace(/["\\]/g, '');
  }

  // markStale marks results (inside host) as the last good ones, with a
  // note saying what to correct, or clears the mark.
  function markStale(host, results, stale, what) {
    results.classList.toggle('is-stale', stale);
    var note = host.querySelector('[data-role="stale"]');
    if (stale && !note) {
      note = document.createElement('p');
      note.className = 'stale-note';
      note.setAttribute('data-role', 'stale');
      note.textContent = 'Out of date: these are the last good results. Correct the marked ' + what + ' to update them.';
      results.parentNode.insertBefore(note, results);
    } else if (!stale && note) {
      note.remove();
    }
  }

  Calculator.prototype.setStale = function (stale) {
    markStale(this.el, this.results, stale, 'value');
    if (this.pendingNotice) {
      this.notice.textContent = this.pendingNotice;
      this.notice.hidden = false;
      this.pendingNotice = '';
    }
  };

  // writeState puts the settings into the share link and, when address is
  // set, into the page's address.
  Calculator.prototype.writeState = function (state, address) {
    if (typeof state !== 'string') return;
    var page = single ? (this.el.closest('section.page') || {}).id : '';
    page = page ? page.replace(/^page-/, '') : 'index';
    var h = '#' + (single ? 'p=' + page + (state ? '&' : '') : '') + state;
    this.share.setAttribute('href', h);
    if (address && location.hash !== h) {
      this.lastHash = h;
      try {
        history.replaceState(null, '', h);
      } catch (e) {
        // Some browsers refuse history changes on file://; the link still works.
      }
    }
  };

  Calculator.prototype.reset = function () {
    var inputs = this.inputs();
    for (var i = 0; i < inputs.length; i++) inputs[i].value = inputs[i].getAttribute('data-default');
    this.schedule();
  };

  Calculator.prototype.say = function (text) {
    this.actionMsg.textContent = text;
  };

  Calculator.prototype.copy = function () {
    if (!this.last) return;
    copyText(this, this.last.markdown, 'Results copied as a Markdown table.');
  };

  Calculator.prototype.copyLink = function () {
    var url = location.href.split('#')[0] + (this.share.getAttribute('href') || '');
    copyText(this, url, 'Link to these settings copied.');
  };

  function copyText(calc, text, done) {
    var fallback = function () {
      var ta = document.createElement('textarea');
      ta.value = text;
      ta.className = 'offscreen';
      ta.setAttribute('readonly', '');
      document.body.appendChild(ta);
      ta.select();
      var ok = false;
      try {
        ok = document.execCommand('copy');
      } catch (e) {
        ok = false;
      }
      ta.remove();
      if (ok) {
        calc.say(done);
        return;
      }
      // Last resort: show the text for copying by hand.
      var box = calc.el.querySelector('.copy-fallback');
      if (!box) {
        box = document.createElement('textarea');
        box.className = 'copy-fallback';
        box.setAttribute('readonly', '');
        box.setAttribute('aria-label', 'Text to copy');
        calc.actionMsg.parentNode.appendChild(box);
      }
      box.value = text;
      box.focus();
      box.select();
      calc.say('Copying is not allowed here: select the text below and copy it.');
    };
    if (navigator.clipboard && typeof navigator.clipboard.writeText === 'function') {
      navigator.clipboard.writeText(text).then(function () { calc.say(done); }, fallback);
    } else {
      fallback();
    }
  }

  Calculator.prototype.download = function () {
    if (!this.last || !engine) return;
    // The CSV of the last good result, computed now rather than on every edit.
    var out = this.call({ csv: true }, this.last.form);
    if (out.error || !out.csv) {
      this.say('The CSV could not be made: ' + (out.error ? out.error.message : 'no sweep'));
      return;
    }
    var name = 'zport-' + this.topology + '.csv';
    saveFile(name, 'text/csv;charset=utf-8', out.csv);
    this.say('CSV of the sweep saved as ' + name + '.');
  };

  // saveFile offers text as a download called name; nothing leaves the
  // machine (a blob: URL of the page itself).
  function saveFile(name, type, text) {
    var url = URL.createObjectURL(new Blob([text], { type: type }));
    var a = document.createElement('a');
    a.href = url;
    a.download = name;
    a.className = 'offscreen';
    document.body.appendChild(a);
    a.click();
    a.remove();
    setTimeout(function () { URL.revokeObjectURL(url); }, 30000);
  }

  // The circuit page (custom.html) reads its circuit from the fragment key
  // c=: the circuit text as UTF-8, compressed with
  // CompressionStream('deflate-raw') and encoded as base64url without
  // padding, e.g. custom.html#c=K0ktLlEozy_KSQEA. The link's data-state
  // (written by the engine) adds the stage's reference, ports, gain and
  // frequencies. In the single-file export the page is a section: #p=custom&c=….
  Calculator.prototype.updateCircuitLink = function () {
    var a = this.results.querySelector('a.open-circuit');
    var pre = this.results.querySelector('pre.circuit-text');
    if (!a || !pre) return;
    var page = 'custom.html#';
    if (single) {
      if (!document.getElementById('page-custom')) {
        this.hideCircuitLink();
        return;
      }
      page = '#p=custom&';
      a.setAttribute('href', '#p=custom');
    }
    if (typeof CompressionStream !== 'function') return;
    var state = a.getAttribute('data-state') || '';
    compress(pre.textContent).then(function (c) {
      a.setAttribute('href', page + 'c=' + c + (state ? '&' + state : ''));
    }, function () { /* the plain link still opens the page */ });
  };

  Calculator.prototype.hideCircuitLink = function () {
    var a = this.results.querySelector('a.open-circuit');
    if (a) a.parentNode.hidden = true;
  };

  function base64url(bytes) {
    if (typeof bytes.toBase64 === 'function') return bytes.toBase64({ alphabet: 'base64url', omitPadding: true });
    var bin = '';
    for (var i = 0; i < bytes.length; i++) bin += String.fromCharCode(bytes[i]);
    return btoa(bin).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
  }

  // compress is the c= encoding of text: a promise of the base64url string.
  function compress(text) {
    var stream = new Blob([new TextEncoder().encode(text)]).stream().pipeThrough(new CompressionStream('deflate-raw'));
    return new Response(stream).arrayBuffer().then(function (buf) { return base64url(new Uint8Array(buf)); });
  }

  // decompress reads a c= value back into text. It refuses anything that
  // is not base64url, does not inflate, inflates to more than maxBytes (a
  // small link can hold a huge text: it stops reading there) or is not
  // UTF-8, with an Error saying which.
  function decompress(s, maxBytes) {
    var bytes;
    try {
      if (!/^[A-Za-z0-9_-]*$/.test(s)) throw new Error('bad character');
      var b64 = s.replace(/-/g, '+').replace(/_/g, '/');
      while (b64.length % 4) b64 += '=';
      bytes = decodeBase64(b64);
    } catch (e) {
      return Promise.reject(new Error('the circuit in the link is not valid base64url'));
    }
    if (typeof DecompressionStream !== 'function') return Promise.reject(new Error('this browser cannot decompress'));
    var reader = new Blob([bytes]).stream().pipeThrough(new DecompressionStream('deflate-raw')).getReader();
    var chunks = [], total = 0;
    function next() {
      return reader.read().then(function (r) {
        if (r.done) {
          var all = new Uint8Array(total), off = 0;
          for (var i = 0; i < chunks.length; i++) {
            all.set(chunks[i], off);
            off += chunks[i].length;
          }
          try {
            return new TextDecoder('utf-8', { fatal: true }).decode(all);
          } catch (e) {
            throw new Error('the circuit in the link is not UTF-8 text');
          }
        }
        total += r.value.length;
        if (total > maxBytes) {
          reader.cancel();
          throw new Error('the circuit in the link is longer than ' + Math.round(maxBytes / 1024) + ' KB');
        }
        chunks.push(r.value);
        return next();
      });
    }
    return next().catch(function (e) {
      throw /^the circuit/.test(e.message) ? e : new Error('the circuit in the link is damaged (' + e.message + ')');
    });
  }

  function hover(el) {
    if (typeof window.zportPlotHover === 'function') window.zportPlotHover(el);
  }

  // ---- what the circuit page shares ----

  globalThis.zportSite = {
    single: single,
    onEngine: function (cb) {
      if (engine) cb(engine);
      else readyCallbacks.push(cb);
    },
    recomputed: recomputed,
    markStale: markStale,
    copyText: copyText,
    saveFile: saveFile,
    hover: hover,
    compress: compress,
    decompress: decompress,
    fragment: fragmentState,
    // page is the page shown: in the single-file export, the section
    // chosen by p=; otherwise the file's own name.
    page: function () {
      if (single) return hashPage() || 'index';
      return (location.pathname.split('/').pop() || 'index.html').replace(/\.html$/, '');
    }
  };

  // ---- start ----

  function start() {
    showPage();
    var els = document.querySelectorAll('[data-calculator]');
    for (var i = 0; i < els.length; i++) calculators.push(new Calculator(els[i]));
    for (var k = 0; k < calculators.length; k++) calculators[k].updateCircuitLink();
    window.addEventListener('hashchange', function () {
      showPage();
      if (!engine) return;
      for (var j = 0; j < calculators.length; j++) {
        var c = calculators[j];
        if (c.owner() && location.hash !== c.lastHash && fragmentState()) c.start();
      }
    });
    if (!calculators.length && !document.querySelector('[data-circuit-editor]')) return;
    setStatus('loading', statusText.loading);
    loadEngine().then(function (z) {
      engine = z;
      performance.mark('zport-engine-ready');
      setStatus('ready', statusText.ready);
      for (var j = 0; j < calculators.length; j++) calculators[j].start();
      var cbs = readyCallbacks;
      readyCallbacks = [];
      for (var n = 0; n < cbs.length; n++) cbs[n](z);
    }, function (err) {
      setStatus('failed', 'The live engine could not start: ' + (err && err.message ? err.message : String(err)) +
        '. The results shown were computed when the page was built; the values cannot be edited here.');
    });
  }

  start();
})();
