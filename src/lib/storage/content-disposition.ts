/**
 * The Content-Disposition of a download (RFC 6266 §4.1): an ASCII `filename` for old clients
 * and the exact name as `filename*` in RFC 8187's UTF-8 encoding for every other. Nothing in
 * a name can break out of its parameter: no quote, backslash, CR, LF or other control
 * character survives in the quoted form, and the extended form is percent-encoded.
 */

/** Characters RFC 8187 §3.2.1 lets stand unencoded in an ext-value (attr-char). */
const ATTR_CHAR = /^[A-Za-z0-9!#$&+\-.^_`|~]$/;

/** The name percent-encoded as RFC 8187 asks: UTF-8 bytes, every non-attr-char as %XX. */
export function encodeRfc8187(name: string): string {
  let out = '';
  for (const char of name) {
    if (ATTR_CHAR.test(char)) {
      out += char;
      continue;
    }
    for (const byte of Buffer.from(char, 'utf8')) {
      out += `%${byte.toString(16).toUpperCase().padStart(2, '0')}`;
    }
  }
  return out;
}

/**
 * An ASCII stand-in for the quoted `filename`: accents dropped, every other character outside
 * printable ASCII, and `"`, `\` and `%` (which some clients decode), replaced by `_`.
 */
export function asciiFallbackName(name: string): string {
  const ascii = name
    .normalize('NFKD')
    .replace(/\p{M}/gu, '')
    .replace(/[^\x20-\x7e]|["\\%]/gu, '_')
    .trim();
  return ascii === '' || /^[._]+$/.test(ascii) ? 'download' : ascii;
}

/** `attachment; filename="…"; filename*=UTF-8''…` for `name`. */
export function attachmentDisposition(name: string): string {
  // Lone surrogates cannot be written as UTF-8; U+FFFD stands in for them.
  const wellFormed = name.replace(/\p{Cs}/gu, '\uFFFD');
  return `attachment; filename="${asciiFallbackName(wellFormed)}"; filename*=UTF-8''${encodeRfc8187(wellFormed)}`;
}
