// Cargo's runner for wasm32-wasip1 test binaries (tests/wasm.sh): runs the module under Node's
// WASI with the test harness's arguments and exits with its status.
import { readFileSync } from 'node:fs';
import { WASI } from 'node:wasi';

const [file, ...args] = process.argv.slice(2);
const wasi = new WASI({ version: 'preview1', args: [file, ...args], env: {}, preopens: {}, returnOnExit: true });
const module = await WebAssembly.compile(readFileSync(file));
const instance = await WebAssembly.instantiate(module, wasi.getImportObject());
process.exit(wasi.start(instance));
