import wabtInit from 'wabt';

/** The WebAssembly text `source` (from `name`) as a binary module, SIMD enabled. */
export async function assembleWat(name: string, source: string): Promise<Uint8Array> {
  const wabt = await wabtInit();
  const parsed = wabt.parseWat(name, source, { simd: true });
  try {
    parsed.validate();
    return new Uint8Array(parsed.toBinary({ write_debug_names: false }).buffer);
  } finally {
    parsed.destroy();
  }
}

/** The generated TypeScript module that carries `bytes` (assembled from `watFile`). */
export function kernelModuleSource(watFile: string, bytes: Uint8Array): string {
  const base64 = Buffer.from(bytes).toString('base64');
  return [
    `// Generated from ${watFile} by \`npm run build:kernels\`; do not edit.`,
    `export const wasmBase64 = '${base64}';`,
    '',
  ].join('\n');
}
