// zport.js: the one loader of the WebAssembly engine, and the library the
// page scripts share. Plain JavaScript, a classic script run after the
// document is parsed (defer, or at the end of body in the single-file
// export), before calculator.js (the stage calculators), circuit.js (the
// custom-circuit page) and aids.js (the design aids), which use it through
// globalThis.zportSite. Like them it inserts no user text as HTML:
// messages go through textContent, and the only markup inserted is what the
// engine rendered (and escaped) in Go.
//
// Loading: zport-engine.js sets the global string zportEngine, the wasm
// module gzip-compressed and base-122-encoded, because browsers will not
// fetch or stream-compile a .wasm file from file://, and the function
// zportGo, whose body is Go's wasm_exec.js. The engine runs in a Web
// Worker started from a blob: made of that function's source and this
// file's engineWorker (a worker cannot be started from a file either): it
// decodes the string, inflates it with DecompressionStream and compiles
// it with instantiateStreaming from a synthetic Response; the engine
// registers the global object zport there (its functions are listed in
// zport/wasm). The page only renders. The root element's data-engine says
// "loading", "ready" or "failed" (a failure's reason is shown in every
// calculator), and data-busy="true" marks a call running for more than
// 150 ms, when the engine status says "Computing…".
//
// zportSite, the shared part:
//   onEngine(cb)       runs cb() once the engine is ready
//   call(name, ...)    one engine call, run in the worker: object arguments
//                      go as JSON, the answer comes back parsed; a promise
//                      of the answer object (an unreadable answer becomes
//                      {error}). A calculator's recompute (panel or
//                      circuit, with its id) supersedes one still waiting:
//                      that one answers {superseded: true, error}
//   insert(el, html)   puts markup rendered by the engine into el
//   later(fn)          runs fn in a task of its own, soon
//   markStale(…)       marks results as the last good ones, or clears it
//   settings(form)     the analyses' settings typed into a form, by
//                      analysis key (see zport/site/calc.Analysis)
//   showFieldError(form, err) puts an engine error beside the input it
//                      names (by name or data-param); false if none does
//   clearFieldErrors(form)
//   address(h)         puts h into the address bar once the user pauses
//   readDraft(name), keepDraft(name, get)
//                      the user's work as typed, kept across reloads (below)
//   offerRestore(host, message, label, restore), dropRestore(host)
//                      says that something replaced the user's work, with
//                      a button that brings it back
//   copyText, copyResults, saveFile, compress, decompress, hover,
//   recomputed, fragment(), page(), single, cssName
//   PinBar(host)       the pinned designs of a calculator (see below)
//   settle(host, fn), settled(host)  wait for a calculator's last recompute
//   onRequest(proto, spec)  the shared methods of a section whose engine
//                      work runs on request, in slices (a tolerance
//                      study, a solve; see below)
//   chartWidth(el)     the charts' width on a phone (calc.Form.ChartWidth)
//   onNarrow(fn)       calls fn when the phone width changes
// and, for every page: the charts' "SVG" and "PNG" buttons, and printing
// with every section open ("Print report" buttons print).
//
// Drafts: what the user typed into a calculator or the circuit editor,
// valid or not, is kept in sessionStorage — this tab only, nothing leaves
// the machine — under a key of the page (its path, and the calculator's
// id), with the address it belongs to. A reload brings it back; a link
// that opens other settings wins over it, and the page offers the draft
// back ("your previous text"). The address itself holds only the last
// valid state, which is what a share link should carry.
//
// Scripts off: the pages ship their inputs read-only (data-locked), with a
// <noscript> line saying why; this script unlocks them as it starts, and
// locks them again if the engine cannot start. The engine's status line is
// empty and hidden until the script fills it.
//
// URL fragment: a calculator's settings live in the fragment, written by
// the engine (package zport/site/calc), e.g.
//   #R1=10k&R2=47k&…&f=1k&from=10&to=100M&points=400
// In the single-file export, p=NAME comes first and selects the page.
// A fragment without "=" is an ordinary in-page anchor and is left alone.
//
// Performance marks for the benchmark (go run ./build/bench, and its
// ratios): "zport-engine-ready" when the engine has started,
// "zport-first-live" when the first panel computed by it is on the page, a
// measure "zport-recompute" for every recompute (from the edit's frame:
// engine call, insertion, layout) and "zport-engine-call" for every engine
// call (the engine's own time in the worker, from the request sent).
(function () {
  'use strict';

  var root = document.documentElement;
  var single = root.getAttribute('data-single') === 'true';
  var engine = null;
  var firstLive = false;
  var readyCallbacks = [];

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

  // fragment is the settings part of the address, or "" when there is
  // none (an ordinary anchor).
  function fragmentState() {
    var h = location.hash.slice(1);
    if (h.indexOf('=') < 0) return '';
    if (single) h = h.replace(/^p=[a-z0-9-]+(&|$)/, '');
    return h;
  }

  // ---- engine ----
  //
  // The engine runs in a Web Worker, so that the page only ever renders:
  // a classic script cannot start a worker from a file, and file:// allows
  // no fetch, so the worker's code is a blob: made of two functions' own
  // source — Go's wasm_exec.js, which zport-engine.js wraps as
  // zportGo, and engineWorker below — and the engine's bytes are posted to
  // it (the CSP admits workers from blob: only). Calls and answers cross
  // as messages: a request object is sent as JSON text (what the bridge
  // reads), the answer comes back parsed in the worker, so that neither
  // side's main work waits on the other's JSON.

  // decodeBase122 reads the engine's string, written by the site builder
  // (zport/site, base122.go): "n:" and then seven bits per character, or
  // fourteen in a two-byte one standing for a code a string cannot hold
  // (NUL, LF, CR, the quote, the backslash, '<') and the next seven bits.
  // It runs in the worker.
  function decodeBase122(s) {
    var banned = [0, 10, 13, 34, 92, 60];
    var colon = s.indexOf(':');
    var n = Number(s.slice(0, colon));
    if (!(colon > 0) || !(n >= 0)) throw new Error('no length');
    var out = new Uint8Array(n);
    var o = 0, acc = 0, bits = 0;
    for (var k = colon + 1; k < s.length && o < n; k++) {
      var c = s.charCodeAt(k);
      var g = c;
      if (c >= 0x80) {
        var i = (c - 0x80) >> 7;
        if (i >= banned.length) throw new Error('a character out of range');
        g = banned[i];
      }
      for (var two = 0; two < 2; two++) {
        acc = (acc << 7) | g;
        bits += 7;
        if (bits >= 8 && o < n) {
          bits -= 8;
          out[o++] = acc >> bits;
          acc &= (1 << bits) - 1;
        }
        if (c < 0x80) break;
        g = c & 0x7f;
      }
    }
    if (o !== n) throw new Error('the text ends early');
    return out;
  }

  // decodeBase64 reads base64 into bytes.
  function decodeBase64(s) {
    if (typeof Uint8Array.fromBase64 === 'function') return Uint8Array.fromBase64(s);
    var bin = atob(s);
    var out = new Uint8Array(bin.length);
    for (var i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
    return out;
  }

  // engineWorker is the worker's side: it decodes, inflates and starts the
  // engine, then answers calls {id, name, args} with {id, out, ms}, ms
  // being the time the engine took. It runs in the worker's global scope,
  // from its source text and decodeBase122's alone, so it uses nothing
  // else from outside itself.
  function engineWorker() {
    var zport = null;
    function fail(msg) {
      self.postMessage({ failed: msg });
    }
    function start(text) {
      if (typeof DecompressionStream !== 'function') return fail('this browser has no DecompressionStream');
      if (typeof WebAssembly !== 'object' || typeof WebAssembly.instantiateStreaming !== 'function') {
        return fail('this browser cannot run WebAssembly');
      }
      var bytes;
      try {
        bytes = decodeBase122(text);
      } catch (e) {
        return fail('the engine file is damaged (' + e.message + ')');
      }
      var stream = new Blob([bytes]).stream().pipeThrough(new DecompressionStream('gzip'));
      var go = new Go();
      var wasm = new Response(stream, { headers: { 'Content-Type': 'application/wasm' } });
      WebAssembly.instantiateStreaming(wasm, go.importObject).then(function (result) {
        go.run(result.instance).then(function () {
          zport = null;
          self.postMessage({ exited: true });
        });
        if (!self.zport || typeof self.zport.panel !== 'function') throw new Error('the engine started but did not register itself');
        zport = self.zport;
        self.postMessage({ ready: true });
      }).catch(function (e) {
        fail(e && e.message ? e.message : String(e));
      });
    }
    self.onmessage = function (e) {
      var m = e.data;
      if (typeof m.engine === 'string') return start(m.engine);
      var out;
      var t0 = performance.now();
      if (!zport || typeof zport[m.name] !== 'function') {
        out = { error: { message: 'the live engine is not running' } };
      } else {
        try {
          out = JSON.parse(zport[m.name].apply(zport, m.args));
        } catch (err) {
          out = { error: { message: 'the engine gave an unreadable answer' } };
        }
      }
      self.postMessage({ id: m.id, out: out, ms: performance.now() - t0 });
    };
  }

  function loadEngine() {
    var text = globalThis.zportEngine;
    var goRuntime = globalThis.zportGo;
    if (typeof text !== 'string' || typeof goRuntime !== 'function') {
      return Promise.reject(new Error('the engine file zport-engine.js did not load'));
    }
    if (typeof Worker !== 'function') return Promise.reject(new Error('this browser cannot run a worker'));
    var src = '(' + goRuntime + ')();\n' + decodeBase122 + '\n(' + engineWorker + ')();\n';
    var url = URL.createObjectURL(new Blob([src], { type: 'text/javascript' }));
    var w;
    try {
      w = new Worker(url);
    } catch (e) {
      URL.revokeObjectURL(url);
      return Promise.reject(new Error('the engine worker could not start (' + e.message + ')'));
    }
    globalThis.zportEngine = undefined; // the text is no longer needed here
    return new Promise(function (resolve, reject) {
      w.onmessage = function (e) {
        URL.revokeObjectURL(url);
        if (e.data.ready) {
          w.onmessage = answered;
          w.onerror = null;
          resolve(w);
        } else {
          reject(new Error(e.data.failed || 'the engine did not start'));
        }
      };
      w.onerror = function (e) {
        e.preventDefault();
        URL.revokeObjectURL(url);
        reject(new Error(e.message || 'the engine worker could not start'));
      };
      w.postMessage({ engine: text });
    });
  }

  // Calls in flight by id, and the lanes: a calculator's recompute (a
  // panel or circuit call carrying the calculator's id) has at most one
  // call in flight; a newer one waits, and supersedes any that was waiting
  // before it, whose promise answers {superseded: true, error}. The worker
  // cannot stop a call that has started: its answer simply arrives for a
  // caller that has moved on.
  var calls = {};
  var nextCall = 1;
  var lanes = {};
  var busyTimer = 0;
  var BUSY_MS = 150; // a call still running after this says "Computing…"

  function laneOf(name, args) {
    var a = args[0];
    if ((name !== 'panel' && name !== 'circuit') || !a || typeof a !== 'object' || !a.id || a.csv) return '';
    return name + ':' + a.id;
  }

  function send(c) {
    c.t0 = performance.now();
    calls[c.id] = c;
    engine.postMessage({ id: c.id, name: c.name, args: c.args });
    busy();
  }

  function answered(e) {
    var m = e.data;
    if (m.exited || m.failed) return stopped();
    var c = calls[m.id];
    if (!c) return;
    delete calls[m.id];
    if (!c.warm) performance.measure('zport-engine-call', { start: c.t0, duration: m.ms });
    if (c.lane) {
      var l = lanes[c.lane];
      l.running = null;
      if (l.next) {
        l.running = l.next;
        l.next = null;
        send(l.running);
      }
      warmLater(c);
    }
    busy();
    c.resolve(m.out);
    if (!live) setTimeout(goLive, 0); // after the answer is shown
  }

  // The engine's first calls run on the browser's baseline WebAssembly
  // code, several times slower than the optimized code it compiles in the
  // background for what runs often. So that the user's first edit does not
  // pay for that, the engine is warmed while the page is idle: the last
  // recompute is repeated a few times with a short sweep (the same code,
  // a fraction of the time, so an edit never waits long behind it), its
  // answers dropped, until the user's first edit.
  var WARM_RUNS = 8;
  var WARM_POINTS = 20;
  var warm = { runs: 0, name: '', arg: '' };

  function warmLater(c) {
    if (warm.runs >= WARM_RUNS) return;
    warm.name = c.name;
    warm.arg = c.args[0];
    var idle = globalThis.requestIdleCallback || function (fn) { return setTimeout(fn, 50); };
    idle(warmStep, { timeout: 2000 });
  }

  function warmStep() {
    if (!engine || warm.runs >= WARM_RUNS || !warm.name) return;
    for (var k in calls) {
      if (calls[k]) {
        // Not idle yet: look again in a while.
        var again = { name: warm.name, args: [warm.arg] };
        return setTimeout(function () { warmLater(again); }, 200);
      }
    }
    var req;
    try {
      req = JSON.parse(warm.arg);
    } catch (e) {
      return;
    }
    if (req.sweep && Number(req.sweep.points) > WARM_POINTS) req.sweep.points = String(WARM_POINTS);
    warm.runs++;
    var c = { id: nextCall++, name: warm.name, args: [JSON.stringify(req)], warm: true, lane: '' };
    var next = { name: warm.name, args: [warm.arg] };
    c.resolve = function () { warmLater(next); };
    send(c);
  }

  // busy says "Computing…" in the engine status while a call has been
  // running for BUSY_MS, and the usual words once none is.
  function busy() {
    var pending = false;
    for (var k in calls) {
      if (calls[k] && !calls[k].warm) pending = true;
    }
    clearTimeout(busyTimer);
    if (!pending) {
      if (root.hasAttribute('data-busy')) {
        root.removeAttribute('data-busy');
        setStatusText(live ? statusText.ready : statusText.loading);
      }
      return;
    }
    busyTimer = setTimeout(function () {
      if (!engine) return;
      root.setAttribute('data-busy', 'true');
      setStatusText(statusText.busy);
    }, BUSY_MS);
  }

  // goLive marks the page live (data-engine="ready", the status "Live")
  // once the calls its scripts made when the engine started are answered
  // and shown: from then on what the page shows is the engine's.
  var live = false;
  function goLive() {
    if (live || !engine) return;
    for (var k in calls) {
      if (calls[k] && !calls[k].warm) return; // answered() looks again
    }
    live = true;
    setStatus('ready', statusText.ready);
  }

  function stopped() {
    var pending = calls;
    calls = {};
    lanes = {};
    engine = null;
    clearTimeout(busyTimer);
    root.removeAttribute('data-busy');
    lock(true);
    setStatus('failed', 'The live engine has stopped; reload the page to start it again.');
    for (var k in pending) pending[k].resolve({ error: { message: 'the live engine is not running' } });
  }

  // call runs one engine function in the worker: object arguments are sent
  // as JSON, strings and numbers as they are. It returns a promise of the
  // answer object; an unreadable answer, or a stopped engine, gives
  // {error: {message}}.
  function call(name) {
    var raw = Array.prototype.slice.call(arguments, 1);
    var args = raw.map(function (a) {
      return a !== null && typeof a === 'object' ? JSON.stringify(a) : a;
    });
    return new Promise(function (resolve) {
      if (!engine) {
        resolve({ error: { message: 'the live engine is not running' } });
        return;
      }
      var c = { id: nextCall++, name: name, args: args, resolve: resolve, lane: laneOf(name, raw) };
      if (!c.lane) return send(c);
      if (live) warm.runs = WARM_RUNS; // the user edits: warming is over
      var l = lanes[c.lane] || (lanes[c.lane] = { running: null, next: null });
      if (!l.running) {
        l.running = c;
        return send(c);
      }
      if (l.next) l.next.resolve({ superseded: true, error: { message: 'superseded by a newer edit' } });
      l.next = c;
    });
  }

  var statusText = {
    loading: 'These results were computed when the page was built. The live engine is starting.',
    ready: 'Live: the results follow every edit.',
    busy: 'Computing…'
  };

  function setStatus(state, text) {
    root.setAttribute('data-engine', state);
    var els = document.querySelectorAll('[data-role="engine-status"]');
    for (var i = 0; i < els.length; i++) els[i].setAttribute('data-state', state);
    setStatusText(text);
  }

  function setStatusText(text) {
    var els = document.querySelectorAll('[data-role="engine-status"]');
    for (var i = 0; i < els.length; i++) {
      if (els[i].textContent !== text) els[i].textContent = text;
      els[i].hidden = false;
    }
  }

  // lock makes the inputs the pages ship read-only (data-locked) read-only
  // again, or editable: text inputs take readonly, choices disabled.
  function lock(on) {
    var els = document.querySelectorAll('[data-locked]');
    for (var i = 0; i < els.length; i++) {
      var e = els[i];
      var attr = e.tagName === 'SELECT' || e.type === 'checkbox' ? 'disabled' : 'readOnly';
      e[attr] = on;
    }
  }

  // ---- shared helpers ----

  function ready() { return !!engine; }

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

  // cssName keeps a name usable inside a quoted attribute selector.
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

  // settings reads the analyses' inputs of form (data-analysis and
  // data-setting) into {key: {setting: value}}.
  function settings(form) {
    var out = {};
    var els = form.querySelectorAll('[data-analysis][data-setting]');
    for (var i = 0; i < els.length; i++) {
      var k = els[i].getAttribute('data-analysis');
      out[k] = out[k] || {};
      out[k][els[i].getAttribute('data-setting')] = els[i].value;
    }
    return out;
  }

  // fillSettings sets the analyses' inputs of form from settings, leaving
  // an input whose value is already right (and so its caret) alone.
  function fillSettings(form, s) {
    var els = form.querySelectorAll('[data-analysis][data-setting]');
    for (var i = 0; i < els.length; i++) {
      var vals = s && s[els[i].getAttribute('data-analysis')];
      var v = vals ? vals[els[i].getAttribute('data-setting')] : undefined;
      if (typeof v !== 'string') v = els[i].getAttribute('data-default') || '';
      if (els[i].value !== v) els[i].value = v;
    }
  }

  // showFieldError puts the engine's message beside the input it names
  // (by name, else by data-param) and marks it; false when no input of
  // form does.
  function showFieldError(form, err) {
    if (!err.param) return false;
    var p = cssName(err.param);
    var input = form.querySelector('[name="' + p + '"]') || form.querySelector('[data-param="' + p + '"]');
    if (!input) return false;
    var holder = input.closest('[data-field], .field, td, li');
    var msg = holder && holder.querySelector('[data-role="msg"]');
    if (!msg) return false;
    input.setAttribute('aria-invalid', 'true');
    msg.textContent = err.message;
    return true;
  }

  function clearFieldErrors(form) {
    var bad = form.querySelectorAll('[aria-invalid]');
    for (var i = 0; i < bad.length; i++) bad[i].removeAttribute('aria-invalid');
    var msgs = form.querySelectorAll('[data-role="msg"]');
    for (var j = 0; j < msgs.length; j++) msgs[j].textContent = '';
  }

  // address puts h into the address bar once edits pause (a history
  // update per keystroke costs more than the recompute), or at once with
  // now set; writtenHash remembers what the page itself wrote, so that a
  // hashchange it caused is not taken for a new link.
  var ADDRESS_MS = 400;
  var addressTimer = 0;
  var pendingHash = null;
  var writtenHash = null;
  function address(h, now) {
    pendingHash = h;
    clearTimeout(addressTimer);
    if (now) flushAddress();
    else addressTimer = setTimeout(flushAddress, ADDRESS_MS);
  }
  function flushAddress() {
    clearTimeout(addressTimer);
    var h = pendingHash;
    pendingHash = null;
    if (h === null || location.hash === h) return;
    writtenHash = h;
    try {
      history.replaceState(null, '', h);
    } catch (e) {
      // Some browsers refuse history changes on file://; the link still works.
    }
    saveDrafts(); // a draft remembers the address it belongs to
  }
  function ownHash() {
    return location.hash === writtenHash || location.hash === pendingHash;
  }

  // ---- drafts (see the top of this file) ----

  var drafts = {}; // name → the function that gives the draft to keep
  var draftTimer = 0;

  function draftKey(name) {
    return 'zport.draft:' + location.pathname + ':' + name;
  }

  // readDraft returns the draft kept under name, or null.
  function readDraft(name) {
    try {
      var d = JSON.parse(sessionStorage.getItem(draftKey(name)) || 'null');
      return d && typeof d === 'object' ? d : null;
    } catch (e) {
      return null; // storage refused (a privacy setting) or damaged
    }
  }

  // keepDraft keeps what get() returns (a JSON-able object) under name
  // once edits pause, and at once when the page is left or the address is
  // written; get runs then, so it sees the latest state.
  function keepDraft(name, get) {
    drafts[name] = get;
    clearTimeout(draftTimer);
    draftTimer = setTimeout(saveDrafts, ADDRESS_MS);
  }

  function saveDrafts() {
    clearTimeout(draftTimer);
    for (var name in drafts) {
      try {
        sessionStorage.setItem(draftKey(name), JSON.stringify(drafts[name]()));
      } catch (e) {
        // Storage full or refused: the address still holds the last
        // valid state.
      }
    }
  }

  // offerRestore puts a note at the top of host's results (before its
  // notice) saying that something replaced the user's work, with a button
  // that calls restore and removes the note. One note per host.
  function offerRestore(host, message, label, restore) {
    dropRestore(host);
    var note = document.createElement('p');
    note.className = 'calc-notice restore-note';
    note.setAttribute('data-role', 'restore');
    var text = document.createElement('span');
    text.textContent = message + ' ';
    var b = document.createElement('button');
    b.type = 'button';
    b.setAttribute('data-action', 'restore-previous');
    b.textContent = label;
    b.addEventListener('click', function () {
      dropRestore(host);
      restore();
    });
    note.appendChild(text);
    note.appendChild(b);
    var before = host.querySelector('[data-role="notice"]');
    before.parentNode.insertBefore(note, before);
  }

  function dropRestore(host) {
    var old = host.querySelector('[data-role="restore"]');
    if (old) old.remove();
  }

  // copyText puts text on the clipboard and says so through host.say; where
  // copying is not allowed it shows the text in a box after host.actionMsg
  // for copying by hand.
  function copyText(host, text, done) {
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
        host.say(done);
        return;
      }
      var box = host.el.querySelector('.copy-fallback');
      if (!box) {
        box = document.createElement('textarea');
        box.className = 'copy-fallback';
        box.setAttribute('readonly', '');
        box.setAttribute('aria-label', 'Text to copy');
        host.actionMsg.parentNode.appendChild(box);
      }
      box.value = text;
      box.focus();
      box.select();
      host.say('Copying is not allowed here: select the text below and copy it.');
    };
    if (navigator.clipboard && typeof navigator.clipboard.writeText === 'function') {
      navigator.clipboard.writeText(text).then(function () { host.say(done); }, fallback);
    } else {
      fallback();
    }
  }

  // saveFile offers data (text or a Blob) as a download called name;
  // nothing leaves the machine (a blob: URL of the page itself).
  function saveFile(name, type, data) {
    var url = URL.createObjectURL(new Blob([data], { type: type }));
    var a = document.createElement('a');
    a.href = url;
    a.download = name;
    a.className = 'offscreen';
    document.body.appendChild(a);
    a.click();
    a.remove();
    setTimeout(function () { URL.revokeObjectURL(url); }, 30000);
  }

  // The custom-circuit page reads its circuit from the fragment key c=:
  // the circuit text as UTF-8, compressed with
  // CompressionStream('deflate-raw') and encoded as base64url without
  // padding, e.g. custom.html#c=K0ktLlEozy_KSQEA. The stage pages' "open as
  // circuit" links use the same encoding.

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

  // ---- pinned designs ----

  // The designs a calculator keeps for comparison (calc.Pin): up to
  // MAX_PINS, each in a slot 1 … MAX_PINS that gives its line style and
  // its keys in the share link, with a name the user can edit. The bar
  // lists them in the element [data-role="pins"] of host.el; host.design()
  // returns the design to pin (or null, saying why), and host.schedule()
  // recomputes; a pin waits for the recompute of the last edit (settle).
  // Each pin's line-style swatch is copied from the panel the engine
  // rendered (its "Pinned designs" section), so the styles have one home,
  // in Go.
  var MAX_PINS = 4;
  var MAX_PIN_NAME = 40;

  function PinBar(host) {
    this.host = host;
    this.el = host.el.querySelector('[data-role="pins"]');
    this.list = host.el.querySelector('[data-role="pin-list"]');
    this.button = host.el.querySelector('[data-action="pin"]');
    this.pins = [];
    var self = this;
    this.button.addEventListener('click', function () { self.pin(); });
    host.el.querySelector('[data-action="unpin-all"]').addEventListener('click', function () {
      self.pins = [];
      self.changed('Every pin removed.');
    });
  }

  // pin keeps the design as it stands, once the recompute of the last
  // edit has answered (a value still marked wrong is not pinned), in the
  // lowest free slot.
  PinBar.prototype.pin = function () {
    var self = this;
    settle(this.host, function () { self.keep(self.host.design()); });
  };

  PinBar.prototype.keep = function (design) {
    if (!design) return;
    var slot = 0;
    for (var s = 1; s <= MAX_PINS && !slot; s++) {
      if (!this.pins.some(function (p) { return p.slot === s; })) slot = s;
    }
    if (!slot) {
      this.host.say('Four designs are pinned already: remove one to pin another.');
      return;
    }
    var p = Object.assign({ name: 'Pin ' + slot, slot: slot }, design);
    this.pins.push(p);
    this.pins.sort(function (a, b) { return a.slot - b.slot; });
    this.changed('Pinned as “' + p.name + '”: edit the current design and compare.');
  };

  // set replaces the pins by those of a link (the engine's form.pins);
  // text, when given, supplies each circuit pin's text by slot.
  PinBar.prototype.set = function (pins, text) {
    this.pins = (pins || []).map(function (p) {
      var q = Object.assign({}, p);
      if (text) q.circuit = text(q.slot);
      return q;
    });
    this.render();
  };

  // value is the pins as the engine's form takes them.
  PinBar.prototype.value = function () {
    return this.pins.map(function (p) { return Object.assign({}, p); });
  };

  PinBar.prototype.changed = function (msg) {
    this.render();
    if (msg) this.host.say(msg);
    this.host.schedule();
  };

  // render lists the pins: swatch, name (editable) and a remove button.
  PinBar.prototype.render = function () {
    var self = this;
    this.el.hidden = this.pins.length === 0;
    this.button.disabled = !ready() || this.pins.length >= MAX_PINS;
    var items = this.pins.map(function (p) {
      var li = document.createElement('li');
      li.setAttribute('data-pin', String(p.slot));
      var sw = self.host.results.querySelector('.pin-summary [data-pin="' + p.slot + '"] svg');
      if (sw) li.appendChild(sw.cloneNode(true));
      var input = document.createElement('input');
      input.type = 'text';
      input.value = p.name;
      input.maxLength = MAX_PIN_NAME;
      input.spellcheck = false;
      input.setAttribute('aria-label', 'Name of pin ' + p.slot);
      input.addEventListener('input', function () {
        p.name = input.value.trim() ? input.value : 'Pin ' + p.slot;
        self.host.schedule();
      });
      var rm = document.createElement('button');
      rm.type = 'button';
      rm.className = 'quiet';
      rm.textContent = 'Remove';
      rm.setAttribute('aria-label', 'Remove pin ' + p.slot);
      rm.setAttribute('data-action', 'unpin');
      rm.addEventListener('click', function () {
        self.pins = self.pins.filter(function (q) { return q !== p; });
        self.changed('Pin ' + p.slot + ' removed.');
      });
      li.appendChild(input);
      li.appendChild(rm);
      return li;
    });
    // Keep the focused name input (and its caret) when only swatches change.
    var focused = this.list.contains(document.activeElement) ? document.activeElement.getAttribute('aria-label') : null;
    this.list.replaceChildren.apply(this.list, items);
    if (focused) {
      var again = this.list.querySelector('[aria-label="' + cssName(focused) + '"]');
      if (again) again.focus();
    }
  };

  // refresh updates the swatches once a new panel is on the page.
  PinBar.prototype.refresh = function () {
    var self = this;
    var lis = this.list.querySelectorAll('li[data-pin]');
    for (var i = 0; i < lis.length; i++) {
      var slot = lis[i].getAttribute('data-pin');
      var sw = self.host.results.querySelector('.pin-summary [data-pin="' + slot + '"] svg');
      var old = lis[i].querySelector('svg');
      if (sw && !old) lis[i].insertBefore(sw.cloneNode(true), lis[i].firstChild);
    }
    this.button.disabled = !ready() || this.pins.length >= MAX_PINS;
  };

  // ---- chart images ----

  // Every chart (figure.plot) offers "SVG" and "PNG" buttons
  // (data-action="save-svg" / "save-png", written by zport/site/view). The
  // image is the chart as drawn, with its title, axes and legend, made
  // self-contained: the page's style of each part is written onto it as
  // presentation attributes, on a background of the chart's own colour,
  // so that it reads the same pasted into a slide. The PNG is the SVG
  // drawn on a canvas at twice the chart's size. Nothing leaves the page.
  var PNG_SCALE = 2;
  var STYLE_PROPS = ['fill', 'fill-opacity', 'stroke', 'stroke-opacity', 'stroke-width', 'stroke-dasharray',
    'stroke-linejoin', 'stroke-linecap', 'paint-order', 'opacity', 'font-family', 'font-size', 'font-weight',
    'font-style', 'text-anchor', 'dominant-baseline'];

  function chartImage(svg) {
    var vb = (svg.getAttribute('viewBox') || '0 0 640 400').split(/\s+/).map(Number);
    var w = vb[2], h = vb[3];
    var copy = svg.cloneNode(true);
    var from = [svg].concat(Array.prototype.slice.call(svg.querySelectorAll('*')));
    var to = [copy].concat(Array.prototype.slice.call(copy.querySelectorAll('*')));
    for (var i = 0; i < from.length; i++) {
      var cs = getComputedStyle(from[i]);
      for (var k = 0; k < STYLE_PROPS.length; k++) {
        var v = cs.getPropertyValue(STYLE_PROPS[k]);
        if (v && v !== 'none' || STYLE_PROPS[k] === 'fill' || STYLE_PROPS[k] === 'stroke') to[i].setAttribute(STYLE_PROPS[k], v);
      }
      to[i].removeAttribute('class');
      to[i].removeAttribute('tabindex');
    }
    var cursor = copy.querySelectorAll('[data-role="cursor"], .zcur');
    for (var c = 0; c < cursor.length; c++) cursor[c].remove();
    var drop = ['tabindex', 'data-freq', 'data-x0', 'data-x1', 'data-my', 'data-py', 'data-mscale', 'data-unit', 'data-fmin', 'data-fmax', 'aria-labelledby', 'aria-describedby', 'role'];
    for (var d = 0; d < drop.length; d++) copy.removeAttribute(drop[d]);
    var paths = copy.querySelectorAll('[data-values]');
    for (var p = 0; p < paths.length; p++) paths[p].removeAttribute('data-values');
    copy.setAttribute('xmlns', 'http://www.w3.org/2000/svg');
    copy.setAttribute('width', String(w));
    copy.setAttribute('height', String(h));
    var bg = document.createElementNS('http://www.w3.org/2000/svg', 'rect');
    bg.setAttribute('width', '100%');
    bg.setAttribute('height', '100%');
    var fig = svg.closest('figure') || svg.parentNode;
    bg.setAttribute('fill', getComputedStyle(fig).backgroundColor || '#ffffff');
    copy.insertBefore(bg, copy.firstChild);
    return { text: new XMLSerializer().serializeToString(copy), width: w, height: h };
  }

  function chartName(svg, ext) {
    var t = svg.querySelector('title');
    var base = (t ? t.textContent : svg.id || 'chart').toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 60);
    return 'zport-' + (base || 'chart') + '.' + ext;
  }

  function saveChart(svg, kind, say) {
    var img = chartImage(svg);
    if (kind === 'svg') {
      var name = chartName(svg, 'svg');
      saveFile(name, 'image/svg+xml;charset=utf-8', img.text);
      say('Chart saved as ' + name + '.');
      return;
    }
    var pic = new Image();
    pic.onload = function () {
      var canvas = document.createElement('canvas');
      canvas.width = img.width * PNG_SCALE;
      canvas.height = img.height * PNG_SCALE;
      var ctx = canvas.getContext('2d');
      ctx.scale(PNG_SCALE, PNG_SCALE);
      ctx.drawImage(pic, 0, 0, img.width, img.height);
      canvas.toBlob(function (blob) {
        if (!blob) {
          say('The PNG could not be made in this browser; save the SVG instead.');
          return;
        }
        var pname = chartName(svg, 'png');
        saveFile(pname, 'image/png', blob);
        say('Chart saved as ' + pname + ' (' + canvas.width + ' × ' + canvas.height + ' pixels).');
      }, 'image/png');
    };
    pic.onerror = function () { say('The PNG could not be made in this browser; save the SVG instead.'); };
    var bytes = new TextEncoder().encode(img.text);
    pic.src = 'data:image/svg+xml;base64,' + base64(bytes);
  }

  function base64(bytes) {
    if (typeof bytes.toBase64 === 'function') return bytes.toBase64();
    var bin = '';
    for (var i = 0; i < bytes.length; i++) bin += String.fromCharCode(bytes[i]);
    return btoa(bin);
  }

  document.addEventListener('click', function (e) {
    var b = e.target.closest && e.target.closest('button[data-action="save-svg"], button[data-action="save-png"]');
    if (!b) return;
    var fig = b.closest('figure');
    var svg = fig && fig.querySelector('svg.zplot');
    if (!svg) return;
    var msg = fig.querySelector('[data-role="chart-msg"]');
    saveChart(svg, b.getAttribute('data-action') === 'save-svg' ? 'svg' : 'png', function (t) {
      if (msg) msg.textContent = t;
    });
  });

  // ---- print ----

  // Printing shows every section open: closed details are opened before
  // printing and closed again after (the print style sheet hides the
  // controls). "Print report" buttons print the page.
  // A circuit's text prints whole, as text, in place of its editor (a
  // text box prints only the lines it shows).
  var openedForPrint = [];
  window.addEventListener('beforeprint', function () {
    var ds = document.querySelectorAll('main details:not([open])');
    for (var i = 0; i < ds.length; i++) {
      if (ds[i].closest('.aids, .solve')) continue; // an unrun study or solve has nothing to print
      ds[i].open = true;
      openedForPrint.push(ds[i]);
    }
    var eds = document.querySelectorAll('[data-circuit-editor] [data-role="editor"]');
    for (var j = 0; j < eds.length; j++) {
      var pre = eds[j].parentNode.querySelector('pre.print-text');
      if (!pre) {
        pre = document.createElement('pre');
        pre.className = 'print-text circuit-text';
        eds[j].parentNode.insertBefore(pre, eds[j].nextSibling);
      }
      pre.textContent = eds[j].querySelector('textarea').value;
    }
  });
  window.addEventListener('afterprint', function () {
    for (var i = 0; i < openedForPrint.length; i++) openedForPrint[i].open = false;
    openedForPrint = [];
  });
  document.addEventListener('click', function (e) {
    if (e.target.closest && e.target.closest('button[data-action="print"]')) window.print();
  });

  // chartWidth is the width in CSS pixels at which the charts in results
  // are shown on a phone's narrow column (calc.Form.ChartWidth), or 0
  // where they keep their default drawing.
  var narrow = window.matchMedia ? window.matchMedia('screen and (max-width: 30rem)') : null;
  var FIGURE_FRAME = 18; // a figure.plot's padding and border, side to side (style.css)
  function chartWidth(el) {
    if (!narrow || !narrow.matches) return 0;
    var fig = el.querySelector('figure.plot');
    var box = fig || el;
    var cs = getComputedStyle(box);
    var w = box.clientWidth - parseFloat(cs.paddingLeft) - parseFloat(cs.paddingRight);
    if (!fig) w -= FIGURE_FRAME;
    return Math.max(240, Math.floor(w));
  }

  // onNarrow calls fn when the page crosses the phone width, or is
  // resized while narrow (the charts are then drawn again).
  function onNarrow(fn) {
    if (!narrow) return;
    var last = narrow.matches ? window.innerWidth : 0;
    var check = function () {
      var w = narrow.matches ? window.innerWidth : 0;
      if (w !== last) {
        last = w;
        fn();
      }
    };
    var t = 0;
    window.addEventListener('resize', function () {
      clearTimeout(t);
      t = setTimeout(check, 150);
    });
  }

  // settle calls fn once host (a calculator or the custom page's editor)
  // has no recompute waiting for its frame (host.scheduled) or on its way
  // (host.answered, the latest request answered, behind host.seq, the
  // latest asked); host calls settled(host) after each answer.
  function settle(host, fn) {
    host.waiters = host.waiters || [];
    host.waiters.push(fn);
    settled(host);
  }

  function settled(host) {
    if (host.scheduled || host.answered !== host.seq || !host.waiters) return;
    var ws = host.waiters;
    host.waiters = [];
    for (var i = 0; i < ws.length; i++) ws[i]();
  }

  // ---- work run on request, in slices (aids.js, solve.js) ----

  // runSliced steps an engine run in slices of about SLICE_MS of engine
  // time, one task each, so that the page keeps answering, then renders
  // it. job.run is the run's id (from the engine's start function), job.n
  // the first slice's size; job.engineMs adds up the time spent in the
  // engine. spec names the engine's functions — step(id, n) answering
  // {done, total, finished?} (finished when absent: done ≥ total),
  // panel(id) and release(id) — and max, the largest slice; it gives
  // live() (false once the run is cancelled or superseded),
  // progress(done, total) after each slice, done(out) with the panel's
  // answer in a task of its own, and stopped(reason) when the engine
  // stops the run.
  var SLICE_MS = 8;
  function runSliced(job, spec) {
    function slice() {
      if (!spec.live()) return;
      if (!engine) return spec.stopped('the live engine stopped');
      var t = performance.now();
      call(spec.step, job.run, job.n).then(function (st) {
        var dt = performance.now() - t;
        if (!spec.live()) return;
        job.engineMs += dt;
        if (st.error) return spec.stopped(st.error.message);
        // Aim each slice at SLICE_MS of engine time, changing by at most 2×.
        var f = Math.min(2, Math.max(0.5, SLICE_MS / Math.max(dt, 0.25)));
        job.n = Math.max(1, Math.min(spec.max, Math.round(job.n * f)));
        spec.progress(st.done, st.total);
        var finished = st.finished !== undefined ? st.finished : st.done >= st.total;
        if (!finished) {
          later(slice);
          return;
        }
        call(spec.panel, job.run).then(function (out) {
          call(spec.release, job.run);
          later(function () {
            if (spec.live()) spec.done(out);
          });
        });
      });
    }
    later(slice);
  }

  // runButtons switches a run's Run and Cancel buttons and its progress
  // bar, handing the focus from the button being disabled to the other.
  function runButtons(run, cancel, bar, on) {
    var focus = document.activeElement;
    if (run) run.disabled = on;
    if (cancel) cancel.disabled = !on;
    if (bar) bar.hidden = !on;
    if (on && focus === run && cancel) cancel.focus();
    if (!on && focus === cancel && run) run.focus();
  }

  // staleResults marks on-request results (inside the element results)
  // as out of date, with a note saying so first.
  function staleResults(results, text) {
    if (!results || !results.firstChild || results.classList.contains('is-stale')) return;
    results.classList.add('is-stale');
    var note = document.createElement('p');
    note.className = 'stale-note';
    note.textContent = text;
    results.insertBefore(note, results.firstChild);
  }

  // onRequest gives proto — a section whose engine work runs on request
  // (aids.js's tolerance study, solve.js's search) — the methods both
  // share, build (which makes the section) among them. The section keeps its calculator's form in form, its own
  // settings' element in body and its details element in details, and
  // has collect() (its settings as typed), rendered, values and host.
  // spec names the rest: key (its settings' key), action and state (the
  // attributes of its Run/Cancel buttons and of its state on details),
  // results and msg (the selectors of its results and its notice), holder
  // (what holds a setting and its message), start and first (the run's
  // start function and its first slice's size), step, panel, release and
  // max (for runSliced), noun ("search"), measure ("zport-solve"), again (what
  // an out-of-date result asks for) and done(out), a note for the status.
  function onRequest(proto, spec) {
    // build makes the section in slot, collapsed and hidden until its
    // calculator has a result: details (class cls, id, state "idle"), its
    // summary title and the body (data-role role) with the line explain;
    // opening it calls opened(), and every edit in it edited(el).
    proto.build = function (slot, cls, id, title, role, explain) {
      var d = document.createElement('details');
      d.className = cls;
      d.id = id;
      d.hidden = true;
      d.setAttribute(spec.state, 'idle');
      var s = document.createElement('summary');
      s.textContent = title;
      var body = document.createElement('div');
      body.setAttribute('data-role', role);
      var p = document.createElement('p');
      p.className = 'explain';
      p.textContent = explain;
      body.appendChild(p);
      d.appendChild(s);
      d.appendChild(body);
      slot.appendChild(d);
      this.details = d;
      this.body = body;
      var self = this;
      d.addEventListener('toggle', function () {
        if (d.open) self.opened();
      });
      body.addEventListener('input', function (e) { self.edited(e.target); });
      body.addEventListener('change', function (e) { self.edited(e.target); });
      return d;
    };
    // circuitKey changes when the circuit or its spot frequency does.
    proto.circuitKey = function () {
      var f = this.form;
      if (!f) return '';
      return JSON.stringify([f.topology, f.params, f.circuit, f.reference, f.ports, f.gain, f.frequency]);
    };
    // current is the settings: as typed, or as last set.
    proto.current = function () {
      return this.rendered ? this.collect() : this.values || {};
    };
    // notify tells the calculator that the settings changed.
    proto.notify = function () {
      this.values = this.collect();
      this.host.dispatchEvent(new CustomEvent('zport:settings', { detail: { key: spec.key, values: this.values } }));
    };
    proto.say = function (text) {
      var s = this.q('[data-role="run-status"]');
      if (s) s.textContent = text;
    };
    proto.clearMessage = function (el) {
      el.removeAttribute('aria-invalid');
      var holder = el.closest(spec.holder);
      var msg = holder && holder.querySelector('[data-role="msg"]');
      if (msg) msg.textContent = '';
    };
    proto.clearMessages = function () {
      clearFieldErrors(this.body);
      var n = this.q(spec.msg);
      if (n) {
        n.hidden = true;
        n.textContent = '';
      }
    };
    proto.setRunning = function (on) {
      runButtons(this.q('[' + spec.action + '="run"]'), this.q('[' + spec.action + '="cancel"]'), this.q('[data-role="progress"]'), on);
    };
    proto.setState = function (state) {
      this.details.setAttribute(spec.state, state);
    };
    // begin starts a run (spec.start, its first slice spec.first units of
    // work), running from the click on: the engine's first answer comes
    // later. A setting the engine refuses is marked (showError).
    proto.begin = function () {
      var job = { t0: performance.now(), engineMs: 0, n: spec.first, key: this.circuitKey() };
      this.job = job;
      this.setRunning(true);
      var bar = this.q('[data-role="progress"]');
      if (bar) bar.value = 0;
      this.setState('running');
      var self = this;
      this.call(spec.start).then(function (started) {
        if (self.job !== job) return;
        if (started.error) {
          self.job = null;
          self.setRunning(false);
          self.showError(started.error);
          self.say('Not run: see the marked setting.');
          self.setState('error');
          return;
        }
        job.run = started.run;
        job.total = started.total;
        self.progress(0, started.total);
        self.slice(job);
      });
    };
    proto.slice = function (job) {
      var self = this;
      runSliced(job, {
        step: spec.step, panel: spec.panel, release: spec.release, max: spec.max,
        live: function () { return self.job === job; },
        progress: function (done, total) { self.progress(done, total); },
        done: function (out) { self.show(job, out); },
        stopped: function (why) { self.stop('The ' + spec.noun + ' stopped: ' + why + '.'); }
      });
    };
    proto.show = function (job, out) {
      this.job = null;
      this.setRunning(false);
      if (out.error) {
        this.setState('error');
        return this.say('The results could not be shown: ' + out.error.message);
      }
      var results = this.q(spec.results);
      insert(results, out.html);
      results.classList.remove('is-stale');
      this.resultKey = job.key;
      if (job.key !== this.circuitKey()) this.markStale();
      void results.offsetHeight; // lay the panel out inside the measure
      var t1 = performance.now();
      performance.measure(spec.measure, { start: job.t0, end: t1 });
      performance.measure(spec.measure + '-engine', { start: job.t0, duration: job.engineMs });
      this.setState('done');
      this.say('Done in ' + Math.round(t1 - job.t0) + ' ms' + spec.done(out) + '.');
    };
    proto.stop = function (text) {
      var job = this.job;
      if (job && job.run) call(spec.release, job.run);
      this.job = null;
      this.setRunning(false);
      this.setState('cancelled');
      this.say(text);
    };
    proto.markStale = function () {
      staleResults(this.q(spec.results), 'Out of date: these results are for earlier values of the circuit. ' + spec.again);
    };
  }

  // copyResults copies a result's Markdown followed by its share link.
  function copyResults(host, markdown, link) {
    copyText(host, markdown + '\nLink to these results: ' + link + '\n', 'Results copied as Markdown tables, with the link.');
  }

  // recomputed closes the "zport-recompute" measure begun at t0 once the
  // new panel in results is laid out, and marks the first live result.
  function recomputed(results, t0) {
    void results.offsetHeight; // lay the new panel out inside the measure
    performance.measure('zport-recompute', { start: t0, end: performance.now() });
    if (!firstLive) {
      firstLive = true;
      performance.mark('zport-first-live');
    }
  }

  globalThis.zportSite = {
    single: single,
    onEngine: function (cb) {
      if (engine) cb();
      else readyCallbacks.push(cb);
    },
    ready: ready,
    call: call,
    insert: insert,
    later: later,
    cssName: cssName,
    markStale: markStale,
    settings: settings,
    fillSettings: fillSettings,
    showFieldError: showFieldError,
    clearFieldErrors: clearFieldErrors,
    address: address,
    ownHash: ownHash,
    readDraft: readDraft,
    keepDraft: keepDraft,
    offerRestore: offerRestore,
    dropRestore: dropRestore,
    copyText: copyText,
    copyResults: copyResults,
    saveFile: saveFile,
    PinBar: PinBar,
    settle: settle,
    settled: settled,
    onRequest: onRequest,
    chartWidth: chartWidth,
    onNarrow: onNarrow,
    compress: compress,
    decompress: decompress,
    hover: hover,
    recomputed: recomputed,
    fragment: fragmentState,
    // currentSection is the page shown: the document, or in the
    // single-file export the section chosen by p=.
    currentSection: currentSection,
    // page is the name of the page shown: in the single-file export, the
    // section chosen by p=; otherwise the file's own name.
    page: function () {
      if (single) return hashPage() || 'index';
      return (location.pathname.split('/').pop() || 'index.html').replace(/\.html$/, '');
    }
  };

  // ---- start ----

  // whenParsed resolves to what p resolves to once the document is parsed
  // (DOMContentLoaded), so that every page script after this one listens
  // before a calculator announces its first result and its link's
  // settings. In the single file the scripts are inline, and on a busy
  // machine the parser can yield between two of them long enough for the
  // engine to start.
  function whenParsed(p) {
    if (document.readyState === 'complete') return p;
    var parsed = new Promise(function (resolve) {
      document.addEventListener('DOMContentLoaded', resolve, { once: true });
      window.addEventListener('load', resolve, { once: true });
    });
    return Promise.all([p, parsed]).then(function (r) { return r[0]; });
  }

  function start() {
    showPage();
    window.addEventListener('hashchange', showPage);
    if (!document.querySelector('[data-calculator], [data-circuit-editor]')) return;
    lock(false);
    setStatus('loading', statusText.loading);
    whenParsed(loadEngine()).then(function (w) {
      engine = w;
      window.addEventListener('pagehide', function (e) {
        flushAddress();
        saveDrafts();
        if (!e.persisted && engine) {
          engine.terminate();
          engine = null;
        }
      });
      performance.mark('zport-engine-ready');
      var cbs = readyCallbacks;
      readyCallbacks = [];
      for (var n = 0; n < cbs.length; n++) cbs[n]();
      goLive();
    }, function (err) {
      lock(true);
      setStatus('failed', 'The live engine could not start: ' + (err && err.message ? err.message : String(err)) +
        '. The results shown were computed when the page was built; the values cannot be edited here.');
    });
  }

  start();
})();
