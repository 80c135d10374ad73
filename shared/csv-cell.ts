/**
 * Neutralise one CSV cell against formula injection (OWASP "CSV Injection" guidance): a text cell that
 * starts with = + - @ tab, carriage return or line feed is read by spreadsheet programs as a formula, so it
 * gets a single quote in front and is shown as text. Plain numbers such as -1.5, +2 or -3e-4 keep their
 * form so they stay numeric. Quoting of separators and quotes is the CSV writer's job (RFC 4180).
 * Every CSV the app writes passes its text cells through this function.
 */
const FORMULA_START = /^[=+\-@\t\r\n]/;
const PLAIN_NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

export function csvCell(value: string): string {
  if (!FORMULA_START.test(value) || PLAIN_NUMBER.test(value)) return value;
  return `'${value}`;
}
