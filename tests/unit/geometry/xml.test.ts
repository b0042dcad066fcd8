import { readXml, type XmlName } from '../../../shared/geometry/xml';

function events(xml: string) {
  const out: string[] = [];
  const error = readXml(xml, {
    open: (n: XmlName, a) => out.push(`<${n.ns}|${n.local} ${JSON.stringify(a)}`),
    close: (n: XmlName) => out.push(`</${n.local}`),
  });
  return { error, out };
}

// XML 1.0 and Namespaces in XML 1.0 (W3C): the subset 3MF parts use.
describe('the small XML reader', () => {
  test('resolves default and prefixed namespaces per element', () => {
    const { error, out } = events('<a xmlns="urn:a" xmlns:p="urn:p"><p:b k="1"/><c/></a>');
    expect(error).toBeNull();
    expect(out).toEqual(['<urn:a|a {"xmlns":"urn:a","xmlns:p":"urn:p"}', '<urn:p|b {"k":"1"}', '</b', '<urn:a|c {}', '</c', '</a']);
  });

  test('decodes the predefined entities and character references, and allows > and single quotes in values', () => {
    const { error, out } = events(`<a t="&lt;x&gt; &amp; &quot;q&quot; &#65;&#x42;" u='a>b "c"'/>`);
    expect(error).toBeNull();
    expect(out[0]).toBe('<|a {"t":"<x> & \\"q\\" AB","u":"a>b \\"c\\""}');
  });

  test('skips the declaration, comments, CDATA and a DOCTYPE without expanding its entities', () => {
    const xml = '<?xml version="1.0"?><!DOCTYPE a [<!ENTITY big "xxxxxxxx">]><!-- note --><a v="&big;"><![CDATA[<not/>]]></a>';
    const { error, out } = events(xml);
    expect(error).toBeNull();
    expect(out).toEqual(['<|a {"v":"&big;"}', '</a']);
  });

  test.each([
    ['<a><b></a>', 'mismatched closing tag'],
    ['<a>', 'unclosed element'],
    ['<a x=1/>', 'unquoted attribute'],
    ['<a x="1/>', 'unclosed attribute'],
    ['<a/><b/>', 'two roots'],
    ['<p:a/>', 'undeclared prefix'],
    ['', 'no root'],
  ])('reports a malformed document: %s (%s)', (xml) => {
    expect(events(xml).error).not.toBeNull();
  });
});
