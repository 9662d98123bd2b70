/** Window presets: from the template's display section into the kit manifest, in display units. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildStudy } from '../../app/blinding/build.ts';
import type { KitManifest } from '../../app/blinding/kit-format.ts';
import { loadTemplate, parseTemplate } from '../../app/study/parse-template.ts';
import { writeTinyStudy } from './helpers.ts';

describe('window presets', () => {
  it('reach the kit as centre and width on the display scale (0..4000 is the default window)', async () => {
    const { dir, template } = writeTinyStudy({ extraYaml: 'display:\n  presets:\n    - {name: Soft, low: 0, high: 60}\n    - {name: Bright, low: 50, high: 150}\n' });
    await buildStudy(loadTemplate(template), join(dir, 'out'));
    const kit = JSON.parse(readFileSync(join(dir, 'out', 'kits', 'R1', 'kit.json'), 'utf8')) as KitManifest;
    expect(kit.presets).toEqual([{ name: 'Soft', center: 1200, width: 2400 }, { name: 'Bright', center: 4000, width: 4000 }]);
  });

  it('are refused with the line when high is not above low', () => {
    const text = readFileSync(writeTinyStudy({ extraYaml: 'display:\n  presets:\n    - {name: Odd, low: 50, high: 20}\n' }).template, 'utf8');
    expect(() => parseTemplate(text, 'odd.study.yaml')).toThrow(/odd\.study\.yaml:\d+.*display\.presets\[0\]\.high.*above its low/);
  });
});
