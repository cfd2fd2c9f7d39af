import { fileTypeFromBuffer } from 'file-type';

/** What the lab may attach: console printouts and images, and exported traces. */
export const acceptedMediaTypes = ['application/pdf', 'image/png', 'image/jpeg', 'text/csv'] as const;
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
  const firstLine = text.replace(/^\uFEFF/, '').split(/\r?\n/, 1)[0];
  return /[,;\t]/.test(firstLine);
}

/** A file name safe to store and to send back in Content-Disposition. */
export function cleanFileName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? 'attachment';
  // eslint-disable-next-line no-control-regex
  const cleaned = base.replace(/[\u0000-\u001F\u007F"]/g, '').trim().slice(0, 200);
  return cleaned || 'attachment';
}
