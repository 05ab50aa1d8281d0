// The browser test: lsys in the classic notebook as a user meets it.
//
// Debian's classic notebook server (jupyter-notebook) and Debian's chromium,
// driven by playwright-core (pinned in package-lock.json; npm ci). For each
// notebook: open it with its outputs cleared, Run All with the lsys kernel,
// and check that tables, charts and highlighted code appear and that no raw
// LaTeX remains once the cells have finished; then check completion and
// inspection in the page, and save a full-page screenshot to
// build/screenshots/. A missing browser, server or kernel is a failure,
// never a skip.
//
//   node tests/browser/run.js [--lsys PATH] [--out DIR]
//
// The lsys binary defaults to build/lsys (./install builds it); it is
// registered under a private Jupyter path, so nobody else's registration
// is used and nothing outside a temporary folder is touched.
"use strict";

const fs = require("fs");
const os = require("os");
const path = require("path");
const net = require("net");
const { spawn, execFileSync } = require("child_process");

const top = path.resolve(__dirname, "..", "..");
const args = process.argv.slice(2);
function opt(name, def) {
  const i = args.indexOf(name);
  return i >= 0 && i + 1 < args.length ? args[i + 1] : def;
}
const lsysBin = path.resolve(opt("--lsys", path.join(top, "build", "lsys")));
const outDir = path.resolve(opt("--out", path.join(top, "build", "screenshots")));
const chromiumPath = "/usr/bin/chromium";
const demos = fs.readdirSync(path.join(top, "notebooks")).filter((f) => f.endsWith(".ipynb")).sort(); // every demo notebook
// Cells saved on their own (input and output) for the README's tour:
// notebook, the start of the cell's source, file name.
const tour = [
  ["thirty-cells.ipynb", "G1 = system(", "tour-system.png"],
  ["frame-structure.ipynb", "diagram(frame)", "tour-diagram.png"],
  ["frame-structure.ipynb", "polezero(frame.roof.shaker)", "tour-polezero.png"],
  ["converter-loop.ipynb", "plant_held = sample(", "tour-margins.png"],
];

const failures = [];
function fail(msg) {
  failures.push(msg);
  console.error("FAIL: " + msg);
}
function need(ok, msg) {
  if (!ok) fail(msg);
  return ok;
}
function die(msg) {
  console.error("browser test: " + msg);
  process.exit(1);
}

let chromium;
try {
  ({ chromium } = require("playwright-core"));
} catch (e) {
  die("playwright-core is missing: run `npm ci` in tests/browser (./install does it as root)");
}
if (!fs.existsSync(chromiumPath)) die(`no browser at ${chromiumPath}: install Debian's chromium (apt-get install chromium; ./install does it as root)`);
if (!fs.existsSync("/usr/bin/jupyter-notebook")) die("no classic notebook server: install Debian's jupyter-notebook (./install does it as root)");
if (!fs.existsSync(lsysBin)) die(`no lsys binary at ${lsysBin}: run ./install or pass --lsys PATH`);

function freePort() {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.listen(0, "127.0.0.1", () => {
      const p = s.address().port;
      s.close(() => resolve(p));
    });
    s.on("error", reject);
  });
}

// A notebook of 30 cells, each a system card with its state equations, and
// a modal diagram: equations must be typeset once all cells are done.
function thirtyCells() {
  const cells = [];
  const code = (src) => ({ cell_type: "code", execution_count: null, metadata: {}, outputs: [], source: src });
  cells.push({ cell_type: "markdown", metadata: {}, source: "# Thirty system cards\nEach cell shows a system with its state equations." });
  for (let k = 1; k <= 30; k++) {
    const w = (1 + k / 10).toFixed(1);
    cells.push(code(`G${k} = system([[0, 1], [-${w}*${w}, -0.${k % 9 + 1}]], [0, 1], [1, 0], inputs: ["force"], outputs: ["position"])\nG${k}`));
  }
  cells.push(code("diagram(G3)"));
  // every token class of the editor mode once
  cells.push(code('# a comment, a string, a keyword and a number\nlabel = if true then "stiff" else "soft"\nlabel'));
  return { cells, metadata: { kernelspec: { name: "lsys", display_name: "lsys (linear systems)", language: "lsys" } }, nbformat: 4, nbformat_minor: 5 };
}

function cleared(file) {
  const nb = JSON.parse(fs.readFileSync(file, "utf8"));
  for (const c of nb.cells) {
    if (c.cell_type === "code") {
      c.outputs = [];
      c.execution_count = null;
    }
  }
  return nb;
}

async function waitHTTP(url, ms) {
  const t0 = Date.now();
  while (Date.now() - t0 < ms) {
    try {
      const r = await fetch(url);
      if (r.ok) return true;
    } catch (e) {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  return false;
}

async function main() {
  const t0 = Date.now();
  const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "lsys-browser-"));
  const env = Object.assign({}, process.env, {
    HOME: tmp,
    JUPYTER_PATH: path.join(tmp, "p", "share", "jupyter"),
    JUPYTER_CONFIG_DIR: path.join(tmp, "config"),
    JUPYTER_DATA_DIR: path.join(tmp, "data"),
    JUPYTER_RUNTIME_DIR: path.join(tmp, "runtime"),
    PYDEVD_DISABLE_FILE_VALIDATION: "1",
  });
  execFileSync(lsysBin, ["kernelspec", "--prefix", path.join(tmp, "p")], { env, stdio: "inherit" });
  const nbDir = path.join(tmp, "nb");
  fs.mkdirSync(nbDir);
  for (const d of demos) fs.writeFileSync(path.join(nbDir, d), JSON.stringify(cleared(path.join(top, "notebooks", d))));
  // data files the notebooks read (load, readmtx) go beside them
  for (const f of fs.readdirSync(path.join(top, "notebooks"))) {
    if (!f.endsWith(".ipynb")) fs.copyFileSync(path.join(top, "notebooks", f), path.join(nbDir, f));
  }
  fs.writeFileSync(path.join(nbDir, "thirty-cells.ipynb"), JSON.stringify(thirtyCells()));
  fs.mkdirSync(outDir, { recursive: true });

  const port = await freePort();
  const token = "lsys-browser-test";
  const server = spawn("/usr/bin/jupyter-notebook", [
    "--no-browser", "--ip=127.0.0.1", `--port=${port}`, "--port-retries=0", `--NotebookApp.token=${token}`,
    `--notebook-dir=${nbDir}`, "--NotebookApp.open_browser=False",
    ...(process.getuid() === 0 ? ["--allow-root"] : []), // CI containers run as root
  ], { env, stdio: ["ignore", "ignore", "pipe"] });
  let serverLog = "";
  server.stderr.on("data", (b) => { serverLog += b; });
  server.on("exit", (code) => { if (code !== null && code !== 0) die(`the notebook server exited (${code}):\n${serverLog}`); });
  const base = `http://127.0.0.1:${port}`;
  let ctx;
  try {
    if (!(await waitHTTP(`${base}/api?token=${token}`, 30000))) die("the notebook server did not start:\n" + serverLog);
    ctx = await chromium.launchPersistentContext(path.join(tmp, "profile"), {
      executablePath: chromiumPath,
      headless: true,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
        "--disable-background-networking", "--disable-component-update", "--disable-sync"],
      viewport: { width: 1280, height: 900 },
    });
    for (const name of ["thirty-cells.ipynb", ...demos]) {
      await runNotebook(ctx, `${base}/notebooks/${name}?token=${token}`, name, name === "thirty-cells.ipynb");
    }
  } finally {
    if (ctx) await ctx.close().catch(() => {});
    server.kill("SIGTERM");
    fs.rmSync(tmp, { recursive: true, force: true });
  }
  const secs = ((Date.now() - t0) / 1000).toFixed(1);
  if (failures.length) {
    console.error(`browser test: ${failures.length} failure(s) in ${secs} s`);
    process.exit(1);
  }
  console.log(`browser test: ok in ${secs} s; screenshots in ${outDir}`);
}

async function runNotebook(ctx, url, name, probe) {
  const page = await ctx.newPage();
  const errors = [];
  page.on("pageerror", (e) => errors.push(String(e)));
  // The classic notebook asks for the editor mode named in the stored
  // notebook's language_info as it opens, before kernel.js (which defines
  // the mode) has loaded: that one request fails by design of the notebook
  // and the cells get the mode once kernel.js has run, which the
  // highlighting check below verifies. Any other missing resource fails.
  page.on("response", (r) => {
    if (r.status() === 404 && /kernel\.js|kernelspecs|logo/.test(r.url())) errors.push("404 " + r.url());
  });
  await page.goto(url);
  await page.waitForFunction(() => window.Jupyter && Jupyter.notebook && Jupyter.notebook.kernel && Jupyter.notebook.kernel.is_connected(), null, { timeout: 60000 });
  need(await page.evaluate(() => Jupyter.notebook.kernel.name) === "lsys", `${name}: the kernel is not lsys`);
  // Run All, from the menu as a user does
  await page.click("#celllink");
  await page.click("#run_all_cells a");
  const t0 = Date.now();
  await page.waitForFunction(() => {
    const cells = Jupyter.notebook.get_cells().filter((c) => c.cell_type === "code" && c.get_text().trim() !== "");
    return cells.every((c) => typeof c.input_prompt_number === "number") && !Jupyter.notebook.kernel_busy &&
      document.querySelector("#kernel_indicator_icon.kernel_idle_icon") !== null;
  }, null, { timeout: 120000, polling: 100 });
  // iopub (outputs) and shell (the reply that numbers the prompt) are
  // separate channels: the last outputs may land just after the last
  // prompt is numbered, so wait until the outputs stop changing for 1 s
  let last = -1;
  let since = Date.now();
  while (Date.now() - since < 1000 && Date.now() - t0 < 120000) {
    const n = await page.evaluate(() => document.querySelectorAll(".output_area").length);
    if (n !== last) {
      last = n;
      since = Date.now();
    }
    await page.waitForTimeout(100);
  }
  const ran = Date.now() - t0 - 1000;
  // raw LaTeX: display math delimiters or environments left as text in outputs
  const rawLatex = () => page.evaluate(() => {
    const found = [];
    for (const o of document.querySelectorAll(".output_area .output_subarea")) {
      const t = o.innerText;
      const i = Math.max(t.indexOf("$$"), t.indexOf("\\begin{"));
      if (i >= 0) found.push(t.slice(Math.max(0, i - 40), i + 60).replace(/\s+/g, " "));
    }
    return found;
  });
  let found = await rawLatex();
  const tDone = Date.now();
  while (found.length > 0 && Date.now() - tDone < 10000) {
    await page.waitForTimeout(100);
    found = await rawLatex();
  }
  const raw = found.length;
  if (raw) console.error(`${name}: raw LaTeX in: ${found.map((s) => JSON.stringify(s)).join("; ")}`);
  const typeset = Date.now() - tDone;
  console.log(`${name}: cells ran in ${(ran / 1000).toFixed(1)} s; raw LaTeX gone ${typeset} ms after the last cell`);
  need(raw === 0, `${name}: raw LaTeX still shows in ${raw} outputs 10 s after the cells finished`);
  if (probe) need(typeset <= 2000, `${name}: equations typeset ${typeset} ms after the cells finished (want at most 2 s)`);

  const counts = await page.evaluate(() => ({
    errors: document.querySelectorAll(".output_error").length,
    tables: document.querySelectorAll(".output_area table").length,
    charts: document.querySelectorAll('.output_area img[src^="data:image/svg+xml"]').length,
    builtins: document.querySelectorAll(".CodeMirror .cm-builtin").length,
    numbers: document.querySelectorAll(".CodeMirror .cm-number").length,
    mode: Jupyter.notebook.get_cell(1).code_mirror.getOption("mode"),
    // outputs wider than a 980 px notebook column (tables must wrap or
    // transpose, charts be sized to fit)
    wide: Array.from(document.querySelectorAll(".output_subarea > *")).filter((e) => e.scrollWidth > 980)
      .map((e) => `${e.scrollWidth} px: ${(e.innerText || e.getAttribute("alt") || "").slice(0, 60).replace(/\s+/g, " ")}`),
  }));
  need(counts.wide.length === 0, `${name}: outputs wider than 980 px: ${counts.wide.join("; ")}`);
  const expectedErrors = await page.evaluate(() => Jupyter.notebook.get_cells().filter((c) => (c.metadata.tags || []).includes("raises-exception")).length);
  need(counts.errors <= expectedErrors, `${name}: ${counts.errors} cells failed (${expectedErrors} are meant to)`);
  need(counts.tables > 0, `${name}: no tables`);
  need(counts.charts > 0, `${name}: no charts`);
  need(counts.builtins > 0 && counts.numbers > 0, `${name}: code not highlighted (mode ${JSON.stringify(counts.mode)}, ${counts.builtins} built-ins, ${counts.numbers} numbers)`);
  console.log(`${name}: ${counts.tables} tables, ${counts.charts} charts, ${counts.builtins} highlighted built-in calls`);

  if (probe) {
    const kinds = await page.evaluate(() => ["keyword", "builtin", "string", "number", "comment"]
      .filter((k) => document.querySelectorAll(".CodeMirror .cm-" + k).length === 0));
    need(kinds.length === 0, `${name}: no ${kinds.join(", ")} highlighted`);
    // kernel.css gives built-ins the reports' blue (the theme's is green)
    const colour = await page.evaluate(() => getComputedStyle(document.querySelector(".CodeMirror .cm-builtin")).color);
    need(colour === "rgb(11, 79, 138)", `${name}: built-ins drawn in ${colour}, not kernel.css's colour`);
    await completeAndInspect(page, name);
  }
  need(errors.length === 0, `${name}: page errors: ${errors.join("; ")}`);

  // the notebook scrolls inside #site; let the page grow so the full-page
  // screenshot holds every cell
  await page.addStyleTag({ content: "#site { height: auto !important; overflow: visible !important; } html, body { height: auto !important; overflow: visible !important; }" });
  await page.screenshot({ path: path.join(outDir, name.replace(/\.ipynb$/, ".png")), fullPage: true });
  for (const [nb, start, file] of tour) {
    if (nb !== name) continue;
    const idx = await page.evaluate((start) => Jupyter.notebook.get_cells().findIndex((c) => c.get_text().startsWith(start)), start);
    if (!need(idx >= 0, `${name}: no cell starting ${JSON.stringify(start)} for the tour`)) continue;
    await page.evaluate(() => Jupyter.notebook.select(0)); // no selection frame on the shot
    await page.locator("#notebook-container .cell").nth(idx).screenshot({ path: path.join(outDir, file) });
  }
  await page.close();
}

// Completion (Tab) and inspection (Shift-Tab) in a fresh cell at the end.
async function completeAndInspect(page, name) {
  await page.evaluate(() => {
    const nb = Jupyter.notebook;
    const cell = nb.insert_cell_at_bottom("code");
    nb.select(nb.ncells() - 1);
    cell.set_text("diag");
    cell.focus_editor();
    cell.code_mirror.setCursor(0, 4);
  });
  await page.keyboard.press("Tab");
  let ok = false;
  try {
    await page.waitForFunction(() => {
      const cell = Jupyter.notebook.get_cell(Jupyter.notebook.ncells() - 1);
      const sel = document.querySelector(".completions select");
      return cell.get_text() === "diagram" || (sel && Array.from(sel.options).some((o) => o.value === "diagram"));
    }, null, { timeout: 10000 });
    ok = true;
  } catch (e) { /* reported below */ }
  need(ok, `${name}: Tab after "diag" did not complete to diagram`);
  await page.keyboard.press("Escape").catch(() => {});
  await page.evaluate(() => {
    const cell = Jupyter.notebook.get_cell(Jupyter.notebook.ncells() - 1);
    cell.set_text("diagram(");
    cell.focus_editor();
    cell.code_mirror.setCursor(0, 8);
  });
  await page.keyboard.press("Shift+Tab");
  ok = false;
  try {
    await page.waitForFunction(() => {
      const t = document.querySelector("#tooltip");
      return t && t.offsetParent !== null && /modal diagram/i.test(t.innerText);
    }, null, { timeout: 10000 });
    ok = true;
  } catch (e) { /* reported below */ }
  need(ok, `${name}: Shift-Tab on diagram( showed no help`);
  await page.keyboard.press("Escape").catch(() => {});
  await page.evaluate(() => {
    const nb = Jupyter.notebook;
    nb.delete_cell(nb.ncells() - 1);
  });
}

main().catch((e) => die(String(e && e.stack || e)));
