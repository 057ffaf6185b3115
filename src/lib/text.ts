/** Escapes the five HTML-significant characters for text placed in markup. */
export function escapeHtml(value: string): string {
  return value
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

/**
 * A spreadsheet treats a cell that begins with = + - @ tab or CR as a formula. Exported
 * cells get a leading apostrophe so they stay text (OWASP, "CSV Injection").
 */
export function neutraliseCsvCell(value: string): string {
  return /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
}
