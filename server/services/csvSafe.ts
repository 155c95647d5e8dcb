/**
 * Spreadsheet-safe CSV cells (OWASP "CSV Injection"): a text cell that starts with = + - @,
 * a tab or a carriage return is prefixed with an apostrophe so it is shown, never run; every
 * cell holding a comma or a semicolon is quoted, so a spreadsheet that splits on semicolons
 * cannot start a new cell (and a formula) in the middle of a title such as `Hall;=cmd`.
 */
export function neutraliseCell(value: unknown): unknown {
  return typeof value === 'string' && /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
}

/** csv-stringify options for the quoting half. */
export const safeQuoting = { quoted_match: /[;,]/ } as const;
