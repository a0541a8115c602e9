/**
 * Neutralises a CSV cell against formula injection: a spreadsheet treats a cell that begins
 * with =, +, -, @, a tab or a carriage return as a formula, so such a text cell gets a leading
 * apostrophe. Numbers are left alone (a negative number is data, not a formula).
 */
export function neutraliseCell(value: unknown): unknown {
  if (typeof value !== 'string') return value;
  return /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
}
