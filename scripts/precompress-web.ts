/**
 * Writes a brotli (.br) and a gzip (.gz) copy beside every text file of the web build, once, at build
 * time, so the server sends compressed bytes without compressing on each request.
 * Usage: tsx scripts/precompress-web.ts dist
 */
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';

const compressible = /\.(js|css|html|json|map|svg|txt|ttf|otf|ico)$/i;

function* files(dir: string): Generator<string> {
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) yield* files(full);
    else if (compressible.test(entry.name)) yield full;
  }
}

const root = path.resolve(process.argv[2] ?? 'dist');
let raw = 0;
let br = 0;
let gz = 0;
for (const file of files(root)) {
  const bytes = fs.readFileSync(file);
  // Tiny files gain nothing and cost a header.
  if (bytes.length < 1024) continue;
  const brotli = zlib.brotliCompressSync(bytes, {
    params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 11, [zlib.constants.BROTLI_PARAM_SIZE_HINT]: bytes.length },
  });
  const gzip = zlib.gzipSync(bytes, { level: 9 });
  fs.writeFileSync(`${file}.br`, brotli);
  fs.writeFileSync(`${file}.gz`, gzip);
  raw += bytes.length;
  br += brotli.length;
  gz += gzip.length;
}
console.log(`precompressed ${root}: ${raw} bytes → brotli ${br}, gzip ${gz}`);
