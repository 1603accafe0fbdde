// Shared by run.mjs and bench.mjs: start a real `hadamard serve` on loopback, launch Debian's
// Chromium through playwright-core, and stop both by what we started (the server by its PID).
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

export const here = dirname(fileURLToPath(import.meta.url));
export const root = resolve(here, '..', '..');
export const bin = resolve(root, process.env.HADAMARD_BIN || 'target/release/hadamard');

/** Starts `hadamard serve` on a free loopback port with a fresh database; resolves to
 *  { url, pid, stop }. The server prints the address it listens on as its one stdout line. */
export async function startServer() {
  const dir = mkdtempSync(join(tmpdir(), 'hadamard-browser-'));
  const child = spawn(bin, ['serve', '--addr', '127.0.0.1:0', '--db', join(dir, 'registry.sqlite3')], {
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, RUST_LOG: process.env.RUST_LOG || 'warn' },
  });
  let stderr = '';
  child.stderr.on('data', (d) => { stderr += d; });
  const url = await new Promise((ok, fail) => {
    let out = '';
    const timer = setTimeout(() => fail(new Error(`the server did not start in 60 s:\n${stderr}`)), 60_000);
    child.stdout.on('data', (d) => {
      out += d;
      const m = out.match(/http:\/\/127\.0\.0\.1:\d+/);
      if (m) { clearTimeout(timer); ok(m[0]); }
    });
    child.on('exit', (code) => { clearTimeout(timer); fail(new Error(`the server exited with ${code}:\n${stderr}`)); });
    child.on('error', (e) => { clearTimeout(timer); fail(new Error(`cannot start ${bin}: ${e.message} (build it with cargo build --release, or set HADAMARD_BIN)`)); });
  });
  for (let i = 0; i < 100; i++) {
    try { if ((await fetch(`${url}/api/health`)).ok) break; } catch { /* not yet */ }
    await new Promise((r) => setTimeout(r, 100));
  }
  const stop = () => {
    try { process.kill(child.pid, 'SIGTERM'); } catch { /* already gone */ }
    rmSync(dir, { recursive: true, force: true });
  };
  return { url, pid: child.pid, stop };
}

/** Headless Debian Chromium. Playwright gives every launch a fresh, temporary user-data-dir. */
export function launchBrowser() {
  return chromium.launch({
    executablePath: process.env.CHROMIUM || '/usr/bin/chromium',
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync'],
  });
}
