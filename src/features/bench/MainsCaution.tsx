/** Shown on every test-bench screen. */
export function MainsCaution() {
  return (
    <p role="note" className="mb-4 rounded-md border-2 border-alarm-700 bg-alarm-100 p-3 font-semibold text-alarm-700">
      Caution: the test gear runs on mains power, and amplifiers hold lethal voltages even when unplugged. Only qualified people
      open mains equipment or amplifiers; pedals are tested from their 9 V / 18 V DC supply. Follow local codes and licensed practice.
    </p>
  );
}
