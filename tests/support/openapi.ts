// OpenAPI 3.0 writes exclusive bounds as booleans beside minimum/maximum; JSON Schema draft 7 (ajv) as numbers.
export function openApi30ToJsonSchema(node: unknown): unknown {
  if (Array.isArray(node)) return node.map(openApi30ToJsonSchema);
  if (!node || typeof node !== "object") return node;
  const out: Record<string, unknown> = {};
  const src = node as Record<string, unknown>;
  for (const [k, v] of Object.entries(src)) {
    if (k === "exclusiveMinimum" && typeof v === "boolean") { if (v) out.exclusiveMinimum = src.minimum; continue; }
    if (k === "exclusiveMaximum" && typeof v === "boolean") { if (v) out.exclusiveMaximum = src.maximum; continue; }
    if (k === "nullable") continue;
    out[k] = openApi30ToJsonSchema(v);
  }
  if (src.exclusiveMinimum === true) delete out.minimum;
  if (src.exclusiveMaximum === true) delete out.maximum;
  return out;
}
