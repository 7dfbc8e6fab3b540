// Bundled into a blank Chromium page by tests/e2e/listening.test.ts: the preview's real audio code.
import type { CircuitSpec } from '../../shared/engine';
import { CHECK_SAMPLE_RATE, CHECK_TONE_HZ, harmonicPeaks, renderToneOffline } from '../../src/components/listening/offline';
import { PreviewPlayer } from '../../src/components/listening/player';
import { matchedGains, shaperCurve } from '../../src/components/listening/shaper';
import { synthesizePhrase } from '../../src/components/listening/synth';

const player = new PreviewPlayer();

Object.assign(window, {
  kneepointHarness: {
    async offlinePeaks(spec: CircuitSpec, drive: number) {
      const samples = await renderToneOffline(spec, drive);
      return harmonicPeaks(samples, CHECK_SAMPLE_RATE / CHECK_TONE_HZ, 5);
    },
    async play(specs: CircuitSpec[], drive: number) {
      const curves = specs.map((s) => shaperCurve(s, drive));
      await player.start(curves, matchedGains(curves, synthesizePhrase(24000)), 0);
    },
    level: () => player.level(),
    select: (i: number) => player.select(i),
  },
});
