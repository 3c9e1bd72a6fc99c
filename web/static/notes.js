// notes.js drives the Keyloom Notes page: a text area, a strip of
// suggestions under it, and personal words kept in this browser's storage.

import { LoomEngine, toBase64, fromBase64 } from "./loom.js";

const KEYS = {
  overlay: "keyloom-notes.overlay.v1",
  text: "keyloom-notes.text.v1",
  learning: "keyloom-notes.learning.v1",
};
// A word at the end of a string: letters, digits and marks, with inner ' ’ -.
const WORD_AT_END = /[\p{L}\p{N}\p{M}]+(?:['’-][\p{L}\p{N}\p{M}]+)*$/u;
// Typing one of these finishes the word before it.
const FINISHES = /[\s.,!?;:…)"”]$/u;
const SAVE_DELAY_MS = 250;

const note = document.getElementById("note");
const chips = document.getElementById("chips");
const strip = document.getElementById("strip");
const tag = document.getElementById("strip-tag");
const statusEl = document.getElementById("status");
const learningBox = document.getElementById("learning");
const wipeBtn = document.getElementById("wipe");

let eng = null;
let modelBytes = null;
let saveTimer = 0;
let saves = 0;
let statusNote = "";     // status note shown after the learned count
let offer = null;   // {start, typed, replacement}: a correction offered for the last word
let undo = null;    // {start, typed, replacement}: a correction made automatically

function modelURL() {
  return new URLSearchParams(location.search).get("model") || "demo-v1.klm";
}

function setStatus(extra) {
  if (extra !== undefined) statusNote = extra;
  const n = eng ? eng.entries() : 0;
  const learned = n === 0 ? "Nothing learned yet" : `${n} word pattern${n === 1 ? "" : "s"} learned`;
  statusEl.textContent = statusNote ? `${learned} · ${statusNote}` : learned;
}

function fail(err) {
  document.body.dataset.state = "failed";
  statusEl.textContent = `Could not start: ${err.message || err}`;
}

async function boot() {
  try {
    const url = modelURL();
    const resp = await fetch(url);
    if (!resp.ok) throw new Error(`${url}: HTTP ${resp.status}`);
    modelBytes = new Uint8Array(await resp.arrayBuffer());
    eng = await LoomEngine.open(modelBytes);
  } catch (err) {
    fail(err);
    return;
  }
  restore();
  note.disabled = false;
  note.focus();
  note.setSelectionRange(note.value.length, note.value.length);
  document.body.dataset.state = "ready";
  document.body.dataset.readyMs = String(Math.round(performance.now()));
  refresh();
}

// restore brings back the learning switch, the learned words and the note.
function restore() {
  const learning = localStorage.getItem(KEYS.learning) !== "off";
  learningBox.checked = learning;
  eng.setLearning(learning);
  const stored = localStorage.getItem(KEYS.overlay);
  let extra = "";
  if (stored) {
    try {
      eng.loadOverlay(fromBase64(stored));
      extra = "restored from this browser";
    } catch (err) {
      localStorage.removeItem(KEYS.overlay);
      extra = "stored words were unreadable, starting afresh";
    }
  }
  note.value = localStorage.getItem(KEYS.text) || "";
  setStatus(extra);
}

function scheduleSave() {
  clearTimeout(saveTimer);
  saveTimer = setTimeout(saveNow, SAVE_DELAY_MS);
}

function saveNow() {
  clearTimeout(saveTimer);
  saveTimer = 0;
  if (!eng) return;
  try {
    localStorage.setItem(KEYS.overlay, toBase64(eng.saveOverlay()));
    saves++;
    document.body.dataset.saves = String(saves);
    setStatus("saved in this browser");
  } catch (err) {
    setStatus(`not saved: ${err.message}`);
  }
}

function keepText() {
  try { localStorage.setItem(KEYS.text, note.value); } catch { /* storage full: the note stays on screen */ }
}

// commitWord learns the word that starts at start in the note.
function commitWord(word, start) {
  if (!learningBox.checked || !word) return;
  eng.commit(word, note.value.slice(0, start));
  scheduleSave();
}

// replace swaps note.value[start:end] for text and puts the cursor after it.
function replace(start, end, text) {
  note.setRangeText(text, start, end, "end");
  keepText();
}

// finishWord runs when the typed text ended a word: it corrects the word if
// the engine says so (at once when the engine calls it safe, otherwise as an
// offer), then learns it.
function finishWord(sepLen) {
  const cursor = note.selectionStart;
  const sepStart = cursor - sepLen;
  const m = WORD_AT_END.exec(note.value.slice(0, sepStart));
  if (!m) return;
  let start = m.index;
  let word = m[0];
  if (eng.canCorrect) {
    const c = eng.correct(note.value.slice(0, cursor));
    // The engine names the last field as typed, punctuation included.
    const field = note.value.slice(0, cursor).trimEnd();
    if (c && c.replacement && c.replacement !== c.typed && field.endsWith(c.typed)) {
      const at = field.length - c.typed.length;
      const found = { start: at, typed: c.typed, replacement: c.replacement, alternatives: c.alternatives || [] };
      if (c.apply) {
        note.setRangeText(c.replacement, at, field.length, "preserve");
        const shift = c.replacement.length - c.typed.length;
        note.setSelectionRange(cursor + shift, cursor + shift);
        undo = found;
        const fixed = WORD_AT_END.exec(note.value.slice(0, at + c.replacement.length).replace(/[^\p{L}\p{N}\p{M}]+$/u, ""));
        if (fixed) { start = fixed.index; word = fixed[0]; }
      } else {
        offer = found;
      }
    }
  }
  commitWord(word, start);
}

// withWord puts alt in place of the word inside text (which may carry
// punctuation around it).
function withWord(text, alt) {
  return text.replace(/[\p{L}\p{N}\p{M}]+(?:['’-][\p{L}\p{N}\p{M}]+)*/u, alt);
}

function onInput(ev) {
  offer = null;
  undo = null;
  if (ev.inputType === "insertText" && ev.data && FINISHES.test(ev.data)) {
    finishWord(ev.data.length);
  } else if (ev.inputType === "insertLineBreak" || ev.inputType === "insertParagraph") {
    finishWord(1);
  }
  keepText();
  refresh();
}

function onPaste(ev) {
  const text = ev.clipboardData && ev.clipboardData.getData("text/plain");
  if (text && learningBox.checked) {
    eng.learn(text);
    scheduleSave();
  }
}

// accept inserts a chosen word: it replaces the prefix being typed (or
// nothing, after a space) and adds a space unless one follows.
function accept(word, prefixLen) {
  const cursor = note.selectionStart;
  const start = cursor - prefixLen;
  const spaceFollows = /^\s/u.test(note.value.slice(cursor));
  replace(start, cursor, spaceFollows ? word : word + " ");
  if (spaceFollows) note.setSelectionRange(start + word.length + 1, start + word.length + 1);
  commitWord(word, start);
  offer = null;
  undo = null;
  refresh();
}

// fix replaces the text from (at start) with to, when the note still has it.
// addSpace finishes the word when it was being typed at the cursor.
function fix(start, from, to, addSpace) {
  if (note.value.slice(start, start + from.length) !== from) return;
  const end = start + from.length;
  const cursor = note.selectionStart;
  if (end === cursor) {
    replace(start, end, addSpace ? to + " " : to);
  } else {
    note.setRangeText(to, start, end, "preserve");
    const shift = end <= cursor ? to.length - from.length : 0;
    note.setSelectionRange(cursor + shift, cursor + shift);
    keepText();
  }
  const m = /[\p{L}\p{N}\p{M}]+(?:['’-][\p{L}\p{N}\p{M}]+)*/u.exec(to);
  if (m) commitWord(m[0], start + m.index);
  offer = null;
  undo = null;
  refresh();
}

function undoFix() {
  const u = undo;
  if (note.value.slice(u.start, u.start + u.replacement.length) === u.replacement) {
    const cursor = note.selectionStart;
    note.setRangeText(u.typed, u.start, u.start + u.replacement.length, "preserve");
    const shift = u.typed.length - u.replacement.length;
    note.setSelectionRange(cursor + shift, cursor + shift);
    keepText();
    if (learningBox.checked) {
      eng.reject(u.typed, u.replacement);
      scheduleSave();
    }
  }
  undo = null;
  refresh();
}

function chip(kind, title, build, onPick) {
  const b = document.createElement("button");
  b.type = "button";
  b.className = `chip ${kind}`;
  b.dataset.kind = kind;
  b.title = title;
  build(b);
  // Keep the focus (and the cursor) in the note.
  b.addEventListener("mousedown", (ev) => ev.preventDefault());
  b.addEventListener("click", onPick);
  return b;
}

function span(cls, text) {
  const s = document.createElement("span");
  s.className = cls;
  s.textContent = text;
  return s;
}

// fixChip offers to put to in place of from at start; the first chip of a
// correction also shows the word as typed (was), struck out.
function fixChip(start, from, to, was, addSpace) {
  return chip("fix", `Replace “${from}” with “${to}”`, (b) => {
    b.dataset.word = to;
    if (was) b.append(span("was", was), span("arrow", "→"));
    b.append(span("now", to));
  }, () => fix(start, from, to, addSpace));
}

// fixChips offers a correction and its alternatives. The text at c.start
// is now (c.typed, or the replacement already made).
function fixChips(c, now, addSpace, withMain) {
  const out = withMain ? [fixChip(c.start, now, c.replacement, c.typed, addSpace)] : [];
  for (const alt of (c.alternatives || []).slice(0, 2)) {
    const to = withWord(c.replacement, alt);
    if (to !== now) out.push(fixChip(c.start, now, to, "", addSpace));
  }
  return out;
}

// refresh asks the engine about the text before the cursor and redraws the strip.
function refresh() {
  chips.replaceChildren();
  let mode = "idle";
  if (!eng || note.selectionStart !== note.selectionEnd) {
    strip.dataset.mode = mode;
    tag.textContent = "";
    return;
  }
  const cursor = note.selectionStart;
  const before = note.value.slice(0, cursor);
  let res;
  try {
    res = eng.suggest(before);
  } catch (err) {
    setStatus(err.message);
    return;
  }
  if (undo) {
    mode = "fixed";
    chips.append(chip("undo", `Put back “${undo.typed}”`, (b) => {
      b.dataset.word = undo.typed;
      b.textContent = `↶ keep “${undo.typed}”`;
    }, undoFix));
    chips.append(...fixChips(undo, undo.replacement, false, false));
  }
  if (offer) {
    mode = "fix";
    chips.append(...fixChips(offer, offer.typed, false, true));
  }
  if (res.correction && before.endsWith(res.correction.typed)) {
    mode = "fix";
    const c = { ...res.correction, start: cursor - res.correction.typed.length };
    chips.append(...fixChips(c, c.typed, true, true));
  }
  const prefix = res.prefix || "";
  for (const s of res.completions || []) {
    if (mode === "idle") mode = "finish";
    chips.append(chip("completion", `Finish with “${s.word}”`, (b) => {
      b.dataset.word = s.word;
      const shared = s.word.toLowerCase().startsWith(prefix.toLowerCase()) ? prefix.length : 0;
      b.append(span("typed", s.word.slice(0, shared)), span("rest", s.word.slice(shared)));
    }, () => accept(s.word, prefix.length)));
  }
  for (const s of res.predictions || []) {
    if (mode === "idle") mode = "next";
    chips.append(chip("prediction", `Add “${s.word}”`, (b) => {
      b.dataset.word = s.word;
      b.append(span("rest", s.word));
    }, () => accept(s.word, 0)));
  }
  strip.dataset.mode = mode;
  tag.textContent = { idle: "", finish: "finish word", next: "next word", fix: "perhaps", fixed: "corrected" }[mode];
}

let wipeArmedTimer = 0;
function onWipe() {
  if (wipeBtn.dataset.armed !== "true") {
    wipeBtn.dataset.armed = "true";
    wipeBtn.textContent = "Forget all?";
    wipeArmedTimer = setTimeout(disarmWipe, 4000);
    return;
  }
  disarmWipe();
  if (!eng) return;
  eng.wipe();
  localStorage.removeItem(KEYS.overlay);
  offer = null;
  undo = null;
  setStatus("every learned word forgotten");
  document.body.dataset.wipes = String(Number(document.body.dataset.wipes || 0) + 1);
  note.focus();
  refresh();
}

function disarmWipe() {
  clearTimeout(wipeArmedTimer);
  wipeBtn.dataset.armed = "false";
  wipeBtn.textContent = "Wipe";
}

note.addEventListener("input", onInput);
note.addEventListener("paste", onPaste);
note.addEventListener("keyup", (ev) => { if (ev.key.startsWith("Arrow") || ev.key === "Home" || ev.key === "End") refresh(); });
note.addEventListener("click", refresh);
learningBox.addEventListener("change", () => {
  localStorage.setItem(KEYS.learning, learningBox.checked ? "on" : "off");
  if (eng) eng.setLearning(learningBox.checked);
  setStatus(learningBox.checked ? "learning on" : "learning off");
});
wipeBtn.addEventListener("click", onWipe);
addEventListener("pagehide", () => { if (saveTimer) saveNow(); });

// Hooks for tests and for the browser console.
globalThis.loomNotes = {
  engine: () => eng,
  // openFresh opens a second engine from the same model, with nothing learned.
  openFresh: () => LoomEngine.open(modelBytes.slice()),
  saveNow,
  storageKeys: KEYS,
};

boot();
