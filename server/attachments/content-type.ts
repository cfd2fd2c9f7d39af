import { createReadStream } from 'node:fs';
import { fileTypeFromBuffer } from 'file-type';

/** What the lab may attach: console printouts and images, and exported traces. */
const acceptedMediaTypes = ['application/pdf', 'image/png', 'image/jpeg', 'text/csv'] as const;
export type AcceptedMediaType = (typeof acceptedMediaTypes)[number];

/**
 * The file's type from its bytes, never its name: binary formats by signature (file-type),
 * CSV as valid UTF-8 text with no control characters and a delimiter on its first line.
 */
export async function detectMediaType(bytes: Buffer): Promise<AcceptedMediaType | null> {
  const detected = await fileTypeFromBuffer(bytes);
  if (detected) {
    return (acceptedMediaTypes as readonly string[]).includes(detected.mime) ? (detected.mime as AcceptedMediaType) : null;
  }
  return looksLikeCsv(bytes) ? 'text/csv' : null;
}

/**
 * The same judgement for a file on disk: its first bytes, and for a CSV candidate the whole text,
 * read in chunks, so judging a large export holds one chunk in memory, not the file.
 */
export async function detectMediaTypeOfFile(file: string, head: Buffer): Promise<AcceptedMediaType | null> {
  const detected = await fileTypeFromBuffer(head);
  if (detected) return (acceptedMediaTypes as readonly string[]).includes(detected.mime) ? (detected.mime as AcceptedMediaType) : null;
  const judge = new CsvJudge();
  for await (const chunk of createReadStream(file, { highWaterMark: 64 * 1024 })) {
    if (!judge.push(chunk as Buffer)) return null; // refused already: no need to read on
  }
  return judge.end() ? 'text/csv' : null;
}

/**
 * Exported traces: UTF-8 text without control characters or markup, whose first lines (up to 20)
 * split into the same number of fields, at least two, on one delimiter. Quoted delimiters are honoured.
 */
function looksLikeCsv(bytes: Buffer): boolean {
  return looksLikeCsvInPieces([bytes]);
}

/** The CSV judgement of a text that arrives in pieces (as a file read in chunks): the same answer as for the whole. */
export function looksLikeCsvInPieces(pieces: Iterable<Buffer>): boolean {
  const judge = new CsvJudge();
  for (const piece of pieces) if (!judge.push(piece)) return false;
  return judge.end();
}

// eslint-disable-next-line no-control-regex
const controlCharacter = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/;
const markup = /<\s*(script|html|body|iframe|svg)\b/i;
/** The end of a text that could still become markup with the next piece (`<`, `< scr`, …). */
const openMarkup = /<\s*[a-z]*$/i;
const delimiters = [',', ';', '\t'] as const;
const linesJudged = 20;

/**
 * The CSV judgement over text arriving in pieces, holding no more than a piece: each is checked as
 * it comes (UTF-8, control characters, markup; a piece of markup split across two pieces is held
 * back until the next), and of the first 20 non-empty lines only their field counts per delimiter
 * are kept. `push` answers false once the text is refused.
 */
class CsvJudge {
  private decoder = new TextDecoder('utf-8', { fatal: true });
  private bytes = 0;
  private refused = false;
  /** The end of the text so far that could still become markup: searched again with the next piece. */
  private unsearched = '';
  /** White space seen before the first other character (null once the text has begun). */
  private leading: string | null = '';
  /** Field counts per delimiter of the first non-empty lines, and of the line being read. */
  private counts: number[][] = [];
  private fields = [1, 1, 1];
  private quoted = false;
  private lineHasText = false;

  push(chunk: Buffer): boolean {
    if (this.refused) return false;
    this.bytes += chunk.length;
    let text: string;
    try {
      text = this.decoder.decode(chunk, { stream: true });
    } catch {
      return this.refuse();
    }
    return this.take(text, false);
  }

  end(): boolean {
    if (this.refused || this.bytes === 0) return false;
    let rest: string;
    try {
      rest = this.decoder.decode();
    } catch {
      return false;
    }
    if (!this.take(rest, true)) return false;
    this.endLine();
    const counts = this.counts;
    if (counts.length < 2) return false;
    return delimiters.some((_, d) => counts[0][d] >= 2 && counts.every((c) => c[d] === counts[0][d]));
  }

  private refuse(): false {
    this.refused = true;
    return false;
  }

  private take(text: string, last: boolean): boolean {
    if (controlCharacter.test(text)) return this.refuse();
    if (this.leading !== null) {
      // The decoder drops one byte-order mark; a second one is dropped here. Text that begins with
      // `<` (after white space) is markup, not a trace.
      const begun = (this.leading + text).replace(/^\uFEFF/, '');
      if (/^\s*</.test(begun)) return this.refuse();
      if (!/\S/.test(begun) && !last) {
        this.leading = begun;
        return true;
      }
      this.leading = null;
      text = begun;
    }
    let searched = this.unsearched + text;
    const open = last ? null : openMarkup.exec(searched);
    this.unsearched = open ? searched.slice(open.index) : '';
    if (open) searched = searched.slice(0, open.index);
    if (markup.test(searched)) return this.refuse();
    if (this.counts.length < linesJudged) this.countFields(text);
    return true;
  }

  /** Lines end at `\n` (a `\r` before it is white space and no delimiter, so it changes nothing). */
  private countFields(text: string): void {
    for (let i = 0; i < text.length && this.counts.length < linesJudged; i++) {
      const ch = text[i];
      if (ch === '\n') this.endLine();
      else if (ch === '"') {
        this.quoted = !this.quoted;
        this.lineHasText = true;
      } else {
        if (!this.quoted) {
          const d = delimiters.indexOf(ch as (typeof delimiters)[number]);
          if (d >= 0) this.fields[d]++;
        }
        if (!this.lineHasText && /\S/.test(ch)) this.lineHasText = true;
      }
    }
  }

  private endLine(): void {
    if (this.lineHasText && this.counts.length < linesJudged) this.counts.push(this.fields);
    this.fields = [1, 1, 1];
    this.quoted = false;
    this.lineHasText = false;
  }
}

const extensionsOf: Record<AcceptedMediaType, string[]> = {
  'application/pdf': ['pdf'],
  'image/png': ['png'],
  'image/jpeg': ['jpg', 'jpeg'],
  'text/csv': ['csv', 'txt', 'tsv'],
};

const extensionOf = (fileName: string) => (/\.([^.]+)$/.exec(fileName)?.[1] ?? '').toLowerCase();

/** True unless the name's extension is one of the content's (a PNG named .html or .exe disagrees). */
export function nameDisagreesWith(fileName: string, mediaType: AcceptedMediaType): boolean {
  const ext = extensionOf(fileName);
  return ext !== '' && !extensionsOf[mediaType].includes(ext);
}

/** The name with the content's extension added when it has none. */
export function withExtension(fileName: string, mediaType: AcceptedMediaType): string {
  return extensionOf(fileName) ? fileName : `${fileName}.${extensionsOf[mediaType][0]}`;
}

/**
 * multipart file names arrive decoded as Latin-1 (busboy's default for a plain `filename=`), though
 * browsers send UTF-8 bytes: decode them again as UTF-8 when they are valid UTF-8.
 */
function utf8FileName(name: string): string {
  if (!/^[\u0000-\u00FF]*$/.test(name) || !/[\u0080-\u00FF]/.test(name)) return name;
  const bytes = Buffer.from(name, 'latin1');
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return name;
  }
}

/**
 * A file name safe to store and to send back in Content-Disposition: UTF-8, NFC, no folder part,
 * no control characters (C0, DEL, C1), no direction overrides or isolates (which can make
 * "exe.pdf" read as "fdp.exe"; Unicode TR #36 §2.1), no quotes.
 */
export function cleanFileName(name: string): string {
  const base = utf8FileName(name).normalize('NFC').split(/[\\/]/).pop() ?? 'attachment';
  // eslint-disable-next-line no-control-regex
  const cleaned = base.replace(/[\u0000-\u001F\u007F-\u009F"\u061C\u200E\u200F\u202A-\u202E\u2066-\u2069]/g, '').trim().slice(0, 200);
  return cleaned || 'attachment';
}
