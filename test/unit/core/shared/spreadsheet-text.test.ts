/**
 * Spreadsheet-safe text: an apostrophe before every place a formula could
 * start. The trigger characters (= + - @, also after leading spaces, and a
 * leading tab or carriage return) are common practice (the OWASP "CSV
 * injection" advice); the full-width forms and the other separators are the
 * cases issue 11 found getting through.
 */
import { describe, expect, it } from 'vitest';
import { spreadsheetSafeText } from '../../../../core/shared/spreadsheet-text';

describe('spreadsheetSafeText', () => {
  const cases: Array<[string, string]> = [
    ['=1+1', "'=1+1"],
    ['+HYPERLINK("x")', "'+HYPERLINK(\"x\")"],
    ['-2+3', "'-2+3"],
    ['@SUM(A1)', "'@SUM(A1)"],
    ['  =1+1', "  '=1+1"],
    ['＝1+1', "'＝1+1"],
    ['＋1', "'＋1"],
    ['－1', "'－1"],
    ['＠x', "'＠x"],
    ['Survey A;=1+1;B', "Survey A;'=1+1;B"],
    ['a\t=1', "a\t'=1"],
    ['a| @x', "a| '@x"],
    ['a, -b', "a, '-b"],
    ['line\n=2', "line\n'=2"],
    ['\tplain', "'\tplain"],
    ['\r=x', "'\r'=x"],
    ['plain text, no trigger', 'plain text, no trigger'],
    ['a-b=c', 'a-b=c'],
    ['3 m (±0.5)', '3 m (±0.5)'],
  ];
  for (const [input, want] of cases) {
    it(`${JSON.stringify(input)} → ${JSON.stringify(want)}`, () => expect(spreadsheetSafeText(input)).toBe(want));
  }

  it('leaves no cell start with a trigger, splitting on any separator, over seeded random text', () => {
    const alphabet = ['=', '+', '-', '@', '＝', '＋', '－', '＠', ' ', '\t', ';', ',', '|', '\n', 'a', '1', '"', "'"];
    let seed = 12345;
    const next = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    for (let n = 0; n < 2000; n++) {
      const text = Array.from({ length: 1 + Math.floor(next() * 12) }, () => alphabet[Math.floor(next() * alphabet.length)]).join('');
      const safe = spreadsheetSafeText(text);
      for (const cell of safe.split(/[,;\t|\r\n]/)) expect(cell.normalize('NFKC').trimStart(), JSON.stringify(text)).not.toMatch(/^[=+\-@]/);
    }
  });
});
