// A Web Worker of the verify page (web/src/pool.rs): it runs core's exact check, compiled to
// wasm (web/src/worker.rs, served as /pkg/check.js and /pkg/check_bg.wasm), one job at a time.
// In:  {kind: 'load', rows, cols, words: BigUint64Array} | {kind: 'share', share, cap} | {kind: 'facts'}
// Out: {kind: 'ready'} once loaded, then {kind: 'share' | 'facts', json, ms} per job (ms: the time
// it took), or {kind: 'error', message}.
import init, { load, check_share, facts } from '/pkg/check.js';

const ready = init({ module_or_path: '/pkg/check_bg.wasm' });
ready.then(
  () => self.postMessage({ kind: 'ready' }),
  (e) => self.postMessage({ kind: 'error', message: `the check module did not start: ${e}` }),
);

self.onmessage = async ({ data }) => {
  try {
    await ready;
    if (data.kind === 'load') {
      load(data.rows, data.cols, data.words);
    } else if (data.kind === 'share') {
      const t = performance.now();
      const json = check_share(data.share, data.cap);
      self.postMessage({ kind: 'share', json, ms: performance.now() - t });
    } else if (data.kind === 'facts') {
      const t = performance.now();
      const json = facts();
      self.postMessage({ kind: 'facts', json, ms: performance.now() - t });
    }
  } catch (e) {
    self.postMessage({ kind: 'error', message: String((e && e.message) || e) });
  }
};
