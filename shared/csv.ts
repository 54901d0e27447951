// CSV as RFC 4180 (Shafranovich, "Common Format and MIME Type for Comma-Separated Values (CSV) Files", IETF 2005):
// records end in CRLF; a field holding a comma, a double quote, CR or LF is enclosed in double quotes, and a double
// quote inside it is written twice.
//
// Spreadsheets execute a cell that starts with = + - @ (or a tab or CR) as a formula; such text fields are written
// with a leading apostrophe, as commonly recommended against CSV injection. Numbers are written as numbers.

export function csvField(value: string | number | null | undefined): string {
  if (value === null || value === undefined) return "";
  const s = String(value);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** A text field a person or a device wrote: neutralised against formula execution, then quoted as needed. */
export function csvText(value: string | null | undefined): string {
  if (!value) return "";
  return csvField(/^[=+\-@\t\r]/.test(value) ? `'${value}` : value);
}

export function csvRecord(fields: readonly string[]): string {
  return `${fields.join(",")}\r\n`;
}
