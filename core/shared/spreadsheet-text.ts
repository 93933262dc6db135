/**
 * Text for CSV files meant to be opened in a spreadsheet: no cell may start
 * a formula, whatever separator the spreadsheet splits on.
 *
 * A spreadsheet runs a cell as a formula when it starts with = + - or @
 * (common practice, the OWASP "CSV injection" advice), also after leading
 * spaces, and some also for the full-width forms ＝ ＋ － ＠. A program set
 * to split on ";", a tab or "|" instead of "," splits a quoted text cell
 * such as `Survey A;=1+1;B` into cells of its own, so a formula can start
 * after any of those separators and after a line break too. Each such
 * place gets an apostrophe right before the trigger character, which makes
 * the spreadsheet show the rest as text. A leading tab or carriage return
 * gets one as well (some programs treat them as a cell start).
 *
 * The text changes only where it could start a formula; the exact text
 * stays available in the files meant for Shearfield (bundles, raw picks).
 */

const CELL_START = /(^|[,;\t|\r\n])([ \t\u00a0\u3000]*)([=+\-@\uff1d\uff0b\uff0d\uff20])/g;

/** The text with an apostrophe before every character that could start a formula in a spreadsheet. */
export function spreadsheetSafeText(text: string): string {
  const guarded = text.replace(CELL_START, "$1$2'$3");
  return /^[\t\r]/.test(guarded) ? `'${guarded}` : guarded;
}
