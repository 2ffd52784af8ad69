// Reading numbers from form fields for the project forms. An entry that is not a number is sent as typed,
// so the server's schema refuses it by name, rather than becoming NaN (which JSON turns into null,
// silently meaning "no value").

/** undefined for an empty field, a number when the text is one, otherwise the text itself. */
export function numberField(raw: FormDataEntryValue | null): number | string | undefined {
  const text = String(raw ?? '').trim();
  if (text === '') return undefined;
  const value = Number(text);
  return Number.isFinite(value) ? value : text;
}
