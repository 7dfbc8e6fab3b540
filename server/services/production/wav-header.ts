// A WAV's header, read from its bytes before anything is decoded: the decoder trusts the header,
// so a cut-short file or an encoding the analysis cannot use is refused here, in words a tester
// can act on, without spending time on the samples.
// Layout: RIFF/WAVE chunks; `fmt ` (WAVEFORMATEX, Microsoft "Multimedia Programming Interface and
// Data Specifications 1.0", 1991, plus WAVE_FORMAT_EXTENSIBLE) and `data`.

export interface WavHeader {
  formatTag: number;
  channels: number;
  sampleRate: number;
  blockAlign: number;
  bitsPerSample: number;
  /** Byte offset of the samples and their size as the header declares it. */
  dataOffset: number;
  declaredDataBytes: number;
  presentDataBytes: number;
}

export type WavProblem =
  | { kind: 'not-wav'; detail: string }
  | { kind: 'truncated'; declared: number; present: number }
  | { kind: 'unsupported'; format: string };

const WAVE_FORMAT_PCM = 0x0001;
export const WAVE_FORMAT_IEEE_FLOAT = 0x0003;
const WAVE_FORMAT_EXTENSIBLE = 0xfffe;

// Format tags from the registered list (mmreg.h), named so a 415 says what the file is.
const FORMAT_NAMES: Record<number, string> = {
  0x0001: 'PCM', 0x0002: 'Microsoft ADPCM', 0x0003: 'IEEE float', 0x0006: 'A-law', 0x0007: 'µ-law',
  0x0011: 'IMA ADPCM', 0x0031: 'GSM 6.10', 0x0050: 'MPEG', 0x0055: 'MP3',
};

/** The encodings the analysis reads: 16/24/32-bit integer PCM and 32-bit float. */
export const SUPPORTED_ENCODINGS = '16- or 24-bit PCM or 32-bit float WAV';

export function formatName(tag: number, bits: number): string {
  const name = FORMAT_NAMES[tag] ?? `format 0x${tag.toString(16).padStart(4, '0')}`;
  return bits > 0 ? `${bits}-bit ${name}` : name;
}

function supported(tag: number, bits: number): boolean {
  if (tag === WAVE_FORMAT_PCM) return bits === 16 || bits === 24 || bits === 32;
  if (tag === WAVE_FORMAT_IEEE_FLOAT) return bits === 32;
  return false;
}

/** Reads the header; returns the problem instead when the file cannot be analysed as it is. */
export function readWavHeader(buf: Buffer): WavHeader | WavProblem {
  if (buf.length < 12 || buf.toString('latin1', 0, 4) !== 'RIFF' || buf.toString('latin1', 8, 12) !== 'WAVE') {
    return { kind: 'not-wav', detail: 'Not a WAV file (RIFF/WAVE header missing)' };
  }
  let fmt: Omit<WavHeader, 'dataOffset' | 'declaredDataBytes' | 'presentDataBytes'> | null = null;
  let offset = 12;
  while (offset + 8 <= buf.length) {
    const id = buf.toString('latin1', offset, offset + 4);
    const size = buf.readUInt32LE(offset + 4);
    const body = offset + 8;
    if (id === 'fmt ') {
      if (size < 16 || body + 16 > buf.length) return { kind: 'not-wav', detail: 'The WAV format chunk is incomplete' };
      let formatTag = buf.readUInt16LE(body);
      const bitsPerSample = buf.readUInt16LE(body + 14);
      // WAVE_FORMAT_EXTENSIBLE carries the real format in the first two bytes of its sub-format GUID.
      if (formatTag === WAVE_FORMAT_EXTENSIBLE && size >= 40 && body + 26 <= buf.length) formatTag = buf.readUInt16LE(body + 24);
      fmt = { formatTag, channels: buf.readUInt16LE(body + 2), sampleRate: buf.readUInt32LE(body + 4), blockAlign: buf.readUInt16LE(body + 12), bitsPerSample };
    } else if (id === 'data') {
      if (!fmt) return { kind: 'not-wav', detail: 'The WAV has no format chunk before its samples' };
      if (!supported(fmt.formatTag, fmt.bitsPerSample)) return { kind: 'unsupported', format: formatName(fmt.formatTag, fmt.bitsPerSample) };
      const present = buf.length - body;
      if (present < size) return { kind: 'truncated', declared: size, present };
      return { ...fmt, dataOffset: body, declaredDataBytes: size, presentDataBytes: present };
    }
    // Chunks are padded to an even length.
    offset = body + size + (size % 2);
  }
  if (fmt && !supported(fmt.formatTag, fmt.bitsPerSample)) return { kind: 'unsupported', format: formatName(fmt.formatTag, fmt.bitsPerSample) };
  return { kind: 'not-wav', detail: fmt ? 'The WAV has no data chunk (no samples)' : 'The WAV has no format chunk' };
}
