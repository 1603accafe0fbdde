// In-browser verification speed: Sylvester matrices of order 1024, 2048 and 4096 verified in
// headless Chromium by the app (core compiled to wasm32 with simd128; from order 2048 on the
// page's Web Workers, below that on the page in ~25 ms slices), against native
// `hadamard verify` and, when python3 has numpy, numpy's H·Hᵀ, in the same run. Prints the load
// average before and after, and a Markdown table for docs/performance.md ("In the browser").
// "Workers busy" is the time the workers spent on their jobs in all: against the check's wall
// time it shows how much of two cores they got.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { bin, startServer, launchBrowser } from './lib.mjs';

const orders = (process.env.BENCH_ORDERS || '1024,2048,4096').split(',').map(Number);
// BENCH_NO_WORKERS=1 hides Web Workers from the page, so it checks on its own thread.
const noWorkers = process.env.BENCH_NO_WORKERS === '1';
const reps = Number(process.env.BENCH_REPS || 3);
// BENCH_PAUSE_MS: an idle pause before each check, so that the page has finished drawing the
// last verdict (and the browser collecting its garbage) when the next check starts.
const pauseMs = Number(process.env.BENCH_PAUSE_MS || 0);
const dir = mkdtempSync(join(tmpdir(), 'hadamard-bench-'));
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

function sylvester(n) {
  const lines = [];
  for (let i = 0; i < n; i++) {
    let row = '';
    for (let j = 0; j < n; j++) {
      let x = i & j, p = 0;
      while (x) { p ^= 1; x &= x - 1; }
      row += p ? '-' : '+';
    }
    lines.push(row);
  }
  return lines.join('\n') + '\n';
}

function native(path) {
  const xs = [];
  for (let r = 0; r < reps; r++) {
    const out = spawnSync(bin, ['verify', '--json', path], { encoding: 'utf8', maxBuffer: 1 << 26 });
    xs.push(JSON.parse(out.stdout).elapsed_ms);
  }
  return median(xs);
}

function numpy(path) {
  const py = `
import sys, time, numpy as np
rows = open(sys.argv[1]).read().split()
H = np.array([[1.0 if c == '+' else -1.0 for c in r] for r in rows])
n = H.shape[0]
best = []
for _ in range(${reps}):
    t = time.perf_counter()
    ok = np.array_equal(H @ H.T, n * np.eye(n))
    best.append((time.perf_counter() - t) * 1e3)
assert ok
print(sorted(best)[len(best) // 2])
`;
  const out = spawnSync('python3', ['-c', py, path], { encoding: 'utf8' });
  return out.status === 0 ? Number(out.stdout.trim()) : null;
}

const load = () => loadavg().map((x) => x.toFixed(2)).join(' ');
console.error(`load average before: ${load()}`);
const server = await startServer();
const browser = await launchBrowser();
const results = [];
try {
  const page = await browser.newPage();
  if (noWorkers) await page.addInitScript(() => { delete window.Worker; });
  page.on('pageerror', (e) => { throw e; });
  if (process.env.BENCH_LOG) page.on('console', (m) => console.error(m.text()));
  await page.goto(server.url + '/verify');
  await page.waitForSelector('#matrix-file');
  for (const n of orders) {
    const text = sylvester(n);
    const path = join(dir, `sylvester${n}.pm`);
    writeFileSync(path, text);
    const read = [], check = [], stall = [];
    let workers = 0, kernel = '';
    const busy = [];
    for (let r = 0; r < reps; r++) {
      if (pauseMs) await page.waitForTimeout(pauseMs);
      await page.evaluate(() => {
        window.__gaps = [];
        let last = performance.now();
        window.__beat = setInterval(() => { const t = performance.now(); window.__gaps.push(t - last); last = t; }, 10);
      });
      // A file on disk (a buffer would travel through the DevTools protocol and stall the page
      // itself), under a new name each time, so the app starts a fresh check.
      const each = join(dir, `s${n}-${r}.pm`);
      writeFileSync(each, text);
      await page.setInputFiles('#matrix-file', each);
      await page.waitForFunction((name) => {
        const v = document.querySelector('#verdict[data-verdict]');
        return v && v.textContent.includes(name);
      }, `s${n}-${r}.pm`, { timeout: 300_000 });
      const v = await page.$('#verdict');
      if ((await v.getAttribute('data-verdict')) !== 'hadamard') throw new Error(`order ${n} was not verified`);
      workers = Number(await v.getAttribute('data-workers'));
      kernel = await v.getAttribute('data-kernel');
      busy.push(Number(await v.getAttribute('data-workers-ms')));
      read.push(Number(await v.getAttribute('data-read-ms')));
      check.push(Number(await v.getAttribute('data-check-ms')));
      stall.push(await page.evaluate(() => { clearInterval(window.__beat); return Math.max(...window.__gaps); }));
    }
    const row = { n, workers, kernel, read: median(read), check: median(check), checks: check, workerMs: median(busy), stall: median(stall), native: native(path), numpy: numpy(path) };
    results.push(row);
    console.error(JSON.stringify(row));
  }
} finally {
  await browser.close().catch(() => {});
  server.stop();
}
console.error(`load average after: ${load()}`);
const f = (x) => (x == null ? '—' : x >= 100 ? x.toFixed(0) : x.toFixed(1));
console.log('| n | workers | browser: read (ms) | browser: check (ms) | workers busy (ms) | longest pause (ms) | native check (ms) | browser / native | numpy H·Hᵀ (ms) | numpy / browser |');
console.log('|---|---|---|---|---|---|---|---|---|---|');
for (const r of results) {
  console.log(`| ${r.n} | ${r.workers} | ${f(r.read)} | ${f(r.check)} | ${r.workers ? f(r.workerMs) : '—'} | ${f(r.stall)} | ${f(r.native)} | ${(r.check / r.native).toFixed(1)}× | ${f(r.numpy)} | ${r.numpy ? (r.numpy / r.check).toFixed(1) + '×' : '—'} |`);
}
