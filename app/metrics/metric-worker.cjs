// Worker thread of ./metric-workers.ts: computes the slice parts of the jobs it is sent.
// CommonJS on purpose: tsx's CommonJS hook compiles the TypeScript it requires in this thread,
// which starts in about 0.1 s (an ES module loader would first start a hooks thread of its own).
require('tsx/cjs/api').register();
const { parentPort } = require('node:worker_threads');
const { computeSliceParts } = require('./slice-parts.ts');

parentPort.on('message', ({ id, job }) => {
  try {
    const parts = computeSliceParts(job);
    const transfer = parts.ssim ? [parts.ssim.mean.buffer, parts.ssim.maskedSum.buffer, parts.ssim.maskedCount.buffer] : [];
    parentPort.postMessage({ id, parts }, transfer);
  } catch (e) {
    parentPort.postMessage({ id, error: e instanceof Error ? e.message : String(e) });
  }
});
