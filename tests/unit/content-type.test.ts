import { describe, expect, it } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { cleanFileName, detectMediaType, detectMediaTypeOfFile, looksLikeCsvInPieces, nameDisagreesWith } from '../../server/attachments/content-type';

// File signatures: PDF "%PDF-" (ISO 32000-1 §7.5.2), PNG 89 50 4E 47 0D 0A 1A 0A (PNG specification §5.2),
// JPEG SOI FF D8 FF (ITU T.81 / JFIF); CSV by its structure (RFC 4180).
describe('detectMediaType judges by content', () => {
  it.each([
    ['PDF', Buffer.from('%PDF-1.7\n%%EOF\n'), 'application/pdf'],
    ['PNG', Buffer.from('89504e470d0a1a0a0000000d49484452', 'hex'), 'image/png'],
    ['JPEG', Buffer.from('ffd8ffe000104a46494600010100000100010000', 'hex'), 'image/jpeg'],
    ['CSV with a header', Buffer.from('time_s,pa,pd\n0.00,92,88\n0.01,93,"88"\n'), 'text/csv'],
    ['semicolon CSV with a BOM', Buffer.from('\uFEFFt;pa;pd\n0;92;88\n'), 'text/csv'],
    ['quoted delimiters', Buffer.from('note,value\n"a, b",1\n"c",2\n'), 'text/csv'],
  ])('accepts %s', async (_n, bytes, type) => {
    await expect(detectMediaType(bytes)).resolves.toBe(type);
  });

  it.each([
    ['an executable (ELF)', Buffer.concat([Buffer.from([0x7f, 0x45, 0x4c, 0x46, 2, 1, 1, 0]), Buffer.alloc(64)])],
    ['a Windows executable', Buffer.concat([Buffer.from('MZ'), Buffer.alloc(64, 1)])],
    ['a ZIP archive', Buffer.from('504b0304140000000800', 'hex')],
    ['HTML', Buffer.from('<html><body>a,b\n1,2</body></html>')],
    ['a script with commas', Buffer.from('a,b\n<script>alert(1)</script>,x\n')],
    ['one line of prose', Buffer.from('Hello, world')],
    ['ragged lines', Buffer.from('a,b,c\n1,2\n3\n')],
    ['not UTF-8', Buffer.from([0x61, 0x2c, 0x62, 0x0a, 0xff, 0xfe, 0x2c, 0x31])],
    ['empty', Buffer.alloc(0)],
  ])('refuses %s', async (_n, bytes) => {
    await expect(detectMediaType(bytes)).resolves.toBeNull();
  });
});

// A file is judged in chunks (so a large export is never held whole): every split of a text must get
// the answer the whole text gets, including splits inside a UTF-8 sequence, a CRLF, a BOM or markup.
describe('CSV judged in pieces', () => {
  const cases: [string, Buffer, boolean][] = [
    ['CSV with CRLF lines and quotes', Buffer.from('time_s,pa,pd\r\n0.00,92,88\r\n0.01,93,"8,8"\r\n'), true],
    ['CSV with two BOMs and leading blank lines', Buffer.from('\uFEFF\uFEFF\n  \nt;pa\n0;92\n'), true],
    ['CSV with accented text (two-byte UTF-8)', Buffer.from('Vaisseau,Média\nIVA,0.81\nCx,0.92\n'), true],
    ['markup after white space', Buffer.from('  \n <html>a,b\n1,2\n'), false],
    ['markup in a later line', Buffer.from('a,b\n1,2\n3,< Script >\n'), false],
    ['a look-alike that is not markup', Buffer.from('a,b\n1,<scripted\n2,x\n'), true],
    ['a control character at the end', Buffer.from('a,b\n1,2\n3,4\u0007'), false],
    ['ragged lines', Buffer.from('a,b,c\n1,2\n3\n'), false],
    ['UTF-8 cut short at the end', Buffer.concat([Buffer.from('a,b\n1,2\n3,'), Buffer.from([0xc3])]), false],
  ];
  it.each(cases)('%s: the same answer for every split point', (_n, bytes, expected) => {
    expect(looksLikeCsvInPieces([bytes])).toBe(expected);
    for (let i = 0; i <= bytes.length; i++) {
      expect(looksLikeCsvInPieces([bytes.subarray(0, i), bytes.subarray(i)]), `split at ${i}`).toBe(expected);
    }
    expect(looksLikeCsvInPieces([...bytes].map((b) => Buffer.from([b]))), 'one byte at a time').toBe(expected);
  });

  it('judges a file larger than one chunk, with only its first 20 non-empty lines counted', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'csv-judge-'));
    try {
      const file = path.join(dir, 'trace');
      // 20 lines of three fields, then ragged lines beyond the first 20 (not counted), over ~200 kB.
      const text = 'a,b,c\n'.repeat(20) + '1,2\n'.repeat(50_000);
      fs.writeFileSync(file, text);
      const bytes = Buffer.from(text);
      await expect(detectMediaTypeOfFile(file, bytes.subarray(0, 4100))).resolves.toBe('text/csv');
      fs.writeFileSync(file, text + '<svg>\n');
      await expect(detectMediaTypeOfFile(file, bytes.subarray(0, 4100))).resolves.toBeNull();
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('file names', () => {
  it.each([
    ['report.pdf', 'text/csv', true],
    ['trace.csv', 'text/csv', false],
    ['photo.JPG', 'image/jpeg', false],
    ['scan.png', 'application/pdf', true],
    ['export', 'text/csv', false],
    // Any extension that is not the content's disagrees, known or not (an image named .html or .exe).
    ['export.dat', 'text/csv', true],
    ['image.html', 'image/png', true],
    ['image.exe', 'image/png', true],
  ] as const)('%s with %s content disagrees: %s', (name, type, disagrees) => {
    expect(nameDisagreesWith(name, type)).toBe(disagrees);
  });

  it('decodes UTF-8 names that arrive as Latin-1 and strips control and direction-override characters', () => {
    expect(cleanFileName(Buffer.from('Ödegaard 📈.csv', 'utf8').toString('latin1'))).toBe('Ödegaard 📈.csv');
    expect(cleanFileName('scan\u202Egnp.exe')).toBe('scangnp.exe'); // U+202E right-to-left override (Unicode TR #36 §2.1)
    expect(cleanFileName('a\u0085b\u2066c.pdf')).toBe('abc.pdf');
  });

  it('keeps only a plain base name', () => {
    expect(cleanFileName('../../etc/passwd')).toBe('passwd');
    expect(cleanFileName('C:\\Users\\lab\\trace "1".csv')).toBe('trace 1.csv');
    expect(cleanFileName('')).toBe('attachment');
  });
});
