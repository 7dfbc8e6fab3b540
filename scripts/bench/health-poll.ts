// The web process's responsiveness as a client sees it during a benchmark: GET /api/health again
// and again (20 ms apart) while other work runs, each answer's latency kept.

/** Starts polling `${base}/api/health`; `stop()` waits for the poll in flight and answers every latency in ms. */
export function pollHealth(base: string) {
  const latencies: number[] = [];
  let running = true;
  const poller = (async () => {
    while (running) {
      const t = performance.now();
      await fetch(`${base}/api/health`).then((r) => r.arrayBuffer());
      latencies.push(performance.now() - t);
      await new Promise((resolve) => setTimeout(resolve, 20));
    }
  })();
  return {
    stop: async () => {
      running = false;
      await poller;
      return latencies;
    },
  };
}
