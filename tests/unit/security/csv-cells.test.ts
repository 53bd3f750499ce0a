import { describe, expect, it } from 'vitest';
import { protectCell, unprotectCell } from '../../../server/cables/csv-cells';

// The characters that start a formula: OWASP "CSV Injection" (=, +, -, @, tab 0x09, carriage return 0x0D).
describe('protectCell / unprotectCell', () => {
  it('puts a single quote before a text cell that begins with a formula character', () => {
    expect(protectCell('=1+1')).toBe("'=1+1");
    expect(protectCell('+44 20 7946 0000')).toBe("'+44 20 7946 0000");
    expect(protectCell('-0.5')).toBe("'-0.5");
    expect(protectCell('@SUM(A1)')).toBe("'@SUM(A1)");
    expect(protectCell('\tcmd')).toBe("'\tcmd");
    expect(protectCell('\rcmd')).toBe("'\rcmd");
  });

  it('leaves other text alone', () => {
    for (const s of ['RG-6 foam', 'a=b', '0.66', '', "it's fine", 'Lead 2 m']) expect(protectCell(s)).toBe(s);
  });

  it('adds one more quote to text that already begins with quotes before a formula character', () => {
    expect(protectCell("'=x")).toBe("''=x");
    expect(protectCell("''-y")).toBe("'''-y");
  });

  it('undoes exactly what protectCell did, for every case above', () => {
    for (const s of ['=1+1', '-0.5', '@x', '\tcmd', '\rcmd', "'=x", "''-y", 'plain', "'quoted", '', 'a=b']) {
      expect(unprotectCell(protectCell(s))).toBe(s);
    }
  });
});
