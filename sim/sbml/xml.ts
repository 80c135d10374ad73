/**
 * A small element tree over fast-xml-parser's ordered output, with the line of
 * every element's start tag so that import errors can name it. Pure: parses a
 * string, no I/O.
 */
import { XMLParser, XMLValidator } from "fast-xml-parser";

export interface XmlElement {
  name: string;
  attrs: Record<string, string>;
  children: XmlElement[];
  /** Concatenated text content directly inside this element (trimmed). */
  text: string;
  /** 1-based line of the start tag. */
  line: number;
}

type OrderedNode = Record<string, unknown> & { ":@"?: Record<string, string> };

export class XmlSyntaxError extends Error {
  constructor(
    message: string,
    readonly line: number,
  ) {
    super(message);
  }
}

/** Parses an XML document; throws XmlSyntaxError naming the line when it is not well-formed. */
export function parseXml(source: string): XmlElement {
  const valid = XMLValidator.validate(source);
  if (valid !== true) throw new XmlSyntaxError(`not well-formed XML: ${valid.err.msg}`, valid.err.line);
  const parser = new XMLParser({
    ignoreAttributes: false,
    attributeNamePrefix: "",
    preserveOrder: true,
    captureMetaData: true,
    parseTagValue: false,
    parseAttributeValue: false,
    trimValues: true,
    processEntities: true,
  });
  const nodes = parser.parse(source) as OrderedNode[];
  const newlines: number[] = [];
  for (let i = 0; i < source.length; i++) if (source.charCodeAt(i) === 10) newlines.push(i);
  const lineAt = (index: number) => {
    let lo = 0;
    let hi = newlines.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (newlines[mid] < index) lo = mid + 1;
      else hi = mid;
    }
    return lo + 1;
  };
  const meta = XMLParser.getMetaDataSymbol() as unknown as symbol;
  const convert = (node: OrderedNode): XmlElement | null => {
    const name = Object.keys(node).find((k) => k !== ":@");
    if (name === undefined || name === "#text" || name.startsWith("?") || name === "#comment") return null;
    const kids = (node[name] as OrderedNode[]) ?? [];
    const start = (node as unknown as Record<symbol, { startIndex?: number }>)[meta]?.startIndex ?? 0;
    const el: XmlElement = { name, attrs: { ...(node[":@"] ?? {}) }, children: [], text: "", line: lineAt(start) };
    const texts: string[] = [];
    for (const k of kids) {
      if ("#text" in k) texts.push(String(k["#text"]));
      else {
        const c = convert(k);
        if (c) el.children.push(c);
      }
    }
    el.text = texts.join(" ").trim();
    return el;
  };
  const roots = nodes.map(convert).filter((e): e is XmlElement => e !== null);
  if (roots.length !== 1) throw new XmlSyntaxError("expected exactly one root element", 1);
  return roots[0];
}

export function child(el: XmlElement, name: string): XmlElement | undefined {
  return el.children.find((c) => c.name === name);
}
