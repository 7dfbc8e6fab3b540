import { build } from 'esbuild';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { computeOperatingPoint, gainAtDrive, resolveCircuit, validateContractInput, type CircuitSpec } from '../../shared/engine';
import { CHECK_TONE_HZ } from '../../src/components/listening/offline';
import { launchBrowser } from '../support/browser';
import { ASYMMETRIC_SILICON_LED_SHUNT, SYMMETRIC_SILICON_SHUNT } from '../support/circuits';

let browser: Browser;
let page: Page;

beforeAll(async () => {
  const bundle = await build({ entryPoints: ['tests/support/listening-harness.ts'], bundle: true, write: false, format: 'iife', platform: 'browser' });
  browser = await launchBrowser();
  page = await browser.newPage();
  await page.setContent('<button id="start">Play</button>');
  await page.addScriptTag({ content: bundle.outputFiles[0].text });
});
afterAll(async () => {
  await browser?.close();
});

function engineDbc(spec: CircuitSpec, drive: number) {
  const circuit = resolveCircuit(spec);
  const out = computeOperatingPoint(validateContractInput({
    toneHz: CHECK_TONE_HZ, inputPeakV: circuit.drive.inputPeakV, driveGain: gainAtDrive(circuit.drive, drive),
    railPeakV: circuit.drive.railPeakV, clipper: spec.clipper, harmonics: 5,
  }));
  return out.harmonics.map((h) => h.dbc);
}

describe('the listening preview in Chromium’s Web Audio', () => {
  for (const [name, spec] of [['asymmetric silicon-vs-LED', ASYMMETRIC_SILICON_LED_SHUNT], ['symmetric silicon', SYMMETRIC_SILICON_SHUNT]] as const) {
    it(`renders a tone through the ${name} chain with H2 and H3 within 1 dB of the engine`, async () => {
      const drive = 0.45;
      const peaks: number[] = await page.evaluate(
        ([s, d]) => (window as unknown as { kneepointHarness: { offlinePeaks: (s: unknown, d: number) => Promise<number[]> } }).kneepointHarness.offlinePeaks(s, d),
        [spec, drive] as const,
      );
      const measured = peaks.map((p) => 20 * Math.log10(p / peaks[0]));
      const engine = engineDbc(spec, drive);
      if (name === 'symmetric silicon') {
        // Half-wave symmetry: no even harmonics; only the odd orders are compared.
        expect(measured[1]).toBeLessThan(-60);
        expect(Math.abs(measured[2] - engine[2])).toBeLessThan(1);
      } else {
        expect(Math.abs(measured[1] - engine[1])).toBeLessThan(1);
        expect(Math.abs(measured[2] - engine[2])).toBeLessThan(1);
      }
    });
  }

  it('plays out loud after a click: the AudioContext runs and the output is not silent', async () => {
    await page.evaluate(([a, b]) => {
      document.getElementById('start')!.addEventListener('click', () => {
        void (window as unknown as { kneepointHarness: { play: (s: unknown[], d: number) => Promise<void> } }).kneepointHarness.play([a, b], 0.6);
      });
    }, [SYMMETRIC_SILICON_SHUNT, ASYMMETRIC_SILICON_LED_SHUNT] as const);
    await page.click('#start');
    await page.waitForTimeout(600);
    const levels: number[] = [];
    for (let i = 0; i < 5; i++) {
      levels.push(await page.evaluate(() => (window as unknown as { kneepointHarness: { level: () => number } }).kneepointHarness.level()));
      await page.waitForTimeout(100);
    }
    expect(Math.max(...levels)).toBeGreaterThan(0.01);
  });
});
