import { afterAll, describe, expect, it } from 'vitest';
import { findPreset } from '../../shared/engine';
import { cachedNominalBand, circuitHash } from '../../server/services/spec-sheets/band-cache';
import { revisionText, sheetDeviceName, staffName } from '../../server/services/spec-sheets/assemble';
import { startTestApp } from '../support/app';
import { ASYMMETRIC_SILICON_LED_SHUNT } from '../support/circuits';

const t = startTestApp();
afterAll(() => t.stop());

describe('the nominal band cache', () => {
  it('hashes a circuit the same whatever order its keys come in, and differently when a value changes', () => {
    const spec = ASYMMETRIC_SILICON_LED_SHUNT;
    const reordered = Object.fromEntries(Object.entries(spec).reverse()) as typeof spec;
    expect(circuitHash(reordered)).toBe(circuitHash(spec));
    expect(circuitHash({ ...spec, referenceDrive: 0.6 })).not.toBe(circuitHash(spec));
  });

  it('computes a band once per circuit and then reads it from PostgreSQL', async () => {
    const spec = { ...ASYMMETRIC_SILICON_LED_SHUNT, toneHz: 997 }; // a circuit no other test caches
    const hash = circuitHash(spec);
    const first = await cachedNominalBand(t.knex, spec);
    expect(first).toHaveLength(7);
    for (const p of first) expect(p.p5).toBeLessThanOrEqual(p.p95);
    // Overwrite the stored band: the next read must come from the row, not be computed again.
    const marked = first.map((p) => ({ ...p, p50: -1 }));
    await t.knex('sheet_band_cache').where({ circuit_hash: hash }).update({ band: JSON.stringify(marked) });
    const second = await cachedNominalBand(t.knex, spec);
    expect(second.every((p) => p.p50 === -1)).toBe(true);
  });
});

describe('what the sheet prints for people and parts', () => {
  it('prints initials or names as the shop chooses', () => {
    expect(staffName('Juno Abara', 'initials')).toBe('J. A.');
    expect(staffName('Juno Abara', 'names')).toBe('Juno Abara');
    expect(staffName(null, 'initials')).toBe('—');
  });

  it('keeps the revision label only when it fits on the model line', () => {
    expect(revisionText('Saltmarsh Drive', { number: 2, label: 'Quieter board' })).toBe('2 (Quieter board)');
    expect(revisionText('Cinderpath Distortion', { number: 2, label: 'Wider drive' })).toBe('2');
    expect(revisionText('Saltmarsh Drive', { number: 1, label: '' })).toBe('1');
  });

  it('shortens a long device name to fit its column', () => {
    expect(sheetDeviceName(findPreset('si-small-signal')!.label)).toBe('Silicon small-signal');
    expect(sheetDeviceName('LED, red')).toBe('LED, red');
  });
});
