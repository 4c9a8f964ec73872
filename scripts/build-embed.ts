import fs from 'node:fs';
import path from 'node:path';
import { build } from 'esbuild';

/** Bundle the host-page loader (embed/loader.ts) into one small file in public/. */
async function main() {
  const entry = path.resolve('embed/loader.ts');
  if (!fs.existsSync(entry)) {
    console.log('embed/loader.ts not present yet; skipping the loader build.');
    return;
  }
  const result = await build({
    entryPoints: [entry],
    outfile: path.resolve('public/embed.js'),
    bundle: true,
    minify: true,
    format: 'iife',
    target: ['es2019'],
    legalComments: 'none',
    metafile: true,
  });
  const bytes = Object.values(result.metafile.outputs)[0]?.bytes ?? 0;
  console.log(`public/embed.js: ${bytes} bytes`);
}
main().catch((e) => {
  console.error(e);
  process.exit(1);
});
