import { describe, expect, it } from 'vitest';
import { neutraliseCell, neutraliseCsv, parseCsv, toCsv } from '../../shared/csv/neutralise';

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

describe('CSV files', () => {
  it('neutralises a trace export cell by cell, keeping delimiter, quoting and line endings', () => {
    const original = 'time;pd;note\r\n0.01;-3.2;"=1+1"\r\n0.02;81.5;@x\r\n';
    expect(neutraliseCsv(original)).toBe(`time;pd;note\r\n0.01;-3.2;"'=1+1"\r\n0.02;81.5;'@x\r\n`);
  });
  it('keeps quoted delimiters and doubled quotes (RFC 4180 §2)', () => {
    expect(parseCsv('a,"b,""c""",d\n', ',')[0].cells).toEqual(['a', 'b,"c"', 'd']);
    expect(neutraliseCsv('a,"b,""c"""\n')).toBe('a,"b,""c"""\n');
  });
  it('writes new CSV with the same rule', () => {
    expect(toCsv([['id', 'value'], ['=x', -3.2], ['a,b', null]])).toBe(`id,value\r\n'=x,-3.2\r\n"a,b",\r\n`);
  });
});
