/**
 * A small event-driven XML reader for the subset that 3MF and OPC parts use:
 * elements, attributes, namespaces, comments, processing instructions, CDATA
 * and a DOCTYPE (skipped). Entities are never defined or expanded beyond the
 * five predefined ones and character references, so no document can make it
 * grow. Text content is ignored: the formats read here keep data in attributes.
 */

export interface XmlName {
  /** Resolved namespace URI ('' when none). */
  ns: string;
  local: string;
}

export interface XmlHandler {
  open(name: XmlName, attrs: Record<string, string>): void;
  close(name: XmlName): void;
}

/** Reads the document, calling the handler; returns an error message, or null when the document is well formed. */
export function readXml(text: string, handler: XmlHandler): string | null {
  const stack: { qname: string; name: XmlName; scope: Map<string, string> }[] = [];
  let scope = new Map<string, string>([['xml', 'http://www.w3.org/XML/1998/namespace']]);
  let pos = 0;
  let sawRoot = false;
  const n = text.length;
  while (pos < n) {
    const lt = text.indexOf('<', pos);
    if (lt < 0) break;
    if (text.startsWith('<?', lt)) {
      const end = text.indexOf('?>', lt + 2);
      if (end < 0) return 'a processing instruction is not closed';
      pos = end + 2;
      continue;
    }
    if (text.startsWith('<!--', lt)) {
      const end = text.indexOf('-->', lt + 4);
      if (end < 0) return 'a comment is not closed';
      pos = end + 3;
      continue;
    }
    if (text.startsWith('<![CDATA[', lt)) {
      const end = text.indexOf(']]>', lt + 9);
      if (end < 0) return 'a CDATA section is not closed';
      pos = end + 3;
      continue;
    }
    if (text.startsWith('<!', lt)) {
      // DOCTYPE, possibly with an internal subset in brackets: skipped, never interpreted.
      const bracket = text.indexOf('[', lt);
      const gt = text.indexOf('>', lt);
      if (gt < 0) return 'a declaration is not closed';
      if (bracket >= 0 && bracket < gt) {
        const close = text.indexOf(']', bracket);
        const end = close < 0 ? -1 : text.indexOf('>', close);
        if (end < 0) return 'a declaration is not closed';
        pos = end + 1;
      } else pos = gt + 1;
      continue;
    }
    if (text.charCodeAt(lt + 1) === 47 /* / */) {
      const gt = text.indexOf('>', lt + 2);
      if (gt < 0) return 'a tag is not closed';
      const qname = text.slice(lt + 2, gt).trim();
      const top = stack.pop();
      if (!top || top.qname !== qname) return `closing tag </${qname.slice(0, 60)}> does not match`;
      handler.close(top.name);
      scope = top.scope;
      pos = gt + 1;
      continue;
    }
    // Start tag, scanned in place: name, then key="value" pairs, then '>' or '/>'.
    let i = lt + 1;
    while (i < n && !isNameEnd(text.charCodeAt(i))) i++;
    const qname = text.slice(lt + 1, i);
    if (qname === '' || !isNameStart(qname.charCodeAt(0))) return `"<${qname.slice(0, 60)}" is not a valid tag`;
    if (stack.length === 0 && sawRoot) return 'more than one root element';
    sawRoot = true;
    const attrs: Record<string, string> = {};
    let elementScope = scope;
    let selfClosing = false;
    for (;;) {
      while (i < n && isSpace(text.charCodeAt(i))) i++;
      if (i >= n) return `the tag <${qname.slice(0, 60)}> is not closed`;
      const c = text.charCodeAt(i);
      if (c === 62 /* > */) {
        i++;
        break;
      }
      if (c === 47 /* / */) {
        if (text.charCodeAt(i + 1) !== 62) return `the tag <${qname.slice(0, 60)}> is malformed`;
        selfClosing = true;
        i += 2;
        break;
      }
      const keyStart = i;
      while (i < n && !isNameEnd(text.charCodeAt(i)) && text.charCodeAt(i) !== 61 /* = */) i++;
      const key = text.slice(keyStart, i);
      while (i < n && isSpace(text.charCodeAt(i))) i++;
      if (key === '' || text.charCodeAt(i) !== 61) return `an attribute of <${qname.slice(0, 60)}> has no value`;
      i++;
      while (i < n && isSpace(text.charCodeAt(i))) i++;
      const quote = text.charCodeAt(i);
      if (quote !== 34 && quote !== 39) return `an attribute of <${qname.slice(0, 60)}> is not quoted`;
      const close = text.indexOf(quote === 34 ? '"' : "'", i + 1);
      if (close < 0) return `an attribute of <${qname.slice(0, 60)}> is not closed`;
      const value = decodeEntities(text.slice(i + 1, close));
      i = close + 1;
      if (key === 'xmlns' || key.startsWith('xmlns:')) {
        if (elementScope === scope) elementScope = new Map(scope);
        elementScope.set(key === 'xmlns' ? '' : key.slice(6), value);
      }
      attrs[key] = value;
    }
    const colon = qname.indexOf(':');
    const prefix = colon < 0 ? '' : qname.slice(0, colon);
    const ns = elementScope.get(prefix);
    if (ns === undefined && prefix !== '') return `the prefix "${prefix.slice(0, 40)}" is not declared`;
    const name: XmlName = { ns: ns ?? '', local: colon < 0 ? qname : qname.slice(colon + 1) };
    handler.open(name, attrs);
    if (selfClosing) handler.close(name);
    else {
      stack.push({ qname, name, scope });
      scope = elementScope;
    }
    pos = i;
  }
  if (stack.length > 0) return `the element <${stack[stack.length - 1].qname.slice(0, 60)}> is not closed`;
  if (!sawRoot) return 'no root element';
  return null;
}

function isSpace(c: number): boolean {
  return c === 32 || c === 10 || c === 13 || c === 9;
}

function isNameEnd(c: number): boolean {
  return c === 32 || c === 10 || c === 13 || c === 9 || c === 47 || c === 62 || c === 60;
}

function isNameStart(c: number): boolean {
  return (c >= 65 && c <= 90) || (c >= 97 && c <= 122) || c === 95 || c === 58 || c > 127;
}

const NAMED: Record<string, string> = { lt: '<', gt: '>', amp: '&', quot: '"', apos: "'" };

function decodeEntities(value: string): string {
  if (value.indexOf('&') < 0) return value;
  return value.replace(/&(#x[0-9a-fA-F]+|#[0-9]+|[a-z]+);/g, (whole, ref: string) => {
    if (ref[0] === '#') {
      const code = ref[1] === 'x' ? parseInt(ref.slice(2), 16) : parseInt(ref.slice(1), 10);
      return code > 0 && code <= 0x10ffff ? String.fromCodePoint(code) : whole;
    }
    return NAMED[ref] ?? whole;
  });
}
