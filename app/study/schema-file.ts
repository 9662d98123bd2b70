/**
 * The template's JSON Schema as published for editors: study-templates/veil-study.schema.json,
 * made from ./schema.ts so that the two cannot drift (test/unit/template-schema.test.ts fails
 * when the file is stale). Example templates name it in their first line,
 *   # yaml-language-server: $schema=./veil-study.schema.json
 * so that editors with a YAML language server complete keys and flag mistakes while typing.
 * Veil's own `expected` annotations become standard `description`s.
 *
 * Regenerate after changing ./schema.ts:  npx tsx app/study/schema-file.ts
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { EXPECTED_KEYWORD, templateSchema } from './schema.ts';

export const SCHEMA_FILE = 'study-templates/veil-study.schema.json';
export const SCHEMA_COMMENT = '# yaml-language-server: $schema=./veil-study.schema.json';

function publish(node: unknown): unknown {
  if (Array.isArray(node)) return node.map(publish);
  if (node === null || typeof node !== 'object') return node;
  const out: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(node)) {
    if (key === EXPECTED_KEYWORD) {
      if (!('description' in node)) out.description = `Expected: ${value as string}.`;
      continue;
    }
    out[key] = publish(value);
  }
  return out;
}

/** The published schema's text, as the file holds it. */
export function schemaFileText(): string {
  const schema = publish(templateSchema) as Record<string, unknown>;
  return JSON.stringify(schema, null, 2) + '\n';
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const path = join(fileURLToPath(new URL('../../', import.meta.url)), SCHEMA_FILE);
  writeFileSync(path, schemaFileText());
  process.stdout.write(`wrote ${path}\n`);
}
