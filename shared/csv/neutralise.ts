/**
 * One rule for every CSV the product writes or serves: a cell that a spreadsheet would read as a
 * formula (it begins with = + - @, a tab or a carriage return) is prefixed with an apostrophe, so it
 * shows as text; a plain number (a trace's −3.2, +1.5e3) stays exactly as it is. The same holds for
 * each piece of a cell after a comma, semicolon or tab, which a spreadsheet splitting on that
 * character reads as a cell of its own. OWASP, "CSV Injection".
 * Pure TypeScript: used by the server (downloads, exports) and usable by the app.
 */
// Leading spaces (ASCII and ideographic) are skipped before the check, and the full-width forms of
// = + - @ count too: spreadsheets read both as a formula's start.
const formulaStart = /^[ \u3000]*[=+\-@\t\r\uFF1D\uFF0B\uFF0D\uFF20]/;
const plainNumber = /^[+-]?(\d+([.,]\d*)?|[.,]\d+)([eE][+-]?\d+)?$/;

const startsFormula = (text: string) => formulaStart.test(text) && !plainNumber.test(text);
// A piece of a cell after a comma, semicolon or tab: where a spreadsheet splitting on that character
// (whatever the file's own delimiter, quotes or not) would start a new cell.
const innerPiece = /([,;\t])([^,;\t]*)/g;

export function neutraliseCell(cell: string): string {
  const inner = /[,;\t]/.test(cell) ? cell.replace(innerPiece, (all, sep: string, piece: string) => (startsFormula(piece) ? `${sep}'${piece}` : all)) : cell;
  return startsFormula(inner) ? `'${inner}` : inner;
}

/**
 * Cells that hold a comma, a semicolon or a tab are quoted whatever the file's own delimiter: a
 * spreadsheet set to split on another of them (many European locales split on semicolons; a `.csv`
 * opens split on commas) would otherwise start a new cell there — possibly a formula — that no check
 * on the cell's first character can see. For csv-stringify's `quoted_match`.
 */
export const quoteAlsoWhen = /[,;\t]/;

/** The options every CSV export gives csv-stringify: Windows line ends, the quoting above, every text cell neutralised. */
export const csvExportOptions = Object.freeze({
  record_delimiter: 'windows' as const,
  quoted_match: quoteAlsoWhen,
  cast: { string: (value: string) => neutraliseCell(value) },
});

/** Splits CSV text into rows of cells (RFC 4180 quoting), keeping each row's line ending. */
export function parseCsv(text: string, delimiter: string): { cells: string[]; quoted: boolean[]; end: string }[] {
  const rows: { cells: string[]; quoted: boolean[]; end: string }[] = [];
  let cells: string[] = [];
  let quotedFlags: boolean[] = [];
  let cell = '';
  let quoted = false;
  let inQuotes = false;
  const pushCell = () => {
    cells.push(cell);
    quotedFlags.push(quoted);
    cell = '';
    quoted = false;
  };
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (inQuotes) {
      if (ch === '"' && text[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (ch === '"') inQuotes = false;
      else cell += ch;
    } else if (ch === '"' && cell === '') {
      inQuotes = true;
      quoted = true;
    } else if (ch === delimiter) pushCell();
    else if (ch === '\n' || (ch === '\r' && text[i + 1] === '\n')) {
      const end = ch === '\r' ? '\r\n' : '\n';
      if (ch === '\r') i++;
      pushCell();
      rows.push({ cells, quoted: quotedFlags, end });
      cells = [];
      quotedFlags = [];
    } else cell += ch;
  }
  if (cell !== '' || cells.length || quoted) {
    pushCell();
    rows.push({ cells, quoted: quotedFlags, end: '' });
  }
  return rows;
}

const needsQuotes = (cell: string, delimiter: string) => cell.includes(delimiter) || /["\r\n]/.test(cell) || quoteAlsoWhen.test(cell);
const quote = (cell: string) => `"${cell.replaceAll('"', '""')}"`;

/** One cell as written: neutralised, then quoted when it must be (or was). */
function writeCell(cell: string, delimiter = ',', forceQuotes = false): string {
  const safe = neutraliseCell(cell);
  return forceQuotes || needsQuotes(safe, delimiter) ? quote(safe) : safe;
}

/** The first of , ; or tab that splits the first line into at least two fields. */
function guessDelimiter(text: string): string {
  const first = text.split(/\r?\n/, 1)[0] ?? '';
  return [',', ';', '\t'].map((d) => [d, parseCsv(first, d)[0]?.cells.length ?? 0] as const).sort((a, b) => b[1] - a[1])[0]?.[0] ?? ',';
}

/** A stored CSV file as it is served for download: same rows, delimiter and line endings, cells neutralised. */
export function neutraliseCsv(text: string): string {
  const bom = text.startsWith('\uFEFF') ? '\uFEFF' : '';
  const body = bom ? text.slice(1) : text;
  const delimiter = guessDelimiter(body);
  return bom + parseCsv(body, delimiter).map((r) => r.cells.map((c, i) => writeCell(c, delimiter, r.quoted[i])).join(delimiter) + r.end).join('');
}
