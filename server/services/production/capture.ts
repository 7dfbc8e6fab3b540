import wavefile from 'wavefile';
import { CAPTURE_LIMITS } from '../../../shared/schemas/production';
import { analyseCapture } from '../../../shared/production/wav-analysis';
import { invalid, tooLarge } from '../../errors';

// wavefile is CommonJS: its class comes off the default export under Node's ESM loader.
const { WaveFile } = wavefile;
type WaveFile = InstanceType<typeof WaveFile>;

/** Reads a WAV capture (mono or stereo, 44.1/48/96 kHz, limited length) and analyses its test tone. */
export function analyseWav(file: { buffer: Buffer; size: number; originalname: string }) {
  if (file.size > CAPTURE_LIMITS.maxBytes) throw tooLarge(`The capture is ${(file.size / 1048576).toFixed(1)} MB: at most ${CAPTURE_LIMITS.maxBytes / 1048576} MB`);
  const head = file.buffer.subarray(0, 12).toString('latin1');
  if (head.slice(0, 4) !== 'RIFF' || head.slice(8, 12) !== 'WAVE') throw invalid('The capture must be a WAV file', { capture: 'Not a WAV file (RIFF/WAVE header missing)' });
  let wav: WaveFile;
  try {
    wav = new WaveFile(file.buffer);
  } catch (error) {
    throw invalid('The WAV file cannot be read', { capture: `Unreadable WAV: ${(error as Error).message}` });
  }
  const fmt = wav.fmt as { sampleRate: number; numChannels: number; bitsPerSample: number };
  if (!CAPTURE_LIMITS.sampleRates.includes(fmt.sampleRate)) {
    throw invalid('Unsupported sample rate', { capture: `${fmt.sampleRate} Hz: use 44.1, 48 or 96 kHz` });
  }
  if (fmt.numChannels < 1 || fmt.numChannels > 2) throw invalid('Mono or stereo only', { capture: `${fmt.numChannels} channels: use mono or stereo` });
  let channels: Float64Array[];
  try {
    const raw = wav.getSamples(false, Float64Array) as unknown as Float64Array | Float64Array[];
    channels = fmt.numChannels === 1 ? [raw as Float64Array] : (raw as Float64Array[]);
  } catch (error) {
    throw invalid('The WAV samples cannot be read', { capture: `Unreadable samples: ${(error as Error).message}` });
  }
  const frames = channels[0].length;
  const durationS = frames / fmt.sampleRate;
  if (durationS < CAPTURE_LIMITS.minSeconds || durationS > CAPTURE_LIMITS.maxSeconds) {
    throw invalid('The capture is too short or too long', { capture: `${durationS.toFixed(2)} s: use ${CAPTURE_LIMITS.minSeconds}–${CAPTURE_LIMITS.maxSeconds} s of the test tone` });
  }
  // The left channel is the unit's output; a stereo capture is analysed from it alone, as the jig wires it.
  const samples = channels[0];
  try {
    const result = analyseCapture(samples, fmt.sampleRate);
    return { ...result, channels: fmt.numChannels, bitsPerSample: fmt.bitsPerSample, durationS };
  } catch (error) {
    throw invalid('No test tone found in the capture', { capture: (error as Error).message });
  }
}
