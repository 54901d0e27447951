// CSV as RFC 4180 (Shafranovich, "Common Format and MIME Type for Comma-Separated Values (CSV) Files", IETF 2005):
// records end in CRLF; a field holding a comma, a double quote, CR or LF is enclosed in double quotes, and a double
// quote inside it is written twice.
//
// Spreadsheets execute a cell that starts with = + - @ (or a tab or CR) as a formula; such text fields are written
// with a leading apostrophe, as commonly recommended against CSV injection. A spreadsheet set to split on another
// separator (a semicolon, a tab, a pipe) or to import line by line starts a cell after any of those inside a field
// too, so a formula character after a separator (and optional spaces) gets the apostrophe as well. Numbers are
// written as numbers.

export function csvField(value: string | number | null | undefined): string {
  if (value === null || value === undefined) return "";
  const s = String(value);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

// The start of the field or of anything a spreadsheet could split off as a cell, then a formula character.
// A tab or CR opening the field counts as a formula character too (it is itself a separator further in).
const FORMULA_START = /(^|[,;|\t\r\n])([ ]*)(?=[=+\-@])|^(?=[\t\r])/g;

/** A text field a person or a device wrote: neutralised against formula execution, then quoted as needed. */
export function csvText(value: string | null | undefined): string {
  if (!value) return "";
  return csvField(value.replace(FORMULA_START, "$1$2'"));
}

export function csvRecord(fields: readonly string[]): string {
  return `${fields.join(",")}\r\n`;
}
