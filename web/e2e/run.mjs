// run.mjs drives Keyloom Notes in headless Chromium.
//
//   node e2e/run.mjs <page-url> <expected.json> <screenshot.png>
//
// When the engine corrects, a second screenshot with a correction chip is
// written beside the first, named *-fix.png.
// expected.json is written by the Go test (web/e2e_test.go) from the Go
// facade at test time: {canCorrect, inputs: [{before, suggest, correct}]}.
// The script prints one "ok - ..." or "not ok - ..." line per check, then a
// closing "N passed, N failed" line, and exits 1 when any check failed.
//
// CHROMIUM overrides the browser path (default /usr/bin/chromium). The
// browser is never downloaded: playwright-core only drives the one given.

import { chromium } from "playwright-core";
import { mkdtemp, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";

const [url, expectedPath, shotPath] = process.argv.slice(2);
if (!url || !expectedPath || !shotPath) {
  console.error("usage: node e2e/run.mjs <page-url> <expected.json> <screenshot.png>");
  process.exit(2);
}

// Flags for a closed network and a root user (see the machine notes in the
// project's environment docs): no sandbox, no background connections.
const FLAGS = [
  "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
  "--disable-background-networking", "--disable-component-update", "--disable-sync",
];
// An invented word, far from every word of the demo corpus so that no
// corrector rewrites it, typed twice to pass the engine's default MinTyped of 2.
const NEW_WORD = "xylofrump";
// Relative tolerance on probabilities: the browser runs the same Go code,
// but math.Exp may round differently under GOARCH=wasm than on amd64.
const PROB_TOL = 1e-9;

let passed = 0;
let failed = 0;
function check(name, ok, detail = "") {
  if (ok) {
    passed++;
    console.log(`ok - ${name}`);
  } else {
    failed++;
    console.log(`not ok - ${name}${detail ? `: ${detail}` : ""}`);
  }
  return ok;
}

// same compares two JSON values; numbers within PROB_TOL relative.
function same(a, b, path = "") {
  if (typeof a === "number" && typeof b === "number") {
    const scale = Math.max(Math.abs(a), Math.abs(b), Number.MIN_VALUE);
    return Math.abs(a - b) / scale <= PROB_TOL ? null : `${path}: ${a} != ${b}`;
  }
  if (a === null || b === null || typeof a !== "object" || typeof b !== "object") {
    return a === b ? null : `${path}: ${JSON.stringify(a)} != ${JSON.stringify(b)}`;
  }
  if (Array.isArray(a) !== Array.isArray(b)) return `${path}: array vs object`;
  const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
  for (const k of keys) {
    const d = same(a[k], b[k], `${path}.${k}`);
    if (d) return d;
  }
  return null;
}

const expected = JSON.parse(await readFile(expectedPath, "utf8"));
const userDir = await mkdtemp(join(tmpdir(), "keyloom-chromium-"));
const pageErrors = [];
const t0 = Date.now();
const ctx = await chromium.launchPersistentContext(userDir, {
  executablePath: process.env.CHROMIUM || "/usr/bin/chromium",
  headless: true,
  args: FLAGS,
  viewport: { width: 900, height: 720 },
  deviceScaleFactor: 1,
});
try {
  const page = ctx.pages()[0] ?? (await ctx.newPage());
  page.setDefaultTimeout(20000);
  page.on("pageerror", (err) => pageErrors.push(String(err)));
  page.on("console", (msg) => { if (msg.type() === "error") pageErrors.push(msg.text()); });

  await page.goto(url);
  await page.waitForSelector('body[data-state="ready"]', { timeout: 60000 });
  const readyMs = await page.evaluate(() => document.body.dataset.readyMs);
  console.log(`# page ready ${Date.now() - t0} ms after the browser launch, ${readyMs} ms after navigation`);
  const note = page.locator("#note");
  const noteValue = () => note.inputValue();
  const chipWords = (kind) => page.locator(`#chips .chip[data-kind="${kind}"]`).evaluateAll((els) => els.map((e) => e.dataset.word));
  // suggestIn asks an engine in the page: the page's own, or a fresh one.
  const suggestIn = (before, fresh) => page.evaluate(async ([b, f]) => {
    const eng = f ? await loomNotes.openFresh() : loomNotes.engine();
    const res = eng.suggest(b);
    if (f) eng.close();
    return res;
  }, [before, fresh]);

  // 1. The shared route table: a fresh engine in the browser must answer as
  // the Go facade did for the same model (testdata/routes/README.md).
  const got = await page.evaluate(async (inputs) => {
    const eng = await loomNotes.openFresh();
    const out = { canCorrect: eng.canCorrect, inputs: [] };
    for (const { before } of inputs) {
      out.inputs.push({ before, suggest: eng.suggest(before), correct: eng.correct(before) });
    }
    eng.close();
    return out;
  }, expected.inputs);
  check("bridge and facade agree on whether correct is available", got.canCorrect === expected.canCorrect,
    `browser ${got.canCorrect}, Go ${expected.canCorrect}`);
  let tableOK = 0;
  expected.inputs.forEach((want, i) => {
    const d = same(got.inputs[i], want, `[${JSON.stringify(want.before)}]`);
    if (check(`route table ${JSON.stringify(want.before)} matches the Go facade`, d === null, d)) tableOK++;
  });
  console.log(`# route table: ${tableOK}/${expected.inputs.length} inputs match`);

  // 2. Typing key by key shows predictions after a space; a click inserts one.
  await note.click();
  await page.keyboard.type("see you at the ", { delay: 25 });
  await page.waitForSelector('#chips .chip[data-kind="prediction"]');
  const preds = await chipWords("prediction");
  const predsEngine = (await suggestIn("see you at the ", false)).predictions.map((s) => s.word);
  check("predictions strip shows the engine's predictions after a space", JSON.stringify(preds) === JSON.stringify(predsEngine),
    `strip ${JSON.stringify(preds)}, engine ${JSON.stringify(predsEngine)}`);
  await page.locator('#chips .chip[data-kind="prediction"]').first().click();
  check("clicking a prediction inserts it and a space", (await noteValue()) === `see you at the ${preds[0]} `,
    JSON.stringify(await noteValue()));

  // 3. Completions while a word is typed; a click replaces the prefix.
  await page.keyboard.type("and the sh", { delay: 25 });
  await page.waitForSelector('#chips .chip[data-kind="completion"]');
  const comps = await chipWords("completion");
  check("completions start with the typed prefix", comps.length > 0 && comps.every((w) => w.toLowerCase().startsWith("sh")),
    JSON.stringify(comps));
  const beforeAccept = await noteValue();
  await page.locator('#chips .chip[data-kind="completion"]').first().click();
  check("clicking a completion replaces the word being typed", (await noteValue()) === `${beforeAccept.slice(0, -2)}${comps[0]} `,
    JSON.stringify(await noteValue()));
  check("the cursor stays in the note after a click", await page.evaluate(() => document.activeElement.id === "note"));

  // 4. Corrections: a chip while a word that starts no known word is typed,
  // and the engine's decision when the word is finished with a space.
  if (expected.canCorrect) {
    const typo = "the heatr";
    const want = expected.inputs.find((a) => a.before === typo);
    if (check(`the Go facade corrects ${JSON.stringify(typo)} (the shared table's misspelling)`, Boolean(want && want.suggest.correction))) {
      await page.keyboard.type(`Mind ${typo}`, { delay: 25 });
      await page.waitForSelector('#chips .chip[data-kind="fix"]');
      const before = await noteValue();
      const res = await suggestIn(before, false);
      const fixes = await chipWords("fix");
      check("the correction chip shows the engine's replacement first", res.correction && fixes[0] === res.correction.replacement,
        `strip ${JSON.stringify(fixes)}, engine ${JSON.stringify(res.correction)}`);
      await page.screenshot({ path: shotPath.replace(/\.png$/, "-fix.png"), fullPage: true });
      await page.locator('#chips .chip[data-kind="fix"]').first().click();
      check("clicking the correction chip replaces the word being typed",
        (await noteValue()) === `${before.slice(0, -res.correction.typed.length)}${res.correction.replacement} `,
        JSON.stringify(await noteValue()));
    }

    // A misspelling finished by a space: the page follows Correct's decision.
    const typo2 = "tomorow";
    const head = await noteValue();
    const decision = await page.evaluate((t) => loomNotes.engine().correct(t), `${head}${typo2} `);
    if (check(`the engine corrects ${JSON.stringify(typo2)} after a space`, decision !== null, "pick another misspelling")) {
      await page.keyboard.type(`${typo2} `, { delay: 25 });
      if (decision.apply) {
        check("a safe correction is made when the space is typed", (await noteValue()) === `${head}${decision.replacement} `,
          JSON.stringify(await noteValue()));
        await page.waitForSelector('#chips .chip[data-kind="undo"]');
        await page.locator('#chips .chip[data-kind="undo"]').click();
        check("the undo chip puts the typed word back", (await noteValue()) === `${head}${typo2} `, JSON.stringify(await noteValue()));
        const again = await page.evaluate((t) => loomNotes.engine().correct(t), `${head}${typo2} `);
        check("an undone correction is not offered again",
          again === null || again.replacement !== decision.replacement, JSON.stringify(again));
      } else {
        check("an unsafe correction is only offered", (await noteValue()) === `${head}${typo2} `, JSON.stringify(await noteValue()));
        await page.waitForSelector('#chips .chip[data-kind="fix"]');
        await page.locator('#chips .chip[data-kind="fix"]').first().click();
        check("clicking the offered correction replaces the finished word",
          (await noteValue()) === `${head}${decision.replacement} `, JSON.stringify(await noteValue()));
      }
    }
  }

  // 5. Personal words: unknown at first, learned by typing, kept over a reload.
  const probe = "we saw xylo";
  const hasNew = (res) => (res.completions || []).some((s) => s.word.toLowerCase() === NEW_WORD);
  check("the new word is not suggested before it is typed", !hasNew(await suggestIn(probe, false)));
  await page.keyboard.type(`We met ${NEW_WORD} there. Then ${NEW_WORD} left. `, { delay: 15 });
  check("the new word is suggested after it was typed twice", hasNew(await suggestIn(probe, false)));
  // The page saves a moment after the last finished word: poll until the
  // stored overlay, loaded into a fresh engine, knows the new word.
  const storedKnows = () => page.evaluate(async ([p, w]) => {
    const b64 = localStorage.getItem(loomNotes.storageKeys.overlay);
    if (!b64) return false;
    const bytes = Uint8Array.from(atob(b64), (ch) => ch.charCodeAt(0));
    const eng = await loomNotes.openFresh();
    try {
      eng.loadOverlay(bytes);
      return (eng.suggest(p).completions || []).some((s) => s.word.toLowerCase() === w);
    } finally {
      eng.close();
    }
  }, [probe, NEW_WORD]);
  let saved = false;
  for (let i = 0; i < 40 && !(saved = await storedKnows()); i++) await page.waitForTimeout(100);
  check("the overlay stored in the browser holds the new word", saved);
  const typed = await noteValue();

  await page.reload();
  await page.waitForSelector('body[data-state="ready"]', { timeout: 60000 });
  check("the note text survives a reload", (await noteValue()) === typed, JSON.stringify(await noteValue()));
  check("a fresh engine does not know the new word (it comes from the overlay)", !hasNew(await suggestIn(probe, true)));
  await note.press("End");
  await page.keyboard.type("Ask xylo", { delay: 25 });
  await page.waitForSelector('#chips .chip[data-kind="completion"]');
  const after = await chipWords("completion");
  check("after a reload the learned word is offered while typing", after.some((w) => w.toLowerCase() === NEW_WORD),
    JSON.stringify(after));
  await page.screenshot({ path: shotPath, fullPage: true });
  console.log(`# screenshot ${shotPath}`);

  // 6. Wipe forgets every learned word, in the engine and in storage.
  await page.locator("#wipe").click();
  await page.locator('#wipe[data-armed="true"]').click();
  await page.waitForFunction(() => Number(document.body.dataset.wipes || 0) > 0);
  check("after Wipe the learned word is gone", !hasNew(await suggestIn(probe, false)));
  check("after Wipe storage holds no overlay",
    (await page.evaluate(() => localStorage.getItem(loomNotes.storageKeys.overlay))) === null);

  check("no errors in the page", pageErrors.length === 0, pageErrors.join(" | "));
} catch (err) {
  check("the browser session ran to the end", false, err.stack || String(err));
} finally {
  await ctx.close();
  await rm(userDir, { recursive: true, force: true });
}
console.log(`# browser session ${Date.now() - t0} ms`);
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed === 0 && passed > 0 ? 0 : 1);
