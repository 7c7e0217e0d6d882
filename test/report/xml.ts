// A small XML reader for the JUnit tests: elements, attributes, text and CDATA — enough to check
// that the report is well-formed (every tag closed in order) and to count its cases.
export interface XmlElement {
  readonly name: string;
  readonly attributes: Record<string, string>;
  readonly children: XmlElement[];
  text: string;
}

const ENTITIES: Record<string, string> = { amp: "&", lt: "<", gt: ">", quot: '"', apos: "'" };

function decode(text: string): string {
  return text.replace(/&(#x[0-9a-f]+|#\d+|\w+);/gi, (m, e: string) => {
    if (e.startsWith("#x")) return String.fromCodePoint(parseInt(e.slice(2), 16));
    if (e.startsWith("#")) return String.fromCodePoint(parseInt(e.slice(1), 10));
    const v = ENTITIES[e];
    if (v === undefined) throw new Error(`unknown entity ${m}`);
    return v;
  });
}

/** The `>` that ends the tag at `lt`: `>` is legal inside quoted attribute values. */
function tagEnd(source: string, lt: number): number {
  let quoted = false;
  for (let j = lt + 1; j < source.length; j++) {
    if (source[j] === '"') quoted = !quoted;
    else if (source[j] === ">" && !quoted) return j;
  }
  throw new Error("unterminated tag");
}

export function parseXml(source: string): XmlElement {
  let i = 0;
  const root: XmlElement = { name: "#document", attributes: {}, children: [], text: "" };
  const stack: XmlElement[] = [root];
  while (i < source.length) {
    const lt = source.indexOf("<", i);
    if (lt < 0) {
      if (source.slice(i).trim()) throw new Error("text after the root element");
      break;
    }
    const top = stack[stack.length - 1]!;
    top.text += decode(source.slice(i, lt));
    if (source.startsWith("<?", lt)) {
      i = source.indexOf("?>", lt) + 2;
    } else if (source.startsWith("<![CDATA[", lt)) {
      const end = source.indexOf("]]>", lt);
      if (end < 0) throw new Error("unterminated CDATA");
      top.text += source.slice(lt + 9, end);
      i = end + 3;
    } else if (source.startsWith("<!--", lt)) {
      i = source.indexOf("-->", lt) + 3;
    } else if (source.startsWith("</", lt)) {
      const end = source.indexOf(">", lt);
      const name = source.slice(lt + 2, end).trim();
      if (top.name !== name) throw new Error(`closing </${name}> but <${top.name}> is open`);
      stack.pop();
      i = end + 1;
    } else {
      const end = tagEnd(source, lt);
      const selfClosing = source[end - 1] === "/";
      const body = source.slice(lt + 1, selfClosing ? end - 1 : end);
      const nameMatch = /^[\w:.-]+/.exec(body);
      if (!nameMatch) throw new Error(`bad tag at ${lt}`);
      const attributes: Record<string, string> = {};
      const rest = body.slice(nameMatch[0].length);
      const attrRe = /\s+([\w:.-]+)="([^"]*)"/g;
      let consumed = 0;
      for (let m = attrRe.exec(rest); m; m = attrRe.exec(rest)) {
        if (m.index !== consumed) throw new Error(`bad attribute syntax in <${nameMatch[0]}>`);
        if (m[1]! in attributes) throw new Error(`duplicate attribute ${m[1]}`);
        attributes[m[1]!] = decode(m[2]!);
        consumed = m.index + m[0].length;
      }
      if (rest.slice(consumed).trim()) throw new Error(`bad attribute syntax in <${nameMatch[0]}>`);
      const el: XmlElement = { name: nameMatch[0], attributes, children: [], text: "" };
      top.children.push(el);
      if (!selfClosing) stack.push(el);
      i = end + 1;
    }
  }
  if (stack.length !== 1) throw new Error(`<${stack[stack.length - 1]!.name}> is not closed`);
  if (root.children.length !== 1) throw new Error("expected exactly one root element");
  return root.children[0]!;
}

export function descendants(el: XmlElement, name: string): XmlElement[] {
  const out: XmlElement[] = [];
  for (const c of el.children) {
    if (c.name === name) out.push(c);
    out.push(...descendants(c, name));
  }
  return out;
}
