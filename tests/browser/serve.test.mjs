// End-to-end test of `lamella serve` in headless Chromium: load the page,
// move a slider with the keyboard and check the strip's swatch at 0° against
// `lamella color` for the new thickness (within 1 per channel), run a match
// and cancel it, save the scene and compare the file with the page's design.
// Screenshots go to target/browser/.
//
// Needs Debian's chromium (/usr/bin/chromium, or CHROMIUM) and a release
// build of lamella (target/release/lamella, or LAMELLA). playwright-core
// drives the installed browser and downloads none.
import { spawn, execFileSync } from "node:child_process";
import { mkdtempSync, mkdirSync, readFileSync, writeFileSync, rmSync, copyFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve, dirname } from "node:path";
import { fileURLToPath } from "node:url";
import assert from "node:assert/strict";
import { chromium } from "playwright-core";

const root = resolve(dirname(fileURLToPath(import.meta.url)), "../..");
const lamella = process.env.LAMELLA || join(root, "target/release/lamella");
const browserPath = process.env.CHROMIUM || "/usr/bin/chromium";
const shots = join(root, "target/browser");
mkdirSync(shots, { recursive: true });

const work = mkdtempSync(join(tmpdir(), "lamella-browser-"));
const scenePath = join(work, "teal_label_foil.json");
copyFileSync(join(root, "scenes/teal_label_foil.json"), scenePath);
const original = JSON.parse(readFileSync(scenePath, "utf8"));

// The server, on a free port; its first line names the page.
const server = spawn(lamella, ["serve", scenePath, "--port", "0"], { stdio: ["ignore", "pipe", "inherit"] });
const url = await new Promise((ok, fail) => {
  let out = "";
  server.stdout.on("data", (d) => {
    out += d;
    const m = out.match(/http:\/\/\S+/);
    if (m) ok(m[0]);
  });
  server.on("exit", (code) => fail(new Error(`lamella serve exited ${code}`)));
  setTimeout(() => fail(new Error("no address printed")), 20000);
});
assert.match(url, /^http:\/\/127\.0\.0\.1:\d+\/#token=[0-9a-f]{32}$/);

const profile = mkdtempSync(join(tmpdir(), "lamella-chromium-"));
const context = await chromium.launchPersistentContext(profile, {
  executablePath: browserPath,
  headless: true,
  args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
    "--disable-component-update", "--no-first-run"],
  viewport: { width: 1280, height: 800 },
  acceptDownloads: false,
});

function colourAt0(scene) {
  const file = join(work, "check.json");
  writeFileSync(file, JSON.stringify(scene));
  const records = JSON.parse(execFileSync(lamella, ["color", file, "--format", "json"], { encoding: "utf8" }));
  const at0 = records.find((r) => r.angle_deg === 0);
  return at0.srgb.map((x) => Math.round(x * 255));
}

try {
  const page = context.pages()[0] || (await context.newPage());
  const errors = [];
  page.on("pageerror", (e) => errors.push(String(e)));
  await page.goto(url);
  await page.waitForSelector("#strip svg", { timeout: 30000 });
  await page.waitForFunction(() => window.lamella.idle());
  await page.screenshot({ path: join(shots, "serve-start.png") });

  // Move the first slider one step with the keyboard.
  const before = await page.evaluate(() => Number(document.body.dataset.liveCount));
  await page.focus("#slider-0");
  await page.keyboard.press("ArrowRight");
  await page.waitForFunction((n) => Number(document.body.dataset.liveCount) > n && window.lamella.idle(), before);
  const first = original.stack[0].stack[0];
  const moved = JSON.parse(JSON.stringify(original));
  moved.stack[0].stack[0].thickness_nm = first.thickness_nm + 1;
  const doc = await page.evaluate(() => window.lamella.doc());
  assert.equal(doc.stack[0].stack[0].thickness_nm, first.thickness_nm + 1, "the slider moved the thickness by one step");
  const shown = (await page.getAttribute('#swatches .chip[data-angle="0"]', "data-rgb")).split(",").map(Number);
  const expected = colourAt0(moved);
  for (let i = 0; i < 3; i++) assert.ok(Math.abs(shown[i] - expected[i]) <= 1, `strip at 0°: page ${shown}, lamella color ${expected}`);
  const chipCss = await page.$eval('#swatches .chip[data-angle="0"]', (e) => getComputedStyle(e).backgroundColor);
  assert.equal(chipCss, `rgb(${shown.join(", ")})`);

  // A match with a large budget, cancelled while it runs.
  await page.fill("#target-hex", "#8A4FA3");
  await page.fill("#match-evals", "60000");
  await page.click("#match");
  // Cancel as soon as the page offers it: a small design's search can end
  // on its own within a fraction of a second.
  await page.waitForFunction(() => !document.getElementById("cancel").disabled, null, { timeout: 60000 });
  await page.click("#cancel");
  await page.waitForFunction(() => document.body.dataset.matchState !== undefined, null, { timeout: 60000 });
  await page.screenshot({ path: join(shots, "serve-matching.png") });
  assert.equal(await page.evaluate(() => document.body.dataset.matchState), "cancelled", "the match was cancelled");
  assert.match(await page.textContent("#match-info"), /^cancelled after \d+ evaluations/);
  const afterCancel = await page.evaluate(() => window.lamella.doc());
  assert.deepEqual(afterCancel, doc, "a cancelled match leaves the design as it was");

  // Save over the scene file and compare.
  await page.click("#save");
  await page.waitForFunction(() => document.body.dataset.saved);
  const saved = JSON.parse(readFileSync(scenePath, "utf8"));
  assert.deepEqual(saved, await page.evaluate(() => window.lamella.doc()), "the saved file holds the page's design");
  assert.equal(saved.stack[0].stack[0].thickness_nm, first.thickness_nm + 1);

  // The other views, for the screenshots.
  await page.click('[data-tab="spectra"]');
  await page.waitForSelector("#spectra svg", { timeout: 30000 });
  await page.screenshot({ path: join(shots, "serve-spectra.png") });
  await page.click('[data-tab="preview"]');
  await page.waitForFunction(() => document.getElementById("preview").src.startsWith("blob:"), null, { timeout: 60000 });
  await page.screenshot({ path: join(shots, "serve-preview.png") });
  await page.click('[data-tab="travel"]');
  await page.screenshot({ path: join(shots, "serve.png") });
  assert.deepEqual(errors, [], "no script errors");
  console.log(`browser test passed; screenshots in ${shots}`);
} finally {
  await context.close();
  server.kill("SIGTERM");
  rmSync(profile, { recursive: true, force: true });
  rmSync(work, { recursive: true, force: true });
}
