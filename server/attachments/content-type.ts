import fs from 'node:fs/promises';
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

/** The same judgement for a file on disk: its first bytes, and the whole text only for a CSV candidate. */
export async function detectMediaTypeOfFile(file: string, head: Buffer): Promise<AcceptedMediaType | null> {
  const detected = await fileTypeFromBuffer(head);
  if (detected) return (acceptedMediaTypes as readonly string[]).includes(detected.mime) ? (detected.mime as AcceptedMediaType) : null;
  return looksLikeCsv(await fs.readFile(file)) ? 'text/csv' : null;
}

/**
 * Exported traces: UTF-8 text without control characters or markup, whose first lines (up to 20)
 * split into the same number of fields, at least two, on one delimiter. Quoted delimiters are honoured.
 */
function looksLikeCsv(bytes: Buffer): boolean {
  if (bytes.length === 0) return false;
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    return false;
  }
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/.test(text)) return false;
  text = text.replace(/^\uFEFF/, '');
  if (/^\s*</.test(text) || /<\s*(script|html|body|iframe|svg)\b/i.test(text)) return false;
  const lines = text.split(/\r?\n/).filter((l) => l.trim() !== '').slice(0, 20);
  if (lines.length < 2) return false;
  return [',', ';', '\t'].some((d) => {
    const counts = lines.map((l) => fieldCount(l, d));
    return counts[0] >= 2 && counts.every((c) => c === counts[0]);
  });
}

function fieldCount(line: string, delimiter: string): number {
  let fields = 1;
  let quoted = false;
  for (const ch of line) {
    if (ch === '"') quoted = !quoted;
    else if (ch === delimiter && !quoted) fields++;
  }
  return fields;
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
