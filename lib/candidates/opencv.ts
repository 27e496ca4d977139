// Loads OpenCV (the official opencv.js build, packaged as @techstark/opencv-js) once per
// process, on first use.
//
// Two quirks of that build are handled here:
// - On Node it adds process-wide 'uncaughtException' and 'unhandledRejection' listeners
//   (the second aborts the WebAssembly runtime, which then throws out of the listener and
//   ends the process). An app server must keep its own handling of stray rejections, so the
//   listeners it adds are taken off again.
// - Its module object is a thenable that resolves to itself: handed to resolve(), or
//   awaited as the namespace of a dynamic import(), it would be adopted again and again,
//   forever. So it is loaded with require(), and we wait for the runtime's callback and
//   hand back a wrapper.
import { createRequire } from 'node:module';
import type cvNamespace from '@techstark/opencv-js';

export type OpenCv = typeof cvNamespace;

let loading: Promise<{ cv: OpenCv }> | undefined;

const EVENTS = ['uncaughtException', 'unhandledRejection'] as const;
type Listener = (...args: unknown[]) => void;
const listeners = (e: (typeof EVENTS)[number]) => process.listeners(e as 'uncaughtException') as unknown as Listener[];

export function loadOpenCv(): Promise<{ cv: OpenCv }> {
  loading ??= (async () => {
    const before = new Map(EVENTS.map((e) => [e, new Set(listeners(e))]));
    const mod = createRequire(import.meta.url)('@techstark/opencv-js') as OpenCv;
    for (const e of EVENTS) {
      for (const l of listeners(e)) if (!before.get(e)!.has(l)) process.removeListener(e, l);
    }
    const m = mod as OpenCv & { Mat?: unknown; onRuntimeInitialized?: () => void };
    return new Promise<{ cv: OpenCv }>((resolve) => {
      if (typeof m.Mat === 'function') resolve({ cv: m });
      else m.onRuntimeInitialized = () => resolve({ cv: m });
    });
  })();
  return loading;
}
