/** What the numbers mean to a player, without promises the physics cannot keep. */
export function HarmonicsExplainer() {
  return (
    <section aria-labelledby="explain-heading" className="rounded-lg border border-spruce-700/20 bg-white p-5">
      <h2 id="explain-heading" className="text-xl font-bold text-spruce-900">Even and odd harmonics, in plain words</h2>
      <div className="mt-3 grid gap-4 text-ink md:grid-cols-2">
        <p>
          When diodes clip your signal they add new tones above each note, at whole multiples of its pitch: the harmonics. <strong>Even</strong> ones
          (the 2nd, 4th …) sit an octave, and two octaves, above the note. They tend to thicken the sound without making it harsher, and they come from
          an <em>uneven</em> clip — different devices, or different counts, on the two sides.
        </p>
        <p>
          <strong>Odd</strong> ones (the 3rd, 5th …) land an octave and a fifth above and higher. They make the sound edgier and more compressed, and
          they dominate when the clip is symmetric. Turn the drive up and every option moves towards odd harmonics and a squarer wave; THD tells you how
          much of the sound is these added tones. Neither family is better: it is a matter of taste, and your amp and guitar matter as much.
        </p>
      </div>
    </section>
  );
}
