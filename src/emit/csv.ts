// Writing CSV records that Strata's own lexicon reader (and any RFC 4180 reader) reads back unchanged.

/**
 * One field, quoted when it must be (RFC 4180 §2: fields containing a comma, a double quote or a
 * line break are enclosed in double quotes, and a double quote inside is doubled).
 * Strata also quotes a field that starts with `#` (an unquoted `#` at the start of a line marks a
 * comment line for our reader), and one with a space or tab at either end (so no reader trims it).
 */
export function csvField(value: string): string {
  if (value === "") return "";
  const needsQuotes =
    /[",\r\n]/.test(value) || value.startsWith("#") || /^[ \t]|[ \t]$/.test(value);
  return needsQuotes ? `"${value.replace(/"/g, '""')}"` : value;
}

/** One record, terminated by LF. */
export function csvLine(fields: readonly string[]): string {
  return fields.map(csvField).join(",") + "\n";
}
