// Loaded into the server by bench/server-memory.ts (`node --import ./bench/memory-probe.mjs ...`): on SIGUSR2
// it writes the process's own view of its memory (process.memoryUsage and V8's heap spaces) to the file named in
// MEM_PROBE_OUT, and a heap snapshot to MEM_PROBE_SNAPSHOT-<n>.heapsnapshot (the n-th signal) when that is set
// (open it in Chrome's DevTools, Memory tab). Nothing else: the server's code is not touched, and the handler runs only when asked.
import fs from 'node:fs';
import v8 from 'node:v8';

let signals = 0;
process.on('SIGUSR2', () => {
  const out = process.env.MEM_PROBE_OUT;
  if (!out) return;
  const spaces = Object.fromEntries(v8.getHeapSpaceStatistics().map((s) => [s.space_name, { size: s.space_size, used: s.space_used_size }]));
  const text = JSON.stringify({ memory: process.memoryUsage(), spaces });
  signals++;
  if (process.env.MEM_PROBE_SNAPSHOT) v8.writeHeapSnapshot(`${process.env.MEM_PROBE_SNAPSHOT}-${signals}.heapsnapshot`);
  // Written whole, then renamed: the bench polls for the file and must not read half of it.
  fs.writeFileSync(`${out}.part`, text);
  fs.renameSync(`${out}.part`, out);
});
