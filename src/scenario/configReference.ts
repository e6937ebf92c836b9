// The configuration reference (a Markdown table of every scenario key with its type,
// default and meaning), generated from the zod schema through its JSON Schema, so the
// README can never drift from what the validator accepts.

import { scenarioJsonSchema, type JsonSchemaNode } from './scenarioKeys.js';

interface Row {
  key: string;
  type: string;
  fallback: string;
  description: string;
}

function typeOf(node: JsonSchemaNode): string {
  if (node.enum) return node.enum.map((v) => JSON.stringify(v)).join(' \\| ');
  if ((node as { const?: unknown }).const !== undefined) return JSON.stringify((node as { const?: unknown }).const);
  if (node.anyOf) return [...new Set(node.anyOf.map(typeOf))].join(' or ');
  const t = Array.isArray(node.type) ? node.type.join('/') : (node.type ?? 'any');
  let bounds = '';
  const lo = node.minimum ?? node.exclusiveMinimum;
  const hi = node.maximum ?? node.exclusiveMaximum;
  if (t === 'integer' || t === 'number') {
    if (lo !== undefined && hi !== undefined) bounds = ` ${node.exclusiveMinimum !== undefined ? '(' : '['}${lo}, ${hi}${node.exclusiveMaximum !== undefined ? ')' : ']'}`;
    else if (lo !== undefined) bounds = node.exclusiveMinimum !== undefined ? ` > ${lo}` : ` >= ${lo}`;
    else if (hi !== undefined) bounds = ` <= ${hi}`;
  }
  if (t === 'array' && node.items) {
    const oneOf = (node.items as { oneOf?: JsonSchemaNode[] }).oneOf;
    if (oneOf?.some((a) => a.properties)) return 'list of groups (keys below)';
    return `list of ${typeOf(node.items)}`;
  }
  return `${t}${bounds}`;
}

function walk(node: JsonSchemaNode, prefix: string, rows: Row[]): void {
  const props: Record<string, JsonSchemaNode> = {};
  const collect = (n: JsonSchemaNode): void => {
    for (const [key, child] of Object.entries(n.properties ?? {})) {
      const before = props[key] as (JsonSchemaNode & { const?: unknown }) | undefined;
      const now = child as JsonSchemaNode & { const?: unknown };
      // Alternatives told apart by a constant (e.g. disorder.kind): list every constant.
      if (before && before.const !== undefined && now.const !== undefined) {
        props[key] = { enum: [before.const, now.const], description: `${before.description ?? ''}; ${now.description ?? ''}` };
      } else if (before && before.enum && now.const !== undefined) {
        props[key] = { enum: [...before.enum, now.const], description: `${before.description ?? ''}; ${now.description ?? ''}` };
      } else props[key] = child;
    }
    for (const alt of n.anyOf ?? []) if (alt.properties) collect(alt);
    for (const alt of (n as { oneOf?: JsonSchemaNode[] }).oneOf ?? []) if (alt.properties) collect(alt);
  };
  collect(node);
  for (const [key, child] of Object.entries(props)) {
    const path = prefix ? `${prefix}.${key}` : key;
    const nested = child.properties || (child.anyOf ?? []).some((a) => a.properties) || ((child as { oneOf?: JsonSchemaNode[] }).oneOf ?? []).some((a) => a.properties);
    const objectAlternatives = (child.anyOf ?? []).filter((a) => a.properties);
    const scalarAlternatives = (child.anyOf ?? []).filter((a) => !a.properties);
    rows.push({
      key: path,
      type: nested && objectAlternatives.length === 0 && !child.anyOf ? 'object' : nested && scalarAlternatives.length > 0 ? `${scalarAlternatives.map(typeOf).join(' or ')} or object` : nested ? 'object' : typeOf(child),
      fallback: child.default !== undefined && !(typeof child.default === 'object' && child.default !== null && Object.keys(child.default).length === 0) ? JSON.stringify(child.default) : '',
      description: (child.description ?? '').replace(/\|/g, '\\|'),
    });
    if (nested) walk(child, path, rows);
    // A list of tagged groups (the landscape terms): the keys of each alternative, marked with its tag.
    const items = child.type === 'array' ? child.items : undefined;
    // A list of plain groups (evolution.ramps): the keys of its entries.
    if (items?.properties) walk(items, `${path}[i]`, rows);
    const alternatives = [...(items?.anyOf ?? []), ...((items as { oneOf?: JsonSchemaNode[] } | undefined)?.oneOf ?? [])].filter((a) => a.properties);
    for (const alt of alternatives) {
      const tag = Object.values(alt.properties ?? {}).map((p) => (p as { const?: unknown }).const).find((c) => c !== undefined);
      const before = rows.length;
      walk(alt, `${path}[i]`, rows);
      if (tag !== undefined) for (let r = before; r < rows.length; r++) if (!rows[r].key.endsWith('.kind')) rows[r].description = `(${String(tag)}) ${rows[r].description}`;
    }
  }
}

export function configReferenceMarkdown(): string {
  const rows: Row[] = [];
  walk(scenarioJsonSchema(), '', rows);
  const lines = ['| key | type | default | meaning |', '| --- | --- | --- | --- |'];
  for (const r of rows) lines.push(`| \`${r.key}\` | ${r.type} | ${r.fallback ? `\`${r.fallback}\`` : ''} | ${r.description} |`);
  return `${lines.join('\n')}\n`;
}
