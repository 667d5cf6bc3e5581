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
// module gzip-compressed and base64-encoded, because browsers will not
// fetch or stream-compile a .wasm file from file://. It is decoded,
// inflated with DecompressionStream and compiled with instantiateStreaming
// from a synthetic Response. wasm_exec.js (Go's own) supplies Go. The
// engine registers the global object zport (its functions are listed in
// zport/wasm). The root element's data-engine says "loading", "ready" or
// "failed"; a failure's reason is shown in every calculator.
//
// zportSite, the shared part:
//   onEngine(cb)       runs cb() once the engine is ready
//   call(name, ...)    one engine call: object arguments go as JSON, the
//                      answer is parsed; a promise of the answer object
//                      (an unreadable answer becomes {error})
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
//   copyText, saveFile, compress, decompress, hover, recomputed,
//   fragment(), page(), single, cssName
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
// Performance marks for the benchmark (go run ./build bench):
// "zport-engine-ready" when the engine has started, "zport-first-live" when
// the first panel computed by it is on the page, a measure
// "zport-recompute" for every recompute (engine call, insertion, layout)
// and "zport-engine-call" for every engine call.
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
        lock(true);
        setStatus('failed', 'The live engine has stopped; reload the page to start it again.');
      });
      window.addEventListener('pagehide', function (e) {
        flushAddress();
        saveDrafts();
        if (!e.persisted && engine) {
          var z = engine;
          engine = null;
          z.exit();
        }
      });
      return globalThis.zport;
    });
  }

  // call runs one engine function: object arguments are sent as JSON,
  // strings and numbers as they are. The answer is parsed; an unreadable
  // one, or a stopped engine, gives {error: {message}}. It returns a
  // promise, so that callers need not change if the engine moves off the
  // main thread.
  function call(name) {
    var args = Array.prototype.slice.call(arguments, 1).map(function (a) {
      return a !== null && typeof a === 'object' ? JSON.stringify(a) : a;
    });
    return new Promise(function (resolve) {
      if (!engine || typeof engine[name] !== 'function') {
        resolve({ error: { message: 'the live engine is not running' } });
        return;
      }
      var t0 = performance.now();
      var text = engine[name].apply(engine, args);
      performance.measure('zport-engine-call', { start: t0, end: performance.now() });
      try {
        resolve(JSON.parse(text));
      } catch (e) {
        resolve({ error: { message: 'the engine gave an unreadable answer' } });
      }
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
    readDraft: readDraft,
    keepDraft: keepDraft,
    offerRestore: offerRestore,
    dropRestore: dropRestore,
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
    lock(false);
    setStatus('loading', statusText.loading);
    loadEngine().then(function (z) {
      engine = z;
      performance.mark('zport-engine-ready');
      setStatus('ready', statusText.ready);
      var cbs = readyCallbacks;
      readyCallbacks = [];
      for (var n = 0; n < cbs.length; n++) cbs[n]();
    }, function (err) {
      lock(true);
      setStatus('failed', 'The live engine could not start: ' + (err && err.message ? err.message : String(err)) +
        '. The results shown were computed when the page was built; the values cannot be edited here.');
    });
  }

  start();
})();
