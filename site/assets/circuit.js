// circuit.js: the custom-circuit page (custom.html, or the "custom"
// section of the single-file export). Plain JavaScript, a classic script
// run after zport.js, whose engine and helpers it uses through
// globalThis.zportSite. Like zport.js it inserts no user text as HTML:
// the circuit text, names and messages go in through textContent and
// value, and the only markup inserted is the results panel rendered (and
// escaped) by the engine in Go.
//
// On every edit, once per animation frame at most (never queued), one
// engine call (zport.circuit, calc.ComputeCircuit) parses the text once,
// lists what it offers the pickers or every error with its line and
// column, fits the pickers' choices to the text, and analyzes and renders
// the panel. Errors are marked in the gutter at their line, underlined at
// their column and listed; the last good panel stays, marked stale. The
// engine keeps the sweep of one edit within a time budget, shortening it
// (the page says so and offers the whole sweep once), and a circuit whose
// recompute still takes long is recomputed at most every few hundred
// milliseconds, so typing stays responsive.
//
// The editor's element gets data-live="true" once it has read the address
// and analyzed, data-recomputes counts the recomputes and
// data-sweep-points says how many sweep points the panel shows (for tests
// and the benchmark, with the performance measures "zport-engine-call"
// and "zport-recompute").
//
// URL fragment: c=<the text, deflate-raw, base64url> followed by the
// settings the engine writes (calc.Form.CircuitState), e.g.
//   #c=…&ref=U1&port=out&src=Vin&out=out&f=100k&from=10&to=100M&points=400
// The same encoding is used by the stage pages' "open as circuit" links.
// The engine reads the settings by the site's one rule for links (see
// zport/site/calc): what it cannot use is left out, the circuit's default
// in its place, and its notice says which and why. A c= that cannot be
// read (or is given twice) leaves the page's own circuit in place.
//
// The text, valid or not, and the choices are kept as a draft (zport.js):
// a reload brings them back. Anything that replaces the user's own text —
// a link, an example, a file — keeps it, with a button that restores it.
//
// Input limits: text is refused before the textarea takes it when it would
// go past MAX_TEXT characters, however it arrives (beforeinput covers
// typing, pasting, dropping, input methods, dictation and spelling fixes;
// paste and drop are caught earlier still, and a dropped file is opened as
// the Open button would). An insert no event could refuse (an input
// method's composition) is undone. The work an edit causes runs once per
// animation frame, so an insert that the browser delivers line by line
// costs one update, not one per line.
//
// Pins (zportSite.PinBar) keep the text and choices as they are; a pin
// whose text differs from the current one adds pinN.c=<its text, encoded
// as c is> to the link. A paste over the whole text is a new circuit: the
// example's description goes and every choice is made afresh.
//
// The design aids (aids.js) follow the editor through the same events as
// a stage calculator's: zport:computed, zport:link and zport:settings.
(function () {
  'use strict';

  var site = globalThis.zportSite;
  var el = document.querySelector('[data-circuit-editor]');
  if (!site || !el) return;

  var MAX_URL = Number(el.getAttribute('data-max-url')) || 2000;
  var MAX_TEXT = Number(el.getAttribute('data-max-text')) || 262144;
  var MAX_LISTED = 60; // errors listed and marked (the parser stops after 50)
  var SLOW_MS = 120; // a recompute slower than this throttles the next ones
  var BUDGET_MS = 300; // the sweep of one recompute; the engine shortens it to fit
  var GUTTER_SPARE = 40; // line numbers drawn beyond the visible ones
  var BULK_LINES = 20; // an insertText of more lines goes in at once (see guard)

  function role(r) { return el.querySelector('[data-role="' + r + '"]'); }

  // shown reports whether the editor's page is the one on screen: always
  // in the multi-file site; in the single-file export only while its
  // section is chosen, so that it never reads or writes another page's
  // address.
  function shown() {
    return !site.single || site.page() === 'custom';
  }

  function Editor() {
    this.el = el;
    this.id = el.id;
    this.ta = role('text');
    this.numbers = role('numbers');
    this.gutter = role('gutter');
    this.gutterInner = role('gutter-inner');
    this.cutNotice = role('cut-notice');
    this.cutText = role('cut-text');
    this.full = false; // the next recompute runs the whole sweep, whatever it costs
    this.window = '';
    this.marks = role('marks');
    this.overlay = role('overlay');
    this.underlines = role('underlines');
    this.problems = role('problems');
    this.problemsHead = role('problems-head');
    this.errorList = role('errors');
    this.form = role('form');
    this.refSel = role('reference');
    this.portBox = role('ports');
    this.nodePort = role('node-port');
    this.srcSel = role('gain-source');
    this.outSel = role('gain-output');
    this.minusSel = role('gain-minus');
    this.exampleSel = role('example');
    this.results = role('results');
    this.notice = role('notice');
    this.actionMsg = role('action-msg');
    this.fileMsg = role('file-msg');
    this.linkNotice = role('link-notice');
    this.linkNoticeText = role('link-notice-text');
    this.share = el.querySelector('[data-action="share"]');
    this.fileInput = role('file');
    this.examples = readExamples();
    this.described = this.exampleSel.value; // the example whose description shows
    this.last = null; // the last good Output
    this.scheduled = false;
    this.lastCost = 0;
    this.lineCount = -1;
    this.signature = {};
    this.preset = null; // an example's settings, for the next recompute
    this.fresh = false; // the text came from a link or a file
    this.saved = null; // the user's own text, kept when something replaced it
    this.accepted = this.ta.value; // the text as of the last edit within the limit
    this.editFrame = 0;
    this.linkSeq = 0;
    this.seq = 0; // the latest recompute; an older answer is dropped
    this.answered = 0; // the latest recompute answered (zportSite.settle)
    this.outside = {}; // analyses' settings kept outside the form (aids.js)
    this.bootSeq = 0;
    this.metrics = null;
    this.pasted = false; // the last input was a paste over the whole text
    this.pinTexts = null; // a link's pins' texts by slot, for its first recompute
    this.pins = new site.PinBar(this);
    this.wire();
    this.updateGutter();
  }

  // readExamples reads the examples the page carries in its template.
  function readExamples() {
    var t = role('examples');
    var list = {};
    if (!t) return list;
    var items = t.content.querySelectorAll('[data-example]');
    for (var i = 0; i < items.length; i++) {
      var d = items[i];
      list[d.getAttribute('data-example')] = {
        id: d.getAttribute('data-example'),
        title: d.getAttribute('data-title'),
        text: d.querySelector('[data-role="text"]').textContent,
        scenario: d.querySelector('[data-role="scenario"]').textContent,
        look: d.querySelector('[data-role="look"]').textContent,
        preset: {
          reference: d.getAttribute('data-reference'),
          ports: (d.getAttribute('data-ports') || '').split(' ').filter(Boolean),
          source: d.getAttribute('data-source') || '',
          output: d.getAttribute('data-output') || '',
          frequency: d.getAttribute('data-frequency'),
          sweep: { from: d.getAttribute('data-from'), to: d.getAttribute('data-to'), points: d.getAttribute('data-points') }
        }
      };
    }
    return list;
  }

  Editor.prototype.wire = function () {
    var self = this;
    this.ta.addEventListener('input', function () {
      if (self.pasted) {
        // A whole new text: what the pickers showed no longer applies, and
        // nor does the example's description.
        self.pasted = false;
        self.fresh = true;
        self.markExample(true);
      }
      self.afterEdit();
      self.schedule();
    });
    this.ta.addEventListener('scroll', function () { self.syncScroll(); });
    this.ta.addEventListener('beforeinput', function (e) { self.guard(e); });
    this.ta.addEventListener('paste', function (e) {
      var add = e.clipboardData ? e.clipboardData.getData('text/plain') : '';
      if (self.tooLong(add.length, true, 'pasted')) {
        e.preventDefault();
        return;
      }
      // A paste over the whole text is a new circuit (see the input
      // listener).
      var keep = self.ta.value.length - (self.ta.selectionEnd - self.ta.selectionStart);
      self.pasted = keep === 0 && add.trim() !== '';
    });
    this.ta.addEventListener('dragover', function (e) {
      if (hasFiles(e)) e.preventDefault(); // so that a file can be dropped
    });
    this.ta.addEventListener('drop', function (e) {
      if (hasFiles(e)) {
        // A file dropped on the text opens as the Open button would (the
        // browser would otherwise leave the page for the file).
        e.preventDefault();
        self.openFile(e.dataTransfer.files[0]);
        return;
      }
      var add = e.dataTransfer ? e.dataTransfer.getData('text/plain') : '';
      if (self.tooLong(add.length, false, 'dropped')) e.preventDefault();
    });
    el.querySelector('[data-action="full-sweep"]').addEventListener('click', function () {
      self.full = true;
      self.say('Computing the whole sweep…');
      // Let the message paint before the page is busy.
      setTimeout(function () { self.schedule(); }, 30);
    });
    this.form.addEventListener('submit', function (e) {
      e.preventDefault();
      self.schedule();
    });
    var changed = function () {
      self.keepDraft();
      self.schedule();
    };
    this.form.addEventListener('input', changed);
    this.form.addEventListener('change', changed);
    this.exampleSel.addEventListener('change', function () {
      var id = self.exampleSel.value;
      if (id) self.loadExample(id);
      else if (self.saved !== null) self.restore();
      else self.markExample();
    });
    this.errorList.addEventListener('click', function (e) {
      var b = e.target.closest('button[data-line]');
      if (b) self.jump(Number(b.getAttribute('data-line')), Number(b.getAttribute('data-column')));
    });
    el.querySelector('[data-action="copy"]').addEventListener('click', function () { self.copy(); });
    el.querySelector('[data-action="csv"]').addEventListener('click', function () { self.download(); });
    this.share.addEventListener('click', function (e) {
      e.preventDefault();
      self.copyLink();
    });
    el.querySelector('[data-action="open-file"]').addEventListener('click', function () { self.fileInput.click(); });
    var saves = el.querySelectorAll('[data-action="save-file"]');
    for (var i = 0; i < saves.length; i++) saves[i].addEventListener('click', function () { self.saveText(); });
    this.fileInput.addEventListener('change', function () {
      var file = self.fileInput.files && self.fileInput.files[0];
      self.fileInput.value = '';
      if (file) self.openFile(file);
    });
    el.addEventListener('zport:settings', function (e) {
      if (!e.detail || !e.detail.key) return;
      self.outside[e.detail.key] = e.detail.values || {};
      changed();
    });
    site.onNarrow(function () { self.schedule(); });
    hashWatch(this);
  };

  function hasFiles(e) {
    var types = e.dataTransfer ? e.dataTransfer.types : null;
    return !!types && Array.prototype.indexOf.call(types, 'Files') >= 0;
  }

  // ---- input limits ----

  // guard refuses an insert that would take the text past MAX_TEXT, before
  // the textarea takes it: beforeinput comes for every way text arrives.
  Editor.prototype.guard = function (e) {
    var type = e.inputType || '';
    if (type.indexOf('insert') !== 0 || !e.cancelable) return;
    var add = typeof e.data === 'string' ? e.data.length : e.dataTransfer ? e.dataTransfer.getData('text/plain').length : 0;
    // A drop inserts at the drop point; the rest replace the selection.
    if (this.tooLong(add, type !== 'insertFromDrop', 'inserted')) {
      e.preventDefault();
      return;
    }
    // Chromium puts an inserted text in line by line (an input method's,
    // an emoji keyboard's, a script's insertText), each line a whole edit
    // of the textarea: a few thousand lines took minutes. Many lines go
    // in at once instead, as one edit (which the browser's undo does not
    // record).
    if (type === 'insertText' && typeof e.data === 'string' && countLines(e.data) > BULK_LINES) {
      e.preventDefault();
      this.ta.setRangeText(e.data, this.ta.selectionStart, this.ta.selectionEnd, 'end');
      this.ta.dispatchEvent(new InputEvent('input', { inputType: 'insertText', bubbles: true }));
    }
  };

  // tooLong reports whether adding add characters (over the selection, if
  // replacing) would take the text past the limit, and if so says so.
  Editor.prototype.tooLong = function (add, replacing, verb) {
    var keep = this.ta.value.length - (replacing ? this.ta.selectionEnd - this.ta.selectionStart : 0);
    if (add + keep <= MAX_TEXT) return false;
    this.fileMsg.textContent = 'Not ' + verb + ': the text would be ' + Math.round((add + keep) / 1024) +
      ' KB, and circuit text is limited to ' + Math.round(MAX_TEXT / 1024) + ' KB.';
    return true;
  };

  // afterEdit brings the gutter, the example list and the draft up to
  // date once per animation frame, however many input events an insert
  // fired (the browser may deliver a long paste line by line). Text past
  // the limit that no event could refuse is undone.
  Editor.prototype.afterEdit = function () {
    if (this.editFrame) return;
    var self = this;
    this.editFrame = requestAnimationFrame(function () {
      self.editFrame = 0;
      if (self.ta.value.length > MAX_TEXT) {
        var over = self.ta.value.length;
        self.setText(self.accepted);
        self.fileMsg.textContent = 'Undone: the text became ' + Math.round(over / 1024) +
          ' KB, and circuit text is limited to ' + Math.round(MAX_TEXT / 1024) + ' KB.';
        self.schedule();
      }
      self.accepted = self.ta.value;
      self.updateGutter();
      self.syncScroll();
      self.markExample();
      self.keepDraft();
    });
  };

  // ---- the editor: gutter, scrolling, error marks ----

  function countLines(s) {
    var n = 1;
    for (var i = s.indexOf('\n'); i >= 0; i = s.indexOf('\n', i + 1)) n++;
    return n;
  }

  // updateGutter sizes the gutter for the text's lines. Only the numbers
  // near the visible lines are drawn (a pasted file can have tens of
  // thousands of lines, which would take the page a long time to lay out).
  Editor.prototype.updateGutter = function () {
    var n = countLines(this.ta.value);
    if (n === this.lineCount) return;
    this.lineCount = n;
    var m = this.measure();
    this.gutterInner.style.height = (m.top + n * m.lh + m.top) + 'px';
    this.gutter.style.width = (Math.max(3, String(n).length) + 2.2) + 'ch';
    this.drawNumbers();
  };

  Editor.prototype.drawNumbers = function () {
    var m = this.measure();
    var n = this.lineCount;
    var seen = Math.max(this.ta.clientHeight, 30 * m.lh);
    var first = Math.max(0, Math.floor((this.ta.scrollTop - m.top) / m.lh) - GUTTER_SPARE);
    var last = Math.min(n, Math.ceil((this.ta.scrollTop + seen) / m.lh) + GUTTER_SPARE);
    var key = first + ':' + last;
    if (key === this.window) return;
    this.window = key;
    var parts = [];
    for (var i = first; i < last; i++) parts.push(i + 1);
    this.numbers.textContent = parts.join('\n');
    this.numbers.style.top = (m.top + first * m.lh) + 'px';
  };

  Editor.prototype.syncScroll = function () {
    this.gutter.scrollTop = this.ta.scrollTop;
    this.drawNumbers();
    this.underlines.style.transform = 'translate(' + (-this.ta.scrollLeft) + 'px,' + (-this.ta.scrollTop) + 'px)';
  };

  // measure reads the textarea's line height, padding and character width
  // (the font is monospaced), once it is laid out.
  Editor.prototype.measure = function () {
    if (this.metrics && this.metrics.ch > 0) return this.metrics;
    var cs = getComputedStyle(this.ta);
    var probe = document.createElement('span');
    probe.className = 'editor-probe';
    probe.textContent = 'MMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMMM';
    this.overlay.appendChild(probe);
    var ch = probe.getBoundingClientRect().width / 100;
    probe.remove();
    var lh = parseFloat(cs.lineHeight);
    this.metrics = {
      lh: isFinite(lh) ? lh : 1.45 * parseFloat(cs.fontSize),
      top: parseFloat(cs.paddingTop) + parseFloat(cs.borderTopWidth),
      left: parseFloat(cs.paddingLeft) + parseFloat(cs.borderLeftWidth),
      ch: ch,
      tab: parseInt(cs.tabSize, 10) || 4
    };
    return this.metrics;
  };

  // lineStart returns the offset in the text of the start of line n.
  function lineStart(text, n) {
    var off = 0;
    for (var i = 1; i < n && off >= 0; i++) {
      off = text.indexOf('\n', off);
      if (off >= 0) off++;
    }
    return off < 0 ? text.length : off;
  }

  // offsetOf converts a line and column in characters (code points, as
  // the engine counts) into an offset in the JavaScript string.
  function offsetOf(text, line, col) {
    var off = lineStart(text, line);
    for (var c = 1; c < col && off < text.length && text[off] !== '\n'; c++) {
      var code = text.charCodeAt(off);
      off += code >= 0xd800 && code < 0xdc00 ? 2 : 1;
    }
    return off;
  }

  Editor.prototype.showProblems = function (errs, more) {
    this.marks.replaceChildren();
    this.underlines.replaceChildren();
    this.errorList.replaceChildren();
    this.ta.removeAttribute('aria-invalid');
    if (!errs.length) {
      this.problems.hidden = true;
      return;
    }
    this.problems.hidden = false;
    var located = errs.filter(function (e) { return e.line > 0; });
    this.problemsHead.textContent = located.length ? (errs.length === 1 ? 'One problem in the text' : errs.length + ' problems in the text') : 'The circuit cannot be analyzed';
    if (located.length) this.ta.setAttribute('aria-invalid', 'true');
    var m = this.measure();
    var text = this.ta.value;
    var marked = {};
    for (var i = 0; i < errs.length && i < MAX_LISTED; i++) {
      var e = errs[i];
      var li = document.createElement('li');
      if (e.line > 0) {
        var b = document.createElement('button');
        b.type = 'button';
        b.className = 'err-place';
        b.setAttribute('data-line', e.line);
        b.setAttribute('data-column', e.column);
        b.textContent = 'line ' + e.line + ', column ' + e.column;
        li.appendChild(b);
        li.appendChild(document.createTextNode(' ' + e.message));
        li.setAttribute('data-line', e.line);
        if (!marked[e.line]) {
          marked[e.line] = true;
          this.gutterMark(e, m);
        }
        this.underline(text, e, m);
      } else {
        li.textContent = (e.param ? e.param + ': ' : '') + e.message;
      }
      this.errorList.appendChild(li);
    }
    if (more) {
      var extra = document.createElement('li');
      extra.className = 'more';
      extra.textContent = more;
      this.errorList.appendChild(extra);
    }
  };

  // gutterMark marks an error's line in the gutter.
  Editor.prototype.gutterMark = function (e, m) {
    var mk = document.createElement('div');
    mk.className = 'gutter-mark';
    mk.setAttribute('data-line', e.line);
    mk.title = 'line ' + e.line + ': ' + e.message;
    mk.style.top = (m.top + (e.line - 1) * m.lh) + 'px';
    mk.style.height = m.lh + 'px';
    this.marks.appendChild(mk);
  };

  // markParts marks the lines of the parts an engine error names (a loop
  // of voltage sources, a node nothing ties down): the part's name is the
  // second word of its line.
  Editor.prototype.markParts = function (names, message) {
    if (!names || !names.length) return;
    var want = {};
    for (var i = 0; i < names.length; i++) want[names[i]] = true;
    var m = this.measure();
    var text = this.ta.value;
    var lines = text.split('\n');
    for (var n = 0; n < lines.length; n++) {
      var words = lines[n].replace(/#.*/, '').trim().split(/\s+/);
      if (words.length < 2 || !want[words[1]]) continue;
      var e = { line: n + 1, column: lines[n].indexOf(words[1]) + 1, message: message };
      this.gutterMark(e, m);
      this.underline(text, e, m);
    }
  };

  // underline draws a mark under the token the error points at.
  Editor.prototype.underline = function (text, e, m) {
    if (!(m.ch > 0)) return;
    var start = lineStart(text, e.line);
    var at = offsetOf(text, e.line, e.column);
    var end = at;
    while (end < text.length && !/[\s#]/.test(text[end])) end++;
    var visual = 0;
    for (var i = start; i < at; i++) visual = text[i] === '\t' ? (Math.floor(visual / m.tab) + 1) * m.tab : visual + 1;
    var u = document.createElement('div');
    u.className = 'err-underline';
    u.setAttribute('data-line', e.line);
    u.setAttribute('data-column', e.column);
    u.style.top = (m.top + (e.line - 1) * m.lh) + 'px';
    u.style.height = m.lh + 'px';
    u.style.left = (m.left + visual * m.ch) + 'px';
    u.style.width = (Math.max(1, Math.min(end - at, 200)) * m.ch) + 'px';
    this.underlines.appendChild(u);
  };

  // jump puts the caret at a line and column and scrolls it into view.
  Editor.prototype.jump = function (line, col) {
    var text = this.ta.value;
    var at = offsetOf(text, line, col);
    var end = at;
    while (end < text.length && !/[\s#]/.test(text[end])) end++;
    this.ta.focus();
    this.ta.setSelectionRange(at, end);
    var m = this.measure();
    var y = m.top + (line - 1) * m.lh;
    if (y < this.ta.scrollTop || y + m.lh > this.ta.scrollTop + this.ta.clientHeight) {
      this.ta.scrollTop = Math.max(0, y - this.ta.clientHeight / 2);
    }
    this.syncScroll();
  };

  // ---- pickers ----

  function option(value, label, selected) {
    var o = document.createElement('option');
    o.value = value;
    o.textContent = label;
    if (selected) o.selected = true;
    return o;
  }

  // fillSelect rebuilds a select's options when they changed, keeping the
  // choice want when it is still there, else first.
  Editor.prototype.fillSelect = function (sel, key, items, want) {
    var sig = JSON.stringify(items);
    if (this.signature[key] !== sig) {
      this.signature[key] = sig;
      var opts = [];
      for (var i = 0; i < items.length; i++) opts.push(option(items[i][0], items[i][1], false));
      sel.replaceChildren.apply(sel, opts);
    }
    var found = false;
    for (var j = 0; j < sel.options.length; j++) {
      if (sel.options[j].value === want) {
        sel.selectedIndex = j;
        found = true;
        break;
      }
    }
    if (!found && sel.options.length) sel.selectedIndex = 0;
  };

  Editor.prototype.portBoxes = function () {
    return this.portBox.querySelectorAll('input[type="checkbox"]');
  };

  // offered is what the pickers show, for the engine to tell what an edit
  // added (calc.Offered).
  Editor.prototype.offered = function () {
    var refs = [], ports = [], sources = [];
    for (var i = 0; i < this.refSel.options.length; i++) if (this.refSel.options[i].value) refs.push(this.refSel.options[i].value);
    var boxes = this.portBoxes();
    for (var j = 0; j < boxes.length; j++) ports.push(boxes[j].value);
    for (var k = 0; k < this.srcSel.options.length; k++) if (this.srcSel.options[k].value) sources.push(this.srcSel.options[k].value);
    return { references: refs, ports: ports, sources: sources };
  };

  // updatePickers fills the pickers from the engine's inspection of the
  // text and sets them, and the fields, to the form it fitted to the text.
  Editor.prototype.updatePickers = function (ins, form) {
    var refs = ins.references.map(function (r) { return [r.name, r.name + ' (' + r.kind + ', line ' + r.line + ')']; });
    if (!refs.length) refs = [['', 'none: direct solution only (Blackman’s terms need a controlled source or an opamp)']];
    this.fillSelect(this.refSel, 'ref', refs, form.reference || '');

    var want = form.ports || [];
    var names = ins.ports.map(function (x) { return x.name; });
    var sig = JSON.stringify(ins.ports);
    if (this.signature.ports !== sig) {
      this.signature.ports = sig;
      var labels = [];
      for (var i = 0; i < ins.ports.length; i++) {
        var pt = ins.ports[i];
        var lab = document.createElement('label');
        lab.className = 'check';
        var cb = document.createElement('input');
        cb.type = 'checkbox';
        cb.name = 'port';
        cb.value = pt.name;
        lab.appendChild(cb);
        lab.appendChild(document.createTextNode(' ' + pt.name + ' (' + pt.a + ' – ' + pt.b + ')'));
        labels.push(lab);
      }
      if (!labels.length) {
        var none = document.createElement('span');
        none.className = 'hint';
        none.textContent = 'no port lines in the text';
        labels.push(none);
      }
      this.portBox.replaceChildren.apply(this.portBox, labels);
    }
    var boxes = this.portBoxes();
    for (var b = 0; b < boxes.length; b++) boxes[b].checked = want.indexOf(boxes[b].value) >= 0;
    var nodeWant = '';
    for (var w = 0; w < want.length; w++) if (names.indexOf(want[w]) < 0 && !nodeWant) nodeWant = want[w];
    var nodes = ins.nodes.map(function (n) { return [n, n]; });
    this.fillSelect(this.nodePort, 'nodeport', [['', 'none']].concat(nodes), nodeWant);

    var srcs = [['', 'none']].concat(ins.sources.map(function (s) { return [s.name, s.name + ' (' + s.kind + ')']; }));
    var pair = (form.gain ? form.gain.output : '').split(',');
    this.fillSelect(this.srcSel, 'src', srcs, form.gain ? form.gain.source : '');
    this.fillSelect(this.outSel, 'out', nodes, pair[0]);
    this.fillSelect(this.minusSel, 'minus', [['gnd', 'gnd']].concat(nodes), pair[1] || 'gnd');
    this.outSel.disabled = this.minusSel.disabled = !this.srcSel.value;

    this.setField('frequency', form.frequency);
    if (form.sweep) {
      this.setField('sweep.from', form.sweep.from);
      this.setField('sweep.to', form.sweep.to);
      this.setField('sweep.points', form.sweep.points);
    }
  };

  Editor.prototype.setField = function (name, v) {
    var input = this.form.querySelector('input[name="' + name + '"]');
    // Only when it differs: a field being typed in keeps its caret.
    if (input && typeof v === 'string' && input.value !== v) input.value = v;
  };

  Editor.prototype.field = function (name) {
    var input = this.form.querySelector('input[name="' + name + '"]');
    return input ? input.value : '';
  };

  // values is the form as the engine's calc.Form.
  Editor.prototype.values = function () {
    var ports = [];
    var boxes = this.portBoxes();
    for (var i = 0; i < boxes.length; i++) if (boxes[i].checked) ports.push(boxes[i].value);
    if (this.nodePort.value && ports.indexOf(this.nodePort.value) < 0) ports.push(this.nodePort.value);
    var f = {
      circuit: this.ta.value,
      reference: this.refSel.value,
      ports: ports,
      frequency: this.field('frequency'),
      sweep: { from: this.field('sweep.from'), to: this.field('sweep.to'), points: this.field('sweep.points') },
      settings: Object.assign(site.settings(this.form), this.outside),
      pins: this.pins.value(),
      chartWidth: site.chartWidth(this.results),
      id: this.id
    };
    if (this.srcSel.value) {
      var out = this.outSel.value;
      if (this.minusSel.value && this.minusSel.value !== 'gnd') out += ',' + this.minusSel.value;
      f.gain = { source: this.srcSel.value, output: out };
    }
    return f;
  };

  // ---- the engine ----

  // analyze is one edit (zport.circuit, calc.ComputeCircuit): the text
  // inspected once, the choices fitted to it, and the panel. A promise.
  Editor.prototype.analyze = function (req) {
    return site.call('circuit', req).then(function (res) {
      if (!res.inspection) {
        // The bridge itself refused (an error object): show it as a problem.
        var err = res.error || { message: 'the engine gave no answer' };
        res = { inspection: { references: [], sources: [], ports: [], nodes: [], errors: [{ line: 0, column: 0, message: err.message }] } };
      }
      return res;
    });
  };

  Editor.prototype.schedule = function () {
    if (!site.ready() || this.scheduled) return; // one pending update at most
    this.scheduled = true;
    var self = this;
    var run = function () {
      self.scheduled = false;
      self.recompute(true);
    };
    if (this.lastCost > SLOW_MS) {
      // A slow circuit: leave the page time to breathe between recomputes.
      setTimeout(function () { requestAnimationFrame(run); }, Math.min(1000, 2 * this.lastCost));
    } else {
      requestAnimationFrame(run);
    }
  };

  // recompute analyzes the text with the pickers' choices (or an
  // example's, or a link's) and shows the answer. It returns a promise of
  // the engine's output, or of null when the text itself has problems or
  // a newer recompute has superseded this one.
  Editor.prototype.recompute = function (address, fragment) {
    var t0 = performance.now();
    // For tests and the benchmark: how many recomputes have run.
    el.setAttribute('data-recomputes', String(Number(el.getAttribute('data-recomputes') || 0) + 1));
    this.clearMessages();
    this.keepDraft();
    var req = this.values();
    req.offered = this.offered();
    if (this.preset) {
      // An example's settings, or a draft's, exactly.
      var p = this.preset;
      req.reference = p.reference;
      req.ports = p.ports;
      req.gain = p.source ? { source: p.source, output: p.output } : undefined;
      req.frequency = p.frequency;
      req.sweep = p.sweep;
      req.offered = null;
      if (p.settings) {
        site.fillSettings(this.form, p.settings);
        this.outside = {};
        for (var k in p.settings) {
          if (!this.form.querySelector('[data-analysis="' + site.cssName(k) + '"]')) this.outside[k] = p.settings[k];
        }
        req.settings = Object.assign(site.settings(this.form), this.outside);
      }
    } else if (this.fresh) {
      // A text from a link, a file or a paste: everything in it is new.
      req.ports = [];
      req.gain = undefined;
      req.offered = { references: [], ports: [], sources: [] };
    }
    this.preset = null;
    this.fresh = false;
    req.budget = this.full ? 0 : BUDGET_MS;
    this.full = false;
    if (typeof fragment === 'string') {
      req.fragment = fragment;
      if (this.pinTexts) req.pinCircuits = this.pinTexts;
    }
    var seq = ++this.seq;
    var self = this;
    return this.analyze(req).then(function (res) {
      if (seq !== self.seq) return null;
      self.answered = seq;
      var out = self.show(res, req, t0, address, fragment);
      site.settled(self);
      return out;
    });
  };

  // show puts one answer of the engine on the page.
  Editor.prototype.show = function (res, req, t0, address, fragment) {
    var ins = res.inspection;
    var done = function (self, out) {
      self.lastCost = performance.now() - t0;
      return out;
    };
    if (ins.errors.length || ins.limit) {
      var errs = ins.errors.length ? ins.errors : [{ line: 0, column: 0, message: ins.limit }];
      var n = errs.length;
      this.showProblems(errs, n > MAX_LISTED ? (n - MAX_LISTED) + ' more not listed.' : '');
      this.setStale(true);
      return done(this, null);
    }
    this.showProblems([]);
    if (res.form) this.updatePickers(ins, res.form);
    var out = res.output || { error: { message: 'the engine gave no analysis' } };
    if (out.notice) this.pendingNotice = out.notice; // what a link's settings lost
    if (out.error) {
      this.showError(out.error);
      this.setStale(true);
      return done(this, out);
    }
    site.insert(this.results, out.html); // rendered and escaped by the engine (Go)
    this.last = out;
    this.lastText = req.circuit; // the engine does not echo the text back
    if (typeof fragment === 'string' && out.form) {
      // A link's pins: their texts are the link's (pinN.c) or the main one.
      var texts = req.pinCircuits || {};
      this.pins.set(out.form.pins, function (slot) { return texts[slot] !== undefined ? texts[slot] : req.circuit; });
    }
    this.pins.refresh();
    this.setStale(false);
    this.showCut(out.sweepCut, out.form);
    site.hover(this.results);
    this.writeState(out.state, address);
    site.recomputed(this.results, t0);
    // aids.js follows the editor; its form carries the text again.
    var form = Object.assign({}, out.form, { circuit: req.circuit });
    el.dispatchEvent(new CustomEvent('zport:computed', { detail: Object.assign({}, out, { form: form }) }));
    return done(this, out);
  };

  // showCut says when the engine shortened the sweep to fit the budget,
  // and offers the whole sweep once.
  Editor.prototype.showCut = function (cut, form) {
    var asked = form && form.sweep ? form.sweep.points : '';
    el.setAttribute('data-sweep-points', cut ? String(cut.used) : asked || '0');
    if (!cut) {
      this.cutNotice.hidden = true;
      return;
    }
    var per = cut.perPointMs < 1 ? cut.perPointMs.toFixed(2) : cut.perPointMs.toPrecision(2);
    var whole = cut.perPointMs * cut.requested / 1000;
    var about = whole < 10 ? whole.toFixed(1) : Math.round(whole).toString();
    this.cutText.textContent = 'This circuit takes about ' + per + ' ms per frequency here, so its sweep of ' + cut.requested +
      ' points would hold the page for about ' + about + ' s on every edit. ' +
      (cut.used ? 'While you edit, the charts and margins use ' + cut.used + ' points.' : 'While you edit, the sweep, its charts and margins are left out.');
    var b = this.cutNotice.querySelector('button');
    b.textContent = 'Compute all ' + cut.requested + ' points once (about ' + about + ' s)';
    this.cutNotice.hidden = false;
  };

  Editor.prototype.clearMessages = function () {
    site.clearFieldErrors(this.form);
    this.notice.hidden = true;
    this.notice.textContent = '';
  };

  // showError puts an engine error beside the input it names, or in the
  // list of problems.
  Editor.prototype.showError = function (err) {
    var p = err.param || '';
    if (site.showFieldError(this.form, err)) return;
    var input = null;
    if (p === 'reference') input = this.refSel;
    else if (p.indexOf('ports') === 0) input = this.portBox;
    else if (p === 'gain.source' || p === 'gain.output') input = p === 'gain.source' ? this.srcSel : this.outSel;
    var box = input && input.closest('[data-field]');
    var msg = box && box.querySelector('[data-role="msg"]');
    if (msg) {
      input.setAttribute('aria-invalid', 'true');
      msg.textContent = err.message;
      return;
    }
    this.showProblems(err.errors && err.errors.length ? err.errors : [err]);
    this.markParts(err.parts, err.message);
  };

  Editor.prototype.setStale = function (stale) {
    site.markStale(el, this.results, stale, 'problem');
    if (this.pendingNotice) {
      this.notice.textContent = this.pendingNotice;
      this.notice.hidden = false;
      this.pendingNotice = '';
    }
  };

  // ---- the address and the share link ----

  // writeState builds the share link (the text compressed, then the
  // engine's settings) and, once the user has changed something or the
  // page was opened from a link, puts it into the address.
  Editor.prototype.writeState = function (state, address) {
    var self = this;
    var seq = ++this.linkSeq;
    var text = this.ta.value;
    // Each pin whose text is not the current one carries it as pinN.c.
    var own = this.pins.value().filter(function (p) { return p.circuit !== text; });
    Promise.all([site.compress(text)].concat(own.map(function (p) { return site.compress(p.circuit); }))).then(function (cs) {
      if (seq !== self.linkSeq) return;
      var c = cs[0];
      var pinsC = own.map(function (p, i) { return '&pin' + p.slot + '.c=' + cs[i + 1]; }).join('');
      var h = '#' + (site.single ? 'p=custom&' : '') + 'c=' + c + (state ? '&' + state : '') + pinsC;
      self.share.setAttribute('href', h);
      var url = location.href.split('#')[0] + h;
      if (url.length > MAX_URL) {
        self.linkNoticeText.textContent = 'This link is ' + url.length.toLocaleString('en') + ' characters long. Many wikis, chat programs ' +
          'and mail clients cut or refuse links longer than ' + MAX_URL.toLocaleString('en') + ' characters: attach the circuit as a .txt file instead.';
        self.linkNotice.hidden = false;
      } else {
        self.linkNotice.hidden = true;
      }
      if (address && shown()) site.address(h, address === 'now');
    }, function () { /* no CompressionStream: the link stays as it was */ });
  };

  // hashWatch reloads the circuit when the address gets a fragment the
  // page did not write itself (a link followed inside the single file, or
  // a fragment pasted into the address bar).
  function hashWatch(ed) {
    window.addEventListener('hashchange', function () {
      if (!site.ready() || site.ownHash() || !shown()) return;
      if (/(^|&)c=/.test(site.fragment())) ed.boot();
    });
  }

  // splitFragment separates the c= value and the pins' pinN.c= values
  // (by slot) from the other settings; twice says that the link gives c=
  // more than once.
  function splitFragment(frag) {
    var c = null, rest = [], pins = {}, twice = false;
    var parts = frag.split('&');
    for (var i = 0; i < parts.length; i++) {
      var m = /^pin([1-4])\.c=(.*)$/.exec(parts[i]);
      if (m) {
        pins[m[1]] = m[2];
      } else if (parts[i].indexOf('c=') === 0) {
        twice = twice || c !== null;
        c = parts[i].slice(2);
      } else if (parts[i]) {
        rest.push(parts[i]);
      }
    }
    return { c: c, rest: rest.join('&'), pins: pins, twice: twice };
  }

  // ---- drafts ----

  var DRAFT = 'circuit';

  // keepDraft keeps the text as typed, the choices, and the text a link,
  // an example or a file replaced, with the address they belong to.
  Editor.prototype.keepDraft = function () {
    var self = this;
    site.keepDraft(DRAFT, function () {
      var f = self.values();
      var text = f.circuit;
      f.circuit = undefined; // kept once, as text
      return { text: text, form: f, previous: self.saved, hash: shown() ? site.fragment() : '' };
    });
  };

  // restoreDraft puts a draft back: its text, its choices for the next
  // recompute, and the text it had kept.
  Editor.prototype.restoreDraft = function (d) {
    this.setText(d.text);
    this.markExample(true);
    var f = d.form || {};
    this.preset = {
      reference: f.reference || '', ports: f.ports || [], source: f.gain ? f.gain.source : '', output: f.gain ? f.gain.output : '',
      frequency: f.frequency || '', sweep: f.sweep || {}, settings: f.settings || {}
    };
    if (typeof d.previous === 'string' && d.previous !== d.text) {
      this.saved = d.previous;
      this.offerPrevious('');
    }
  };

  // boot reads the address. On the page's first boot a draft of this tab
  // comes back first (unless the address holds a link the draft was not
  // made from); a link's circuit then replaces the text, the text it
  // replaced kept, and the engine reads the link's settings.
  Editor.prototype.boot = function (first) {
    var self = this;
    var seq = ++this.bootSeq;
    var frag = shown() ? site.fragment() : '';
    var restored = false;
    if (first) {
      var draft = site.readDraft(DRAFT);
      if (draft && typeof draft.text === 'string') {
        this.restoreDraft(draft);
        restored = true;
        if (draft.hash === frag) frag = ''; // the draft is the newest state of this address
      }
    }
    var parts = splitFragment(frag);
    var instead = 'Showing ' + (this.ownText() ? 'your own circuit' : 'the example') + ' instead; the link’s other settings were not used either.';
    var ready;
    this.pinTexts = null;
    if (parts.twice) {
      this.pendingNotice = 'The circuit in this link was not used: the link gives it twice (“c=” appears twice). ' + instead;
      ready = Promise.resolve(null);
    } else if (parts.c !== null) {
      var slots = Object.keys(parts.pins);
      ready = Promise.all([site.decompress(parts.c, MAX_TEXT)].concat(slots.map(function (k) { return site.decompress(parts.pins[k], MAX_TEXT); }))).then(function (texts) {
        if (texts[0] !== self.ta.value) self.keep('The link replaced your circuit text; it is kept.');
        self.setText(texts[0]);
        self.fresh = true;
        self.preset = null;
        self.markExample(true);
        if (slots.length) {
          self.pinTexts = {};
          slots.forEach(function (k, i) { self.pinTexts[k] = texts[i + 1]; });
        }
        return parts.rest;
      }, function (err) {
        self.pendingNotice = 'The circuit in this link was not used (' + err.message + '). ' + instead;
        return null;
      });
    } else {
      ready = Promise.resolve(frag ? parts.rest : null);
    }
    ready.then(function (rest) {
      site.onEngine(function () {
        if (seq !== self.bootSeq) return;
        self.start(rest, restored);
      });
    });
  };

  // start analyzes the text: with a link's settings (rest), at once
  // rewriting the address to what was used, or with the page's own.
  Editor.prototype.start = function (rest, restored) {
    var self = this;
    var linked = typeof rest === 'string';
    if (linked) this.preset = null; // a link's settings stand on the circuit's defaults
    var done = this.recompute(linked ? 'now' : false, linked ? rest : undefined).then(function (out) {
      if ((linked || restored) && out && out.form) {
        var form = Object.assign({}, out.form, { circuit: self.ta.value });
        el.dispatchEvent(new CustomEvent('zport:link', { detail: form }));
      }
      return out;
    });
    done.then(function () {
      var buttons = el.querySelectorAll('button[data-action]');
      for (var i = 0; i < buttons.length; i++) buttons[i].disabled = false;
      el.setAttribute('data-live', 'true'); // the editor follows the engine from now on
    });
  };

  // ---- examples, files ----

  Editor.prototype.setText = function (text) {
    this.ta.value = text;
    this.accepted = text;
    this.ta.scrollTop = 0;
    this.ta.scrollLeft = 0;
    this.updateGutter();
    this.syncScroll();
  };

  // ownText reports whether the text is the user's rather than an
  // unchanged example.
  Editor.prototype.ownText = function () {
    var t = this.ta.value;
    if (!t.trim()) return false;
    for (var id in this.examples) if (this.examples[id].text === t) return false;
    return true;
  };

  // markExample selects the example the text is, or "Your own circuit";
  // fresh says the text came from a link or a file, when an example's
  // description no longer applies to it.
  //
  // The description also goes once most of the described example's lines
  // are gone from the text: it would describe another circuit.
  Editor.prototype.markExample = function (fresh) {
    var t = this.ta.value, id = '';
    for (var k in this.examples) if (this.examples[k].text === t) id = k;
    if (this.exampleSel.value !== id) this.exampleSel.value = id;
    if (id) this.describe(this.examples[id]);
    else if (fresh || this.strayed(t)) role('example-about').hidden = true;
  };

  // partLines are the lines of circuit text that hold a part, without
  // comments and spacing.
  function partLines(text) {
    return text.split('\n').map(function (l) { return l.replace(/#.*/, '').trim().split(/\s+/).join(' '); }).filter(Boolean);
  }

  // strayed reports whether text keeps fewer than half the part lines of
  // the example described.
  Editor.prototype.strayed = function (text) {
    var ex = this.examples[this.described];
    if (!ex) return true;
    var have = {};
    partLines(text).forEach(function (l) { have[l] = true; });
    var lines = partLines(ex.text);
    var kept = lines.filter(function (l) { return have[l]; }).length;
    return 2 * kept < lines.length;
  };

  Editor.prototype.describe = function (ex) {
    this.described = ex.id;
    role('example-title').textContent = ex.title;
    role('scenario').textContent = ex.scenario;
    role('look').textContent = ex.look;
    role('example-about').hidden = false;
  };

  // keep saves the user's own text before something replaces it, and
  // offers it back.
  Editor.prototype.keep = function (what) {
    if (!this.ownText()) return;
    this.saved = this.ta.value;
    this.offerPrevious(what);
  };

  // offerPrevious shows the button that brings the kept text back (so does
  // choosing “Your own circuit” in the list of examples).
  Editor.prototype.offerPrevious = function (what) {
    var self = this;
    site.offerRestore(el, what || 'Your previous circuit text is kept.', 'Restore your previous text', function () {
      self.restore();
    });
  };

  Editor.prototype.loadExample = function (id) {
    var ex = this.examples[id];
    if (!ex) return;
    this.keep('Example loaded; your circuit text is kept.');
    this.setText(ex.text);
    this.describe(ex);
    this.preset = ex.preset;
    this.schedule();
  };

  Editor.prototype.restore = function () {
    var back = this.saved;
    // What the restore replaces is kept in turn, so nothing is lost.
    this.saved = this.ownText() && this.ta.value !== back ? this.ta.value : null;
    this.setText(back);
    this.fileMsg.textContent = 'Your previous text is back.';
    site.dropRestore(el);
    if (this.saved !== null) this.offerPrevious('');
    this.markExample(true);
    this.fresh = true;
    this.schedule();
  };

  Editor.prototype.openFile = function (file) {
    var self = this;
    if (file.size > MAX_TEXT) {
      this.fileMsg.textContent = file.name + ' is ' + Math.round(file.size / 1024) + ' KB; circuit text is limited to ' + Math.round(MAX_TEXT / 1024) + ' KB.';
      return;
    }
    file.text().then(function (text) {
      self.keep('Opened ' + file.name + '; your circuit text is kept.');
      self.setText(text);
      self.fresh = true;
      self.markExample(true);
      self.fileMsg.textContent = 'Opened ' + file.name + ' (read on this computer; nothing was uploaded).';
      self.schedule();
    }, function (err) {
      self.fileMsg.textContent = file.name + ' could not be read: ' + (err && err.message ? err.message : String(err));
    });
  };

  Editor.prototype.fileName = function () {
    return 'zport-' + (this.exampleSel.value || 'circuit') + '.txt';
  };

  Editor.prototype.saveText = function () {
    var name = this.fileName();
    site.saveFile(name, 'text/plain;charset=utf-8', this.ta.value);
    this.fileMsg.textContent = 'Circuit text saved as ' + name + '.';
  };

  // ---- results: copy, CSV, link ----

  Editor.prototype.say = function (text) {
    this.actionMsg.textContent = text;
  };

  Editor.prototype.copy = function () {
    if (this.last) site.copyResults(this, this.last.markdown, this.link());
  };

  // link is the share link of the circuit shown.
  Editor.prototype.link = function () {
    return location.href.split('#')[0] + (this.share.getAttribute('href') || '');
  };

  // design is what "Pin this design" keeps: the text and the pickers'
  // choices as they are, or nothing while the text has problems.
  Editor.prototype.design = function () {
    if (this.results.classList.contains('is-stale')) {
      this.say('Correct the marked problems first: a pin keeps a circuit that can be analyzed.');
      return null;
    }
    var f = this.values();
    return { circuit: f.circuit, reference: f.reference, ports: f.ports, gain: f.gain };
  };

  Editor.prototype.copyLink = function () {
    var url = this.link();
    site.copyText(this, url, 'Link to this circuit copied' + (url.length > MAX_URL ? ' (it is long: see the note below).' : '.'));
  };

  Editor.prototype.download = function () {
    if (!this.last || !site.ready()) return;
    var self = this;
    var req = Object.assign({}, this.last.form, { csv: true, circuit: this.lastText, link: this.link(), pins: [] });
    site.call('panel', req).then(function (out) {
      if (out.error || !out.csv) {
        self.say('The CSV could not be made: ' + (out.error ? out.error.message : 'no sweep'));
        return;
      }
      var name = 'zport-' + (self.exampleSel.value || 'circuit') + '.csv';
      site.saveFile(name, 'text/csv;charset=utf-8', out.csv);
      self.say('CSV of the sweep saved as ' + name + '.');
    });
  };

  new Editor().boot(true);
})();
