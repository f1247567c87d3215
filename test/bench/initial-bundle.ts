/**
 * The app's first download, from the production build in dist/ (run `npx ng build` first): the files
 * index.html loads (main script, styles) and every chunk they import statically, raw and compressed the
 * way Angular's build estimates transfer size (brotli at default settings; files under 1 KiB counted as
 * they are), so the figure matches the build's "Initial total". `tsx test/bench/initial-bundle.ts` prints it alone.
 */
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';

const BROWSER_DIST = path.resolve(__dirname, '../../dist/jacketwatch/browser');

export interface InitialBundle {
  files: number;
  rawKb: number;
  transferKb: number;
  /** When the build was made (index.html's modification time). */
  builtAt: string;
}

/** Null when there is no production build to measure. */
export function measureInitialBundle(dir = BROWSER_DIST): InitialBundle | null {
  const indexFile = path.join(dir, 'index.html');
  if (!fs.existsSync(indexFile)) return null;
  const html = fs.readFileSync(indexFile, 'utf8');
  const entries = new Set<string>();
  for (const m of html.matchAll(/<script[^>]*\ssrc="([^"]+\.js)"/g)) entries.add(m[1]);
  for (const m of html.matchAll(/<link[^>]*rel="stylesheet"[^>]*href="([^"]+\.css)"/g)) entries.add(m[1]);
  for (const m of html.matchAll(/<link[^>]*href="([^"]+\.css)"[^>]*rel="stylesheet"/g)) entries.add(m[1]);

  // Static imports only (`import ... from "./x.js"`, `import "./x.js"`): `import("./x.js")` is lazy.
  const initial = new Set<string>();
  const queue = [...entries];
  while (queue.length) {
    const file = queue.pop()!;
    if (initial.has(file)) continue;
    initial.add(file);
    if (!file.endsWith('.js')) continue;
    const code = fs.readFileSync(path.join(dir, file), 'utf8');
    for (const m of code.matchAll(/(?:\bfrom|\bimport)\s*["']\.\/([\w.-]+\.js)["']/g)) queue.push(m[1]);
  }

  let raw = 0;
  let transfer = 0;
  for (const file of initial) {
    const bytes = fs.readFileSync(path.join(dir, file));
    raw += bytes.byteLength;
    transfer += bytes.byteLength < 1024 ? bytes.byteLength : zlib.brotliCompressSync(bytes).byteLength;
  }
  return {
    files: initial.size,
    rawKb: Math.round(raw / 10) / 100,
    transferKb: Math.round(transfer / 10) / 100,
    builtAt: fs.statSync(indexFile).mtime.toISOString(),
  };
}

/** One printed line for the bench. */
export function describeInitialBundle(b: InitialBundle | null): string {
  if (!b) return 'n/a (no production build in dist/; run `npx ng build` first)';
  return `${b.transferKb.toFixed(2)} kB estimated transfer, ${b.rawKb.toFixed(2)} kB raw, ${b.files} files (build of ${b.builtAt})   (target <= 150 kB)`;
}

if (require.main === module) {
  const b = measureInitialBundle();
  console.log(`initial bundle: ${describeInitialBundle(b)}`);
  console.log(`initialTransferKb ${b ? b.transferKb : 'n/a'}`);
}
