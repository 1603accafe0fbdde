// End-to-end tests of the web app: a real `hadamard serve` on loopback, headless Chromium.
// Any page error or console error fails the test it happens in, so a wasm panic cannot pass.
// Screenshots of each main screen go to tests/browser/screenshots/. The last line printed is
// `N passed, N failed`.
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { bin, here, root, startServer, launchBrowser } from './lib.mjs';

const fixtures = join(root, 'tests', 'fixtures', 'formats');
const shots = join(here, 'screenshots');
mkdirSync(shots, { recursive: true });
const work = mkdtempSync(join(tmpdir(), 'hadamard-browser-files-'));

const sha256 = (bytes) => createHash('sha256').update(bytes).digest('hex');
const cliJson = (path) => JSON.parse(spawnSync(bin, ['verify', '--json', path], { encoding: 'utf8' }).stdout);
const cliError = (path) => spawnSync(bin, ['verify', path], { encoding: 'utf8' }).stderr.trim().replace(/^hadamard: /, '');
function assert(cond, msg) { if (!cond) throw new Error(msg); }
function eq(got, want, what) { assert(got === want, `${what}: got ${JSON.stringify(got)}, want ${JSON.stringify(want)}`); }

// A valid file, the same with one sign flipped (row 5, column 7, counted from 1), a malformed one.
const valid = join(fixtures, 'h12.pm');
const validText = readFileSync(valid, 'utf8');
const rows = validText.trim().split('\n');
rows[4] = rows[4].slice(0, 6) + (rows[4][6] === '+' ? '-' : '+') + rows[4].slice(7);
const wrongSign = join(work, 'h12_one_wrong_sign.pm');
writeFileSync(wrongSign, rows.join('\n') + '\n');
const malformed = join(fixtures, 'bad_char_line3_col7.pm');

function sylvester(k) {
  const n = 1 << k;
  let s = '';
  for (let i = 0; i < n; i++) {
    let row = '';
    for (let j = 0; j < n; j++) {
      let x = i & j, p = 0;
      while (x) { p ^= 1; x &= x - 1; }
      row += p ? '-' : '+';
    }
    s += row + '\n';
  }
  return s;
}

/** An n×n ±1 matrix in pm text, from a small seeded generator (xorshift32). */
function randomPm(n, seed) {
  let x = seed >>> 0 || 1;
  let s = '';
  for (let i = 0; i < n; i++) {
    let row = '';
    for (let j = 0; j < n; j++) {
      x ^= x << 13; x >>>= 0; x ^= x >>> 17; x ^= x << 5; x >>>= 0;
      row += x & 1 ? '-' : '+';
    }
    s += row + '\n';
  }
  return s;
}

const server = await startServer();
const browser = await launchBrowser();
let passed = 0, failed = 0;
const state = {};

async function withPage(fn, slug, { context, viewport } = {}) {
  const ctx = context || await browser.newContext({ acceptDownloads: true, viewport: viewport || { width: 1200, height: 900 } });
  const page = await ctx.newPage();
  const problems = [];
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('console', (m) => { if (m.type() === 'error') problems.push(`console error: ${m.text()}`); });
  try {
    await fn(page);
    // Let any late error surface before judging.
    await page.waitForTimeout(100);
    assert(problems.length === 0, problems.join('; '));
  } catch (e) {
    await page.screenshot({ path: join(shots, `failed-${slug}.png`), fullPage: true }).catch(() => {});
    throw new Error(`${e.message}${problems.length ? ` (also: ${problems.join('; ')})` : ''}`);
  } finally {
    if (!context) await ctx.close(); else await page.close();
  }
}

// BROWSER_ONLY=text runs only the tests whose name contains the text.
const only = process.env.BROWSER_ONLY;

async function test(name, fn, opts) {
  if (only && !name.includes(only)) return;
  const t0 = Date.now();
  try {
    await withPage(fn, name.replace(/[^a-z0-9]+/gi, '-').slice(0, 40), opts);
    passed++;
    console.log(`ok   ${name} (${Date.now() - t0} ms)`);
  } catch (e) {
    failed++;
    console.log(`FAIL ${name}: ${e.message.split('\n')[0]}`);
  }
}

const verdict = (page) => page.waitForSelector('#verdict[data-verdict]', { timeout: 60_000 })
  .then((el) => el.getAttribute('data-verdict'));

async function lookUp(page, n) {
  await page.goto(server.url + '/');
  await page.fill('#lookup-input', String(n));
  await page.press('#lookup-input', 'Enter');
  await page.waitForURL(`**/orders/${n}`);
  const el = await page.waitForSelector('#order-status[data-status]', { timeout: 30_000 });
  return el.getAttribute('data-status');
}

try {
  for (const [n, want] of [[12, ['constructible']], [92, ['constructible', 'known']], [668, ['open']], [6, ['impossible']]]) {
    await test(`look up ${n}: ${want.join(' or ')}`, async (page) => {
      const api = await (await fetch(`${server.url}/api/orders/${n}`)).json();
      const got = await lookUp(page, n);
      eq(got, api.status, `status shown for ${n} vs the API`);
      assert(want.includes(got), `status of ${n} is ${got}`);
      const words = await page.textContent('#order-status');
      assert(words.includes(String(n)), 'the status sentence names the order');
      if (n === 6) {
        const text = await page.textContent('main');
        assert(text.includes('multiple of 4'), 'says why 6 is impossible');
        assert(await page.$('a[href="/orders/4"]') && await page.$('a[href="/orders/8"]'), 'links the nearest orders 4 and 8');
      } else if (got !== 'open') {
        await page.waitForSelector('details.route .tree', { timeout: 10_000 });
      }
      if (n === 12) {
        await page.waitForSelector('.stored a.id', { timeout: 30_000 });
      }
      if (n === 92 || n === 6 || n === 668) await page.screenshot({ path: join(shots, `order-${n}.png`), fullPage: true });
    });
  }

  await test('a dimension gives ranked factorings', async (page) => {
    await page.goto(server.url + '/');
    await page.check('#kind-dimension');
    await page.fill('#lookup-input', '13696');
    await page.click('form.lookup button[type=submit]');
    await page.waitForURL('**/?dimension=13696');
    await page.waitForSelector('table.ranked tbody tr');
    const first = await page.textContent('table.ranked tbody tr');
    assert(first.includes('2^'), `first factoring: ${first}`);
    await page.screenshot({ path: join(shots, 'dimension-13696.png'), fullPage: true });
  });

  await test('a strata count gives the smallest known order', async (page) => {
    await page.goto(server.url + '/?strata=30');
    await page.waitForSelector('.answer a[href^="/orders/"]');
    eq(await page.getAttribute('.answer a', 'href'), '/orders/32', 'order for 30 strata');
  });

  await test('coverage map: 500 orders, legend in words, a click opens the order', async (page) => {
    await page.goto(server.url + '/coverage');
    await page.waitForSelector('.map a.cell');
    eq(await page.locator('.map a.cell').count(), 500, 'cells');
    const legend = await page.textContent('.legend-list');
    assert(legend.includes('open') && legend.includes('buildable here'), `legend: ${legend}`);
    await page.screenshot({ path: join(shots, 'coverage.png'), fullPage: true });
    await page.click('a.cell[data-order="668"]');
    await page.waitForURL('**/orders/668');
    eq(await (await page.waitForSelector('#order-status[data-status]')).getAttribute('data-status'), 'open', '668');
  });

  await test('verify a valid file: hadamard, same id as the CLI', async (page) => {
    await page.goto(server.url + '/verify');
    await page.setInputFiles('#matrix-file', valid);
    eq(await verdict(page), 'hadamard', 'data-verdict');
    eq(await page.textContent('#local-id'), cliJson(valid).sha256, 'id');
    assert((await page.textContent('.publish .notice')).includes('public and permanent'), 'the publish notice');
    await page.screenshot({ path: join(shots, 'verify-valid.png'), fullPage: true });
  });

  await test('verify a file with one wrong sign: not-hadamard, the sign found', async (page) => {
    await page.goto(server.url + '/verify');
    await page.setInputFiles('#matrix-file', wrongSign);
    eq(await verdict(page), 'not-hadamard', 'data-verdict');
    const repair = await page.textContent('#repair');
    assert(repair.includes('row 5, column 7'), `repair: ${repair}`);
    const cli = cliJson(wrongSign);
    eq(cli.repair.row + 1, 5, 'the CLI agrees on the row');
    const pairs = await page.textContent('#failing-pairs');
    assert(pairs.includes('rows 1 and 5'), `pairs: ${pairs}`);
    assert(!(await page.$('#publish')), 'no publish button for a failing matrix');
    await page.screenshot({ path: join(shots, 'verify-wrong-sign.png'), fullPage: true });
    await page.click('#repair button');
    eq(await page.waitForSelector('#verdict[data-verdict="hadamard"]').then((e) => e.getAttribute('data-verdict')), 'hadamard', 'after the repair');
  });

  await test('verify with erased entries and with several wrong signs: incomplete, completed, corrected', async (page) => {
    // Sylvester's matrix of order 32, made here in JavaScript; its id by node:crypto.
    const h = sylvester(5);
    const id = sha256(h);
    const cells = h.split('\n').filter((r) => r).map((r) => r.split(''));
    let x = 2026;
    const erased = new Set();
    while (erased.size < 80) {
      x ^= x << 13; x >>>= 0; x ^= x >>> 17; x ^= x << 5; x >>>= 0;
      erased.add(x % 1024);
    }
    for (const k of erased) cells[k >> 5][k & 31] = '?';
    const withErasures = join(work, 'h32_erased.pm');
    writeFileSync(withErasures, cells.map((r) => r.join('')).join('\n') + '\n');
    await page.goto(server.url + '/verify');
    await page.setInputFiles('#matrix-file', withErasures);
    eq(await verdict(page), 'incomplete', 'data-verdict');
    const head = await page.textContent('#verdict .headline');
    assert(head.startsWith('Incomplete: 80 entries erased'), `headline: ${head}`);
    assert((await page.textContent('#repair')).includes(id), 'the completion is the erased matrix');
    eq(cliJson(withErasures).completion.completed_sha256, id, 'the CLI agrees');
    await page.screenshot({ path: join(shots, 'verify-erased.png'), fullPage: true });
    await page.click('#repair button');
    await page.waitForSelector('#verdict[data-verdict="hadamard"]');
    eq(await page.textContent('#local-id'), id, 'after completing');

    const rows = h.split('\n').filter((r) => r).map((r) => r.split(''));
    for (const [i, j] of [[3, 17], [10, 2], [29, 30]]) rows[i][j] = rows[i][j] === '+' ? '-' : '+';
    const signs = join(work, 'h32_three_wrong_signs.pm');
    writeFileSync(signs, rows.map((r) => r.join('')).join('\n') + '\n');
    await page.goto(server.url + '/verify');
    await page.setInputFiles('#matrix-file', signs);
    eq(await verdict(page), 'not-hadamard', 'data-verdict');
    const repair = await page.textContent('#repair');
    for (const want of ['3 wrong signs', 'row 4, column 18', 'row 11, column 3', 'row 30, column 31', id]) {
      assert(repair.includes(want), `repair lacks ${want}: ${repair}`);
    }
    eq(cliJson(signs).repair.corrected_sha256, id, 'the CLI agrees');
  });

  await test('verify a malformed file: error with the CLI\'s line and column', async (page) => {
    await page.goto(server.url + '/verify');
    await page.setInputFiles('#matrix-file', malformed);
    eq(await verdict(page), 'error', 'data-verdict');
    const msg = (await page.textContent('#error-message')).trim();
    eq(msg, cliError(malformed), 'message');
    assert(msg.startsWith('line 3, column 7'), msg);
    await page.screenshot({ path: join(shots, 'verify-malformed.png'), fullPage: true });
  });

  await test('pasted text in another format (CSV) verifies', async (page) => {
    await page.goto(server.url + '/verify');
    await page.fill('#matrix-text', readFileSync(join(fixtures, 'h12.csv'), 'utf8'));
    await page.click('#verify-text');
    eq(await verdict(page), 'hadamard', 'data-verdict');
    eq(await page.textContent('#local-id'), cliJson(valid).sha256, 'the CSV file holds the same matrix');
  });

  await test('order 2048 stays responsive while it is checked', async (page) => {
    await page.goto(server.url + '/verify');
    await page.evaluate(() => {
      window.__gaps = [];
      let last = performance.now();
      window.__beat = setInterval(() => { const t = performance.now(); window.__gaps.push(t - last); last = t; }, 20);
    });
    // From disk: a buffer would travel through the DevTools protocol and stall the page itself.
    const big = join(work, 'sylvester2048.pm');
    writeFileSync(big, sylvester(11));
    await page.setInputFiles('#matrix-file', big);
    eq(await verdict(page), 'hadamard', 'data-verdict');
    assert(Number(await page.getAttribute('#verdict', 'data-workers')) >= 1, 'checked on the Web Workers');
    const worst = await page.evaluate(() => { clearInterval(window.__beat); return Math.max(...window.__gaps); });
    // The read is one step; the check yields every ~25 ms.
    assert(worst < 500, `the page stalled for ${worst.toFixed(0)} ms`);
    console.log(`     longest stall ${worst.toFixed(0)} ms`);
    await page.click('button[aria-label="Zoom in"]');
    await page.click('button[aria-label="Zoom in"]');
    const caption = await page.textContent('.picture .caption');
    assert(caption.startsWith('Zoom 4×: rows 769–1280'), `caption after zooming: ${caption}`);
    await page.focus('.picture canvas');
    await page.keyboard.press('ArrowDown');
    assert((await page.textContent('.picture .caption')).includes('rows 897–1408'), 'arrow key pans');
  });

  await test('without Web Workers, order 2048 is checked on the page, in slices', async (page) => {
    await page.addInitScript(() => { delete window.Worker; });
    await page.goto(server.url + '/verify');
    await page.evaluate(() => {
      window.__gaps = [];
      let last = performance.now();
      window.__beat = setInterval(() => { const t = performance.now(); window.__gaps.push(t - last); last = t; }, 20);
    });
    await page.setInputFiles('#matrix-file', join(work, 'sylvester2048.pm'));
    eq(await verdict(page), 'hadamard', 'data-verdict');
    eq(await page.getAttribute('#verdict', 'data-workers'), '0', 'workers');
    const worst = await page.evaluate(() => { clearInterval(window.__beat); return Math.max(...window.__gaps); });
    assert(worst < 500, `the page stalled for ${worst.toFixed(0)} ms`);
  });

  // The browser's report against the CLI's on failing matrices: the page checks in wasm with
  // core's simd128 kernel (on its Web Workers from order 2048, on the page below that), the CLI
  // natively with another kernel, so every count and listed pair is an independent cross-check.
  const failing = [
    ['Sylvester 2048 with one wrong sign, on the workers', sylvester(11), [700, 1234], true],
    ['a random ±1 matrix of order 2048, on the workers', randomPm(2048, 7), null, true],
    ['Sylvester 256 with one wrong sign, on the page', sylvester(8), [200, 99], false],
  ];
  for (const [what, text, flip, onWorkers] of failing) {
    await test(`${what}: the same failing pairs as the CLI`, async (page) => {
      let body = text;
      if (flip) {
        const lines = body.split('\n');
        const [r, c] = flip;
        lines[r] = lines[r].slice(0, c) + (lines[r][c] === '+' ? '-' : '+') + lines[r].slice(c + 1);
        body = lines.join('\n');
      }
      const file = join(work, `${what.replace(/[^a-z0-9]+/gi, '-')}.pm`);
      writeFileSync(file, body);
      const cli = cliJson(file);
      assert(!cli.hadamard && cli.failing_pairs_total > 0, 'the CLI finds failing pairs');
      await page.goto(server.url + '/verify');
      await page.setInputFiles('#matrix-file', file);
      eq(await verdict(page), 'not-hadamard', 'data-verdict');
      const v = await page.$('#verdict');
      eq(await v.getAttribute('data-kernel'), 'wasm32-simd128-sliced', 'kernel');
      const workers = Number(await v.getAttribute('data-workers'));
      assert(onWorkers ? workers >= 1 : workers === 0, `checked by ${workers} workers`);
      const n = cli.order;
      const reasons = await page.textContent('.reasons');
      assert(reasons.includes(`${cli.failing_pairs_total} of ${n * (n - 1) / 2} row pairs are not orthogonal`),
        `total: CLI ${cli.failing_pairs_total}, page: ${reasons.slice(0, 120)}`);
      const listed = await page.$$eval('#failing-pairs li', (lis) => lis.map((li) => li.textContent));
      const want = cli.failing_pairs.slice(0, listed.length)
        .map((p) => `rows ${p.i + 1} and ${p.j + 1}: inner product ${p.dot}`);
      assert(listed.length > 0, 'pairs listed');
      eq(JSON.stringify(listed), JSON.stringify(want), 'listed pairs');
      eq(await page.textContent('#local-id'), cli.sha256, 'id');
      if (flip) {
        const repair = await page.textContent('#repair');
        assert(repair.includes(`row ${flip[0] + 1}, column ${flip[1] + 1}`), `repair: ${repair}`);
        eq(cli.repair.row, flip[0], 'the CLI finds the same row');
      } else {
        eq(await page.$('#repair'), null, 'no repair for a random matrix');
      }
    });
  }

  await test('publish, then "already in the catalogue"', async (page) => {
    await page.goto(server.url + '/verify');
    // A normalised-but-permuted variant nobody else stores: swap rows 2 and 3 of h12.
    const r = validText.trim().split('\n');
    [r[1], r[2]] = [r[2], r[1]];
    const text = r.join('\n') + '\n';
    state.publishedId = sha256(Buffer.from(text));
    await page.fill('#matrix-text', text);
    await page.click('#verify-text');
    eq(await verdict(page), 'hadamard', 'data-verdict');
    await page.click('#publish');
    const ok = await page.waitForSelector('#publish-ok', { timeout: 30_000 });
    eq(await ok.getAttribute('data-id'), state.publishedId, 'published id');
    eq(await page.getAttribute('#permalink', 'href'), `/m/${state.publishedId}`, 'permanent link');
    assert((await ok.textContent()).startsWith('Published'), await ok.textContent());
    await page.screenshot({ path: join(shots, 'published.png'), fullPage: true });
    await page.click('#verify-text');
    await page.waitForSelector('#verdict[data-verdict="hadamard"]');
    await page.click('#publish');
    const again = await page.waitForSelector('#publish-ok');
    assert((await again.textContent()).startsWith('Already in the catalogue'), await again.textContent());
  });

  await test('the permanent link in a fresh context: page, picture, download hashes to the id', async (page) => {
    assert(state.publishedId, 'needs the publish test');
    await page.goto(`${server.url}/m/${state.publishedId}`);
    await page.waitForSelector('#id-check.good', { timeout: 30_000 });
    eq(await page.textContent('#entry-id'), state.publishedId, 'id on the page');
    const text = await page.textContent('main');
    assert(text.includes('Order 12') && text.includes('Uploaded'), 'order and provenance');
    assert(await page.$('canvas'), 'the picture');
    for (const f of ['pm', 'csv', 'bits', 'json', 'npy', 'npy-f64', 'npy-f64-scaled', 'png']) {
      assert(await page.$(`a[data-format="${f}"]`), `download link ${f}`);
    }
    await page.screenshot({ path: join(shots, 'matrix-page.png'), fullPage: true });
    const [dl] = await Promise.all([page.waitForEvent('download'), page.click('a[data-format="pm"]')]);
    const bytes = readFileSync(await dl.path());
    eq(sha256(bytes), state.publishedId, 'SHA-256 of the pm download');
    await page.click('#copy-link').catch(() => {});
  });

  await test('the matrix page offers every derived object, and they download', async (page) => {
    assert(state.publishedId, 'needs the publish test');
    await page.goto(`${server.url}/m/${state.publishedId}`);
    await page.waitForSelector('#derived a[data-derived="brr"]', { timeout: 30_000 });
    for (const k of ['screening', 'code', 'symmetric-design', 'sequency', 'ordering', 'brr', 'equivalence']) {
      assert(await page.$(`#derived a[data-derived="${k}"]`), `derived link ${k}`);
    }
    await page.fill('#derived-seed', '42');
    const [dl] = await Promise.all([page.waitForEvent('download'), page.click('#derived a[data-derived="screening"]')]);
    const csv = readFileSync(await dl.path(), 'utf8').split('\n');
    eq(csv[0], 'run,standard_order,kind,A,B,C,D,E,F,G,H,I,J,K', 'screening CSV header');
    eq(csv.filter((l) => l.includes(',design,')).length, 12, 'runs');
    const api = await (await fetch(`${server.url}/api/matrices/${state.publishedId}/derive/screening?seed=42`)).json();
    eq(api.randomisation.seed, 42, 'the seed typed on the page is the one used');
    await page.screenshot({ path: join(shots, 'matrix-derived.png'), fullPage: true });
    await page.goto(`${server.url}/orders/12`);
    await page.waitForSelector('#order-derived a[data-derived="brr"]', { timeout: 30_000 });
    eq(await page.getAttribute('#order-derived a[data-derived="brr"]', 'href'), '/api/brr?strata=11&format=csv', 'BRR link on the order page');
  });

  await test('phone width: no sideways scrolling on the main screens', async (page) => {
    for (const path of ['/', '/orders/92', '/coverage', '/verify']) {
      await page.goto(server.url + path);
      await page.waitForTimeout(path === '/' ? 100 : 600);
      const over = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
      assert(over <= 1, `${path} is ${over}px too wide`);
    }
    await page.goto(server.url + '/');
    await page.screenshot({ path: join(shots, 'phone-home.png'), fullPage: true });
  }, { viewport: { width: 375, height: 760 } });

  await test('keyboard: skip link, lookup by Enter, focus moves to the new heading', async (page) => {
    await page.goto(server.url + '/');
    await page.waitForSelector('#lookup-input');
    await page.keyboard.press('Tab');
    eq(await page.evaluate(() => document.activeElement.textContent), 'Skip to the content', 'first tab stop');
    await page.focus('#lookup-input');
    await page.keyboard.type('92');
    await page.keyboard.press('Enter');
    await page.waitForURL('**/orders/92');
    await page.waitForFunction(() => document.activeElement && document.activeElement.tagName === 'H1');
    await page.goBack();
    await page.waitForSelector('#lookup-input');
    await page.screenshot({ path: join(shots, 'home.png'), fullPage: true });
  });
} finally {
  await browser.close().catch(() => {});
  server.stop();
}
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed === 0 ? 0 : 1);
