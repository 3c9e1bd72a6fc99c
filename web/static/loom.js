// loom.js starts the Keyloom WebAssembly module and wraps its bridge
// (web/wasm/main.go) in a small class whose methods throw ordinary errors.

let started = null;

// startBridge loads main.wasm once and resolves to the bridge object.
export function startBridge(wasmURL = "main.wasm") {
  if (started) return started;
  started = (async () => {
    if (typeof globalThis.Go !== "function") {
      throw new Error("keyloom notes: wasm_exec.js is not loaded");
    }
    const go = new globalThis.Go();
    const ready = new Promise((resolve) => { globalThis.loomBridgeReady = resolve; });
    let result;
    try {
      result = await WebAssembly.instantiateStreaming(fetch(wasmURL), go.importObject);
    } catch {
      // Served without the application/wasm type: compile from bytes.
      const resp = await fetch(wasmURL);
      if (!resp.ok) throw new Error(`keyloom notes: ${wasmURL}: HTTP ${resp.status}`);
      result = await WebAssembly.instantiate(await resp.arrayBuffer(), go.importObject);
    }
    go.run(result.instance); // resolves only when the Go program exits
    return ready;
  })();
  return started;
}

// unwrap turns a bridge answer {ok} / {err} into a value or an exception.
function unwrap(answer) {
  if (answer && typeof answer === "object" && "err" in answer) throw new Error(answer.err);
  return answer.ok;
}

// LoomEngine is one engine opened from model bytes.
export class LoomEngine {
  constructor(handle) {
    this.h = handle;
    this.canCorrect = Boolean(handle.canCorrect);
  }

  // open builds an engine from the bytes of a .klm model file.
  static async open(modelBytes) {
    const bridge = await startBridge();
    const u8 = modelBytes instanceof Uint8Array ? modelBytes : new Uint8Array(modelBytes);
    return new LoomEngine(unwrap(bridge.open(u8)));
  }

  info() { return JSON.parse(unwrap(this.h.info())); }
  // suggest returns {prefix, completions, predictions, correction?}.
  suggest(before) { return JSON.parse(unwrap(this.h.suggest(before))); }
  // correct returns the decision for the last word after a separator, or null.
  correct(before) { return JSON.parse(unwrap(this.h.correct(before))); }
  learn(text) { unwrap(this.h.learn(text)); }
  commit(word, contextBefore) { unwrap(this.h.commit(word, contextBefore)); }
  reject(original, correction) { unwrap(this.h.reject(original, correction)); }
  entries() { return unwrap(this.h.entries()); }
  saveOverlay() { return unwrap(this.h.saveOverlay()); }
  loadOverlay(bytes) { unwrap(this.h.loadOverlay(bytes)); }
  wipe() { unwrap(this.h.wipe()); }
  setLearning(on) { unwrap(this.h.setLearning(Boolean(on))); }
  close() { unwrap(this.h.close()); }
}

// toBase64 and fromBase64 carry overlay bytes through localStorage.
export function toBase64(u8) {
  let s = "";
  for (let i = 0; i < u8.length; i += 0x8000) {
    s += String.fromCharCode.apply(null, u8.subarray(i, i + 0x8000));
  }
  return btoa(s);
}

export function fromBase64(b64) {
  const s = atob(b64);
  const u8 = new Uint8Array(s.length);
  for (let i = 0; i < s.length; i++) u8[i] = s.charCodeAt(i);
  return u8;
}
