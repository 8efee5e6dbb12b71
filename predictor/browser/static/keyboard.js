// foretype keyboard: an on-screen keyboard over the prediction service, with a copy-task logger.
// Counting (the same as the typing pad and the simulated typist): a character, a backspace and a suggestion
// taken cost one keystroke each; keystroke savings = 1 - keystrokes / characters of the text.
"use strict";

(function () {
  const LAYOUTS = {
    alphabetic: ["abcdefg", "hijklmn", "opqrstu", "vwxyz'-"],
    typewriter: ["qwertyuiop", "asdfghjkl'", "zxcvbnm-"],
    frequency: ["etaoins", "hrdlcum", "wfgypbv", "kjxqz'-"],
  };
  const PLACEMENTS = ["left", "right", "under"];
  const MARKS_BEFORE_SPACE = ".,;:!?…";
  // Characters that replace the automatic space after a taken word (predictor/simulate/editing.py).
  const ATTACHING = new Set([...".,;:!?…\"'\n", ")", "]", "}", "’", "”", "»"]);
  const PARTIAL_WORD = /[\p{L}\p{N}](?:[\p{L}\p{N}\p{M}]|['’\-])*$/u;

  const $ = (id) => document.getElementById(id);
  const query = new URLSearchParams(location.search);
  const token = new URLSearchParams(location.hash.slice(1)).get("token") || query.get("token") || "";

  const state = {
    text: "",
    keystrokes: 0,
    taken: 0,
    shift: false,
    autoSpace: false,
    suggestions: [],
    passed: new Set(),
    lastAsked: null,
    seq: 0,
    shownSeq: 0,
    config: null,
    settings: loadSettings(),
    study: null, // {session, phrases: [...], index, t0}
  };

  function loadSettings() {
    let saved = {};
    try { saved = JSON.parse(localStorage.getItem("foretype-keyboard") || "{}"); } catch (e) { saved = {}; }
    const k = parseInt(query.get("k") || saved.k || "5", 10);
    const placement = query.get("placement") || saved.placement || "left";
    const layout = query.get("layout") || saved.layout || "alphabetic";
    return {
      k: Math.min(9, Math.max(1, isNaN(k) ? 5 : k)),
      placement: PLACEMENTS.includes(placement) ? placement : "left",
      layout: layout in LAYOUTS ? layout : "alphabetic",
      profile: query.get("profile") || saved.profile || "pilot",
    };
  }

  function saveSettings() {
    try { localStorage.setItem("foretype-keyboard", JSON.stringify(state.settings)); } catch (e) { /* private mode */ }
  }

  function headers(json) {
    const h = {};
    if (json) h["Content-Type"] = "application/json";
    if (token) h["Authorization"] = "Bearer " + token;
    return h;
  }

  function status(message) { $("status").textContent = message || ""; }

  // ---------------------------------------------------------------- suggestions over the WebSocket
  // The service's per-keystroke channel (docs/service.md): each request carries a sequence number and the
  // whole text before the cursor; a reply names the sequence number it answers, so stale replies are dropped.
  function protocol(config) {
    return {
      websocket: config.websocket + "?model=" + encodeURIComponent(config.model) + "&k=" + state.settings.k,
      request: (seq, text, k, leaveOut) => Object.assign({ type: "suggest", seq: seq, text: text, k: k }, leaveOut.length ? { leave_out: leaveOut } : {}),
      reply: (m) => (m && m.type === "suggestions" ? { seq: m.seq, words: m.suggestions.map((s) => ({ word: s.word, probability: s.prob })) } : null),
    };
  }

  const channel = {
    socket: null,
    ready: false,
    pending: null,
    open() {
      const cfg = state.config.suggest;
      const url = new URL(cfg.websocket, location.href);
      url.protocol = location.protocol === "https:" ? "wss:" : "ws:";
      if (token) url.searchParams.set("token", token);
      const socket = new WebSocket(url);
      this.socket = socket;
      socket.onopen = () => { this.ready = true; if (this.pending) { socket.send(this.pending); this.pending = null; } };
      socket.onmessage = (message) => receive(JSON.parse(message.data));
      socket.onclose = () => { this.ready = false; this.socket = null; status("suggestions paused: the service closed the connection; reconnecting…"); setTimeout(() => this.open(), 1000); };
    },
    send(payload) {
      const text = JSON.stringify(payload);
      if (this.ready) this.socket.send(text); else this.pending = text;
    },
  };

  function ask() {
    notePassed();
    state.seq += 1;
    channel.send(state.config.suggest.request(state.seq, state.text, state.settings.k, Array.from(state.passed)));
  }

  // Within one word, the words shown and passed over (the next letter typed instead) are left out of the
  // next lists, as in the typing pad and the simulated typist; a new word, or a backspace, starts afresh.
  function notePassed() {
    const prefix = partialWord(state.text);
    const before = state.text.slice(0, state.text.length - prefix.length);
    const last = state.lastAsked;
    const sameWord = last && prefix.length > last.prefix.length && prefix.startsWith(last.prefix) && before === last.before;
    if (!sameWord) state.passed = new Set();
    else if (state.shownSeq === state.seq) state.suggestions.forEach((s) => state.passed.add(s.word.toLowerCase()));
    state.lastAsked = { prefix: prefix, before: before };
  }

  function receive(message) {
    const reply = state.config.suggest.reply(message);
    if (!reply) { if (message && message.type === "error") status("service: " + message.message); return; }
    if (reply.seq !== state.seq) return; // stale: the text has changed since this was asked
    status("");
    state.suggestions = reply.words.slice(0, state.settings.k);
    state.shownSeq = reply.seq;
    drawSuggestions();
    log({ kind: "list", words: state.suggestions.map((s) => s.word) });
  }

  // ---------------------------------------------------------------- the text and the tally
  function partialWord(text) {
    const found = PARTIAL_WORD.exec(text);
    return found ? found[0] : "";
  }

  function writtenForm(word, typed) {
    let head = "";
    for (let i = 0; i < typed.length && i < word.length; i++) {
      const t = typed[i];
      head += t !== t.toLowerCase() && t === t.toUpperCase() ? t : word[i];
    }
    return head + word.slice(head.length);
  }

  function changed() {
    drawText();
    drawTally();
    ask();
  }

  function typeChar(char) {
    if (char === " " && state.autoSpace && state.text.endsWith(" ")) {
      // A space right after a taken word is absorbed, as in the typing pad and the simulated typist:
      // the word already ends in its space, so nothing changes and no keystroke is counted.
      state.autoSpace = false;
      return;
    }
    if (state.shift) { char = char.toUpperCase(); setShift(false); }
    if (state.autoSpace && ATTACHING.has(char) && state.text.endsWith(" ")) {
      state.text = state.text.slice(0, -1) + char;
    } else {
      state.text += char;
    }
    state.autoSpace = false;
    state.keystrokes += 1;
    log({ kind: "key", char: char, text: state.text });
    changed();
  }

  function backspace() {
    state.text = Array.from(state.text).slice(0, -1).join("");
    state.autoSpace = false;
    state.keystrokes += 1;
    log({ kind: "backspace", text: state.text });
    changed();
  }

  function take(rank) {
    const suggestion = state.suggestions[rank - 1];
    if (!suggestion) return;
    const typed = partialWord(state.text);
    const before = state.text.slice(0, state.text.length - typed.length);
    const lead = !typed && before && MARKS_BEFORE_SPACE.includes(before[before.length - 1]) ? " " : "";
    const written = writtenForm(suggestion.word, typed);
    const insert = lead + written + " ";
    state.text = before + insert;
    state.autoSpace = true;
    state.keystrokes += 1;
    state.taken += 1;
    setShift(false);
    log({ kind: "take", word: written, rank: rank, erase: typed.length, insert: insert, text: state.text });
    changed();
  }

  function resetText() {
    state.text = "";
    state.keystrokes = 0;
    state.taken = 0;
    state.autoSpace = false;
    setShift(false);
  }

  // ---------------------------------------------------------------- drawing
  function drawText() { $("text-body").textContent = state.text; }

  // Characters of the text without its trailing spaces: the space a taken word leaves at the end is not
  // part of the transcription (the session report and the simulated typist count the same way).
  function drawTally() {
    const chars = Array.from(state.text.replace(/ +$/, "")).length;
    $("t-chars").textContent = chars;
    $("t-keys").textContent = state.keystrokes;
    $("t-taken").textContent = state.taken;
    $("t-ksr").textContent = chars ? (100 * (1 - state.keystrokes / chars)).toFixed(1) + "%" : "—";
  }

  function suggestionItem(s, rank, top) {
    const li = document.createElement("li");
    const button = document.createElement("button");
    button.type = "button";
    button.className = "suggestion";
    button.dataset.rank = String(rank);
    button.title = "take it (alt+" + rank + (rank === 1 ? " or Tab" : "") + ")";
    const badge = document.createElement("span");
    badge.className = "rank";
    badge.textContent = rank;
    const word = document.createElement("span");
    word.className = "word";
    word.textContent = s.word;
    const bar = document.createElement("span");
    bar.className = "likelihood";
    const fill = document.createElement("i");
    fill.style.width = (top > 0 && s.probability != null ? Math.max(4, 100 * s.probability / top) : 0) + "%";
    bar.appendChild(fill);
    button.append(badge, word, bar);
    button.addEventListener("click", () => take(rank));
    button.addEventListener("mousedown", (event) => event.preventDefault());
    li.appendChild(button);
    return li;
  }

  function drawSuggestions() {
    const top = state.suggestions.length ? state.suggestions[0].probability || 0 : 0;
    const shown = state.settings.placement === "under" ? "chips-under" : "rail";
    for (const id of ["rail", "chips-under"]) {
      const list = $(id);
      list.replaceChildren(...(id === shown ? state.suggestions.map((s, i) => suggestionItem(s, i + 1, top)) : []));
      if (!state.suggestions.length && id === shown) {
        const li = document.createElement("li");
        li.className = "empty";
        li.textContent = "no word starts this way";
        list.appendChild(li);
      }
    }
  }

  function key(label, action, cls, name) {
    const button = document.createElement("button");
    button.type = "button";
    button.className = "key" + (cls ? " " + cls : "");
    button.textContent = label;
    button.dataset.key = name || label;
    button.addEventListener("click", action);
    button.addEventListener("mousedown", (event) => event.preventDefault()); // keep the focus off the keys
    return button;
  }

  function drawKeys() {
    const keys = $("keys");
    const rows = LAYOUTS[state.settings.layout].map((letters) => {
      const row = document.createElement("div");
      row.className = "row";
      for (const c of letters) row.appendChild(key(c, () => typeChar(c)));
      return row;
    });
    const marks = document.createElement("div");
    marks.className = "row";
    marks.append(
      key("⇧", () => setShift(!state.shift), "act", "shift"),
      ...[".", ",", "?", "!"].map((c) => key(c, () => typeChar(c))),
      key("⌫", backspace, "act", "backspace"),
    );
    const bottom = document.createElement("div");
    bottom.className = "row";
    bottom.append(key("space", () => typeChar(" "), "wide", " "));
    const next = key("next ⏎", () => finishPhrase(), "act go", "next");
    next.disabled = !state.study;
    bottom.append(next);
    keys.replaceChildren(...rows, marks, bottom);
    setShift(state.shift);
  }

  function setShift(on) {
    state.shift = on;
    const button = document.querySelector('.key[data-key="shift"]');
    if (button) button.classList.toggle("on", on);
  }

  function applySettings() {
    $("stage").dataset.placement = state.settings.placement;
    $("k").value = state.settings.k;
    $("k-out").textContent = state.settings.k;
    $("placement").value = state.settings.placement;
    $("layout").value = state.settings.layout;
    $("profile").value = state.settings.profile;
    drawKeys();
    drawSuggestions();
  }

  // ---------------------------------------------------------------- physical keyboard
  document.addEventListener("keydown", (event) => {
    const target = event.target;
    if (target && (target.tagName === "INPUT" || target.tagName === "SELECT")) return;
    if (event.ctrlKey || event.metaKey) return;
    if (event.altKey && /^Digit[1-9]$/.test(event.code)) { event.preventDefault(); take(parseInt(event.code.slice(5), 10)); return; }
    if (event.altKey) return;
    if (event.key === "Tab") { event.preventDefault(); take(1); return; }
    if (event.key === "Backspace") { event.preventDefault(); backspace(); return; }
    if (event.key === "Enter") { event.preventDefault(); if (state.study) finishPhrase(); return; }
    if (event.key.length === 1 || Array.from(event.key).length === 1) {
      event.preventDefault();
      if (state.shift && event.key === event.key.toLowerCase()) setShift(false);
      typeChar(event.key);
    }
  });

  // ---------------------------------------------------------------- the copy task and its log
  const outbox = { queue: [], busy: false, starting: false };

  function now() { return Math.round((performance.now() - state.study.t0) * 10) / 10; }

  function log(fields) {
    if (!state.study || state.study.index < 0) return;
    outbox.queue.push(Object.assign({ t: now() }, fields));
    flush();
  }

  async function flush(keepalive) {
    if (outbox.busy || !outbox.queue.length || !state.study) return;
    outbox.busy = true;
    const batch = outbox.queue.splice(0, outbox.queue.length);
    try {
      const response = await fetch("/api/study/sessions/" + state.study.session + "/events", {
        method: "POST", headers: headers(true), body: JSON.stringify({ events: batch }), keepalive: !!keepalive,
      });
      if (!response.ok) throw new Error((await response.json()).error?.message || response.statusText);
    } catch (error) {
      outbox.queue.unshift(...batch);
      status("the log could not be written (" + error.message + "); retrying");
      outbox.busy = false;
      setTimeout(flush, 1000);
      return;
    }
    outbox.busy = false;
    if (outbox.queue.length) flush();
  }

  async function startStudy() {
    outbox.starting = true;
    try { await beginStudy(); } finally { outbox.starting = false; }
  }

  async function beginStudy() {
    const response = await fetch("/api/study/sessions", {
      method: "POST",
      headers: headers(true),
      body: JSON.stringify({ profile: state.settings.profile, k: state.settings.k, placement: state.settings.placement, layout: state.settings.layout }),
    });
    const body = await response.json();
    if (!response.ok) { status(body.error?.message || "the session could not start"); return; }
    state.study = { session: body.session, phrases: body.phrases, index: -1, t0: performance.now(), rates: [] };
    // A focused button that becomes disabled would swallow the participant's first keys.
    if (document.activeElement && document.activeElement.blur) document.activeElement.blur();
    $("start-study").disabled = true;
    $("copy").hidden = false;
    $("design").hidden = true;
    ["k", "placement", "layout", "profile"].forEach((id) => { $(id).disabled = true; });
    drawKeys();
    nextPhrase();
  }

  function nextPhrase() {
    const study = state.study;
    study.index += 1;
    if (study.index >= study.phrases.length) { endStudy(); return; }
    resetText();
    $("phrase-count").textContent = "phrase " + (study.index + 1) + " of " + study.phrases.length;
    $("target").textContent = study.phrases[study.index];
    log({ kind: "phrase_start", phrase: study.index, target: study.phrases[study.index] });
    changed();
  }

  function finishPhrase() {
    const study = state.study;
    if (!study || study.index < 0) return;
    log({ kind: "phrase_end", phrase: study.index, text: state.text });
    nextPhrase();
  }

  async function endStudy() {
    log({ kind: "session_end" });
    await flush();
    const session = state.study.session;
    $("stage").hidden = true;
    $("done").hidden = false;
    try {
      const response = await fetch("/api/study/sessions/" + session + "/report", { headers: headers(false) });
      const report = await response.json();
      const m = report.measures;
      const pct = (x) => (x == null ? "—" : (100 * x).toFixed(1) + "%");
      $("done-summary").textContent = m.phrases + " phrases · " + (m.wpm == null ? "—" : m.wpm.toFixed(1)) + " words per minute · keystroke savings " + pct(m.ksr) + " · total error rate " + pct(m.total_error_rate);
    } catch (error) { $("done-summary").textContent = "The log is saved; read it with foretype study report."; }
    state.study = null;
  }

  window.addEventListener("pagehide", () => flush(true));

  // ---------------------------------------------------------------- start
  async function start() {
    applySettings();
    $("toggle-design").addEventListener("click", () => {
      const panel = $("design");
      panel.hidden = !panel.hidden;
      $("toggle-design").setAttribute("aria-expanded", String(!panel.hidden));
    });
    $("k").addEventListener("input", () => { state.settings.k = parseInt($("k").value, 10); $("k-out").textContent = state.settings.k; saveSettings(); ask(); });
    $("placement").addEventListener("change", () => { state.settings.placement = $("placement").value; saveSettings(); applySettings(); });
    $("layout").addEventListener("change", () => { state.settings.layout = $("layout").value; saveSettings(); applySettings(); });
    $("profile").addEventListener("change", () => { state.settings.profile = $("profile").value.trim() || "pilot"; saveSettings(); });
    $("start-study").addEventListener("click", startStudy);
    $("again").addEventListener("click", () => { $("done").hidden = true; $("stage").hidden = false; $("copy").hidden = true; $("start-study").disabled = false; ["k", "placement", "layout", "profile"].forEach((id) => { $(id).disabled = false; }); resetText(); drawKeys(); changed(); });
    const response = await fetch("/api/study/config", { headers: headers(false) });
    const config = await response.json();
    config.suggest = protocol(config);
    state.config = config;
    $("model-name").textContent = "model " + config.model + " · " + config.phrases + " phrases (" + config.phrase_source + ")";
    channel.open();
    changed();
    document.body.dataset.ready = "1";
  }

  // Test and automation hook: what the page holds now.
  window.foretypeKeyboard = {
    state: () => ({ text: state.text, keystrokes: state.keystrokes, taken: state.taken, suggestions: state.suggestions.map((s) => s.word), seq: state.seq, shownSeq: state.shownSeq, pending: outbox.queue.length + (outbox.busy ? 1 : 0) + (outbox.starting ? 1 : 0), session: state.study && state.study.session }),
  };
  window.addEventListener("DOMContentLoaded", start);
})();
