/**
 * Adds to the exported index.html what lets the first screen start while the main scripts download,
 * not one step after the other once they have run:
 * - the early-reads script (components/data/early-reads.js, copied beside the bundles under a name
 *   with its hash), which starts the first screen's API reads at once;
 * - script tags, before the entry's, for the chunks of the worklist's route (root layout, signed-in
 *   layout, worklist screen) and of every other layout (the router asks for each layout when it
 *   starts): each is its own chunk, and would otherwise be asked for only once the one above it had
 *   rendered;
 * - the bundled fonts' @font-face rules and preload links.
 * Usage: tsx scripts/preload-web.ts dist
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

/** The route files whose chunks the worklist's first render needs, outermost first. */
const firstRouteFiles = ['./_layout.tsx', './(app)/_layout.tsx', './(app)/index.tsx'];
const earlyReadsSource = path.resolve(import.meta.dirname, '../components/data/early-reads.js');
const fontPattern = /^PublicSans_.*\.ttf$/;
/** The id of the page's own @font-face rules (components/fonts.ts looks for it). */
const pageFontsId = 'isobar-fonts';

function* files(dir: string): Generator<string> {
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) yield* files(full);
    else yield full;
  }
}

/**
 * The chunk paths of `routeFiles`, read from the entry bundle's route context: each route is
 * `"./file.tsx":{…get:()=>r(d[1])(d[N],d.paths)}` and the module's dependency map, after the module
 * body, names module N and the chunk that holds it. Returns null when the bundle does not have
 * that shape (a different bundler version): the page then works as before, without the preloads.
 */
export function routeChunks(entry: string, routeFiles: string[]): string[] | null {
  const first = entry.indexOf(`${JSON.stringify(routeFiles[0])}:{`);
  if (first < 0) return null;
  const mapStart = entry.slice(first).search(/\},\d+,\{"0":/);
  if (mapStart < 0) return null;
  const open = entry.indexOf('{', first + mapStart + 2);
  let depth = 0;
  let close = open;
  for (; close < entry.length; close++) {
    if (entry[close] === '{') depth++;
    else if (entry[close] === '}' && --depth === 0) break;
  }
  let map: Record<string, number | Record<string, string>>;
  try {
    map = JSON.parse(entry.slice(open, close + 1));
  } catch {
    return null;
  }
  const paths = map.paths as Record<string, string> | undefined;
  if (!paths) return null;
  const context = entry.slice(entry.lastIndexOf('__d(', first), first + mapStart);
  const chunks: string[] = [];
  for (const file of routeFiles) {
    const m = context.match(new RegExp(`${escape(JSON.stringify(file))}:\\{enumerable:!0,get:\\(\\)=>r\\(d\\[\\d+\\]\\)\\(d\\[(\\d+)\\],d\\.paths\\)\\}`));
    const chunk = m ? paths[String(map[m[1]])] : undefined;
    if (!chunk) return null;
    chunks.push(chunk);
  }
  return chunks;
}

/** Every layout file in the entry bundle's route context. */
export function layoutFiles(entry: string): string[] {
  return [...new Set([...entry.matchAll(/"(\.\/(?:[^"]*\/)?_layout\.tsx)":\{enumerable/g)].map((m) => m[1]))];
}

const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

function main(): void {
  const root = path.resolve(process.argv[2] ?? 'dist');
  const indexFile = path.join(root, 'index.html');
  let html = fs.readFileSync(indexFile, 'utf8');
  const all = [...files(root)].map((f) => '/' + path.relative(root, f).split(path.sep).join('/'));
  const links: string[] = [];

  const early = fs.readFileSync(earlyReadsSource);
  const earlyHref = `/_expo/static/js/web/early-reads-${crypto.createHash('sha256').update(early).digest('hex').slice(0, 32)}.js`;
  fs.writeFileSync(path.join(root, earlyHref), early);
  links.push(`<script src="${earlyHref}" async></script>`);

  const entries = all.filter((f) => /\/_expo\/static\/js\/web\/entry-[0-9a-f]+\.js$/.test(f));
  const entry = entries.length === 1 ? fs.readFileSync(path.join(root, entries[0]), 'utf8') : '';
  const chunks = entry ? routeChunks(entry, [...firstRouteFiles, ...layoutFiles(entry).filter((f) => !firstRouteFiles.includes(f))]) : null;
  const entryTag = entries.length === 1 ? html.match(new RegExp(`<script src="${escape(entries[0])}" defer></script>`)) : null;
  html = html.replace(/<script src="[^"]*" defer data-first-route><\/script>/g, '');
  if (chunks && entryTag) {
    // Defined before the entry runs, so the router finds these routes' modules at once and renders
    // the first screen in one pass, instead of asking for one chunk after another as it goes down.
    const tags = chunks.map((href) => `<script src="${href}" defer data-first-route></script>`).join('');
    html = html.replace(entryTag[0], `${tags}${entryTag[0]}`);
  } else console.warn('preload-web: the route chunks or the entry script were not found; the page loads the routes as it renders them');

  // The fonts are declared by the page itself (the app no longer waits for them before its first
  // render: app/_layout.tsx) and preloaded; `swap` shows text at once in the system font if a
  // font is late, and the font as soon as it arrives.
  const fonts = all.filter((f) => fontPattern.test(path.basename(f)));
  const faces = fonts.map((href) => `@font-face{font-family:"${path.basename(href).split('.')[0]}";src:url("${href}") format("truetype");font-display:swap}`);
  for (const href of fonts) links.push(`<link rel="preload" href="${href}" as="font" type="font/ttf" crossorigin>`);
  if (faces.length) links.push(`<style id="${pageFontsId}">${faces.join('')}</style>`);
  html = html
    .replace(/<link rel="preload"[^>]*>\n?/g, '')
    .replace(new RegExp(`<style id="${pageFontsId}">[^<]*</style>\\n?`, 'g'), '')
    .replace(/<script src="\/_expo\/static\/js\/web\/early-reads-[^"]*" async><\/script>\n?/g, '')
    .replace('</head>', `${links.join('\n')}\n</head>`);
  fs.writeFileSync(indexFile, html);
  console.log(`preload-web: ${chunks?.length ?? 0} route chunks before the entry, ${fonts.length} fonts, the early-reads script in ${indexFile}`);
}

if (process.argv[1]?.endsWith('preload-web.ts')) main();
