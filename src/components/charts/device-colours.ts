// The colour a clipping device is drawn in, following the device: an LED in the colour it
// glows, a white LED in a grey that shows on the chart's white background (dashed, so it is not
// read as a plain grey device), bare diodes in the palette's dark tones by kind. Every chart that
// draws devices takes its colours from here.

export interface DeviceLook {
  colour: string;
  dashed?: boolean;
}

const LED_LOOKS: [RegExp, DeviceLook][] = [
  [/\bred\b/i, { colour: '#d42a2a' }],
  [/\borange|amber\b/i, { colour: '#e8741c' }],
  [/\byellow\b/i, { colour: '#d9a400' }],
  [/\bgreen\b/i, { colour: '#2e9b3e' }],
  [/\bblue\b/i, { colour: '#2563d9' }],
  [/\bviolet|purple|uv\b/i, { colour: '#7b3fc4' }],
  [/\bwhite\b/i, { colour: '#8a949c', dashed: true }],
];

const KIND_LOOKS: Record<string, DeviceLook> = {
  silicon: { colour: '#1c1b19' },
  schottky: { colour: '#3c5249' },
  germanium: { colour: '#8a5a2b' },
  led: { colour: '#c0602f' },
  other: { colour: '#6b6459' },
};

/** How to draw one device, e.g. {presetKey: 'led-blue'} → blue; a custom "Blue LED, 3 mm" → blue too. */
export function deviceLook(device: { name: string; kind: string; presetKey?: string | null }): DeviceLook {
  const words = `${device.presetKey?.replace(/-/g, ' ') ?? ''} ${device.name}`;
  if (device.kind === 'led' || /\bled\b/i.test(words)) {
    const match = LED_LOOKS.find(([pattern]) => pattern.test(words));
    if (match) return match[1];
  }
  if (device.presetKey === 'si-rectifier') return { colour: '#5b6b8c' };
  return KIND_LOOKS[device.kind] ?? KIND_LOOKS.other;
}
