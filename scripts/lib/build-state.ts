import fs from 'node:fs';
import path from 'node:path';

const SOURCE_DIRS = ['app', 'components', 'lib', 'models', 'embed', 'public', 'fonts'];
const SOURCE_FILES = ['next.config.mjs', 'tailwind.config.ts', 'postcss.config.mjs', 'package-lock.json', 'tsconfig.json'];

function newestMtime(entry: string): number {
  if (!fs.existsSync(entry)) return 0;
  const stat = fs.statSync(entry);
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = stat.mtimeMs;
  for (const child of fs.readdirSync(entry)) newest = Math.max(newest, newestMtime(path.join(entry, child)));
  return newest;
}

/** True when .next is missing or older than any source that goes into it. */
export function buildIsStale(root = process.cwd()): boolean {
  const marker = path.join(root, process.env.NEXT_DIST_DIR || '.next', 'BUILD_ID');
  if (!fs.existsSync(marker)) return true;
  const built = fs.statSync(marker).mtimeMs;
  const sources = [...SOURCE_DIRS, ...SOURCE_FILES].map((p) => path.join(root, p));
  return sources.some((p) => newestMtime(p) > built);
}
