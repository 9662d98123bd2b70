/**
 * The layering of design.md, enforced: app/ imports nothing from main/ or renderer/, nor
 * electron, nor DOM globals; renderer/ imports no Node built-ins and nothing from app/ but the
 * API contract; main/ may import app/.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

const ROOT = resolve(import.meta.dirname, '..', '..');

function files(dir: string, exts: string[]): string[] {
  const out: string[] = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...files(p, exts));
    else if (exts.some((x) => e.name.endsWith(x))) out.push(p);
  }
  return out;
}

function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const specs: string[] = [];
  const re = /(?:^|\n)\s*(?:import|export)\s[^'"]*?from\s*['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)|(?:^|\n)\s*import\s*['"]([^'"]+)['"]|require\(\s*['"]([^'"]+)['"]\s*\)/g;
  for (const m of text.matchAll(re)) specs.push(m[1] ?? m[2] ?? m[3] ?? m[4]);
  return specs;
}

const NODE_BUILTINS = new Set([...builtinModules, ...builtinModules.map((m) => `node:${m}`)]);
const DOM_GLOBALS = /\b(window|document|navigator|localStorage|sessionStorage|HTMLElement|HTMLCanvasElement)\s*[.([]/;

/** Source text without comments and string literals, so words in messages do not count as code. */
function codeOnly(text: string): string {
  return text
    .replace(/\/\*[\s\S]*?\*\/|\/\/.*$/gm, '')
    .replace(/'(?:[^'\\\n]|\\.)*'|"(?:[^"\\\n]|\\.)*"|`(?:[^`\\]|\\.)*`/g, "''");
}

function violations(layer: string, exts: string[], check: (file: string, spec: string) => string | null): string[] {
  const out: string[] = [];
  for (const f of files(join(ROOT, layer), exts)) {
    for (const spec of importsOf(f)) {
      const why = check(f, spec);
      if (why) out.push(`${relative(ROOT, f)} imports '${spec}': ${why}`);
    }
  }
  return out;
}

describe('layering', () => {
  it('app/ imports nothing from main/ or renderer/, nor electron', () => {
    const bad = violations('app', ['.ts'], (f, spec) => {
      if (spec === 'electron' || spec.startsWith('electron/')) return 'app/ must not use Electron';
      if (spec.startsWith('.')) {
        const target = relative(join(ROOT, 'app'), resolve(f, '..', spec));
        if (target.startsWith('..')) return 'app/ must not reach outside app/';
      }
      return null;
    });
    expect(bad).toEqual([]);
  });

  it('app/ uses no DOM globals', () => {
    const bad = files(join(ROOT, 'app'), ['.ts']).filter((f) => DOM_GLOBALS.test(codeOnly(readFileSync(f, 'utf8'))));
    expect(bad.map((f) => relative(ROOT, f))).toEqual([]);
  });

  it('renderer/ imports no Node built-ins and from app/ only the API contract', () => {
    const bad = violations('renderer', ['.ts', '.svelte'], (f, spec) => {
      if (NODE_BUILTINS.has(spec)) return 'the renderer never imports Node modules';
      if (spec === 'electron') return 'the renderer talks to Electron only through the preload bridge';
      if (spec.startsWith('.')) {
        const target = relative(ROOT, resolve(f, '..', spec));
        if (target.startsWith('app') && target !== join('app', 'api-contract.ts')) return 'the renderer reaches the core only through the API';
        if (target.startsWith('main')) return 'the renderer never imports host code';
      }
      return null;
    });
    expect(bad).toEqual([]);
  });

  it('the check itself sees a violation when one is there', () => {
    expect(importsOf(join(ROOT, 'main', 'serve.ts'))).toContain('../app/api.ts');
    expect(DOM_GLOBALS.test(codeOnly('const x = document.body'))).toBe(true);
    expect(DOM_GLOBALS.test(codeOnly("const s = 'the display window (default)'"))).toBe(false);
  });
});
