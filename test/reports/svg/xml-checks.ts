/**
 * Parse-free checks on generated SVG text, shared by the chart tests. The
 * well-formedness rules are XML 1.0's (common practice): one root element,
 * properly nested and closed tags, double-quoted attributes without
 * duplicates or a raw "<", and "&" only as a predefined or numeric entity.
 */

/** Problems found in the text; an empty list means well-formed by these rules. */
export function wellFormedProblems(xml: string): string[] {
  const problems: string[] = [];
  const stack: string[] = [];
  const tag = /<(\/?)([A-Za-z_][\w.:-]*)((?:\s+[^\s=/>]+\s*=\s*"[^"]*")*)\s*(\/?)>/y;
  const attribute = /([^\s=/>]+)\s*=\s*"([^"]*)"/g;
  const badAmpersand = /&(?!(?:amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);)/;
  let roots = 0;
  let pos = 0;
  while (pos < xml.length) {
    const lt = xml.indexOf('<', pos);
    const text = xml.slice(pos, lt === -1 ? xml.length : lt);
    if (badAmpersand.test(text)) problems.push(`bare & in text near ${pos}`);
    if (stack.length === 0 && text.trim() !== '') problems.push(`text outside the root near ${pos}`);
    if (lt === -1) break;
    tag.lastIndex = lt;
    const match = tag.exec(xml);
    if (!match) {
      problems.push(`malformed tag at ${lt}: ${xml.slice(lt, lt + 40)}`);
      break;
    }
    const [, closing, name, attributes, selfClosing] = match;
    if (closing) {
      if (attributes || selfClosing) problems.push(`closing tag </${name}> with attributes`);
      const open = stack.pop();
      if (open !== name) problems.push(`</${name}> closes <${open}>`);
    } else {
      const seen = new Set<string>();
      for (const [, attrName, value] of attributes!.matchAll(attribute)) {
        if (seen.has(attrName!)) problems.push(`duplicate attribute ${attrName} on <${name}>`);
        seen.add(attrName!);
        if (value!.includes('<') || badAmpersand.test(value!))
          problems.push(`unescaped value in ${attrName} on <${name}>`);
      }
      if (stack.length === 0) roots++;
      if (!selfClosing) stack.push(name!);
    }
    pos = tag.lastIndex;
  }
  if (stack.length > 0) problems.push(`unclosed: ${stack.join(' > ')}`);
  if (roots !== 1) problems.push(`${roots} root elements`);
  return problems;
}

/** How many times `needle` occurs in `text`. */
export function count(text: string, needle: string): number {
  return text.split(needle).length - 1;
}

/** Non-finite numbers that leaked into the markup (a NaN coordinate draws nothing and hides a bug). */
export function nonFiniteTokens(text: string): string[] {
  return text.match(/\b(?:NaN|Infinity)\b/g) ?? [];
}
