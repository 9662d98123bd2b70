/**
 * The published JSON Schema (study-templates/veil-study.schema.json) is the template schema of
 * app/study/schema.ts, the example templates name it in their first line, and a general-purpose
 * JSON Schema validator (ajv, draft-07, as editors' YAML language servers use) accepts them with it.
 */
import { Ajv } from 'ajv';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse } from 'yaml';
import { describe, expect, it } from 'vitest';
import { SCHEMA_COMMENT, SCHEMA_FILE, schemaFileText } from '../../app/study/schema-file.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const examples = readdirSync(join(ROOT, 'study-templates')).filter((f) => f.endsWith('.study.yaml'));

describe('the published template schema', () => {
  it('is up to date with app/study/schema.ts (else run: npx tsx app/study/schema-file.ts)', () => {
    expect(readFileSync(join(ROOT, SCHEMA_FILE), 'utf8')).toBe(schemaFileText());
  });

  it('is named in the first line of every example template', () => {
    expect(examples.length).toBeGreaterThanOrEqual(2);
    for (const f of examples) expect(readFileSync(join(ROOT, 'study-templates', f), 'utf8').split('\n')[0]).toBe(SCHEMA_COMMENT);
  });

  it('accepts every example template, and rejects a misspelt display policy as Veil does', () => {
    const validate = new Ajv({ strict: false, allErrors: true }).compile(JSON.parse(readFileSync(join(ROOT, SCHEMA_FILE), 'utf8')));
    for (const f of examples) {
      const path = join(ROOT, 'study-templates', f);
      expect(validate(parse(readFileSync(path, 'utf8'))), `${f}: ${JSON.stringify(validate.errors)}`).toBe(true);
      expect(() => loadTemplate(path)).not.toThrow();
    }
    const bad = parse(readFileSync(join(ROOT, 'study-templates/brain-mixed-sources.study.yaml'), 'utf8'));
    bad.display.intensity = 'histogram';
    expect(validate(bad)).toBe(false);
    expect(JSON.stringify(validate.errors)).toContain('/display/intensity');
  });
});
