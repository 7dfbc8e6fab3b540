// WAV captures are judged from their header before decoding: a cut-short data chunk is a 400 naming
// the declared and present bytes, an encoding the analysis cannot read is a 415 saying what to export.
// The files are built byte by byte here (RIFF/WAVE layout per Microsoft's "Multimedia Programming
// Interface and Data Specifications 1.0", 1991), independently of the WAV library the server uses.
import { describe, expect, it } from 'vitest';
import { DomainError } from '../../server/errors';
import { analyseWav } from '../../server/services/production/capture';

interface Fmt { tag: number; bits: number; channels?: number; rate?: number; extensible?: number }

function wav(fmt: Fmt, data: Buffer, declaredDataBytes = data.length) {
  const channels = fmt.channels ?? 1;
  const rate = fmt.rate ?? 48000;
  const blockAlign = Math.max(1, (channels * fmt.bits) / 8);
  const fmtBody = Buffer.alloc(fmt.extensible ? 40 : 16);
  fmtBody.writeUInt16LE(fmt.extensible ? 0xfffe : fmt.tag, 0);
  fmtBody.writeUInt16LE(channels, 2);
  fmtBody.writeUInt32LE(rate, 4);
  fmtBody.writeUInt32LE(rate * blockAlign, 8);
  fmtBody.writeUInt16LE(blockAlign, 12);
  fmtBody.writeUInt16LE(fmt.bits, 14);
  if (fmt.extensible) {
    fmtBody.writeUInt16LE(22, 16); // cbSize
    fmtBody.writeUInt16LE(fmt.bits, 18); // valid bits
    fmtBody.writeUInt32LE(channels === 1 ? 0x4 : 0x3, 20); // channel mask
    fmtBody.writeUInt16LE(fmt.extensible, 24); // sub-format GUID, first two bytes = the format tag
    Buffer.from('000000001000800000aa00389b71', 'hex').copy(fmtBody, 26);
  }
  const header = Buffer.alloc(12);
  header.write('RIFF', 0, 'latin1');
  header.writeUInt32LE(4 + 8 + fmtBody.length + 8 + declaredDataBytes, 4);
  header.write('WAVE', 8, 'latin1');
  const chunk = (id: string, size: number) => { const b = Buffer.alloc(8); b.write(id, 0, 'latin1'); b.writeUInt32LE(size, 4); return b; };
  return Buffer.concat([header, chunk('fmt ', fmtBody.length), fmtBody, chunk('data', declaredDataBytes), data]);
}

/** A 1 kHz tone with 10 % second harmonic (THD = 10 %), as samples in [-1, 1]. */
function toneSamples(rate = 48000, seconds = 0.5) {
  return Array.from({ length: Math.round(rate * seconds) }, (_v, i) => {
    const x = (2 * Math.PI * 1000 * i) / rate;
    return 0.6 * (Math.sin(x) + 0.1 * Math.sin(2 * x));
  });
}
const pcm16 = (s: number[]) => { const b = Buffer.alloc(s.length * 2); s.forEach((v, i) => b.writeInt16LE(Math.round(v * 32767), i * 2)); return b; };
const pcm24 = (s: number[]) => { const b = Buffer.alloc(s.length * 3); s.forEach((v, i) => b.writeIntLE(Math.round(v * 8388607), i * 3, 3)); return b; };
const float32 = (s: number[]) => { const b = Buffer.alloc(s.length * 4); s.forEach((v, i) => b.writeFloatLE(v, i * 4)); return b; };

const file = (buffer: Buffer) => ({ buffer, size: buffer.length, originalname: 'capture.wav' });
function refusal(buffer: Buffer): DomainError {
  try {
    analyseWav(file(buffer));
  } catch (error) {
    if (error instanceof DomainError) return error;
    throw error;
  }
  throw new Error('the capture was accepted');
}

describe('WAV header checks before decoding', () => {
  it('refuses a data chunk shorter than its header declares, naming both byte counts', () => {
    const full = wav({ tag: 1, bits: 16 }, pcm16(toneSamples()));
    const cut = full.subarray(0, full.length - 10_000);
    const error = refusal(cut);
    expect(error.status).toBe(400);
    // 0.5 s × 48 000 frames × 2 bytes = 48 000 bytes declared; 38 000 left after cutting 10 000.
    expect(error.fields?.capture).toMatch(/declares 48000 bytes of audio but only 38000 are present/);
  });

  it.each([
    [{ tag: 7, bits: 8 }, '8-bit µ-law'],
    [{ tag: 6, bits: 8 }, '8-bit A-law'],
    [{ tag: 0x11, bits: 4 }, '4-bit IMA ADPCM'],
    [{ tag: 2, bits: 4 }, '4-bit Microsoft ADPCM'],
    [{ tag: 3, bits: 64 }, '64-bit IEEE float'],
    [{ tag: 1, bits: 8 }, '8-bit PCM'],
    [{ tag: 0, bits: 16, extensible: 7 }, '16-bit µ-law'],
  ])('answers 415 for %j naming %s and what to export instead', (fmt, name) => {
    const error = refusal(wav(fmt, Buffer.alloc(24_000, 0x55)));
    expect(error.status).toBe(415);
    expect(error.message).toContain(name);
    expect(error.fields?.capture).toContain('export the capture as 16- or 24-bit PCM or 32-bit float WAV');
  });

  it('refuses a declared length over the limit before decoding', () => {
    // 11 s of 16-bit mono at 48 kHz declared (1 056 000 bytes) and present: above the 10 s limit.
    const error = refusal(wav({ tag: 1, bits: 16 }, Buffer.alloc(11 * 48000 * 2)));
    expect(error.status).toBe(400);
    expect(error.fields?.capture).toMatch(/11\.00 s/);
  });

  it('refuses a file without RIFF/WAVE or without samples', () => {
    expect(refusal(Buffer.from('RIFF\0\0\0\0WAVEfmt ')).fields?.capture).toMatch(/format chunk/);
    expect(refusal(Buffer.from('not a wav at all')).fields?.capture).toMatch(/Not a WAV file/);
  });

  it.each([
    ['16-bit PCM', wav({ tag: 1, bits: 16 }, pcm16(toneSamples()))],
    ['24-bit PCM (extensible)', wav({ tag: 0, bits: 24, extensible: 1 }, pcm24(toneSamples()))],
    ['32-bit float', wav({ tag: 3, bits: 32 }, float32(toneSamples()))],
  ] as const)('analyses %s: THD of a tone with a tenth second harmonic', (_name, buffer) => {
    const result = analyseWav(file(buffer));
    expect(result.thdFPercent).toBeCloseTo(10, 0);
    expect(result.fundamentalHz).toBeCloseTo(1000, 0);
  });
});
