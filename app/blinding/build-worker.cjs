// Worker thread of ./build-workers.ts: makes the images of the cases it is sent
// (./case-images.ts), handing each back and waiting for the build to take it before going on.
// CommonJS on purpose: tsx's CommonJS hook compiles the TypeScript it requires in this thread.
require('tsx/cjs/api').register();
const { parentPort } = require('node:worker_threads');
const { makeCaseImages } = require('./case-images.ts');

const waiting = new Map();
let nextSeq = 0;

parentPort.on('message', async (m) => {
  if (m.type === 'taken') {
    waiting.get(m.seq)?.();
    waiting.delete(m.seq);
    return;
  }
  const emit = (image) => new Promise((taken) => {
    const seq = ++nextSeq;
    waiting.set(seq, taken);
    parentPort.postMessage({ type: 'image', id: m.id, seq, image }, image.kind === 'method' ? [image.image.bytes.buffer] : []);
  });
  try {
    const done = await makeCaseImages(m.job, emit);
    parentPort.postMessage({ type: 'done', id: m.id, done });
  } catch (e) {
    const error = e instanceof Error ? { name: e.name, message: e.message, problems: e.problems } : { name: 'Error', message: String(e) };
    parentPort.postMessage({ type: 'error', id: m.id, error });
  }
});
