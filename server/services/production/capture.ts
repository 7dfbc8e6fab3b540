import wavefile from 'wavefile';
import { CAPTURE_LIMITS } from '../../../shared/schemas/production';
import { analyseCapture } from '../../../shared/production/wav-analysis';
import { thdFromAmplitudes, type CaptureReading } from '../../../shared/production/capture-check';
import { invalid, tooLarge, unsupportedMedia } from '../../errors';
import { readWavHeader, SUPPORTED_ENCODINGS, WAVE_FORMAT_IEEE_FLOAT } from './wav-header';

// wavefile is CommonJS: its class comes off the default export under Node's ESM loader.
const { WaveFile } = wavefile;
type WaveFile = InstanceType<typeof WaveFile>;

/**
 * Full scale of a sample format: 1.0 for float; the largest positive code for integer PCM, so a sine
 * whose positive peak just reaches it reads 1.0 (the full-scale convention of AES17, from memory).
 */
export function fullScaleOf(formatTag: number, bitsPerSample: number) {
  return formatTag === WAVE_FORMAT_IEEE_FLOAT ? 1 : 2 ** (bitsPerSample - 1) - 1;
}

/** Reads a WAV capture (mono or stereo, 44.1/48/96 kHz, limited length) and analyses its test tone. */
export function analyseWav(file: { buffer: Buffer; size: number; originalname: string }): CaptureReading {
  if (file.size > CAPTURE_LIMITS.maxBytes) throw tooLarge(`The capture is ${(file.size / 1048576).toFixed(1)} MB: at most ${CAPTURE_LIMITS.maxBytes / 1048576} MB`);
  // Everything the header can tell is checked before a single sample is decoded.
  const header = readWavHeader(file.buffer);
  if ('kind' in header) {
    if (header.kind === 'not-wav') throw invalid('The capture must be a WAV file', { capture: header.detail });
    if (header.kind === 'truncated') {
      throw invalid('The WAV file is cut short', { capture: `The header declares ${header.declared} bytes of audio but only ${header.present} are present: export or copy the capture again` });
    }
    throw unsupportedMedia(`${header.format} WAV captures cannot be analysed`, { capture: `${header.format} is not supported: export the capture as ${SUPPORTED_ENCODINGS}` });
  }
  if (!CAPTURE_LIMITS.sampleRates.includes(header.sampleRate)) {
    throw invalid('Unsupported sample rate', { capture: `${header.sampleRate} Hz: use 44.1, 48 or 96 kHz` });
  }
  if (header.channels < 1 || header.channels > 2) throw invalid('Mono or stereo only', { capture: `${header.channels} channels: use mono or stereo` });
  const declaredSeconds = header.declaredDataBytes / (header.channels * (header.bitsPerSample / 8)) / header.sampleRate;
  if (declaredSeconds < CAPTURE_LIMITS.minSeconds || declaredSeconds > CAPTURE_LIMITS.maxSeconds) {
    throw invalid('The capture is too short or too long', { capture: `${declaredSeconds.toFixed(2)} s: use ${CAPTURE_LIMITS.minSeconds}–${CAPTURE_LIMITS.maxSeconds} s of the test tone` });
  }
  let wav: WaveFile;
  try {
    wav = new WaveFile(file.buffer);
  } catch (error) {
    throw invalid('The WAV file cannot be read', { capture: `Unreadable WAV: ${(error as Error).message}` });
  }
  const fmt = { sampleRate: header.sampleRate, numChannels: header.channels, bitsPerSample: header.bitsPerSample };
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
  let result: ReturnType<typeof analyseCapture>;
  try {
    result = analyseCapture(samples, fmt.sampleRate);
  } catch (error) {
    throw invalid('No test tone found in the capture', { capture: (error as Error).message });
  }
  const fullScale = fullScaleOf(header.formatTag, header.bitsPerSample);
  const harmonics = result.harmonics.map((h) => ({ order: h.order, amplitudeFs: h.amplitude / fullScale, dbc: h.dbc }));
  const thd = thdFromAmplitudes(harmonics.map((h) => ({ order: h.order, amplitude: h.amplitudeFs })));
  return {
    fundamentalHz: result.fundamentalHz, sampleRate: fmt.sampleRate, channels: fmt.numChannels, bitsPerSample: fmt.bitsPerSample, durationS,
    harmonics, thdFPercent: thd.thdFPercent, thdRPercent: thd.thdRPercent,
  };
}
