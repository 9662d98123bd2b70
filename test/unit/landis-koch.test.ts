import { describe, expect, it } from 'vitest';
import { INTERPRETATION_CONVENTION, landisKoch } from '../../app/stats/landis-koch.ts';

describe('Landis & Koch (1977) words', () => {
  it('names the bands, each cut belonging to the lower band (common practice)', () => {
    // Source: Landis & Koch (1977) Biometrics 33:159-174, bands as commonly quoted (from memory).
    const cases: [number, string][] = [
      [-0.1, 'poor'], [0, 'slight'], [0.2, 'slight'], [0.21, 'fair'], [0.4, 'fair'], [0.41, 'moderate'],
      [0.6, 'moderate'], [0.61, 'substantial'], [0.8, 'substantial'], [0.81, 'almost perfect'], [1, 'almost perfect'],
    ];
    for (const [v, word] of cases) expect(landisKoch(v), String(v)).toBe(word);
    expect(landisKoch(-1e-17)).toBe('slight'); // floating-point noise around 0
    expect(landisKoch(null)).toBeNull();
    expect(landisKoch(Number.NaN)).toBeNull();
  });

  it('says that it is a convention', () => {
    expect(INTERPRETATION_CONVENTION).toMatch(/Landis & Koch \(1977\)/);
    expect(INTERPRETATION_CONVENTION).toMatch(/convention, not a test/);
  });
});
