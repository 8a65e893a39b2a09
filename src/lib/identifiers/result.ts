/** Outcome of parsing an identifier: the parsed parts, or a code and one plain sentence. */
export type ParseResult<T, Code extends string> =
  | ({ ok: true } & T)
  | { ok: false; code: Code; message: string };

/** Builds the failure arm of a ParseResult. */
export function failParse<Code extends string>(
  code: Code,
  message: string,
): { ok: false; code: Code; message: string } {
  return { ok: false, code, message };
}

/** English ordinal for a 1-based position ("1st", "2nd", "12th"). */
export function formatOrdinal(position: number): string {
  const lastTwo = position % 100;
  if (lastTwo >= 11 && lastTwo <= 13) return `${position}th`;
  switch (position % 10) {
    case 1:
      return `${position}st`;
    case 2:
      return `${position}nd`;
    case 3:
      return `${position}rd`;
    default:
      return `${position}th`;
  }
}
