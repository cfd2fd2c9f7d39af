import { describe, expect, it } from 'vitest';
import { csvExportOptions, neutraliseCell, neutraliseCsv, parseCsv, quoteAlsoWhen } from '../../shared/csv/neutralise';
import { stringify } from 'csv-stringify/sync';

// OWASP "CSV Injection": cells starting with = + - @, tab or carriage return are read as formulas
// by spreadsheets; prefixing an apostrophe makes them text. Plain numbers are left alone.

describe('neutraliseCell', () => {
  it('prefixes formula-like cells', () => {
    for (const cell of ['=HYPERLINK("http://x")', '+cmd|x', '-2+3', '@SUM(A1)', '\tx', '\rx']) expect(neutraliseCell(cell)).toBe(`'${cell}`);
  });
  it('leaves plain numbers and ordinary text as they are', () => {
    for (const cell of ['-3.2', '+1.5e3', '-0,82', '0.78', 'LAD', '', 'a=b']) expect(neutraliseCell(cell)).toBe(cell);
  });
});

// OWASP "CSV Injection": leading whitespace and full-width signs are read as a formula's start too, and
// a semicolon or tab inside a comma-separated cell splits it for spreadsheets set to those delimiters.
describe('cells a spreadsheet would still read as a formula', () => {
  it('prefixes a formula behind leading spaces or with full-width signs', () => {
    expect(neutraliseCell(' =1+1')).toBe("' =1+1");
    expect(neutraliseCell('\u3000=1+1')).toBe("'\u3000=1+1");
    expect(neutraliseCell('\uFF1DSUM(A1)')).toBe("'\uFF1DSUM(A1)");
    expect(neutraliseCell(' 3.2')).toBe(' 3.2');
  });
  it('quotes a cell holding a semicolon or a tab even in a comma-separated file', () => {
    expect(stringify([["Bob;=cmd|' /C calc'!A0", 'x\ty', 'plain']], csvExportOptions)).toBe('"Bob;\'=cmd|\' /C calc\'!A0","x\ty",plain\r\n');
    expect(stringify([["Bob;=cmd"]], { quoted_match: quoteAlsoWhen, cast: { string: neutraliseCell } })).toBe('"Bob;\'=cmd"\n');
  });
  it('neutralises each piece after a comma, semicolon or tab: a spreadsheet splitting there sees a new cell (OWASP, CSV Injection)', () => {
    expect(neutraliseCell('Dr Probe;=1+1')).toBe("Dr Probe;'=1+1");
    expect(neutraliseCell('a, @SUM(A1)\t+cmd')).toBe("a,' @SUM(A1)\t'+cmd");
    expect(neutraliseCell('=1;=2')).toBe("'=1;'=2");
    // Plain numbers stay plain, inside a cell too.
    expect(neutraliseCell('0.1;-3.2,+4')).toBe('0.1;-3.2,+4');
    expect(neutraliseCell('Smith, Anna')).toBe('Smith, Anna');
  });
});

describe('CSV files', () => {
  it('neutralises a trace export cell by cell, keeping delimiter, quoting and line endings', () => {
    const original = 'time;pd;note\r\n0.01;-3.2;"=1+1"\r\n0.02;81.5;@x\r\n';
    expect(neutraliseCsv(original)).toBe(`time;pd;note\r\n0.01;-3.2;"'=1+1"\r\n0.02;81.5;'@x\r\n`);
  });
  it('keeps quoted delimiters and doubled quotes (RFC 4180 §2)', () => {
    expect(parseCsv('a,"b,""c""",d\n', ',')[0].cells).toEqual(['a', 'b,"c"', 'd']);
    expect(neutraliseCsv('a,"b,""c"""\n')).toBe('a,"b,""c"""\n');
  });
  it('writes new CSV with the same rule (csv-stringify with the export options)', () => {
    expect(stringify([['id', 'value'], ['=x', -3.2], ['a,b', null]], csvExportOptions)).toBe(`id,value\r\n'=x,-3.2\r\n"a,b",\r\n`);
  });
});
