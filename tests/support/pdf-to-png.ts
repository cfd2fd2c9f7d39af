import { execFileSync, spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

/**
 * PDF helpers for tests, on Debian's poppler-utils (`pdftoppm`, `pdftotext`, `pdfinfo`): render pages
 * to PNG to look at them, and read a PDF back as text and metadata. The scripts install poppler-utils;
 * a helper called without it throws a message that says so.
 */

function need(tool: 'pdftoppm' | 'pdftotext' | 'pdfinfo'): void {
  if (!hasPoppler(tool)) throw new Error(`${tool} is not installed: install Debian's poppler-utils (apt-get install -y poppler-utils).`);
}

/** Whether a poppler tool is on the PATH. */
export function hasPoppler(tool: 'pdftoppm' | 'pdftotext' | 'pdfinfo' = 'pdftoppm'): boolean {
  return spawnSync(tool, ['-v'], { stdio: 'ignore' }).error === undefined;
}

function withFile<T>(pdf: Uint8Array, fn: (path: string, dir: string) => T): T {
  const dir = mkdtempSync(join(tmpdir(), 'isobar-pdf-'));
  try {
    const path = join(dir, 'in.pdf');
    writeFileSync(path, pdf);
    return fn(path, dir);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/**
 * Renders each page to `<outDir>/<name>-<page>.png` (page numbers as pdftoppm pads them) and returns
 * the paths in page order. 80 dpi is enough to read a page; raise it to check small print.
 */
export function pdfToPng(pdf: Uint8Array, outDir: string, name: string, dpi = 80): string[] {
  need('pdftoppm');
  const out = resolve(outDir);
  mkdirSync(out, { recursive: true });
  for (const f of readdirSync(out)) if (f.startsWith(`${name}-`) && f.endsWith('.png')) rmSync(join(out, f));
  withFile(pdf, (path) => execFileSync('pdftoppm', ['-r', String(dpi), '-png', path, join(out, name)]));
  return readdirSync(out)
    .filter((f) => f.startsWith(`${name}-`) && f.endsWith('.png'))
    .sort((a, b) => Number(a.slice(name.length + 1, -4)) - Number(b.slice(name.length + 1, -4)))
    .map((f) => join(out, f));
}

/** The text of each page (pdftotext, layout kept), split at the form feeds between pages. */
export function pdfPages(pdf: Uint8Array): string[] {
  need('pdftotext');
  const text = withFile(pdf, (path) => execFileSync('pdftotext', ['-layout', '-enc', 'UTF-8', path, '-'], { encoding: 'utf8' }));
  const pages = text.split('\f');
  if (pages[pages.length - 1].trim() === '') pages.pop();
  return pages;
}

/** pdfinfo's fields (Pages, Page size, Title, CreationDate, …). */
export function pdfInfo(pdf: Uint8Array): Record<string, string> {
  need('pdfinfo');
  const out = withFile(pdf, (path) => execFileSync('pdfinfo', ['-isodates', path], { encoding: 'utf8' }));
  return Object.fromEntries(
    out
      .split('\n')
      .filter((l) => l.includes(':'))
      .map((l) => [l.slice(0, l.indexOf(':')).trim(), l.slice(l.indexOf(':') + 1).trim()]),
  );
}

/** Width and height of a PNG file from its IHDR chunk (PNG specification, section 11.2.2). */
export function pngSize(png: Buffer): { width: number; height: number } {
  if (png.readUInt32BE(0) !== 0x89504e47) throw new Error('Not a PNG file.');
  return { width: png.readUInt32BE(16), height: png.readUInt32BE(20) };
}
