/**
 * Test helper: strict checks of a standalone SVG document. Well-formedness by fast-xml-parser's
 * validator (XML 1.0), plus what a browser-embedded chart needs: the SVG namespace,
 * `role="img"` with `aria-labelledby` pointing at the `<title>` and `<desc>`, no script, no
 * external reference (fonts, images, style sheets), only the five predefined entities.
 *
 * @module
 */
import assert from "node:assert/strict";
import { XMLParser, XMLValidator } from "fast-xml-parser";

export interface SvgNode {
  name: string;
  attrs: Record<string, string>;
  children: SvgNode[];
  text: string;
}

function toNodes(list: unknown[]): SvgNode[] {
  const out: SvgNode[] = [];
  for (const item of list as Record<string, unknown>[]) {
    const attrs: Record<string, string> = {};
    const a = item[":@"] as Record<string, string> | undefined;
    if (a) { for (const [k, v] of Object.entries(a)) attrs[k.replace(/^@/, "")] = String(v); }
    for (const [k, v] of Object.entries(item)) {
      if (k === ":@") continue;
      if (k === "#text") out.push({ name: "#text", attrs: {}, children: [], text: String(v) });
      else {
        const children = toNodes(v as unknown[]);
        out.push({
          name: k,
          attrs,
          children,
          text: children.filter((c) => c.name === "#text").map((c) => c.text).join(""),
        });
      }
    }
  }
  return out;
}

/** All descendants named `name`. */
export function findAll(node: SvgNode, name: string): SvgNode[] {
  const out: SvgNode[] = [];
  const walk = (n: SvgNode) => {
    if (n.name === name) out.push(n);
    n.children.forEach(walk);
  };
  walk(node);
  return out;
}

/** Parse and check an SVG document; returns the root `<svg>` node. */
export function checkSvg(svg: string): SvgNode {
  const valid = XMLValidator.validate(svg);
  assert.equal(valid, true, `not well-formed XML: ${JSON.stringify(valid)}`);
  // Only the predefined entities and numeric references.
  const entities = svg.match(/&[^;\s]*;?/g) ?? [];
  for (const e of entities) {
    assert.match(e, /^&(amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);$/, `bad entity ${e}`);
  }
  assert.ok(
    // deno-lint-ignore no-control-regex
    !/[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]/.test(svg),
    "XML-invalid character",
  );
  const parsed = new XMLParser({
    ignoreAttributes: false,
    attributeNamePrefix: "@",
    preserveOrder: true,
    processEntities: true,
    trimValues: false,
    parseTagValue: false,
    parseAttributeValue: false,
  }).parse(svg) as unknown[];
  const root = toNodes(parsed).find((n) => n.name === "svg");
  assert.ok(root, "no <svg> root element");
  assert.equal(root.attrs.xmlns, "http://www.w3.org/2000/svg");
  assert.equal(root.attrs.role, "img");
  const ids = (root.attrs["aria-labelledby"] ?? "").split(/\s+/);
  const title = root.children.find((c) => c.name === "title");
  const desc = root.children.find((c) => c.name === "desc");
  assert.ok(title && desc, "needs <title> and <desc> as children of <svg>");
  assert.deepEqual(ids, [title.attrs.id, desc.attrs.id]);
  assert.ok(title.text.length > 0 && desc.text.length > 0);
  // Nothing executable, nothing fetched.
  assert.equal(findAll(root, "script").length, 0);
  assert.equal(findAll(root, "foreignObject").length, 0);
  assert.equal(findAll(root, "image").length, 0);
  assert.ok(!/\son\w+=/i.test(svg), "event handler attribute");
  assert.ok(!/(href|src)=/i.test(svg), "external reference");
  assert.ok(!/@import|@font-face|url\((?!#)/i.test(svg), "external style or font");
  return root;
}

/** Texts of all `<text>` elements. */
export function texts(root: SvgNode): string[] {
  return findAll(root, "text").map((t) => t.text);
}
