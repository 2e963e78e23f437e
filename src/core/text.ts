/**
 * User text as it goes into a one-line message: control characters (newlines, tabs, NUL) escaped and long
 * text cut to 60 characters, so the message stays one readable line whatever the file held.
 */
export function shown(text: string): string {
  let escaped = '';
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) escaped += '\\n';
    else if (c === 13) escaped += '\\r';
    else if (c === 9) escaped += '\\t';
    else if (c < 32 || c === 127 || c === 0x2028 || c === 0x2029)
      escaped += `\\u${c.toString(16).padStart(4, '0')}`;
    else escaped += text[i];
    if (escaped.length > 60) break;
  }
  return escaped.length > 60 ? `${escaped.slice(0, 57)}…` : escaped;
}
