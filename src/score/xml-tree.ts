import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { unzipSync } from 'fflate';
import { UserError } from '../util/errors.js';

/** A parsed XML element: name, attributes, child elements in document order, and its own text. */
export interface XmlElement {
  readonly name: string;
  readonly attributes: Readonly<Record<string, string>>;
  readonly children: readonly XmlElement[];
  readonly text: string;
}

type OrderedNode = Record<string, unknown>;

const parser = new XMLParser({
  preserveOrder: true,
  ignoreAttributes: false,
  attributeNamePrefix: '',
  parseTagValue: false,
  parseAttributeValue: false,
  trimValues: true,
  processEntities: true,
});

function toElement(node: OrderedNode): XmlElement | undefined {
  const name = Object.keys(node).find((k) => k !== ':@' && k !== '#text');
  if (name === undefined || name.startsWith('?') || name.startsWith('!')) return undefined;
  const raw = node[name];
  const list = Array.isArray(raw) ? (raw as OrderedNode[]) : [];
  const children: XmlElement[] = [];
  let text = '';
  for (const child of list) {
    if ('#text' in child) text += String(child['#text']);
    else {
      const element = toElement(child);
      if (element) children.push(element);
    }
  }
  const attributes = (node[':@'] ?? {}) as Record<string, string>;
  return { name, attributes, children, text };
}

/** Parses XML text into its root element; malformed XML is one line naming the file and line. */
export function parseXml(text: string, file: string): XmlElement {
  const valid = XMLValidator.validate(text);
  if (valid !== true) throw new UserError(`${file}: line ${valid.err.line}: not well-formed XML (${valid.err.msg})`);
  const nodes = parser.parse(text) as OrderedNode[];
  for (const node of nodes) {
    const element = toElement(node);
    if (element) return element;
  }
  throw new UserError(`${file}: no XML element in the file`);
}

export function child(element: XmlElement, name: string): XmlElement | undefined {
  return element.children.find((c) => c.name === name);
}

export function childrenNamed(element: XmlElement, name: string): XmlElement[] {
  return element.children.filter((c) => c.name === name);
}

export function childText(element: XmlElement, name: string): string | undefined {
  return child(element, name)?.text;
}

const ZIP_MAGIC = [0x50, 0x4b, 0x03, 0x04];

export function isZip(bytes: Uint8Array): boolean {
  return ZIP_MAGIC.every((b, i) => bytes[i] === b);
}

/**
 * The MusicXML text inside a compressed `.mxl` (a zip whose META-INF/container.xml names the
 * root file; MusicXML 4.0, "Compressed file format"), or the first .musicxml/.xml outside META-INF.
 */
export function unzipMusicXml(bytes: Uint8Array, file: string): string {
  let entries: Record<string, Uint8Array>;
  try {
    entries = unzipSync(bytes);
  } catch (error) {
    throw new UserError(`${file}: not a readable compressed MusicXML (.mxl) file (${error instanceof Error ? error.message : String(error)})`);
  }
  const decode = (data: Uint8Array): string => new TextDecoder().decode(data);
  const container = entries['META-INF/container.xml'];
  let root: string | undefined;
  if (container) {
    const rootfile = child(child(parseXml(decode(container), `${file}: META-INF/container.xml`), 'rootfiles') ?? emptyElement, 'rootfile');
    root = rootfile?.attributes['full-path'];
  }
  root ??= Object.keys(entries).find((name) => !name.startsWith('META-INF/') && /\.(musicxml|xml)$/iu.test(name));
  const data = root === undefined ? undefined : entries[root];
  if (root === undefined || data === undefined) throw new UserError(`${file}: the .mxl archive holds no MusicXML file${root ? ` (container names "${root}")` : ''}`);
  return decode(data);
}

const emptyElement: XmlElement = { name: '', attributes: {}, children: [], text: '' };
