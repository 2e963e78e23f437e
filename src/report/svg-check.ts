/**
 * Finds active content in SVG markup by reading its elements and attributes, not by searching the text: a
 * label such as `x onload=1` is escaped text inside an element or an attribute value, and is harmless there.
 * What is active (can run code or fetch when the page is opened):
 * - elements `script`, `foreignObject`, `iframe`, `object`, `embed`, `handler`, and the animation elements
 *   `set`, `animate` (they can rewrite an `href` to a script URL);
 * - any attribute whose local name starts with `on` (event handlers);
 * - a `javascript:` URL in `href`, `xlink:href` or `src`, or inside `url(…)` of any attribute (entities
 *   decoded, spaces and control characters dropped, as browsers do before reading a URL's scheme).
 * Returns a short description of the first active part, or undefined when there is none. Markup that cannot
 * be read (an unterminated tag or comment) is reported too: a page built from unreadable markup is refused.
 */
const ACTIVE_ELEMENTS = new Set([
  'script',
  'foreignobject',
  'iframe',
  'object',
  'embed',
  'handler',
  'set',
  'animate',
]);
const URL_ATTRIBUTES = new Set(['href', 'src']);

function localName(name: string): string {
  const colon = name.lastIndexOf(':');
  return (colon < 0 ? name : name.slice(colon + 1)).toLowerCase();
}

function decodeEntities(text: string): string {
  return text.replace(/&(#x[0-9a-f]+|#\d+|[a-z]+);?/gi, (whole, body: string) => {
    if (body[0] === '#') {
      const code =
        body[1] === 'x' || body[1] === 'X' ? Number.parseInt(body.slice(2), 16) : Number(body.slice(1));
      return Number.isFinite(code) && code >= 0 && code <= 0x10ffff ? String.fromCodePoint(code) : '';
    }
    const named: Record<string, string> = {
      amp: '&',
      lt: '<',
      gt: '>',
      quot: '"',
      apos: "'",
      colon: ':',
      tab: '\t',
      newline: '\n',
    };
    return named[body.toLowerCase()] ?? whole;
  });
}

/** `value` with entities decoded. */
function scriptUrl(value: string): boolean {
  // Browsers drop ASCII whitespace and control characters when they read a URL's scheme.
  let squeezed = '';
  for (const ch of value) {
    const code = ch.charCodeAt(0);
    if (code > 0x20 && code !== 0x7f) squeezed += ch.toLowerCase();
  }
  return (
    squeezed.startsWith('javascript:') ||
    squeezed.includes('url(javascript:') ||
    squeezed.includes("url('javascript:") ||
    squeezed.includes('url("javascript:')
  );
}

const NAME = /[^\s/>=]/;

export function findActiveContent(svg: string): string | undefined {
  const n = svg.length;
  let i = 0;
  // Invariant: svg[0..i) has been read and holds no active content; i is at text or at a '<'.
  while (i < n) {
    const lt = svg.indexOf('<', i);
    if (lt < 0) return undefined;
    if (svg.startsWith('<!--', lt)) {
      const end = svg.indexOf('-->', lt + 4);
      if (end < 0) return 'an unterminated comment';
      i = end + 3;
      continue;
    }
    if (svg.startsWith('<![CDATA[', lt)) {
      const end = svg.indexOf(']]>', lt + 9);
      if (end < 0) return 'an unterminated CDATA section';
      i = end + 3;
      continue;
    }
    if (svg[lt + 1] === '?' || svg[lt + 1] === '!') {
      const end = svg.indexOf('>', lt + 2);
      if (end < 0) return 'an unterminated declaration';
      i = end + 1;
      continue;
    }
    let j = lt + 1;
    if (svg[j] === '/') {
      const end = svg.indexOf('>', j);
      if (end < 0) return 'an unterminated end tag';
      i = end + 1;
      continue;
    }
    const nameStart = j;
    while (j < n && NAME.test(svg[j])) j++;
    const element = localName(svg.slice(nameStart, j));
    if (element === '') return 'a tag without a name';
    if (ACTIVE_ELEMENTS.has(element)) return `a <${element}> element`;
    // Attributes up to the closing '>' (quoted values may hold '>').
    for (;;) {
      while (j < n && /\s/.test(svg[j])) j++;
      if (j >= n) return 'an unterminated tag';
      if (svg[j] === '>') {
        j++;
        break;
      }
      if (svg[j] === '/') {
        j++;
        continue;
      }
      const attrStart = j;
      while (j < n && NAME.test(svg[j])) j++;
      if (j === attrStart) return 'an unreadable attribute';
      const attr = svg.slice(attrStart, j);
      const local = localName(attr);
      if (local.startsWith('on')) return `an event attribute '${attr}' on <${element}>`;
      while (j < n && /\s/.test(svg[j])) j++;
      let value = '';
      if (svg[j] === '=') {
        j++;
        while (j < n && /\s/.test(svg[j])) j++;
        const quote = svg[j];
        if (quote === '"' || quote === "'") {
          const end = svg.indexOf(quote, j + 1);
          if (end < 0) return 'an unterminated attribute value';
          value = svg.slice(j + 1, end);
          j = end + 1;
        } else {
          const start = j;
          while (j < n && !/[\s>]/.test(svg[j])) j++;
          value = svg.slice(start, j);
        }
      }
      const decoded = decodeEntities(value);
      if ((URL_ATTRIBUTES.has(local) || /url\s*\(/i.test(decoded)) && scriptUrl(decoded)) {
        return `a javascript: URL in '${attr}' on <${element}>`;
      }
    }
    i = j;
  }
  return undefined;
}
