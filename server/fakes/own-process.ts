// How a local fake runs as a program of its own (`tsx server/fakes/<name>/main.ts`, and under
// `npm start`'s supervisor): one place for starting it, saying where it listens, and stopping it.

/**
 * Starts a fake, prints the line `describe` makes of it, and closes it once, then exits, on SIGINT or
 * SIGTERM, or when the supervisor that started it (holding an IPC channel) goes away.
 */
export async function runFakeProcess<F extends { close(): Promise<void> }>(start: () => Promise<F>, describe: (fake: F) => string): Promise<F> {
  const fake = await start();
  console.log(describe(fake));
  let stopping = false;
  const stop = () => {
    if (stopping) return;
    stopping = true;
    void fake.close().then(() => process.exit(0));
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
  // Under `npm start` the supervisor holds an IPC channel: if it goes away, so does this fake.
  if (process.send) {
    process.on('disconnect', stop);
    process.channel?.unref();
  }
  return fake;
}
