/**
 * `npm run build:kernels`: assembles the WebAssembly kernels (shared/engine/reduce/kernels/*.wat,
 * the text format of the WebAssembly standard) with wabt and writes each as a base64 module
 * beside it (NAME-wasm.ts), which the engine loads without a build step in the server, the
 * command line and the browser. tests/unit/reduce/kernels.test.ts checks the two agree.
 */
import { readFileSync, readdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { assembleWat, kernelModuleSource } from './lib/assemble-wat.ts';

const dir = path.resolve(import.meta.dirname, '../shared/engine/reduce/kernels');
for (const file of readdirSync(dir).filter((f) => f.endsWith('.wat'))) {
  const bytes = await assembleWat(file, readFileSync(path.join(dir, file), 'utf8'));
  const out = path.join(dir, file.replace(/\.wat$/, '-wasm.ts'));
  writeFileSync(out, kernelModuleSource(file, bytes));
  console.log(`${path.relative(process.cwd(), out)}: ${bytes.length} bytes`);
}
