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
//   copyText, saveFile, compress, decompress, hover, recomputed,
//   fragment(), page(), single, cssName
//
// URL fragment: a calculator's settings live in the fragment, written by
// the engine (package zport/site/calc), e.g.
//   #R1=10k&R2=47k&…&f=1k&from=10&to=100M&points=400
// In the single-file export, p=NAME comes first and selects the page.
// A fragment without "=" is an ordinary in-page anchor and is left alone.
//
// Performance marks for the benchmarks (go run ./build/bench and
// ./build/bench/ratios): "zport-engine-ready" when the engine has started,
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
    }
  }

  // ---- shared helpers ----

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
  }
  function ownHash() {
    return location.hash === writtenHash || location.hash === pendingHash;
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
    ready: function () { return !!engine; },
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
    copyText: copyText,
    saveFile: saveFile,
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

  function start() {
    showPage();
    window.addEventListener('hashchange', showPage);
    if (!document.querySelector('[data-calculator], [data-circuit-editor]')) return;
    setStatus('loading', statusText.loading);
    loadEngine().then(function (w) {
      engine = w;
      window.addEventListener('pagehide', function (e) {
        flushAddress();
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
      setStatus('failed', 'The live engine could not start: ' + (err && err.message ? err.message : String(err)) +
        '. The results shown were computed when the page was built; the values cannot be edited here.');
    });
  }

  start();
})();
