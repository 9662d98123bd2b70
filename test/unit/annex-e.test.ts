/**
 * De-identification leak test after DICOM PS3.15 Annex E (Basic Application Level
 * Confidentiality Profile). The sources (test/reference/annex-e, written by pydicom) carry a
 * distinctive value in every text-bearing attribute of the DICOM data dictionary, a superset of
 * the text attributes of Table E.1-1, plus private tags, free text and sequences. We build kits
 * from them, read in the reading room, export a results bundle, and scan every byte of every file
 * that can leave the site (inflating gzip content and the members of the kits' zip archives) and
 * every path: zero hits.
 */
import { mkdtempSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { unzipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { createApi } from '../../app/api.ts';
import { buildStudy } from '../../app/blinding/build.ts';
import { loadTemplate } from '../../app/study/parse-template.ts';

const FIXTURE = join(import.meta.dirname, '..', 'reference', 'annex-e');
const planted = (JSON.parse(readFileSync(join(FIXTURE, 'planted.json'), 'utf8')) as { planted: { tag: string; value: string }[] }).planted;

function allFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? allFiles(join(dir, e.name)) : [join(dir, e.name)]));
}

/** A file's bytes, inflated gzip content, and each member of a zip archive (inflated) with its name. */
function contents(file: string): Buffer[] {
  const bytes = readFileSync(file);
  const out = [bytes];
  if (bytes[0] === 0x1f && bytes[1] === 0x8b) out.push(gunzipSync(bytes));
  if (bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04) {
    for (const [name, member] of Object.entries(unzipSync(bytes))) out.push(Buffer.from(name), Buffer.from(member));
  }
  return out;
}

describe('de-identification (DICOM PS3.15 Annex E)', () => {
  it('plants enough values to be meaningful', () => {
    expect(planted.length).toBeGreaterThan(1500);
    // Attributes of Annex E's table that must be among them, by tag (PS3.6).
    const required: Record<string, string> = {
      PatientName: '(0010,0010)', PatientID: '(0010,0020)', PatientBirthDate: '(0010,0030)', AccessionNumber: '(0008,0050)',
      StudyInstanceUID: '(0020,000D)', SeriesInstanceUID: '(0020,000E)', InstitutionName: '(0008,0080)',
      ReferringPhysicianName: '(0008,0090)', StationName: '(0008,1010)', DeviceSerialNumber: '(0018,1000)',
      StudyDescription: '(0008,1030)', SeriesDescription: '(0008,103E)', ProtocolName: '(0018,1030)', ImageComments: '(0020,4000)',
      StudyDate: '(0008,0020)', AcquisitionTime: '(0008,0032)', OperatorsName: '(0008,1070)', FrameOfReferenceUID: '(0020,0052)',
    };
    for (const [name, tag] of Object.entries(required)) expect(planted.some((p) => p.tag === tag), name).toBe(true);
    // The sources really carry them: the scan below would find them there.
    const source = readFileSync(join(FIXTURE, 'sources', 'case-1', 'alpha', 'slice-1.dcm'));
    expect(planted.filter((p) => source.includes(Buffer.from(p.value))).length).toBeGreaterThan(1400);
  });

  it('no planted value reaches any kit file, path or results bundle', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'veil-annex-e-'));
    const template = join(dir, 'leak.study.yaml');
    writeFileSync(template, `title: Leak test
seed: 11
sources: ${JSON.stringify(join(FIXTURE, 'sources'))}
methods:
  - {id: m-alpha, label: Alpha, path: "{case}/alpha"}
  - {id: m-beta, label: Beta, path: "{case}/beta"}
cases: auto
questions:
  - {id: q, text: Quality?, scale: {points: 5, low: Poor, high: Good}}
readers: [R1, R2]
`);
    const out = join(dir, 'study');
    await buildStudy(loadTemplate(template), out, undefined, undefined, { zip: true });
    const api = createApi(out);
    try {
      const kit = await api.openKit({ reader: 'R1' });
      await api.itemPixels({ reader: 'R1', itemId: kit.items[0].id });
      await api.submitAnswer({ reader: 'R1', itemId: kit.items[0].id, scores: { q: 4 }, seconds: 2 });
      await api.exportResults({ reader: 'R1' });
    } finally {
      api.close();
    }
    const kitFiles = allFiles(join(out, 'kits'));
    expect(kitFiles.length).toBeGreaterThan(8);
    expect(kitFiles.filter((f) => f.endsWith('.zip')).map((f) => relative(out, f)).sort()).toEqual([join('kits', 'R1.zip'), join('kits', 'R2.zip')]);
    const hits: string[] = [];
    for (const f of kitFiles) {
      const path = relative(out, f);
      for (const body of contents(f)) {
        for (const p of planted) {
          if (body.includes(Buffer.from(p.value)) || path.includes(p.value)) hits.push(`${p.tag} (${p.value}) in ${path}`);
        }
      }
    }
    expect(hits).toEqual([]);
    // And nothing that names the method or the sources.
    for (const f of kitFiles) {
      for (const body of contents(f)) {
        const text = body.toString('latin1');
        for (const secret of ['m-alpha', 'm-beta', 'Alpha', 'Beta', FIXTURE, 'slice-1.dcm']) expect(text.includes(secret), `${secret} in ${f}`).toBe(false);
      }
      expect(statSync(f).isFile()).toBe(true);
    }
  });
});
